// Line runs: automatic line choice (acquisition, settling, keeping the line through excursions of
// 5, 15, 30 and 45 m, turns, outages), explicit choice, signed cross-track deviation (starboard
// positive), neighbour lines, run statistics and corridor coverage.
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

TEST(LineRuns, AcquiresNearestMatchingLineAndKeepsIt) {
    LineTracker t(threeLines(), LineTrackerOptions{20.0});  // hysteresis 5 m, acquire within 20 m
    // Crossing the lines at right angles matches no line.
    EXPECT_EQ(t.update(0, {10, 50}, 1.0, 0.0, 3.0), kRunNone);
    // Northbound 2 m east of B -> run 0 on B.
    EXPECT_FALSE(t.activeCrossTrack({22, 60}, 0.0, 1.0).has_value());
    EXPECT_EQ(t.update(1, {22, 60}, 0.0, 1.0, 3.0), 0);
    EXPECT_EQ(t.activeLine(), 1);
    EXPECT_DOUBLE_EQ(t.activeCrossTrack({22, 60}, 0.0, 1.0).value(), 2.0);
    // Drifting east to 11 m, then 13 m (7 m from C): still B. (Before issue #14 the tracker took
    // C here, as a new run, and the deviation from B was never seen.)
    EXPECT_EQ(t.update(2, {31, 70}, 0.0, 1.0, 3.0), 0);
    EXPECT_EQ(t.update(3, {33, 80}, 0.0, 1.0, 3.0), 0);
    EXPECT_EQ(t.activeLine(), 1);
    EXPECT_DOUBLE_EQ(t.runs()[0].worst_deviation_m, 13.0);
    // Past the end of B (200 m + hysteresis): no line.
    EXPECT_EQ(t.update(4, {40, 230}, 0.0, 1.0, 3.0), kRunNone);
    EXPECT_FALSE(t.runs()[0].open);
    // Turning and coming back south on C: a new, reversed run.
    EXPECT_EQ(t.update(5, {40, 190}, 0.0, -1.0, 3.0), 1);
    EXPECT_EQ(t.activeLine(), 2);
    EXPECT_TRUE(t.runs()[1].reversed);
}

// An excursion of `offset_m` to starboard (east) in the middle of line B, northbound, at 1 m
// steps, reached and left at about 20 degrees (a helmsman's correction; within the 30 degree axis
// tolerance) or at 40 degrees for a shorter stretch than the turn hold.
struct Excursion {
    double offset_m;
    double angle_deg;
};

class LineRunsExcursion : public ::testing::TestWithParam<Excursion> {};

TEST_P(LineRunsExcursion, StaysOnTheLineAsADeviation) {
    const Excursion x = GetParam();
    // Three 600 m lines 20 m apart (room for a 45 m excursion at 25 degrees).
    LineTracker t({{"A", {0, 0}, {0, 600}}, {"B", {20, 0}, {20, 600}}, {"C", {40, 0}, {40, 600}}},
                  LineTrackerOptions{20.0});
    const double slope = std::tan(x.angle_deg * 3.14159265358979 / 180.0);  // east per north
    const double ramp_m = x.offset_m / slope;
    // Offset profile: ramp out from N 50, hold 50 m at the full offset, ramp back.
    const double n_hold = 50.0 + ramp_m, n_back = n_hold + 50.0;
    std::int64_t ti = 0;
    double worst = 0.0;
    double e_prev = 20.0, n_prev = -1.0;
    for (double n = 0.0; n <= 600.0; n += 1.0) {
        double off = 0.0;
        if (n > 50.0) off = std::min(x.offset_m, (n - 50.0) * slope);
        if (n > n_back) off = std::max(0.0, x.offset_m - (n - n_back) * slope);
        const double e = 20.0 + off;
        const double de = e - e_prev, dn = n - n_prev;
        const double len = std::hypot(de, dn);
        const int run = t.update(ti++ * 500'000'000LL, {e, n}, de / len, dn / len, 3.0);
        ASSERT_EQ(run, 0) << "at N " << n << ", offset " << off;
        ASSERT_EQ(t.activeLine(), 1);
        worst = std::max(worst, t.activeCrossTrack({e, n}, de / len, dn / len).value());
        e_prev = e;
        n_prev = n;
    }
    ASSERT_EQ(t.runs().size(), 1U);
    EXPECT_NEAR(t.runs()[0].worst_deviation_m, x.offset_m, 1e-9);
    EXPECT_NEAR(worst, x.offset_m, 1e-9);
    EXPECT_FALSE(t.runs()[0].reversed);
}

INSTANTIATE_TEST_SUITE_P(Offsets, LineRunsExcursion,
                         ::testing::Values(Excursion{5.0, 20.0}, Excursion{15.0, 20.0}, Excursion{30.0, 20.0},
                                           Excursion{45.0, 25.0}, Excursion{5.0, 40.0}));

