# test_ui draws the screen: it needs the ImGui screen library (and starts its own Xvfb when
# DISPLAY is not set, see test_screen.cpp).
target_link_libraries(${target} PRIVATE sg_ui)
# test_screen_replay.cpp records the demo at 20x through the real `swathguard record` and
# `swathguard-sim` binaries.
add_dependencies(${target} swathguard swathguard-sim)
