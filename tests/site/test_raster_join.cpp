// The join of coverage rasters behind a site (CoverageRaster::mergeTile, docs/site.md): the per-cell
// best margin, ties to the first-ranked run. Checked as the algebra it claims to be: the same
// result for every order and grouping of the inputs (commutative, associative), idempotent, the
// identity of an empty raster, equal to painting everything into one raster when the runs do not
// tie, and the bytes of a session summary round-tripping to the same content hash.
#include <gtest/gtest.h>

#include <algorithm>
#include <array>
#include <random>
#include <vector>

#include "coverage/coverage_raster.hpp"
#include "coverage/raster_io.hpp"

namespace {

using namespace sg::coverage;

struct Stroke {
    std::array<Point, 4> corners;
    QuadProfile profile;
    int run;
};

// Random swept quads (strips 2-12 m wide, 5-40 m long) over a square of extent_m, runs 0..run_max.
std::vector<Stroke> strokes(unsigned seed, int n, int run_max, int run_base = 0, double extent_m = 120.0) {
    std::mt19937 rng(seed);
    std::uniform_real_distribution<double> pos(0.0, extent_m), ang(0.0, 6.283185307179586), len(5.0, 40.0),
        half(1.0, 6.0), margin(1.0, 20.0);
    std::uniform_int_distribution<int> run(-1, run_max);
    std::vector<Stroke> out;
    for (int i = 0; i < n; ++i) {
        const Point a{pos(rng), pos(rng)};
        const double t = ang(rng), l = len(rng);
        const double de = std::sin(t), dn = std::cos(t);
        const Point b{a.e_m + de * l, a.n_m + dn * l};
        const double hl = half(rng), hr = half(rng);
        // Port is (-dn, de), starboard (dn, -de).
        Stroke s;
        s.corners = {Point{a.e_m - dn * hl, a.n_m + de * hl}, Point{b.e_m - dn * hl, b.n_m + de * hl},
                     Point{b.e_m + dn * hr, b.n_m - de * hr}, Point{a.e_m + dn * hr, a.n_m - de * hr}};
        s.profile = {a, b, de, dn, hl, hr, margin(rng)};
        const int r = run(rng);
        s.run = r < 0 ? kRunNone : r + run_base;
        out.push_back(s);
    }
    return out;
}

CoverageRaster paint(const std::vector<Stroke>& ss) {
    CoverageRaster r(0.5, {0.0, 0.0});
    for (const auto& s : ss) r.paintQuad(s.corners, s.profile, s.run);
    return r;
}

CoverageRaster joined(const std::vector<const CoverageRaster*>& parts) {
    CoverageRaster r(0.5, {0.0, 0.0});
    for (const auto* p : parts) r.mergeFrom(*p);
    return r;
}

TEST(RasterJoin, EveryOrderGivesTheSameRaster) {
    // Three sessions with their own run ranges (as a site numbers them), overlapping in space.
    const auto a = paint(strokes(1, 60, 5, 0));
    const auto b = paint(strokes(2, 60, 5, 6));
    const auto c = paint(strokes(3, 60, 5, 12));
    std::vector<const CoverageRaster*> order{&a, &b, &c};
    std::sort(order.begin(), order.end());
    const std::uint64_t first = joined(order).contentHash();
    int permutations = 0;
    do {
        EXPECT_EQ(joined(order).contentHash(), first);
        ++permutations;
    } while (std::next_permutation(order.begin(), order.end()));
    EXPECT_EQ(permutations, 6);
    // Not a trivial result: the join differs from each part.
    EXPECT_NE(first, a.contentHash());
    EXPECT_NE(first, c.contentHash());
}

TEST(RasterJoin, GroupingDoesNotMatter) {
    const auto a = paint(strokes(4, 50, 4, 0));
    const auto b = paint(strokes(5, 50, 4, 5));
    const auto c = paint(strokes(6, 50, 4, 10));
    const auto ab = joined({&a, &b});
    const auto bc = joined({&b, &c});
    EXPECT_EQ(joined({&ab, &c}).contentHash(), joined({&a, &bc}).contentHash());
}

TEST(RasterJoin, IdempotentAndEmptyIsIdentity) {
    const auto a = paint(strokes(7, 80, 6));
    const CoverageRaster empty(0.5, {0.0, 0.0});
    EXPECT_EQ(joined({&a, &a}).contentHash(), joined({&a}).contentHash());
    EXPECT_EQ(joined({&a, &empty}).contentHash(), joined({&a}).contentHash());
    // Joining into an empty raster reproduces the raster itself (codes and runs).
    EXPECT_EQ(joined({&a}).contentHash(), a.contentHash());
}

TEST(RasterJoin, EqualsPaintingBothWhenOneRunEach) {
    // With one run per session and later runs numbered higher, the join is what painting every
    // stroke into one raster in time order gives (painting keeps the earliest run at equal margin).
    auto s1 = strokes(8, 40, 0, 0);
    auto s2 = strokes(9, 40, 0, 1);
    for (auto& s : s1) s.run = 0;
    for (auto& s : s2) s.run = 1;
    std::vector<Stroke> all = s1;
    all.insert(all.end(), s2.begin(), s2.end());
    const auto a = paint(s1), b = paint(s2), both = paint(all);
    EXPECT_EQ(joined({&b, &a}).contentHash(), both.contentHash());
}

TEST(RasterJoin, CountsNewlyCoveredCells) {
    const auto a = paint(strokes(10, 30, 3));
    CoverageRaster r(0.5, {0.0, 0.0});
    EXPECT_EQ(r.mergeFrom(a), a.coveredCells());
    EXPECT_EQ(r.mergeFrom(a), 0U);
}

TEST(RasterJoin, RunOffsetShiftsRealRunsOnly) {
    std::vector<Stroke> ss = strokes(11, 10, 2);
    ss[0].run = kRunNone;
    const auto a = paint(ss);
    CoverageRaster r(0.5, {0.0, 0.0});
    r.mergeFrom(a, 100);
    std::array<std::uint8_t, kCellsPerTile> ca{}, cr{};
    a.forEachTile([&](TileKey key, const CoverageTile& ta) {
        const CoverageTile* tr = r.tile(tileX(key), tileY(key));
        ASSERT_NE(tr, nullptr);
        a.tileCodes(ta, ca);
        r.tileCodes(*tr, cr);
        for (int c = 0; c < kCellsPerTile; ++c) {
            ASSERT_EQ(ca[static_cast<std::size_t>(c)], cr[static_cast<std::size_t>(c)]);
            if (ca[static_cast<std::size_t>(c)] == 0) continue;
            const int ra = a.runAt(ta, c), rr = r.runAt(*tr, c);
            EXPECT_EQ(rr, ra >= 0 ? ra + 100 : ra);
        }
    });
}

TEST(RasterJoin, MismatchedGridIsRefused) {
    const auto a = paint(strokes(12, 5, 1));
    CoverageRaster other_cell(0.25, {0.0, 0.0}), other_origin(0.5, {100.0, 0.0});
    EXPECT_THROW(other_cell.mergeFrom(a), std::invalid_argument);
    EXPECT_THROW(other_origin.mergeFrom(a), std::invalid_argument);
    const auto bytes = rasterToBytes(a);
    EXPECT_THROW(mergeRasterBytes(bytes, other_cell, 0), std::runtime_error);
}

TEST(RasterBytes, RoundTripKeepsTheContentHash) {
    // Many runs per tile (planes) and more than 14 (palette overflow) in one small raster.
    std::vector<Stroke> ss = strokes(13, 200, 30, 0, 20.0);
    const auto a = paint(ss);
    ASSERT_GT(a.runPlaneCount(), 0U);
    ASSERT_GT(a.paletteOverflows(), 0U);
    const auto bytes = rasterToBytes(a);
    const auto info = rasterBytesInfo(bytes);
    EXPECT_EQ(info.cell_size_m, 0.5);
    EXPECT_EQ(info.tiles, a.tileCount());
    CoverageRaster r(0.5, {0.0, 0.0});
    EXPECT_EQ(mergeRasterBytes(bytes, r, 0), a.coveredCells());
    EXPECT_EQ(r.contentHash(), a.contentHash());
    EXPECT_EQ(r.coveredCells(), a.coveredCells());
}

TEST(RasterBytes, DamagedBytesAreRefused) {
    const auto bytes = rasterToBytes(paint(strokes(14, 20, 3)));
    CoverageRaster r(0.5, {0.0, 0.0});
    EXPECT_THROW(mergeRasterBytes(bytes.substr(0, bytes.size() / 2), r, 0), std::runtime_error);
    EXPECT_THROW(mergeRasterBytes("not a raster at all", r, 0), std::runtime_error);
}

}  // namespace
