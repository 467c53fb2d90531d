// Not run yet vs missed ground (LineTracker::pendingGround + findGaps) and stable gap names
// (GapNamer). The expected figures are worked by hand from the rule in docs/coverage.md ("Not run
// yet and missed", "Gap names"); no outside reference exists for these definitions of our own.
#include <gtest/gtest.h>

#include "coverage/gap_names.hpp"
#include "coverage/gaps.hpp"
#include "coverage/line_runs.hpp"

namespace sg::coverage {
namespace {

// Three planned lines 10 m apart (x = 0, 10, 20), 100 m long, run northwards; area x -5..25,
// y 0..100. Line 0 is run from end to end and its run closed; nothing is painted.
struct ThreeLines {
    std::vector<PlanLine> lines{{"A", {0, 0}, {0, 100}}, {"B", {10, 0}, {10, 100}}, {"C", {20, 0}, {20, 100}}};
    MultiPolygon area{Polygon{Ring{{-5, 0}, {25, 0}, {25, 100}, {-5, 100}}, {}}};
    CoverageRaster raster{0.5, {-100, -100}};
    LineTracker tracker{lines, [] {
                            LineTrackerOptions o;
                            o.line_spacing_m = 10.0;
                            return o;
                        }()};
    ThreeLines() {
        std::int64_t t = 0;
        for (double y = -5.0; y <= 105.0; y += 1.0) tracker.update(t += 500'000'000, {0.0, y}, 0.0, 1.0, 3.0);
        tracker.closeRun(t);
    }
    GapReport gaps(double w) {
        const auto pending = tracker.pendingGround(w, bounds(area));
        GapReport rep = findGaps(raster, area, {}, &pending.quads);
        rep.lines_total = pending.lines_total;
        for (int li : pending.lines_pending) rep.lines_not_run.push_back(lines[static_cast<std::size_t>(li)].name);
        return rep;
    }
};

TEST(NotRunYet, GroundOfLinesNotRunIsNoGap) {
    ThreeLines f;
    ASSERT_EQ(f.tracker.runs().size(), 1U);
    // W = 0: lines B and C claim half the spacing towards a neighbour, C everything east of it.
    // Missed: x -5..5 (line A's own ground to the area edge, and half-way to B) = 10 m x 100 m.
    auto rep = f.gaps(0.0);
    ASSERT_EQ(rep.gaps.size(), 1U);
    EXPECT_NEAR(rep.gaps[0].area_m2, 1000.0, 1e-9);
    EXPECT_NEAR(rep.notRunM2(), 2000.0, 1e-9);
    EXPECT_EQ(rep.area_cells, rep.not_run_cells + rep.gaps[0].cells);  // nothing covered
    EXPECT_EQ(rep.lines_not_run, (std::vector<std::string>{"B", "C"}));
    EXPECT_EQ(rep.notRunMessage(), "2 of 3 planned lines not run yet: their ground is not counted as missed");
    // W = 7 m: B's pass is expected to reach 7 m towards A: missed x -5..3 = 800 m2.
    rep = f.gaps(7.0);
    ASSERT_EQ(rep.gaps.size(), 1U);
    EXPECT_NEAR(rep.gaps[0].area_m2, 800.0, 1e-9);
    EXPECT_NEAR(rep.notRunM2(), 2200.0, 1e-9);
    // Coverage stays area-based whatever the classification.
    EXPECT_EQ(rep.area_cells, 60 * 200);
}

TEST(NotRunYet, OpenRunClaimsOnlyTheStretchAhead) {
    ThreeLines f;
    // Line B started and stopped half-way (the run is open): its first half has gone by.
    std::int64_t t = 100'000'000'000;
    for (double y = -5.0; y <= 50.0; y += 1.0) f.tracker.update(t += 500'000'000, {10.0, y}, 0.0, 1.0, 3.0);
    ASSERT_EQ(f.tracker.activeLine(), 1);
    auto rep = f.gaps(0.0);
    // Missed: x -5..15 for y 0..50 (A and B both gone by there: B's ground to half-way to C),
    // plus x -5..5 for y 50..100. Not run yet: the rest.
    double missed = 0.0;
    for (const auto& g : rep.gaps) missed += g.area_m2;
    EXPECT_NEAR(missed, 20.0 * 50.0 + 10.0 * 50.0, 0.5 * 20.0);  // B's along extent is +-0.5 m
    EXPECT_EQ(rep.lines_not_run, (std::vector<std::string>{"B", "C"}));
    // The survey over: the open run counts as ended, B ran more than half its length.
    const auto fin = f.tracker.pendingGround(0.0, bounds(f.area), true);
    EXPECT_EQ(fin.lines_pending, (std::vector<int>{2}));
}

// A report with the given runs (row, i0, i1, gap index) and `n` gaps.
GapReport report(std::vector<GapRun> runs, int n) {
    GapReport r;
    r.gaps.resize(static_cast<std::size_t>(n));
    r.runs = std::move(runs);
    return r;
}

TEST(GapNames, StableSplitMergeNeverReused) {
    GapNamer names;
    auto r1 = report({{0, 0, 10, 0}, {0, 20, 25, 1}}, 2);
    names.name(r1, true);
    EXPECT_EQ(r1.gaps[0].id, 1);
    EXPECT_EQ(r1.gaps[1].id, 2);
    // The same ground again, listed in the other order: each keeps its name.
    auto r2 = report({{0, 0, 10, 1}, {0, 20, 25, 0}}, 2);
    names.name(r2, true);
    EXPECT_EQ(r2.gaps[1].id, 1);
    EXPECT_EQ(r2.gaps[0].id, 2);
    // A preview of a new gap takes the next number but does not use it up.
    auto p = report({{0, 0, 10, 0}, {0, 20, 25, 1}, {5, 0, 3, 2}}, 3);
    names.name(p, false);
    EXPECT_EQ(p.gaps[2].id, 3);
    EXPECT_EQ(names.nextNumber(), 3);
    // G1 splits: the larger piece (0..6) keeps G1, the smaller (7..10) is new: G3.
    auto r3 = report({{0, 0, 6, 0}, {0, 7, 10, 1}, {0, 20, 25, 2}}, 3);
    names.name(r3, true);
    EXPECT_EQ(r3.gaps[0].id, 1);
    EXPECT_EQ(r3.gaps[1].id, 3);
    EXPECT_EQ(r3.gaps[2].id, 2);
    // G1 and G2 merge (one gap over both): the oldest name stays; G3 closed.
    auto r4 = report({{0, 0, 25, 0}}, 1);
    names.name(r4, true);
    EXPECT_EQ(r4.gaps[0].id, 1);
    // A gap where G3 was: a new name, 4 (closed names are never reused).
    auto r5 = report({{0, 0, 25, 0}, {3, 7, 10, 1}}, 2);
    names.name(r5, true);
    EXPECT_EQ(r5.gaps[1].id, 4);
    EXPECT_EQ(names.nextNumber(), 5);
}

// Opening a site: the names a session recorded at its end (GapNamer::adopt) replace the previous
// commit, so its gaps get the numbers it gave live, whatever order one commit would give them in;
// the next free number never goes back (docs/site.md, "Gap names across sessions").
TEST(GapNames, AdoptedNamesWinOverOneCommit) {
    GapNamer names;
    auto r1 = report({{0, 0, 10, 0}}, 1);
    names.name(r1, true);  // G1; next 2
    // Recorded live: the small gap at row 4 opened first (G7), the large one at row 8 later (G8).
    GapNamer::Committed live{9, {{8, 0, 20, 8}, {0, 0, 10, 1}, {4, 0, 3, 7}}};
    names.adopt(live);
    auto r2 = report({{0, 0, 10, 0}, {4, 0, 3, 2}, {8, 0, 20, 1}}, 3);  // report order: G1, large, small
    names.name(r2, true);
    EXPECT_EQ(r2.gaps[0].id, 1);
    EXPECT_EQ(r2.gaps[1].id, 8);
    EXPECT_EQ(r2.gaps[2].id, 7);
    EXPECT_EQ(names.nextNumber(), 9);
    // Adopting a state with a lower next number keeps the higher one: no name given twice.
    names.adopt({3, {}});
    EXPECT_EQ(names.nextNumber(), 9);
    EXPECT_EQ(names.committed().runs.size(), 0U);
}

}  // namespace
}  // namespace sg::coverage
