// Line runs: automatic line choice with hysteresis, explicit choice, signed cross-track deviation
// (starboard positive), run statistics and corridor coverage.
#include <cmath>
#include <optional>

#include <gtest/gtest.h>

#include "coverage/line_runs.hpp"
#include "coverage/swath_painter.hpp"
#include "coverage_test_util.hpp"

namespace sg::coverage {
namespace {

std::vector<PlanLine> threeLines() {
    // North-south lines at E 0, 20, 40 from N 0 to N 200 (spacing 20 m).
    return {{"A", {0, 0}, {0, 200}}, {"B", {20, 0}, {20, 200}}, {"C", {40, 0}, {40, 200}}};
}

TEST(LineRuns, CrossTrackIsStarboardPositiveForEitherDirection) {
    LineTracker t(threeLines(), LineTrackerOptions{20.0});
    // Northbound, 3 m east of B: starboard (east) -> +3.
    EXPECT_DOUBLE_EQ(t.crossTrack(1, {23, 50}, 0.0, 1.0), 3.0);
    // Southbound at the same point: east is port -> -3.
    EXPECT_DOUBLE_EQ(t.crossTrack(1, {23, 50}, 0.0, -1.0), -3.0);
    EXPECT_DOUBLE_EQ(t.crossTrack(1, {17, 50}, 0.0, 1.0), -3.0);
    EXPECT_DOUBLE_EQ(t.alongTrack(1, {17, 50}), 50.0);
}

TEST(LineRuns, PicksNearestMatchingLineWithHysteresis) {
    LineTracker t(threeLines(), LineTrackerOptions{20.0});  // hysteresis 5 m, max offset 20 m
    // Crossing the lines at right angles matches no line.
    EXPECT_EQ(t.update(0, {10, 50}, 1.0, 0.0, 3.0), kRunNone);
    // Northbound 2 m east of B -> run 0 on B.
    EXPECT_FALSE(t.activeCrossTrack({22, 60}, 0.0, 1.0).has_value());
    EXPECT_EQ(t.update(1, {22, 60}, 0.0, 1.0, 3.0), 0);
    EXPECT_EQ(t.activeLine(), 1);
    EXPECT_DOUBLE_EQ(t.activeCrossTrack({22, 60}, 0.0, 1.0).value(), 2.0);
    // Drifting east to 11 m (9 m from C): C is nearer, but not by more than 5 m -> stay on B.
    EXPECT_EQ(t.update(2, {31, 70}, 0.0, 1.0, 3.0), 0);
    EXPECT_EQ(t.activeLine(), 1);
    // 13 m east of B, 7 m from C: nearer by 6 m > 5 m -> new run on C.
    EXPECT_EQ(t.update(3, {33, 80}, 0.0, 1.0, 3.0), 1);
    EXPECT_EQ(t.activeLine(), 2);
    EXPECT_FALSE(t.runs()[0].open);
    // Past the end of C (200 m + hysteresis): no line.
    EXPECT_EQ(t.update(4, {40, 230}, 0.0, 1.0, 3.0), kRunNone);
    // Turning and coming back south on C: a new, reversed run.
    EXPECT_EQ(t.update(5, {40, 190}, 0.0, -1.0, 3.0), 2);
    EXPECT_TRUE(t.runs()[2].reversed);
}

TEST(LineRuns, ExplicitChoiceHoldsTheLine) {
    LineTracker t(threeLines(), LineTrackerOptions{20.0});
    t.choose(0);
    EXPECT_FALSE(t.isAutomatic());
    // Even right on top of B, the chosen line A stays active.
    EXPECT_EQ(t.update(0, {20, 50}, 0.0, 1.0, 3.0), 0);
    EXPECT_EQ(t.activeLine(), 0);
    EXPECT_DOUBLE_EQ(t.runs()[0].worst_deviation_m, 20.0);
    t.automatic();
    EXPECT_EQ(t.update(1, {20, 60}, 0.0, 1.0, 3.0), 1);  // back to automatic: B
    EXPECT_EQ(t.activeLine(), 1);
}

TEST(LineRuns, RunStatisticsAndCorridorCoverage) {
    LineTracker t(threeLines(), LineTrackerOptions{20.0});
    CoverageRaster raster(0.5, {0, 0});
    SwathPainter painter(raster);
    // Fly B northbound with a 4 m excursion to port at N 100, altitude 3..5 m, one missing.
    for (int n = 0; n <= 200; ++n) {
        const double e = (n >= 95 && n <= 105) ? 16.0 : 20.0;
        std::optional<double> alt = 3.0 + 2.0 * n / 200.0;
        if (n == 50) alt = std::nullopt;
        const int run = t.update(n * 100'000'000LL, {e, static_cast<double>(n)}, 0.0, 1.0, alt);
        SwathSample s;
        s.t_ns = n * 100'000'000LL;
        s.e_m = e;
        s.n_m = n;
        s.dir_n = 1.0;
        s.left_m = s.right_m = 10.0;  // covers exactly the 20 m corridor when on line
        s.centre_margin = 2.0F;
        s.valid = true;
        s.run = run;
        painter.add(s);
    }
    painter.flush();
    t.addAlarm(0);
    t.addAlarm(0);
    t.addAlarm(kRunNone);
    t.closeRun(201 * 100'000'000LL);
    t.refreshCoverage(raster);
    ASSERT_EQ(t.runs().size(), 1U);
    const LineRun& r = t.runs()[0];
    EXPECT_EQ(r.line, 1);
    EXPECT_FALSE(r.reversed);
    EXPECT_EQ(r.samples, 201);
    EXPECT_EQ(r.altitude_missing, 1);
    EXPECT_DOUBLE_EQ(r.worst_altitude_m, 5.0);
    EXPECT_NEAR(r.meanAltitude_m(), (4.0 * 201 - 3.5) / 200.0, 1e-12);  // mean of 3..5 less N=50
    EXPECT_DOUBLE_EQ(r.worst_deviation_m, -4.0);                      // port
    EXPECT_EQ(r.alarms, 2);
    EXPECT_EQ(r.start_t_ns, 0);
    EXPECT_EQ(raster.cellAt({20.25, 60.25}).run, 0);
    // Corridor B +- 10 m: the excursion (N 95..105, plus the slanted quads to N 94 and 106)
    // uncovers the 4 m strip E 26..30 over about 12 m -> about 4*12 / (20*200) = 1.2 % missing.
    EXPECT_LT(r.corridor_covered_pct, 99.5);
    EXPECT_GT(r.corridor_covered_pct, 98.0);
    // Line A's corridor (E -10..10) is only touched by B's swath edge at E 10 and by the
    // excursion to E 6..10: a few percent at most.
    EXPECT_LT(corridorCoveragePercent(raster, t.lines()[0], 10.0), 2.0);
    EXPECT_GT(corridorCoveragePercent(raster, t.lines()[0], 10.0), 0.5);
    // Line C's corridor (E 30..50) is never touched.
    EXPECT_DOUBLE_EQ(corridorCoveragePercent(raster, t.lines()[2], 10.0), 0.0);
}

}  // namespace
}  // namespace sg::coverage
