# The loopback test runs the real `swathguard record` and `swathguard-sim` binaries.
add_dependencies(test_engine swathguard swathguard-sim)
# GEOS (Debian libgeos-dev) is the outside reference of the generated truth survey.
find_package(GEOS REQUIRED CONFIG)
target_link_libraries(${target} PRIVATE GEOS::geos_c)
