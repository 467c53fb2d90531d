// Gaps and infill: a constructed survey with one line flown too high for 80 m and one line flown
// 15 m off track must give exactly those two gaps, at the right place and size; the infill plan
// must close them (re-flown: 100 %). Also merging of gaps along one line, small gaps kept apart,
// and gap outlines checked with GEOS (valid polygons of the right area).
#include <algorithm>
#include <cmath>
#include <stdexcept>
#include <string>

#include <gtest/gtest.h>

#include "coverage/gaps.hpp"
#include "coverage/infill.hpp"
#include "coverage/swath_painter.hpp"
#include "coverage_test_util.hpp"

namespace sg::coverage {
namespace {

using test::Geos;
constexpr double kCell = 0.5;
const Point kOrigin{600000.0, 5760000.0};
Point at(double e, double n) { return {kOrigin.e_m + e, kOrigin.n_m + n}; }

MultiPolygon rect(double e0, double n0, double e1, double n1) {
    return {Polygon{{at(e0, n0), at(e1, n0), at(e1, n1), at(e0, n1)}, {}}};
}

// Flies a north-south line at easting `e` (local), alternating direction by `northward`, samples
// every 1 m, half-width `hw`; samples with `invalid(n)` true are marked invalid.
template <class Pred>
void flyLine(SwathPainter& p, double e, bool northward, double hw, int run, Pred invalid) {
    for (int k = 0; k <= 440; ++k) {
        const double n = northward ? -20.0 + k : 420.0 - k;
        SwathSample s;
        s.t_ns = static_cast<std::int64_t>(k) * 100'000'000;
        s.e_m = kOrigin.e_m + e;
        s.n_m = kOrigin.n_m + n;
        s.dir_e = 0.0;
        s.dir_n = northward ? 1.0 : -1.0;
        s.left_m = s.right_m = hw;
        s.centre_margin = 2.0F;
        s.valid = !invalid(n);
        s.run = run;
        p.add(s);
    }
    p.reset();
}

const auto kNever = [](double) { return false; };

TEST(GapsAndInfill, ConstructedSurveyTwoFaultsTwoGapsClosedByInfill) {
    // Area 200 m x 400 m; 10 lines N-S at E = 10, 30, ..., 190, spacing 20 m, half-width 11 m
    // (2 m overlap). Line 4 (E 70) too high (invalid) for 150 < N < 230; line 7 (E 130) flown
    // 15 m east of its line, at E 145.
    const MultiPolygon area = rect(0, 0, 200, 400);
    CoverageRaster r(kCell, kOrigin);
    SwathPainter p(r);
    for (int line = 0; line < 10; ++line) {
        const double e = 10.0 + 20.0 * line;
        if (line == 3) {
            flyLine(p, e, line % 2 == 0, 11.0, line, [](double n) { return n > 150.0 && n < 230.0; });
        } else if (line == 6) {
            flyLine(p, e + 15.0, line % 2 == 0, 11.0, line, kNever);
        } else {
            flyLine(p, e, line % 2 == 0, 11.0, line, kNever);
        }
    }
    const GapReport rep = findGaps(r, area, GapOptions{1.0, 0.0});
    ASSERT_EQ(rep.gaps.size(), 2U);
    EXPECT_EQ(rep.smallCount(), 0U);
    // Expected from the construction (cell edges fall on whole metres, so these are exact):
    // gap 1 (largest): off-track line; E 121..134 (line 6 edge 110+11, shifted line 145-11) x N 0..400.
    const Gap& off = rep.gaps[0];
    EXPECT_DOUBLE_EQ(off.area_m2, 13.0 * 400.0);
    EXPECT_DOUBLE_EQ(off.bbox.min_e, kOrigin.e_m + 121.0);
    EXPECT_DOUBLE_EQ(off.bbox.max_e, kOrigin.e_m + 134.0);
    EXPECT_DOUBLE_EQ(off.bbox.min_n, kOrigin.n_m + 0.0);
    EXPECT_DOUBLE_EQ(off.bbox.max_n, kOrigin.n_m + 400.0);
    EXPECT_NEAR(off.centroid.e_m, kOrigin.e_m + 127.5, 1e-6);
    EXPECT_NEAR(off.centroid.n_m, kOrigin.n_m + 200.0, 1e-6);
    EXPECT_DOUBLE_EQ(off.along_length_m, 400.0);
    EXPECT_DOUBLE_EQ(off.width_m, 13.0);
    // gap 2: too high; E 61..79 (neighbour edges 50+11 and 90-11) x N 150..230.
    const Gap& high = rep.gaps[1];
    EXPECT_DOUBLE_EQ(high.area_m2, 18.0 * 80.0);
    EXPECT_DOUBLE_EQ(high.bbox.min_e, kOrigin.e_m + 61.0);
    EXPECT_DOUBLE_EQ(high.bbox.max_e, kOrigin.e_m + 79.0);
    EXPECT_DOUBLE_EQ(high.bbox.min_n, kOrigin.n_m + 150.0);
    EXPECT_DOUBLE_EQ(high.bbox.max_n, kOrigin.n_m + 230.0);
    EXPECT_DOUBLE_EQ(high.along_length_m, 80.0);
    EXPECT_DOUBLE_EQ(high.width_m, 18.0);
    EXPECT_NEAR(rep.coveragePercent(), 100.0 * (80000.0 - 5200.0 - 1440.0) / 80000.0, 1e-9);

    InfillOptions opt;
    opt.half_width_m = 11.0;
    opt.heading_deg = 0.0;
    opt.run_in_m = 30.0;
    opt.run_out_m = 30.0;
    const InfillPlan plan = planInfill(rep, opt);
    ASSERT_EQ(plan.lines.size(), 2U);
    // Ranked by gap area per km of line (run-in and run-out 30 m each, cells 0.5 m):
    //   off-track gap: 5200 m^2 over 399.5 + 60 m = 11317 m^2/km  -> rank 1
    //   too-high gap:  1440 m^2 over  79.5 + 60 m = 10323 m^2/km  -> rank 2
    const InfillLine& first = plan.lines[0];
    const InfillLine& second = plan.lines[1];
    EXPECT_EQ(first.closes_ids, std::vector<int>{1});
    EXPECT_NEAR(first.start.e_m, kOrigin.e_m + 127.5, 1e-9);  // centre of cells 121.25..133.75
    EXPECT_NEAR(first.start.n_m, kOrigin.n_m + 0.25 - 30.0, 1e-9);
    EXPECT_NEAR(first.end.n_m, kOrigin.n_m + 399.75 + 30.0, 1e-9);
    EXPECT_NEAR(first.area_per_km, 5200.0 / 0.4595, 1e-6);
    EXPECT_EQ(second.closes_ids, std::vector<int>{2});
    EXPECT_NEAR(second.start.e_m, kOrigin.e_m + 70.0, 1e-9);
    EXPECT_NEAR(second.start.n_m, kOrigin.n_m + 150.25 - 30.0, 1e-9);
    EXPECT_NEAR(second.end.n_m, kOrigin.n_m + 229.75 + 30.0, 1e-9);
    EXPECT_NEAR(second.area_per_km, 1440.0 / 0.1395, 1e-6);
    EXPECT_EQ(first.rank, 1);
    // Named after the gap it closes (docs/coverage.md, "Gap names"): gap 1 -> I1, gap 2 -> I2.
    EXPECT_EQ(first.name, "I1");
    EXPECT_EQ(second.name, "I2");

    const InfillCheck check = flyInfill(r, area, plan, GapOptions{1.0, 0.0});
    EXPECT_TRUE(check.after.gaps.empty());
    EXPECT_DOUBLE_EQ(check.after.coveragePercent(), 100.0);
    // The original raster is untouched by the proof.
    EXPECT_EQ(findGaps(r, area, GapOptions{1.0, 0.0}).gaps.size(), 2U);
}

TEST(GapsAndInfill, GapsOnOneLineMergeWhenCloserThanRunInPlusRunOut) {
    const MultiPolygon area = rect(0, 0, 80, 400);
    CoverageRaster r(kCell, kOrigin);
    SwathPainter p(r);
    flyLine(p, 10, true, 11, 0, kNever);
    // Two holes 40 m apart on line 2, two holes 150 m apart on line 3 (staggered so they do not
    // join the holes of line 2).
    flyLine(p, 30, false, 11, 1, [](double n) { return (n > 100 && n < 120) || (n > 160 && n < 180); });
    flyLine(p, 50, true, 11, 2, [](double n) { return (n > 130 && n < 150) || (n > 300 && n < 320); });
    flyLine(p, 70, false, 11, 3, kNever);
    const GapReport rep = findGaps(r, area, GapOptions{1.0, 0.0});
    ASSERT_EQ(rep.gaps.size(), 4U);
    InfillOptions opt;
    opt.half_width_m = 10.0;
    opt.run_in_m = 30.0;
    opt.run_out_m = 30.0;
    const InfillPlan plan = planInfill(rep, opt);
    // Each hole is 18 m wide (the neighbours cover to 21 and from 39 on line 2; 41 and 59 on
    // line 3), so one 10 m half-width line per column; the pair 40 m apart merges (40 < 30 + 30),
    // the pair 150 m apart does not: 3 lines.
    ASSERT_EQ(plan.lines.size(), 3U);
    int merged = 0;
    for (const auto& l : plan.lines) {
        if (l.closes_ids.size() == 2U) ++merged;
    }
    EXPECT_EQ(merged, 1);
    const InfillCheck check = flyInfill(r, area, plan, GapOptions{1.0, 0.0});
    EXPECT_TRUE(check.after.gaps.empty());
}

TEST(GapsAndInfill, SmallGapsAreListedApartAndPlannedOnlyOnRequest) {
    // Swaths 0..20 and 20.5..40.5: a 0.5 m sliver (one cell column) along the whole area.
    const MultiPolygon area = rect(0, 0, 40, 100);
    CoverageRaster r(kCell, kOrigin);
    SwathPainter p(r);
    flyLine(p, 10, true, 10, 0, kNever);
    flyLine(p, 30.5, false, 10, 1, kNever);
    const GapReport rep = findGaps(r, area, GapOptions{1.0, 0.0});
    ASSERT_EQ(rep.gaps.size(), 1U);
    EXPECT_TRUE(rep.gaps[0].small);
    EXPECT_EQ(rep.significantCount(), 0U);
    EXPECT_DOUBLE_EQ(rep.gaps[0].width_m, 0.5);
    EXPECT_DOUBLE_EQ(rep.gaps[0].area_m2, 50.0);
    InfillOptions opt;
    opt.half_width_m = 5.0;
    EXPECT_TRUE(planInfill(rep, opt).lines.empty());
    opt.include_small_gaps = true;
    const InfillPlan plan = planInfill(rep, opt);
    ASSERT_EQ(plan.lines.size(), 1U);
    EXPECT_TRUE(flyInfill(r, area, plan, GapOptions{1.0, 0.0}).after.gaps.empty());
    // With min width 0.4 m the sliver is a real gap.
    EXPECT_FALSE(findGaps(r, area, GapOptions{0.4, 0.0}).gaps[0].small);
}

TEST(GapsAndInfill, DiagonalCellsJoinOneGapAndObliqueHeadingIsUsed) {
    // Two square holes touching at one corner are one gap (8-connectivity).
    const MultiPolygon area = rect(0, 0, 60, 60);
    CoverageRaster r(kCell, kOrigin);
    SwathPainter p(r);
    for (int k = 0; k < 7; ++k) {
        const double e = 5.0 + 10.0 * k;
        auto hole = [k](double n) {
            return (k == 2 && n > 20 && n < 30) || (k == 3 && n > 30 && n < 40);
        };
        // Half-width 5: line 2 (E 25) covers 20..30, line 3 (E 35) covers 30..40.
        for (int i = 0; i <= 80; ++i) {
            const double n = -10.0 + i;
            SwathSample s;
            s.t_ns = i;
            s.e_m = kOrigin.e_m + e;
            s.n_m = kOrigin.n_m + n;
            s.dir_n = 1.0;
            s.left_m = s.right_m = 5.0;
            s.centre_margin = 2.0F;
            s.valid = !hole(n);
            p.add(s);
        }
        p.reset();
    }
    const GapReport rep = findGaps(r, area, GapOptions{1.0, 45.0});
    ASSERT_EQ(rep.gaps.size(), 1U);
    EXPECT_DOUBLE_EQ(rep.gaps[0].area_m2, 200.0);
    // Along 45 degrees the two squares line up: extent = 2 * 10 * sqrt(2) less one cell diagonal
    // plus one cell (cell centres + one cell).
    EXPECT_NEAR(rep.gaps[0].along_length_m, 20.0 * std::sqrt(2.0) - kCell * std::sqrt(2.0) + kCell, 1e-9);
    // Outline: two squares touching at a corner -> two polygons, 100 m^2 each.
    const MultiPolygon outline = gapOutline(rep, 0);
    ASSERT_EQ(outline.size(), 2U);
    EXPECT_DOUBLE_EQ(coverage::area(outline), 200.0);
    InfillOptions opt;
    opt.half_width_m = 8.0;
    opt.heading_deg = 45.0;
    opt.run_in_m = opt.run_out_m = 10.0;
    const InfillPlan plan = planInfill(rep, opt);
    ASSERT_FALSE(plan.lines.empty());
    for (const auto& l : plan.lines) {
        EXPECT_NEAR(l.start.e_m - l.end.e_m, l.start.n_m - l.end.n_m, 1e-6);  // on bearing 45
    }
    EXPECT_TRUE(flyInfill(r, area, plan, GapOptions{1.0, 45.0}).after.gaps.empty());
}

TEST(GapsAndInfill, AnUnsurveyedBlockIsRefusedWithAClearMessage) {
    // 2 km x 2 km never surveyed = 16 million cells of 0.5 m > the 10 million cell limit.
    const MultiPolygon area = rect(0, 0, 2000, 2000);
    const CoverageRaster r(kCell, kOrigin);
    const GapReport rep = findGaps(r, area, GapOptions{});
    ASSERT_EQ(rep.gaps.size(), 1U);
    EXPECT_DOUBLE_EQ(rep.coveragePercent(), 0.0);
    InfillOptions opt;
    opt.half_width_m = 5.0;
    try {
        planInfill(rep, opt);
        FAIL() << "no error";
    } catch (const std::runtime_error& e) {
        EXPECT_NE(std::string(e.what()).find("unsurveyed block"), std::string::npos) << e.what();
    }
}

TEST(GapsAndInfill, OutlineWithHoleIsAValidGeosPolygonOfTheGapArea) {
    // An uncovered area with a covered island and a second covered strip: the gap wraps the island.
    Geos g;
    const MultiPolygon area{Polygon{{at(0.3, 0.1), at(90.2, 3.3), at(80.1, 70.6), at(5.5, 60.2)}, {}}};
    CoverageRaster r(kCell, kOrigin);
    SwathPainter p(r);
    for (const auto& s : test::samplesAlong({at(30.1, 20.2), at(50.3, 40.7)}, 1.0, 4.0, 4.0, 2.0F)) p.add(s);
    p.reset();
    for (const auto& s : test::samplesAlong({at(-5, 50.2), at(100, 55.1)}, 1.0, 3.0, 3.0, 2.0F)) p.add(s);
    const GapReport rep = findGaps(r, area, GapOptions{1.0, 0.0});
    ASSERT_GE(rep.gaps.size(), 1U);
    std::size_t holes = 0;
    for (std::size_t k = 0; k < rep.gaps.size(); ++k) {
        const MultiPolygon outline = gapOutline(rep, static_cast<int>(k));
        const MultiPolygon same = gapOutlines(rep)[k];  // the one-pass variant agrees
        ASSERT_EQ(same.size(), outline.size());
        EXPECT_DOUBLE_EQ(coverage::area(same), coverage::area(outline));
        double geos_area = 0.0;
        for (const auto& poly : outline) {
            holes += poly.holes.size();
            auto gp = g.polygon(poly.exterior, poly.holes);
            EXPECT_EQ(GEOSisValid_r(g.h, gp.get()), 1) << "gap " << k;  // GEOS validity (OGC rules)
            geos_area += g.area(gp.get());
        }
        EXPECT_NEAR(geos_area, rep.gaps[k].area_m2, 1e-6) << "gap " << k;
    }
    EXPECT_GE(holes, 1U);
}

}  // namespace
}  // namespace sg::coverage