TEST(LineRuns, ARunInNearerTheNeighbourSettlesOnTheRightLine) {
    LineTracker t(threeLines(), LineTrackerOptions{20.0});  // settle over the first 20 m
    // Coming onto the lines at N 0, 9 m east of A (11 m from B): A first.
    EXPECT_EQ(t.update(0, {9, 0}, 0.0, 1.0, 3.0), 0);
    EXPECT_EQ(t.activeLine(), 0);
    // 4 m further north the boat is 1 m from B: B is nearer by 7 m > 5 m -> the run moves to B
    // (the same run id: its cells are not repainted).
    EXPECT_EQ(t.update(1, {19, 4}, 0.0, 1.0, 3.0), 0);
    EXPECT_EQ(t.activeLine(), 1);
    EXPECT_EQ(t.runs()[0].line, 1);
    // After the settling distance, the line is kept even 15 m off.
    EXPECT_EQ(t.update(2, {20, 40}, 0.0, 1.0, 3.0), 0);
    EXPECT_EQ(t.update(3, {35, 60}, 0.0, 1.0, 3.0), 0);
    EXPECT_EQ(t.activeLine(), 1);
    EXPECT_DOUBLE_EQ(t.runs()[0].worst_deviation_m, 15.0);
}

TEST(LineRuns, ATurnEndsTheRunAfterTheTurnHold) {
    LineTracker t(threeLines(), LineTrackerOptions{20.0});  // turn hold 20 m
    std::int64_t ti = 0;
    for (double n = 0; n <= 100; n += 2) EXPECT_EQ(t.update(ti++, {20, n}, 0.0, 1.0, 3.0), 0);
    // Heading east (90 degrees off the axis) for 16 m: still the run (a sharp correction).
    for (double e = 22; e <= 36; e += 2) EXPECT_EQ(t.update(ti++, {e, 100}, 1.0, 0.0, 3.0), 0);
    // More than 20 m off the axis: the run ends, and heading east matches no line.
    for (double e = 38; e <= 44; e += 2) t.update(ti++, {e, 100}, 1.0, 0.0, 3.0);
    EXPECT_EQ(t.activeRun(), kRunNone);
    EXPECT_FALSE(t.runs()[0].open);
    // Back along the axis southbound near C: a new reversed run on C.
    EXPECT_EQ(t.update(ti++, {42, 98}, 0.0, -1.0, 3.0), 1);
    EXPECT_EQ(t.activeLine(), 2);
    EXPECT_TRUE(t.runs()[1].reversed);
}

TEST(LineRuns, AfterAnOutageTheRunGoesOnOnlyNearItsLine) {
    LineTracker t(threeLines(), LineTrackerOptions{20.0});  // continuity gap 10 s
    const std::int64_t s = 1'000'000'000LL;
    EXPECT_EQ(t.update(0, {20, 10}, 0.0, 1.0, 3.0), 0);
    EXPECT_EQ(t.update(1 * s, {20, 12}, 0.0, 1.0, 3.0), 0);
    // 30 s without positions, back 3 m off B: the same run.
    EXPECT_EQ(t.update(31 * s, {23, 72}, 0.0, 1.0, 3.0), 0);
    // A 5 s break 26 m off B (on the far side of C): still B (short breaks do not matter).
    EXPECT_EQ(t.update(36 * s, {46, 82}, 0.0, 1.0, 3.0), 0);
    // A 30 s break resuming 26 m off B: no longer B; C is 6 m away -> a new run on C.
    EXPECT_EQ(t.update(66 * s, {46, 142}, 0.0, 1.0, 3.0), 1);
    EXPECT_EQ(t.activeLine(), 2);
}

TEST(LineRuns, NeighbourLinesAndWhetherTheyWereRun) {
    LineTracker t(threeLines(), LineTrackerOptions{20.0});
    // Northbound on B: C to starboard (east), A to port.
    EXPECT_EQ(t.neighbourLine(1, {20, 50}, 0.0, 1.0, true), 2);
    EXPECT_EQ(t.neighbourLine(1, {20, 50}, 0.0, 1.0, false), 0);
    // Southbound on B the sides swap; even 15 m off B towards C, C is still B's neighbour.
    EXPECT_EQ(t.neighbourLine(1, {35, 50}, 0.0, -1.0, true), 0);
    EXPECT_EQ(t.neighbourLine(1, {35, 50}, 0.0, -1.0, false), 2);
    // A is the outermost line to the west; beyond the line ends there is no neighbour.
    EXPECT_EQ(t.neighbourLine(0, {0, 50}, 0.0, 1.0, false), -1);
    EXPECT_EQ(t.neighbourLine(1, {20, 250}, 0.0, 1.0, true), -1);
    // Run A northbound from N 0 to N 120, then B: A has been passed up to N 120 only.
    std::int64_t ti = 0;
    for (double n = 0; n <= 120; n += 2) t.update(ti++, {0, n}, 0.0, 1.0, 3.0);
    EXPECT_FALSE(t.passedBy(0, {20, 60}));  // A's run is still open
    for (double e = 2; e <= 40; e += 2) t.update(ti++, {e, 125}, 1.0, 0.0, 3.0);
    for (double n = 0; n <= 200; n += 2) t.update(ti++, {20, n}, 0.0, 1.0, 3.0);
    EXPECT_EQ(t.activeLine(), 1);
    EXPECT_TRUE(t.passedBy(0, {20, 60}));
    EXPECT_FALSE(t.passedBy(0, {20, 150}));
    EXPECT_FALSE(t.passedBy(2, {20, 60}));  // C never run
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
