// The plan view's label placer (ui/label_placer.hpp) and the rounding of label numbers.
#include <gtest/gtest.h>

#include "ui/label_placer.hpp"

namespace {

using sg::ui::LabelPlacer;
using sg::ui::LabelSpot;
using sg::ui::Rect;

// Six parallel lines 10 px apart ending at the same x (the HF01..HF06 case): labels 12 px high
// cannot all sit beside their ends; each placed label is clear of every other, and a label
// that does not fit is skipped instead of drawn on top.
TEST(LabelPlacer, StackedLineEndsGetNoOverlappingLabels) {
    LabelPlacer p({{0, 0}, {400, 300}}, 2.0f);
    std::vector<Rect> placed;
    for (int i = 0; i < 6; ++i) {
        const auto r = p.place({300.0f, 100.0f + 10.0f * static_cast<float>(i)}, {40, 12}, sg::ui::spotsBeyond({1, 0}), 4.0f);
        if (r) placed.push_back(*r);
    }
    ASSERT_GE(placed.size(), 3u);  // beside, above-right and below-right of the ends
    for (std::size_t i = 0; i < placed.size(); ++i)
        for (std::size_t j = i + 1; j < placed.size(); ++j) EXPECT_FALSE(sg::ui::overlaps(placed[i], placed[j]));
}

TEST(LabelPlacer, BlockedAreasAndBoundsAreRespected) {
    LabelPlacer p({{0, 0}, {100, 100}});
    p.block({{50, 40}, {100, 60}});
    // Right of (45, 50) is blocked; the first free spot in the list is taken (left).
    const auto r = p.place({45, 50}, {20, 10}, {LabelSpot::kRight, LabelSpot::kLeft}, 3.0f);
    ASSERT_TRUE(r);
    EXPECT_FLOAT_EQ(r->max.x, 42.0f);
    // Near the right edge nothing fits inside the bounds: skipped.
    EXPECT_FALSE(p.place({98, 10}, {20, 10}, {LabelSpot::kRight}, 3.0f));
}

TEST(LabelPlacer, SpotsBeyondFollowTheLineDirection) {
    EXPECT_EQ(sg::ui::spotsBeyond({1, 0.2f}).front(), LabelSpot::kRight);
    EXPECT_EQ(sg::ui::spotsBeyond({-1, 0.2f}).front(), LabelSpot::kLeft);
    EXPECT_EQ(sg::ui::spotsBeyond({0.1f, -1}).front(), LabelSpot::kAbove);  // screen y grows down
    EXPECT_EQ(sg::ui::spotsBeyond({0.1f, 1}).front(), LabelSpot::kBelow);
}

// Rounded to what a gap area on a ~1 m raster means (not five decimals).
TEST(LabelNumbers, AreasAndDistancesRounded) {
    EXPECT_EQ(sg::ui::roundedArea(3.2), "< 10 m\u00b2");
    EXPECT_EQ(sg::ui::roundedArea(47.0), "50 m\u00b2");
    EXPECT_EQ(sg::ui::roundedArea(1234.567), "1200 m\u00b2");
    EXPECT_EQ(sg::ui::roundedArea(9960.0), "10000 m\u00b2");
    EXPECT_EQ(sg::ui::roundedArea(18234.0), "1.8 ha");
    EXPECT_EQ(sg::ui::roundedDistance(4.44), "4.4 m");
    EXPECT_EQ(sg::ui::roundedDistance(123.6), "124 m");
    EXPECT_EQ(sg::ui::roundedDistance(2345.0), "2.35 km");
}

}  // namespace
