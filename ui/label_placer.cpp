// Greedy label placement; see label_placer.hpp.
#include "ui/label_placer.hpp"

#include <algorithm>
#include <cmath>
#include <cstdio>

namespace sg::ui {

Rect labelRect(ImVec2 a, ImVec2 s, LabelSpot spot, float g) {
    float x = 0, y = 0;  // top-left
    switch (spot) {
        case LabelSpot::kRight: x = a.x + g; y = a.y - s.y * 0.5f; break;
        case LabelSpot::kLeft: x = a.x - g - s.x; y = a.y - s.y * 0.5f; break;
        case LabelSpot::kAbove: x = a.x - s.x * 0.5f; y = a.y - g - s.y; break;
        case LabelSpot::kBelow: x = a.x - s.x * 0.5f; y = a.y + g; break;
        case LabelSpot::kAboveRight: x = a.x + g; y = a.y - g - s.y; break;
        case LabelSpot::kBelowRight: x = a.x + g; y = a.y + g; break;
        case LabelSpot::kAboveLeft: x = a.x - g - s.x; y = a.y - g - s.y; break;
        case LabelSpot::kBelowLeft: x = a.x - g - s.x; y = a.y + g; break;
    }
    return {{x, y}, {x + s.x, y + s.y}};
}

std::vector<LabelSpot> spotsBeyond(ImVec2 d) {
    using S = LabelSpot;
    const bool horizontal = std::fabs(d.x) >= std::fabs(d.y);
    if (horizontal) {
        // Beyond the end along the line, then above/below the end, then beside but further back.
        return d.x >= 0 ? std::vector<S>{S::kRight, S::kAboveRight, S::kBelowRight, S::kAboveLeft, S::kBelowLeft}
                        : std::vector<S>{S::kLeft, S::kAboveLeft, S::kBelowLeft, S::kAboveRight, S::kBelowRight};
    }
    return d.y >= 0 ? std::vector<S>{S::kBelow, S::kBelowRight, S::kBelowLeft, S::kRight, S::kLeft}
                    : std::vector<S>{S::kAbove, S::kAboveRight, S::kAboveLeft, S::kRight, S::kLeft};
}

bool LabelPlacer::isFree(const Rect& r) const {
    if (r.min.x < m_bounds.min.x || r.min.y < m_bounds.min.y || r.max.x > m_bounds.max.x || r.max.y > m_bounds.max.y)
        return false;
    const Rect padded{{r.min.x - m_pad, r.min.y - m_pad}, {r.max.x + m_pad, r.max.y + m_pad}};
    for (const Rect& t : m_taken)
        if (overlaps(padded, t)) return false;
    return true;
}

std::optional<Rect> LabelPlacer::place(ImVec2 anchor, ImVec2 size, const std::vector<LabelSpot>& spots, float gap) {
    for (LabelSpot s : spots) {
        const Rect r = labelRect(anchor, size, s, gap);
        if (isFree(r)) {
            m_taken.push_back(r);
            return r;
        }
    }
    return std::nullopt;
}

std::string roundedArea(double a) {
    char buf[48];
    if (!(a >= 0) || !std::isfinite(a)) return "? m\u00b2";
    if (a < 10.0) {
        std::snprintf(buf, sizeof buf, "< 10 m\u00b2");
    } else if (a < 100.0) {
        std::snprintf(buf, sizeof buf, "%.0f m\u00b2", std::round(a / 10.0) * 10.0);
    } else if (a < 10000.0) {
        const double step = std::pow(10.0, std::floor(std::log10(a)) - 1.0);  // two significant figures
        std::snprintf(buf, sizeof buf, "%.0f m\u00b2", std::round(a / step) * step);
    } else {
        std::snprintf(buf, sizeof buf, "%.1f ha", a / 10000.0);
    }
    return buf;
}

std::string roundedDistance(double m) {
    char buf[48];
    const double a = std::fabs(m);
    if (a < 10.0) std::snprintf(buf, sizeof buf, "%.1f m", m);
    else if (a < 1000.0) std::snprintf(buf, sizeof buf, "%.0f m", m);
    else std::snprintf(buf, sizeof buf, "%.2f km", m / 1000.0);
    return buf;
}

}  // namespace sg::ui
