// Screen layout: toolbar on top, plan view on the left, time plots above tabbed panels on the
// right, replay strip and status bar at the bottom.
#include "ui/layout.hpp"

#include "ui/settings.hpp"

#include <algorithm>
#include <cmath>

namespace sg::ui {

Layout computeLayout(ImVec2 display, float scale, bool replay, bool banner) {
    const float w = display.x, h = display.y;
    // Strips hold one row of widgets: text height (kBaseFontPx) + frame padding (2 x 3) + window
    // padding (2 x 8), all scaled like ImGui's style (ScaleAllSizes); never below ImGui's minimum
    // window height (32 scaled), or the window would grow past the slot and off the screen.
    const float row = kBaseFontPx + 2 * 3.0f + 2 * 8.0f;
    const float toolbar_h = std::round(std::max(row, 32.0f) * scale);
    const float status_h = std::round(std::max(kBaseFontPx + 2 * 8.0f + 4.0f, 32.0f) * scale);
    const float replay_h = replay ? std::round(std::max(row + 4.0f, 36.0f) * scale) : 0.0f;
    // The alert strip grows with the scale up to a fifth of the window height (never below its
    // scale-1 height): at 2.5 on 1280x800 it would otherwise take over a quarter of the screen. A
    // fifth still holds the two acknowledge buttons stacked at 2.5 (2 x 50 px and the stripes).
    const float banner_h = std::round(std::min(86.0f * scale, std::max(86.0f, 0.2f * h)));
    const float body_top = toolbar_h + (banner ? banner_h : 0.0f);
    const float body_bottom = std::max(body_top + 10.0f, h - status_h - replay_h);
    // The right column (plots, lists, their toggles) needs more of a narrow window as text grows.
    const float plan_share = std::clamp(0.56f - 0.06f * (scale - 1.0f), 0.44f, 0.56f);
    const float plan_w = std::round(std::clamp(w * plan_share, 200.0f, w));
    const float plots_h = std::round((body_bottom - body_top) * 0.62f);

    Layout l;
    l.toolbar = {{0, 0}, {w, toolbar_h}};
    l.plan = {{0, body_top}, {plan_w, body_bottom}};
    l.plots = {{plan_w, body_top}, {w, body_top + plots_h}};
    l.tabs = {{plan_w, body_top + plots_h}, {w, body_bottom}};
    l.replay = {{0, body_bottom}, {w, body_bottom + replay_h}};
    l.status = {{0, h - status_h}, {w, h}};
    l.banner = {{0, toolbar_h}, {w, toolbar_h + banner_h}};
    return l;
}

}  // namespace sg::ui
