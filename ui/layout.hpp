// Where each slot of the screen goes for a given window size and UI scale. Pure arithmetic, so
// tests can find the plan view or the banner in a screenshot.
#pragma once

#include <imgui.h>

namespace sg::ui {

struct Rect {
    ImVec2 min, max;
    float width() const { return max.x - min.x; }
    float height() const { return max.y - min.y; }
    bool contains(ImVec2 p) const { return p.x >= min.x && p.x < max.x && p.y >= min.y && p.y < max.y; }
};

struct Layout {
    Rect toolbar, plan, plots, tabs, replay, status;
    Rect banner;  // the alarm banner's largest extent (under the toolbar, full width)
};

// display: window size in pixels; scale: UI scale; replay: whether the replay strip is shown;
// banner: whether the alarm banner is shown (the panels move down to make room for it, so it
// never hides the plots or the plan view's controls).
Layout computeLayout(ImVec2 display, float scale, bool replay, bool banner);

}  // namespace sg::ui
