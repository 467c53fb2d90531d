# test_ui draws the screen: it needs the ImGui screen library (and starts its own Xvfb when
# DISPLAY is not set, see test_screen.cpp).
target_link_libraries(${target} PRIVATE sg_ui)
