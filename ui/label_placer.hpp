// Greedy label placement for the plan view: each label tries a short list of candidate
// positions around its anchor, in order, and takes the first whose rectangle lies inside the view
// and overlaps no rectangle placed or blocked before it; a label with no free candidate is
// skipped. Labels are placed in priority order (the caller's order), so what matters most wins.
// Pure arithmetic on screen rectangles: tested in tests/ui/test_labels.cpp.
#pragma once

#include <optional>
#include <string>
#include <vector>

#include "ui/layout.hpp"

namespace sg::ui {

// Where a label goes relative to its anchor point (screen y grows downwards).
enum class LabelSpot {
    kRight,       // left edge at anchor + gap, vertically centred
    kLeft,        // right edge at anchor - gap, vertically centred
    kAbove,       // bottom edge at anchor - gap, horizontally centred
    kBelow,       // top edge at anchor + gap, horizontally centred
    kAboveRight,  // bottom-left corner at anchor + (gap, -gap)
    kBelowRight,  // top-left corner at anchor + (gap, gap)
    kAboveLeft,   // bottom-right corner at anchor + (-gap, -gap)
    kBelowLeft,   // top-right corner at anchor + (-gap, gap)
};

// The rectangle of a label of `size` at `spot` around `anchor`, `gap` pixels away.
Rect labelRect(ImVec2 anchor, ImVec2 size, LabelSpot spot, float gap);

// Candidate spots that keep a label off a line leaving `anchor` in direction `dir` (screen
// vector, need not be unit): beyond the end along the line first, then beside it.
std::vector<LabelSpot> spotsBeyond(ImVec2 dir);

class LabelPlacer {
public:
    // bounds: labels must lie wholly inside; pad: extra clearance kept around every placed label.
    explicit LabelPlacer(Rect bounds, float pad = 2.0f) : m_bounds(bounds), m_pad(pad) {}
    // An area no label may cover (controls, legend, scale bar...).
    void block(const Rect& r) { m_taken.push_back(r); }
    // First free candidate, or nothing (the label is then not drawn). On success the rectangle is
    // taken.
    std::optional<Rect> place(ImVec2 anchor, ImVec2 size, const std::vector<LabelSpot>& spots, float gap);
    bool isFree(const Rect& r) const;
    const std::vector<Rect>& taken() const { return m_taken; }

private:
    Rect m_bounds;
    float m_pad;
    std::vector<Rect> m_taken;
};

// True when the two rectangles share interior area.
inline bool overlaps(const Rect& a, const Rect& b) {
    return a.min.x < b.max.x && b.min.x < a.max.x && a.min.y < b.max.y && b.min.y < a.max.y;
}

// An area rounded to what a gap's area means on a raster of cells (~1 m): below 100 m2 to the
// nearest 10 m2, below 10 000 m2 to two significant figures, then hectares to 0.1 ha.
// "30 m²", "1200 m²", "2.4 ha".
std::string roundedArea(double area_m2);
// A distance rounded for a label: below 10 m to 0.1 m, below 1 km to 1 m, then km to 0.01 km.
std::string roundedDistance(double metres);

}  // namespace sg::ui
