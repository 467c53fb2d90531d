# bench_ui draws the screen without a GPU: it needs the ImGui screen library.
if(TARGET sg_ui)
  target_link_libraries(bench_ui PRIVATE sg_ui)
else()
  set_target_properties(bench_ui PROPERTIES EXCLUDE_FROM_ALL ON)
endif()
