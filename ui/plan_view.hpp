// The plan view's map transform (survey easting/northing <-> screen pixels), exposed so tests can
// find a known world point in a screenshot. Grid north is up.
#pragma once

#include <imgui.h>

#include "engine/snapshot.hpp"
#include "ui/layout.hpp"

namespace sg::ui {

struct PlanTransform {
    double center_e = 0.0, center_n = 0.0;  // world point at the centre of the view, metres
    double px_per_m = 1.0;                  // zoom, > 0
    ImVec2 rect_center{0, 0};               // screen pixel of the centre

    ImVec2 toScreen(engine::PointEN p) const {
        return {static_cast<float>(rect_center.x + (p.e_m - center_e) * px_per_m),
                static_cast<float>(rect_center.y - (p.n_m - center_n) * px_per_m)};
    }
    engine::PointEN toWorld(ImVec2 s) const {
        return {center_e + (s.x - rect_center.x) / px_per_m, center_n - (s.y - rect_center.y) / px_per_m};
    }
};

struct BoundsEN {
    double min_e = 0, min_n = 0, max_e = 0, max_n = 0;
    bool valid = false;
    void add(engine::PointEN p);
};

// What the plan view shows when it fits the survey: the area of interest, else the planned
// lines, else the covered tiles, else the vessel.
BoundsEN surveyBounds(const engine::Snapshot& snapshot);

// The coverage tiles the plan draws: a site's whole coverage, or this session's own when the
// operator hides earlier sessions (only where the snapshot has earlier sessions).
const std::vector<engine::CoverageTileView>& planTiles(const engine::Snapshot& snapshot, bool hide_earlier);

// A transform showing `b` whole inside `rect` with a 5 % margin on each side.
PlanTransform fitTransform(const BoundsEN& b, const Rect& rect);

}  // namespace sg::ui
