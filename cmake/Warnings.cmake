# Per-target warnings: sg_set_warnings(target) on every target the project builds.
function(sg_set_warnings target)
  target_compile_options(${target} PRIVATE -Wall -Wextra -Wpedantic -Wshadow -Wconversion
    -Wno-sign-conversion -Wnon-virtual-dtor -Wold-style-cast -Wcast-align -Woverloaded-virtual
    -Wformat=2 -Wimplicit-fallthrough)
  if(SG_WERROR)
    target_compile_options(${target} PRIVATE -Werror)
  endif()
  if(SG_SANITIZE)
    target_compile_options(${target} PRIVATE -fsanitize=address,undefined -fno-omit-frame-pointer)
    target_link_options(${target} PRIVATE -fsanitize=address,undefined)
  endif()
endfunction()

# A core module: src/<name>/*.cpp as static library sg_<name>, headers included as "<name>/x.hpp".
function(sg_add_module name)
  cmake_parse_arguments(M "" "" "DEPS" ${ARGN})
  file(GLOB srcs CONFIGURE_DEPENDS ${CMAKE_CURRENT_SOURCE_DIR}/${name}/*.cpp)
  if(srcs)
    add_library(sg_${name} STATIC ${srcs})
    target_include_directories(sg_${name} PUBLIC ${PROJECT_SOURCE_DIR}/src)
    target_link_libraries(sg_${name} PUBLIC ${M_DEPS})
    sg_set_warnings(sg_${name})
  else()
    add_library(sg_${name} INTERFACE)
    target_include_directories(sg_${name} INTERFACE ${PROJECT_SOURCE_DIR}/src)
    target_link_libraries(sg_${name} INTERFACE ${M_DEPS})
  endif()
endfunction()
