# GEOS (Debian libgeos-dev) is the outside reference for coverage areas: its C API via GEOS::geos_c.
find_package(GEOS REQUIRED CONFIG)
target_link_libraries(${target} PRIVATE GEOS::geos_c)
