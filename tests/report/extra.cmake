# The report tests link the report library, and the command-line test runs the real binary.
target_link_libraries(test_report PRIVATE sg_report)
target_include_directories(test_report PRIVATE ${PROJECT_SOURCE_DIR}/tests)
add_dependencies(test_report swathguard)
find_package(GEOS REQUIRED CONFIG)
target_link_libraries(test_report PRIVATE GEOS::geos_c)
