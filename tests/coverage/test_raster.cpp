// Coverage raster: swept-quad fill against GEOS buffers (flat end caps) for straight, curved and
// multi-pass coverage, no holes on fast passes, the margin profile and its quantisation, chain
// breaks, content hash and dirty generations.
#include <cmath>
#include <numbers>

#include <gtest/gtest.h>

#include "coverage/coverage_raster.hpp"
#include "coverage/gaps.hpp"
#include "coverage/swath_painter.hpp"
#include "coverage_test_util.hpp"

namespace sg::coverage {
namespace {

using test::Geos;

constexpr double kCell = 0.5;
const Point kOrigin{600000.0, 5760000.0};  // a UTM-like origin, so the cell arithmetic is realistic

Point at(double e, double n) { return {kOrigin.e_m + e, kOrigin.n_m + n}; }

void paint(CoverageRaster& r, const std::vector<SwathSample>& samples) {
    SwathPainter p(r);
    for (const auto& s : samples) p.add(s);
}

double coveredArea(const CoverageRaster& r) {
    return static_cast<double>(r.coveredCells()) * r.cellSize() * r.cellSize();
}

// Tolerance for a raster area against an exact polygon area, derived from the cell size. A cell
// counts when its centre is inside, so only the N = perimeter / cell cells cut by the boundary can
// be wrong, each by an amount spread over about +-cell^2/2. Taken as independent uniform errors
// their sum has sigma = sqrt(N) * cell^2 / sqrt(12); we allow 6 sigma. (An edge parallel to the
// grid breaks the independence - worst case perimeter * cell / 2 - so the test passes are oblique
// and placed off the cell grid.) A missing row of cells along a 100 m edge (50 m^2) exceeds it.
double tolerance(double perimeter_m) {
    return 6.0 * std::sqrt(perimeter_m / kCell) * kCell * kCell / std::sqrt(12.0);
}

TEST(CoverageRaster, StraightPassMatchesGeosFlatBuffer) {
    // Reference: GEOS buffer with flat end caps (libgeos 3.11, GEOSBufferWithStyle_r).
    Geos g;
    const std::vector<Point> path{at(10.13, 20.37), at(160.71, 95.29)};
    CoverageRaster r(kCell, kOrigin);
    paint(r, test::samplesAlong(path, 1.0, 7.3, 7.3, 3.0F));
    auto buf = g.flatBuffer(g.line(path).get(), 7.3);
    const double ref = g.area(buf.get());
    EXPECT_NEAR(coveredArea(r), ref, tolerance(g.length(buf.get())));
    // Exact value as a second outside check: flat-capped buffer of a segment = 2 w L.
    EXPECT_NEAR(ref, 2.0 * 7.3 * std::hypot(150.58, 74.92), 1e-6);
}

TEST(CoverageRaster, AsymmetricHalfWidthsMatchOffsetBuffer) {
    // Port 4.1 m, starboard 9.7 m: the same area as a 6.9 m buffer of the track offset 2.8 m to
    // starboard (GEOS). Track on bearing 30 degrees.
    Geos g;
    const double ue = 0.5, un = std::sqrt(3.0) / 2.0;  // along; starboard is (un, -ue)
    const Point s0 = at(5.21, 5.33);
    auto pt = [&](double a, double c) { return Point{s0.e_m + a * ue + c * un, s0.n_m + a * un - c * ue}; };
    CoverageRaster r(kCell, kOrigin);
    paint(r, test::samplesAlong({pt(0, 0), pt(200, 0)}, 0.8, 4.1, 9.7, 2.0F));
    auto buf = g.flatBuffer(g.line({pt(0, 2.8), pt(200, 2.8)}).get(), 6.9);
    EXPECT_NEAR(coveredArea(r), g.area(buf.get()), tolerance(g.length(buf.get())));
    // And on the right sides (a cell diagonal, 0.71 m, from each edge).
    for (double a = 10.0; a < 190.0; a += 7.3) {
        EXPECT_TRUE(r.cellAt(pt(a, 9.7 - 0.71)).covered());
        EXPECT_FALSE(r.cellAt(pt(a, 9.7 + 0.71)).covered());
        EXPECT_TRUE(r.cellAt(pt(a, -4.1 + 0.71)).covered());
        EXPECT_FALSE(r.cellAt(pt(a, -4.1 - 0.71)).covered());
    }
}

TEST(CoverageRaster, CurvedPassMatchesGeosBuffer) {
    // An S-curve: two quarter arcs of radius 60 m turning opposite ways, half-width 12 m.
    Geos g;
    auto path = test::arc(at(60.37, 0.11), 60.0, std::numbers::pi, std::numbers::pi / 2, 200);
    auto second = test::arc(at(60.37, 120.11), 60.0, -std::numbers::pi / 2, 0.0, 200);
    path.insert(path.end(), second.begin() + 1, second.end());
    CoverageRaster r(kCell, kOrigin);
    paint(r, test::samplesAlong(path, 0.5, 12.0, 12.0, 4.0F));
    auto buf = g.flatBuffer(g.line(path).get(), 12.0);
    const double ref = g.area(buf.get());
    EXPECT_NEAR(coveredArea(r), ref, tolerance(g.length(buf.get())));
    // Pappus: a band of width 2w along a curve of radius > w has area 2 w L (L = 2 * pi/2 * 60).
    EXPECT_NEAR(ref, 2.0 * 12.0 * std::numbers::pi * 60.0, 0.002 * ref);
}

TEST(CoverageRaster, MultiPassUnionInsideAreaMatchesGeos) {
    Geos g;
    const Ring area{at(0.3, 0.2), at(180.4, 10.1), at(200.2, 150.3), at(90.7, 190.9), at(-10.1, 120.6)};
    const std::vector<std::vector<Point>> passes{
        {at(-20.1, 30.3), at(220.3, 60.7)},
        {at(-20.1, 45.9), at(220.3, 76.1)},  // overlaps the first
        {at(40.2, -10.4), at(130.8, 210.2)},  // crosses both
    };
    auto curve = test::arc(at(100.3, 100.1), 50.0, 0.0, 1.5 * std::numbers::pi, 300);
    CoverageRaster r(kCell, kOrigin);
    SwathPainter painter(r);
    Geos::Geom uni;
    int run = 0;
    for (const auto& p : passes) {
        for (const auto& s : test::samplesAlong(p, 2.0, 8.0, 8.0, 2.5F, 0, run)) painter.add(s);
        painter.reset();
        auto b = g.flatBuffer(g.line(p).get(), 8.0);
        uni = uni ? g.unite(uni.get(), b.get()) : std::move(b);
        ++run;
    }
    for (const auto& s : test::samplesAlong(curve, 1.0, 6.0, 6.0, 2.5F, 0, run)) painter.add(s);
    uni = g.unite(uni.get(), g.flatBuffer(g.line(curve).get(), 6.0).get());
    auto clipped = g.intersect(uni.get(), g.polygon(area).get());
    const GapReport rep = findGaps(r, MultiPolygon{Polygon{area, {}}}, GapOptions{});
    const double covered = static_cast<double>(rep.covered_cells) * kCell * kCell;
    EXPECT_NEAR(covered, g.area(clipped.get()), tolerance(g.length(clipped.get())));
    // The area polygon itself, cell-counted, against its exact area.
    const double exact_area = std::abs(signedArea(area));
    EXPECT_NEAR(rep.areaM2(), exact_area, tolerance(g.length(g.polygon(area).get())));
}

TEST(CoverageRaster, MergingDenseSamplesKeepsTheCoverage) {
    // 0.2 m samples (10 Hz at 2 m/s) on an S-curve and a straight leg, with and without merging.
    // Merging moves swath edges by at most a quarter cell, so only boundary cells may differ and
    // at most about a quarter of them: bound = 0.25 * perimeter / cell.
    auto path = test::arc(at(60.37, 0.11), 60.0, std::numbers::pi, std::numbers::pi / 2, 400);
    auto second = test::arc(at(60.37, 120.11), 60.0, -std::numbers::pi / 2, 0.0, 400);
    path.insert(path.end(), second.begin() + 1, second.end());
    path.push_back(at(120.37, 300.11));
    const auto samples = test::samplesAlong(path, 0.2, 9.0, 12.0, 3.0F);
    CoverageRaster plain(kCell, kOrigin), merged(kCell, kOrigin);
    {
        SwathPainter p(plain, 20.0, 0.0);
        for (const auto& s : samples) p.add(s);
    }
    std::uint64_t merged_samples = 0;
    {
        SwathPainter p(merged);
        for (const auto& s : samples) p.add(s);
        p.flush();
        merged_samples = p.counters().merged;
    }
    EXPECT_GT(merged_samples, samples.size() / 2);
    std::uint64_t differ = 0;
    std::array<std::uint8_t, kCellsPerTile> codes{};
    plain.forEachTile([&](TileKey key, const CoverageTile& t) {
        plain.tileCodes(t, codes);
        for (int c = 0; c < kCellsPerTile; ++c) {
            const std::int64_t ix = static_cast<std::int64_t>(tileX(key)) * kTileCells + (c & (kTileCells - 1));
            const std::int64_t iy = static_cast<std::int64_t>(tileY(key)) * kTileCells + (c >> kTileShift);
            const bool a = codes[static_cast<std::size_t>(c)] >= kCoveredCode;
            const bool b = merged.code(ix, iy) >= kCoveredCode;
            differ += a != b ? 1U : 0U;
        }
    });
    const double perimeter = 2.0 * (60.0 * std::numbers::pi + 120.0) + 2.0 * 21.0;
    EXPECT_LE(static_cast<double>(differ), 0.25 * perimeter / kCell);
    EXPECT_NEAR(static_cast<double>(merged.coveredCells()), static_cast<double>(plain.coveredCells()),
                0.25 * perimeter / kCell);
}

TEST(CoverageRaster, FastPassLeavesNoHoles) {
    // Samples 5 m apart, half-width 10 m: every cell within 9.5 m of the track must be covered.
    const std::vector<Point> path{at(3.3, 7.7), at(403.3, 307.7)};
    CoverageRaster r(kCell, kOrigin);
    const auto samples = test::samplesAlong(path, 5.0, 10.0, 10.0, 1.5F);
    ASSERT_GT(samples.size(), 90U);
    paint(r, samples);
    const double len = 500.0;
    const double ue = 400.0 / len, un = 300.0 / len;
    int checked = 0;
    for (double a = 0.5; a <= len - 0.5; a += 0.21) {  // a cell away from the ends
        for (double c = -9.5; c <= 9.5; c += 0.23) {
            const Point p{path[0].e_m + a * ue + c * un, path[0].n_m + a * un - c * ue};
            ASSERT_TRUE(r.cellAt(p).covered()) << "hole at along " << a << " across " << c;
            ++checked;
        }
    }
    EXPECT_GT(checked, 100000);
    // ... and nothing beyond 10.5 m.
    for (double a = 0.0; a <= len; a += 1.0) {
        for (double c : {-10.6, 10.6}) {
            EXPECT_FALSE(r.cellAt({path[0].e_m + a * ue + c * un, path[0].n_m + a * un - c * ue}).covered());
        }
    }
}

TEST(CoverageRaster, MarginProfileCentreToEdge) {
    // Mass-rule shape (A ~ r^-3, the trade's mass rule; common practice): margin M0 at the centre,
    // M(u) = M0 (1 + k u^2)^-1.5 with k = M0^(2/3) - 1, exactly 1 at the edge.
    CoverageRaster r(kCell, kOrigin);
    paint(r, test::samplesAlong({at(0.25, 0), at(0.25, 100)}, 1.0, 10.0, 10.0, 8.0F));
    // Centre: 8.0 -> code 128 exactly.
    EXPECT_DOUBLE_EQ(r.cellAt(at(0.25, 50)).margin, 8.0);
    // At u = 0.5 (5 m): k = 8^(2/3) - 1 = 3 -> 8 / (1.75)^1.5 = 3.4553 -> floor(16 M)/16 = 3.4375.
    EXPECT_DOUBLE_EQ(r.cellAt(at(5.25, 50)).margin, std::floor(16.0 * 8.0 / std::pow(1.75, 1.5)) / 16.0);
    // The last cell inside the edge is covered with margin >= 1; outside is not touched.
    // Cell centre 9.75 m (u = 0.95): 8 / (1 + 3 * 0.9025)^1.5 = 1.1206 -> 1.0625.
    EXPECT_DOUBLE_EQ(r.cellAt(at(9.9, 50)).margin, 1.0625);
    EXPECT_EQ(r.cellAt(at(10.5, 50)).margin, 0.0);
    // Symmetric to port.
    EXPECT_DOUBLE_EQ(r.cellAt(at(-4.75, 50)).margin, r.cellAt(at(5.25, 50)).margin);
}

TEST(CoverageRaster, MarginCodeQuantisation) {
    EXPECT_EQ(marginCode(0.0), 0);
    EXPECT_EQ(marginCode(-3.0), 0);
    EXPECT_EQ(marginCode(1.0), kCoveredCode);
    EXPECT_EQ(marginCode(0.9999), kCoveredCode - 1);  // rounded down: never overstated
    EXPECT_EQ(marginCode(1.0624), 16);
    EXPECT_EQ(marginCode(1.0625), 17);
    EXPECT_EQ(marginCode(15.9375), 255);
    EXPECT_EQ(marginCode(1000.0), 255);  // saturates
    EXPECT_DOUBLE_EQ(marginFromCode(255), 15.9375);
}

TEST(CoverageRaster, BestMarginAndEarliestRunKept) {
    CoverageRaster r(kCell, kOrigin);
    paint(r, test::samplesAlong({at(0.25, 0), at(0.25, 50)}, 1.0, 5.0, 5.0, 2.0F, 0, 7));
    paint(r, test::samplesAlong({at(0.25, 0), at(0.25, 50)}, 1.0, 5.0, 5.0, 3.0F, 0, 9));
    paint(r, test::samplesAlong({at(0.25, 0), at(0.25, 50)}, 1.0, 5.0, 5.0, 1.5F, 0, 11));
    EXPECT_DOUBLE_EQ(r.cellAt(at(0.25, 25)).margin, 3.0);
    EXPECT_EQ(r.cellAt(at(0.25, 25)).run, 9);
    CoverageRaster tie(kCell, kOrigin);
    paint(tie, test::samplesAlong({at(0.25, 0), at(0.25, 50)}, 1.0, 5.0, 5.0, 2.0F, 0, 3));
    paint(tie, test::samplesAlong({at(0.25, 0), at(0.25, 50)}, 1.0, 5.0, 5.0, 2.0F, 0, 4));
    EXPECT_EQ(tie.cellAt(at(0.25, 25)).run, 3);
}

TEST(CoverageRaster, InvalidSampleBreaksTheChain) {
    CoverageRaster r(kCell, kOrigin);
    SwathPainter p(r);
    auto s = test::samplesAlong({at(0.25, 0), at(0.25, 40)}, 10.0, 5.0, 5.0, 2.0F);
    ASSERT_EQ(s.size(), 5U);  // N = 0, 10, 20, 30, 40
    s[2].valid = false;       // no quad 10-20 nor 20-30
    for (const auto& x : s) p.add(x);
    p.flush();
    EXPECT_TRUE(r.cellAt(at(0.25, 5)).covered());
    EXPECT_FALSE(r.cellAt(at(0.25, 15)).covered());
    EXPECT_FALSE(r.cellAt(at(0.25, 25)).covered());
    EXPECT_TRUE(r.cellAt(at(0.25, 35)).covered());
    EXPECT_EQ(p.counters().invalid, 1U);
    EXPECT_EQ(p.counters().quads, 2U);
}

TEST(CoverageRaster, LongStepAndNonDetectingSamplesPaintNothing) {
    CoverageRaster r(kCell, kOrigin);
    SwathPainter p(r, 20.0);
    auto s = test::samplesAlong({at(0.25, 0), at(0.25, 50)}, 25.0, 5.0, 5.0, 2.0F);
    for (const auto& x : s) p.add(x);
    EXPECT_EQ(r.coveredCells(), 0U);
    EXPECT_EQ(p.counters().long_steps, 2U);
    CoverageRaster r2(kCell, kOrigin);
    paint(r2, test::samplesAlong({at(0.25, 0), at(0.25, 50)}, 1.0, 5.0, 5.0, 0.9F));
    EXPECT_EQ(r2.coveredCells(), 0U);  // centre margin below 1 detects nothing
}

TEST(CoverageRaster, ContentHashIsStableAndSensitive) {
    auto build = [](float m, double shift) {
        CoverageRaster r(kCell, kOrigin);
        paint(r, test::samplesAlong({at(1.0 + shift, 0), at(80, 90)}, 1.0, 6.0, 4.0, m, 0, 2));
        paint(r, test::samplesAlong({at(-30, 40), at(90, 10)}, 1.0, 3.0, 3.0, m, 1, 5));
        return r;
    };
    const auto a = build(2.0F, 0.0);
    const auto b = build(2.0F, 0.0);
    EXPECT_EQ(a.contentHash(), b.contentHash());
    CoverageRaster copy = a;
    EXPECT_EQ(copy.contentHash(), a.contentHash());
    EXPECT_NE(build(2.1F, 0.0).contentHash(), a.contentHash());  // margins differ
    EXPECT_NE(build(2.0F, 0.5).contentHash(), a.contentHash());  // one pass moved by a cell
}

TEST(CoverageRaster, DirtyGenerationsMarkOnlyChangedTiles) {
    CoverageRaster r(kCell, kOrigin);
    paint(r, test::samplesAlong({at(0.25, 0), at(0.25, 200)}, 1.0, 5.0, 5.0, 2.0F));
    const auto g0 = r.generation();
    const auto tiles0 = r.tileCount();
    EXPECT_TRUE(r.tilesChangedSince(g0).empty());
    // A short pass far from the first touches only its own tiles.
    paint(r, test::samplesAlong({at(500.25, 0), at(500.25, 10)}, 1.0, 2.0, 2.0, 2.0F));
    const auto changed = r.tilesChangedSince(g0);
    EXPECT_EQ(changed.size(), r.tileCount() - tiles0);
    // Re-painting the same pass with a weaker margin changes nothing.
    const auto g1 = r.generation();
    paint(r, test::samplesAlong({at(0.25, 0), at(0.25, 200)}, 1.0, 5.0, 5.0, 1.5F));
    EXPECT_TRUE(r.tilesChangedSince(g1).empty());
}

TEST(CoverageRaster, MemoryUnderTwoBytesPerTouchedCellOverlappingLines) {
    // Adjacent lines whose swaths overlap by 1 m: blocks along the overlaps hold two runs and get
    // a run plane; nearly every cell of an allocated block is touched.
    CoverageRaster r(kCell, kOrigin);
    SwathPainter p(r);
    for (int k = 0; k < 20; ++k) {
        for (const auto& s : test::samplesAlong({at(8.0 * k, 0), at(8.0 * k, 400)}, 1.0, 4.5, 4.5, 2.0F, 0, k)) {
            p.add(s);
        }
        p.reset();
    }
    EXPECT_GT(r.runPlaneCount(), 0U);
    const double per_touched = static_cast<double>(r.memoryBytes()) / static_cast<double>(r.touchedCells());
    EXPECT_LT(per_touched, 2.0);
    EXPECT_GT(per_touched, 1.0);  // the margin codes alone take one byte per touched cell
}

TEST(CoverageRaster, MemoryUnderTwoBytesPerTouchedCellIsolatedSwaths) {
    // Swaths 20 m wide, 200 m apart, steering +-3 m (a small copy of the 20 km benchmark): blocks
    // follow the swath edges, whole tiles would be half empty. One run per block: no plane.
    CoverageRaster r(kCell, kOrigin);
    SwathPainter p(r);
    for (int k = 0; k < 4; ++k) {
        std::vector<Point> path;
        for (int m = 0; m <= 2000; m += 5) {
            path.push_back(at(13.7 + 200.0 * k + 3.0 * std::sin(2.0 * std::numbers::pi * m / 200.0), 21.3 + m));
        }
        for (const auto& s : test::samplesAlong(path, 1.0, 10.0, 10.0, 3.0F, 0, k)) p.add(s);
        p.reset();
    }
    EXPECT_EQ(r.runPlaneCount(), 0U);
    const double per_touched = static_cast<double>(r.memoryBytes()) / static_cast<double>(r.touchedCells());
    EXPECT_LT(per_touched, 2.0);
    // Touched cells: 4 swaths of 20 m x 2000 m (the wobble does not change a swept band's area).
    EXPECT_NEAR(static_cast<double>(r.touchedCells()) * kCell * kCell, 4 * 20.0 * 2000.0, 0.01 * 4 * 20.0 * 2000.0);
}

TEST(CoverageRaster, RunsPerCellAcrossBlocksAndPlanes) {
    // Run 4 paints a 6 m band, run 6 a stronger 2 m band inside it, run 8 a weaker band over all
    // (no change), run 9 an equal band beside (tie: run 4 stays). Blocks holding both runs 4 and
    // 6 need a plane; others keep one index.
    CoverageRaster r(kCell, kOrigin);
    paint(r, test::samplesAlong({at(0.0, 0), at(0.0, 40)}, 1.0, 3.0, 3.0, 2.0F, 0, 4));
    EXPECT_EQ(r.runPlaneCount(), 0U);
    const auto blocks = r.blockCount();
    paint(r, test::samplesAlong({at(0.0, 10), at(0.0, 30)}, 1.0, 1.0, 1.0, 5.0F, 0, 6));
    EXPECT_EQ(r.blockCount(), blocks);  // inside painted blocks only
    EXPECT_GT(r.runPlaneCount(), 0U);
    paint(r, test::samplesAlong({at(0.0, 0), at(0.0, 40)}, 1.0, 3.0, 3.0, 1.5F, 0, 8));
    paint(r, test::samplesAlong({at(0.0, 0), at(0.0, 40)}, 1.0, 3.0, 3.0, 2.0F, 0, 9));
    for (double n = 0.25; n < 40.0; n += 0.5) {
        for (double e = -3.75; e < 4.0; e += 0.5) {
            const auto c = r.cellAt(at(e, n));
            // Run 6 wins only at |e| = 0.25 m: there 5 (1 + 1.924 * 0.0625)^-1.5 = 4.2 > 2; at
            // 0.75 m its 5 (1 + 1.924 * 0.5625)^-1.5 = 1.66 is below run 4's 2 (1 + 0.587 * 0.0625)^-1.5
            // = 1.89 (k = M0^(2/3) - 1 of each pass; see MarginProfileCentreToEdge).
            const bool inner = n > 10.0 && n < 30.0 && std::abs(e) < 0.5;
            const bool band = std::abs(e) < 3.0;
            if (inner) {
                EXPECT_EQ(c.run, 6) << e << " " << n;
            } else if (band) {
                EXPECT_EQ(c.run, 4) << e << " " << n;
            } else {
                EXPECT_EQ(c.run, kRunNone) << e << " " << n;
                EXPECT_EQ(c.margin, 0.0);
            }
        }
    }
}

TEST(CoverageRaster, RowPiecesAndTileCodesAgreeWithCellLookups) {
    CoverageRaster r(kCell, kOrigin);
    paint(r, test::samplesAlong({at(3.1, 2.9), at(97.3, 61.7)}, 1.0, 6.0, 4.0, 3.0F, 0, 1));
    paint(r, test::samplesAlong({at(-20.0, 50.0), at(60.0, -5.0)}, 1.0, 3.0, 3.0, 2.0F, 0, 2));
    std::uint64_t covered = 0;
    for (std::int64_t j = -40; j < 160; ++j) {
        std::int64_t next = -90;
        r.forEachRowPiece(j, -90, 230, [&](std::int64_t a, std::int64_t e, const std::uint8_t* codes) {
            EXPECT_EQ(a, next);  // pieces are contiguous, in order, non-empty
            EXPECT_LT(a, e);
            next = e;
            for (std::int64_t i = a; i < e; ++i) {
                const std::uint8_t q = codes == nullptr ? 0 : codes[i - a];
                ASSERT_EQ(q, r.code(i, j)) << i << " " << j;
                covered += q >= kCoveredCode ? 1U : 0U;
            }
        });
        EXPECT_EQ(next, 230);
    }
    EXPECT_EQ(covered, r.coveredCells());  // the window holds both passes
    std::array<std::uint8_t, kCellsPerTile> codes{};
    std::size_t tiles = 0;
    r.forEachTile([&](TileKey key, const CoverageTile& t) {
        ++tiles;
        EXPECT_EQ(r.tile(tileX(key), tileY(key)), &t);
        r.tileCodes(t, codes);
        for (int c = 0; c < kCellsPerTile; ++c) {
            const std::int64_t ix = static_cast<std::int64_t>(tileX(key)) * kTileCells + (c & (kTileCells - 1));
            const std::int64_t iy = static_cast<std::int64_t>(tileY(key)) * kTileCells + (c >> kTileShift);
            ASSERT_EQ(codes[static_cast<std::size_t>(c)], r.code(ix, iy));
            ASSERT_EQ(r.runAt(t, c), r.cell(ix, iy).run);
        }
    });
    EXPECT_EQ(tiles, r.tileCount());
}

TEST(CoverageRaster, CopyIsIndependent) {
    // flyInfill paints a copy: the original must not change.
    CoverageRaster r(kCell, kOrigin);
    paint(r, test::samplesAlong({at(0.25, 0), at(0.25, 100)}, 1.0, 5.0, 5.0, 2.0F, 0, 1));
    const auto hash = r.contentHash();
    const auto covered = r.coveredCells();
    CoverageRaster copy = r;
    paint(copy, test::samplesAlong({at(0.25, 50), at(0.25, 150)}, 1.0, 5.0, 5.0, 3.0F, 0, 2));
    paint(copy, test::samplesAlong({at(300.25, 0), at(300.25, 100)}, 1.0, 5.0, 5.0, 3.0F, 0, 3));
    EXPECT_EQ(r.contentHash(), hash);
    EXPECT_EQ(r.coveredCells(), covered);
    EXPECT_EQ(r.cellAt(at(0.25, 75)).run, 1);
    EXPECT_EQ(copy.cellAt(at(0.25, 75)).run, 2);
    EXPECT_GT(copy.coveredCells(), covered);
}

}  // namespace
}  // namespace sg::coverage
