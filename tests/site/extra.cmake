# The site tests run the real `swathguard` binary (demo, gaps, replay, record) on logs they make.
add_dependencies(test_site swathguard swathguard-sim)
target_include_directories(test_site PRIVATE ${PROJECT_SOURCE_DIR}/tests)
