// The tiled coverage raster and its scanline fill of swept quadrilaterals; see coverage_raster.hpp.
#include "coverage/coverage_raster.hpp"

#include <algorithm>
#include <bit>
#include <cmath>
#include <limits>
#include <stdexcept>

namespace sg::coverage {

namespace {

constexpr double kCodeScale = 16.0;  // codes per unit margin

// 64-bit mixing step (the finaliser of SplitMix64, Steele et al. 2014): stable across platforms.
std::uint64_t mix(std::uint64_t h, std::uint64_t v) {
    std::uint64_t z = h ^ (v + 0x9E3779B97F4A7C15ULL + (h << 6) + (h >> 2));
    z = (z ^ (z >> 30)) * 0xBF58476D1CE4E5B9ULL;
    z = (z ^ (z >> 27)) * 0x94D049BB133111EBULL;
    return z ^ (z >> 31);
}

struct XY {
    double x, y;
};

}  // namespace

std::uint8_t marginCode(double margin) {
    if (!(margin > 0.0)) return 0;
    const double q = std::floor(margin * kCodeScale);
    return static_cast<std::uint8_t>(std::min(q, 255.0));
}

double marginFromCode(std::uint8_t code) { return code / kCodeScale; }

CoverageRaster::CoverageRaster(double cell_size_m, Point origin)
    : m_cell_m(cell_size_m), m_inv_cell(1.0 / cell_size_m), m_origin(origin) {
    if (!(cell_size_m > 0.0 && cell_size_m <= 1000.0)) {
        throw std::invalid_argument("coverage raster: cell size must be in (0, 1000] m");
    }
}

// ---- tile index -------------------------------------------------------------------------------

namespace {
std::size_t slotOf(TileKey key, std::size_t mask) { return static_cast<std::size_t>(mix(0, key)) & mask; }
}  // namespace

std::uint32_t CoverageRaster::TileIndex::find(TileKey key) const {
    if (m_keys.empty()) return 0;
    const std::size_t mask = m_keys.size() - 1;
    for (std::size_t s = slotOf(key, mask);; s = (s + 1) & mask) {
        if (m_values[s] == 0) return 0;
        if (m_keys[s] == key) return m_values[s];
    }
}

void CoverageRaster::TileIndex::insert(TileKey key, std::uint32_t value) {
    if (4 * (m_count + 1) > 3 * m_keys.size()) grow();
    const std::size_t mask = m_keys.size() - 1;
    std::size_t s = slotOf(key, mask);
    while (m_values[s] != 0) s = (s + 1) & mask;
    m_keys[s] = key;
    m_values[s] = value;
    ++m_count;
}

void CoverageRaster::TileIndex::grow() {
    const std::size_t n = m_keys.empty() ? 64 : 2 * m_keys.size();
    std::vector<TileKey> keys(n, 0);
    std::vector<std::uint32_t> values(n, 0);
    const std::size_t mask = n - 1;
    for (std::size_t i = 0; i < m_keys.size(); ++i) {
        if (m_values[i] == 0) continue;
        std::size_t s = slotOf(m_keys[i], mask);
        while (values[s] != 0) s = (s + 1) & mask;
        keys[s] = m_keys[i];
        values[s] = m_values[i];
    }
    m_keys = std::move(keys);
    m_values = std::move(values);
}

// ---- cells ------------------------------------------------------------------------------------

namespace {
// Block index within the tile and cell offset within the block of tile cell (row, col).
int blockOf(int row, int col) { return (row >> kBlockShift) * kBlocksPerSide + (col >> kBlockShift); }
int offsetOf(int row, int col) { return ((row & (kBlockCells - 1)) << kBlockShift) | (col & (kBlockCells - 1)); }

int runIndexIn(const CoverageBlock& b, const RunPlane* plane, int off) {
    if ((b.runs & CoverageBlock::kPlaneBit) == 0) return static_cast<int>(b.runs & 0xFU);
    return (plane->nibble[static_cast<std::size_t>(off >> 1)] >> ((off & 1) * 4)) & 0xF;
}
}  // namespace

std::int64_t CoverageRaster::cellX(double e_m) const {
    return static_cast<std::int64_t>(std::floor((e_m - m_origin.e_m) * m_inv_cell));
}
std::int64_t CoverageRaster::cellY(double n_m) const {
    return static_cast<std::int64_t>(std::floor((n_m - m_origin.n_m) * m_inv_cell));
}
Point CoverageRaster::cellCentre(std::int64_t ix, std::int64_t iy) const {
    return {m_origin.e_m + (static_cast<double>(ix) + 0.5) * m_cell_m,
            m_origin.n_m + (static_cast<double>(iy) + 0.5) * m_cell_m};
}

const CoverageTile* CoverageRaster::tile(std::int32_t tx, std::int32_t ty) const {
    const std::uint32_t v = m_index.find(tileKey(tx, ty));
    return v == 0 ? nullptr : &m_tiles[v - 1];
}

std::uint8_t CoverageRaster::code(std::int64_t ix, std::int64_t iy) const {
    const CoverageTile* t = tile(static_cast<std::int32_t>(ix >> kTileShift),
                                 static_cast<std::int32_t>(iy >> kTileShift));
    if (t == nullptr) return 0;
    const int row = static_cast<int>(iy & (kTileCells - 1)), col = static_cast<int>(ix & (kTileCells - 1));
    const CoverageBlock* b = block(*t, blockOf(row, col));
    return b == nullptr ? 0 : b->margin[static_cast<std::size_t>(offsetOf(row, col))];
}

int CoverageRaster::runAt(const CoverageTile& t, int cell) const {
    const int row = cell >> kTileShift, col = cell & (kTileCells - 1);
    const CoverageBlock* b = block(t, blockOf(row, col));
    const int off = offsetOf(row, col);
    if (b == nullptr || b->margin[static_cast<std::size_t>(off)] == 0) return kRunNone;
    const RunPlane* plane =
        (b->runs & CoverageBlock::kPlaneBit) != 0 ? &m_planes[b->runs & ~CoverageBlock::kPlaneBit] : nullptr;
    return t.runOfIndex(runIndexIn(*b, plane, off));
}

CoverageRaster::Cell CoverageRaster::cell(std::int64_t ix, std::int64_t iy) const {
    const CoverageTile* t = tile(static_cast<std::int32_t>(ix >> kTileShift),
                                 static_cast<std::int32_t>(iy >> kTileShift));
    if (t == nullptr) return {};
    const int c = static_cast<int>(((iy & (kTileCells - 1)) << kTileShift) | (ix & (kTileCells - 1)));
    return {marginFromCode(code(ix, iy)), runAt(*t, c)};
}

void CoverageRaster::tileCodes(const CoverageTile& t, std::span<std::uint8_t, kCellsPerTile> out) const {
    for (int b = 0; b < kBlocksPerTile; ++b) {
        const CoverageBlock* blk = block(t, b);
        const int row0 = (b / kBlocksPerSide) * kBlockCells, col0 = (b % kBlocksPerSide) * kBlockCells;
        for (int r = 0; r < kBlockCells; ++r) {
            std::uint8_t* dst = out.data() + (row0 + r) * kTileCells + col0;
            if (blk == nullptr) {
                std::fill(dst, dst + kBlockCells, std::uint8_t{0});
            } else {
                std::copy_n(blk->margin.data() + r * kBlockCells, kBlockCells, dst);
            }
        }
    }
}

CoverageTile& CoverageRaster::tileFor(std::int32_t tx, std::int32_t ty) {
    const TileKey key = tileKey(tx, ty);
    if (m_last_tile != 0 && m_last_key == key) return m_tiles[m_last_tile - 1];
    std::uint32_t v = m_index.find(key);
    if (v == 0) {
        const std::uint32_t idx = m_tiles.add();
        m_tiles[idx].key = key;
        v = idx + 1;
        m_index.insert(key, v);
    }
    m_last_key = key;
    m_last_tile = v;
    return m_tiles[v - 1];
}

int CoverageRaster::paletteIndex(CoverageTile& t, int run) {
    if (run == kRunOverflow) return kPaletteSize - 1;
    if (run < 0) return 0;
    for (int i = 1; i < t.palette_used; ++i) {
        if (t.palette[static_cast<std::size_t>(i - 1)] == run) return i;
    }
    if (t.palette_used < kPaletteSize - 1) {
        t.palette[static_cast<std::size_t>(t.palette_used - 1)] = run;
        return t.palette_used++;
    }
    ++m_palette_overflows;
    return kPaletteSize - 1;
}

void CoverageRaster::setRuns(CoverageBlock& b, int first_cell, unsigned mask, int pal) {
    if ((b.runs & CoverageBlock::kPlaneBit) == 0) {
        const auto uniform = static_cast<std::uint8_t>(b.runs & 0xFU);
        if (uniform == pal) return;
        // A second palette index in this block: give it a plane, every cell at the old index
        // (cells still untouched read as "no run" whatever their nibble).
        const std::uint32_t p = m_planes.add();
        if (p >= CoverageBlock::kPlaneBit) throw std::length_error("coverage raster: too many run planes");
        m_planes[p].nibble.fill(static_cast<std::uint8_t>(uniform | (uniform << 4)));
        b.runs = CoverageBlock::kPlaneBit | p;
    }
    RunPlane& plane = m_planes[b.runs & ~CoverageBlock::kPlaneBit];
    for (; mask != 0; mask &= mask - 1) {
        const int cell = first_cell + std::countr_zero(mask);
        auto& nib = plane.nibble[static_cast<std::size_t>(cell >> 1)];
        const int shift = (cell & 1) * 4;
        nib = static_cast<std::uint8_t>((nib & ~(0xF << shift)) | (pal << shift));
    }
}

void CoverageRaster::paintQuad(const std::array<Point, 4>& corners, const QuadProfile& profile,
                               int run) {
    ++m_generation;
    // Corners in cell units relative to the origin (cell (i, j) has its centre at i+0.5, j+0.5).
    std::array<XY, 4> c{};
    double ymin = 1e300, ymax = -1e300;
    for (std::size_t k = 0; k < 4; ++k) {
        c[k] = {(corners[k].e_m - m_origin.e_m) * m_inv_cell,
                (corners[k].n_m - m_origin.n_m) * m_inv_cell};
        ymin = std::min(ymin, c[k].y);
        ymax = std::max(ymax, c[k].y);
    }
    if (!(ymax > ymin)) return;
    // Edges with their end points in a canonical order (lower y first, then lower x), so that
    // two quads sharing an edge compute bit-identical crossings.
    struct Edge {
        double x0, y0, y1, slope;  // x at y: x0 + (y - y0) * slope, for y0 <= y < y1
    };
    std::array<Edge, 4> edges{};
    int nedges = 0;
    for (std::size_t k = 0; k < 4; ++k) {
        XY a = c[k];
        XY b = c[(k + 1) % 4];
        if (a.y > b.y || (a.y == b.y && a.x > b.x)) std::swap(a, b);
        if (a.y == b.y) continue;  // horizontal edges never cross a row centre line
        edges[static_cast<std::size_t>(nedges++)] = {a.x, a.y, b.y, (b.x - a.x) / (b.y - a.y)};
    }

    // Margin profile: signed starboard offset d (cells) of a cell centre from the line through
    // centre0, with the starboard normal (dir_n, -dir_e).
    const double nx = profile.dir_n;
    const double ny = -profile.dir_e;
    const double c0x = (profile.centre0.e_m - m_origin.e_m) * m_inv_cell;
    const double c0y = (profile.centre0.n_m - m_origin.n_m) * m_inv_cell;
    const double wl = profile.left_m * m_inv_cell;
    const double wr = profile.right_m * m_inv_cell;
    const double inv_l2 = wl > 0.0 ? 1.0 / (wl * wl) : 0.0;
    const double inv_r2 = wr > 0.0 ? 1.0 / (wr * wr) : 0.0;
    const double m0 = std::max(1.0, profile.centre_margin);
    const double k = std::cbrt(m0 * m0) - 1.0;  // M0^(2/3) - 1
    const double m0_scaled = m0 * kCodeScale;
    const bool flat = k <= 0.0;

    const std::int64_t j0 = static_cast<std::int64_t>(std::ceil(ymin - 0.5));
    std::array<double, 4> xs{};
    // Last tile and block used (rows of one quad mostly stay in them). Pools never move their
    // elements, so the pointers stay valid while blocks are added.
    TileKey cur_key = 0;
    CoverageTile* cur_tile = nullptr;
    std::uint32_t cur_slot = 0;
    CoverageBlock* cur_block = nullptr;
    for (std::int64_t j = j0;; ++j) {
        const double yc = static_cast<double>(j) + 0.5;
        if (yc >= ymax) break;
        if (yc < ymin) continue;
        int nxs = 0;
        for (int ei = 0; ei < nedges; ++ei) {
            const Edge& e = edges[static_cast<std::size_t>(ei)];
            if (e.y0 <= yc && yc < e.y1) xs[static_cast<std::size_t>(nxs++)] = e.x0 + (yc - e.y0) * e.slope;
        }
        // Insertion sort of at most 4 crossings (std::sort trips a GCC -Warray-bounds false alarm).
        for (int a = 1; a < nxs; ++a) {
            for (int b = a; b > 0 && xs[static_cast<std::size_t>(b)] < xs[static_cast<std::size_t>(b - 1)]; --b) {
                std::swap(xs[static_cast<std::size_t>(b)], xs[static_cast<std::size_t>(b - 1)]);
            }
        }
        const std::int32_t ty = static_cast<std::int32_t>(j >> kTileShift);
        const int brow = static_cast<int>((j >> kBlockShift) & (kBlocksPerSide - 1)) * kBlocksPerSide;
        const int row_off = static_cast<int>(j & (kBlockCells - 1)) * kBlockCells;
        const double d_row = (0.5 - c0x) * nx + (yc - c0y) * ny;
        for (int s = 0; s + 1 < nxs; s += 2) {
            std::int64_t i = static_cast<std::int64_t>(std::ceil(xs[static_cast<std::size_t>(s)] - 0.5));
            const std::int64_t i_end =
                static_cast<std::int64_t>(std::ceil(xs[static_cast<std::size_t>(s + 1)] - 0.5));
            while (i < i_end) {
                // One tile's part of the span.
                const std::int32_t tx = static_cast<std::int32_t>(i >> kTileShift);
                const std::int64_t seg_end =
                    std::min(i_end, (static_cast<std::int64_t>(tx) + 1) << kTileShift);
                if (cur_tile == nullptr || cur_key != tileKey(tx, ty)) {
                    cur_tile = &tileFor(tx, ty);
                    cur_key = tileKey(tx, ty);
                }
                CoverageTile& t = *cur_tile;
                int pal = -1;  // palette slot taken on the first improved cell only
                bool changed = false;
                double d = d_row + nx * static_cast<double>(i);
                while (i < seg_end) {
                    // One block's part: at most 8 cells.
                    const std::int64_t blk_end = std::min(seg_end, (i | (kBlockCells - 1)) + 1);
                    auto& slot = t.block[static_cast<std::size_t>(
                        brow + static_cast<int>((i >> kBlockShift) & (kBlocksPerSide - 1)))];
                    if (slot == 0) {
                        // A new block: every cell of the piece will improve on code 0, so the run
                        // takes its palette slot now and the block starts with that one index.
                        if (pal < 0) pal = paletteIndex(t, run);
                        const std::uint32_t idx = m_blocks.add();
                        m_blocks[idx].runs = static_cast<std::uint32_t>(pal);
                        slot = idx + 1;
                    }
                    if (slot != cur_slot) {
                        cur_slot = slot;
                        cur_block = &m_blocks[slot - 1];
                    }
                    CoverageBlock& b = *cur_block;
                    const int first = row_off + static_cast<int>(i & (kBlockCells - 1));
                    std::uint8_t* cells = b.margin.data() + first;
                    const int n = static_cast<int>(blk_end - i);
                    unsigned improved = 0;
                    for (int o = 0; o < n; ++o, d += nx) {
                        int q;
                        if (flat) {
                            q = kCoveredCode;
                        } else {
                            const double u2 = d * d * (d > 0.0 ? inv_r2 : inv_l2);
                            const double sfac = 1.0 + k * u2;
                            const double m = m0_scaled / (sfac * std::sqrt(sfac));
                            q = m >= 255.0 ? 255 : std::max(static_cast<int>(m), int{kCoveredCode});
                        }
                        if (q > cells[o]) {
                            cells[o] = static_cast<std::uint8_t>(q);
                            improved |= 1U << o;
                        }
                    }
                    if (improved != 0) {
                        if (pal < 0) pal = paletteIndex(t, run);
                        // Fast path: the block's one index is this run's.
                        if (b.runs != static_cast<std::uint32_t>(pal)) setRuns(b, first, improved, pal);
                        changed = true;
                    }
                    i = blk_end;
                }
                if (changed) {
                    t.generation = m_generation;
                    if (m_track_dirty) markDirty(t);
                }
            }
        }
    }
}

void CoverageRaster::forEachTile(const std::function<void(TileKey, const CoverageTile&)>& fn) const {
    for (std::uint32_t i = 0; i < m_tiles.size(); ++i) fn(m_tiles[i].key, m_tiles[i]);
}

std::vector<TileKey> CoverageRaster::sortedTileKeys() const {
    std::vector<TileKey> keys;
    keys.reserve(m_tiles.size());
    for (std::uint32_t i = 0; i < m_tiles.size(); ++i) keys.push_back(m_tiles[i].key);
    std::sort(keys.begin(), keys.end(), [](TileKey a, TileKey b) {
        return tileY(a) != tileY(b) ? tileY(a) < tileY(b) : tileX(a) < tileX(b);
    });
    return keys;
}

std::vector<TileKey> CoverageRaster::tilesChangedSince(std::uint64_t since) const {
    std::vector<TileKey> keys;
    for (std::uint32_t i = 0; i < m_tiles.size(); ++i) {
        if (m_tiles[i].generation > since) keys.push_back(m_tiles[i].key);
    }
    return keys;
}

// Untouched cells are never in a block but a block may hold untouched cells: count per block.
std::uint64_t CoverageRaster::touchedCells() const {
    std::uint64_t n = 0;
    for (std::uint32_t i = 0; i < m_blocks.size(); ++i) {
        for (std::uint8_t q : m_blocks[i].margin) n += q > 0 ? 1U : 0U;
    }
    return n;
}

std::uint64_t CoverageRaster::coveredCells() const {
    std::uint64_t n = 0;
    for (std::uint32_t i = 0; i < m_blocks.size(); ++i) {
        for (std::uint8_t q : m_blocks[i].margin) n += q >= kCoveredCode ? 1U : 0U;
    }
    return n;
}

std::size_t CoverageRaster::memoryBytes() const {
    return sizeof(*this) + m_index.bytes() + m_tiles.bytes() + m_blocks.bytes() + m_planes.bytes();
}

std::uint64_t CoverageRaster::contentHash() const {
    // The same sequence as the earlier one-plane layout (tile key, then per cell in row-major
    // order code << 32 | run id), so hashes recorded before the block layout still compare.
    std::uint64_t h = mix(0, std::bit_cast<std::uint64_t>(m_cell_m));
    h = mix(h, std::bit_cast<std::uint64_t>(m_origin.e_m));
    h = mix(h, std::bit_cast<std::uint64_t>(m_origin.n_m));
    std::array<std::uint8_t, kCellsPerTile> codes{};
    for (TileKey key : sortedTileKeys()) {
        const CoverageTile& t = m_tiles[m_index.find(key) - 1];
        tileCodes(t, codes);
        bool any = false;
        for (std::uint8_t q : codes) any = any || q > 0;
        if (!any) continue;  // an allocated but empty tile is the same content as no tile
        h = mix(h, key);
        for (int c = 0; c < kCellsPerTile; ++c) {
            const std::uint64_t v = (static_cast<std::uint64_t>(codes[static_cast<std::size_t>(c)]) << 32) |
                                    static_cast<std::uint32_t>(runAt(t, c));
            h = mix(h, v);
        }
    }
    return h;
}

// ---- merging ----------------------------------------------------------------------------------

void CoverageRaster::markDirty(CoverageTile& t) {
    if (t.dirty != 0) return;
    t.dirty = 1;
    m_dirty.push_back(m_index.find(t.key) - 1);
}

std::vector<TileKey> CoverageRaster::takeDirtyTiles() {
    std::vector<TileKey> keys;
    keys.reserve(m_dirty.size());
    for (std::uint32_t i : m_dirty) {
        m_tiles[i].dirty = 0;
        keys.push_back(m_tiles[i].key);
    }
    m_dirty.clear();
    return keys;
}

std::uint64_t CoverageRaster::mergeTile(TileKey key, std::uint16_t block_mask,
                                        std::span<const std::uint8_t, kCellsPerTile> codes,
                                        std::span<const std::int32_t, kCellsPerTile> runs) {
    if (block_mask == 0) return 0;
    ++m_generation;
    CoverageTile& t = tileFor(tileX(key), tileY(key));
    std::uint64_t newly = 0;
    bool changed = false;
    // Runs repeat along a tile: remember the last run's palette index.
    int last_run = std::numeric_limits<int>::min(), last_pal = 0;
    const auto palOf = [&](int run) {
        if (run != last_run) {
            last_pal = paletteIndex(t, run);
            last_run = run;
        }
        return last_pal;
    };
    for (int b = 0; b < kBlocksPerTile; ++b) {
        if ((block_mask & (1U << b)) == 0) continue;
        const int row0 = (b / kBlocksPerSide) * kBlockCells, col0 = (b % kBlocksPerSide) * kBlockCells;
        auto& slot = t.block[static_cast<std::size_t>(b)];
        for (int off = 0; off < kCellsPerBlock; ++off) {
            const int ci = (row0 + (off >> kBlockShift)) * kTileCells + col0 + (off & (kBlockCells - 1));
            const std::uint8_t q = codes[static_cast<std::size_t>(ci)];
            if (q == 0) continue;
            const int run = runs[static_cast<std::size_t>(ci)];
            if (slot == 0) {
                const std::uint32_t idx = m_blocks.add();
                m_blocks[idx].runs = static_cast<std::uint32_t>(palOf(run));
                slot = idx + 1;
            }
            CoverageBlock& blk = m_blocks[slot - 1];
            const std::uint8_t cur = blk.margin[static_cast<std::size_t>(off)];
            if (q < cur) continue;
            if (q == cur) {
                const RunPlane* plane = (blk.runs & CoverageBlock::kPlaneBit) != 0
                                            ? &m_planes[blk.runs & ~CoverageBlock::kPlaneBit]
                                            : nullptr;
                const int cur_run = t.runOfIndex(runIndexIn(blk, plane, off));
                if (mergeRank(run) >= mergeRank(cur_run)) continue;
            }
            if (cur < kCoveredCode && q >= kCoveredCode) ++newly;
            blk.margin[static_cast<std::size_t>(off)] = q;
            const int pal = palOf(run);
            if (blk.runs != static_cast<std::uint32_t>(pal)) setRuns(blk, off, 1U, pal);
            changed = true;
        }
    }
    if (changed) {
        t.generation = m_generation;
        if (m_track_dirty) markDirty(t);
    }
    return newly;
}

std::uint64_t CoverageRaster::mergeFrom(const CoverageRaster& other, int run_offset) {
    if (other.m_cell_m != m_cell_m || other.m_origin.e_m != m_origin.e_m ||
        other.m_origin.n_m != m_origin.n_m) {
        throw std::invalid_argument("coverage raster: merge needs the same cell size and origin");
    }
    std::uint64_t newly = 0;
    std::array<std::uint8_t, kCellsPerTile> codes{};
    std::array<std::int32_t, kCellsPerTile> runs{};
    for (std::uint32_t i = 0; i < other.m_tiles.size(); ++i) {
        const CoverageTile& t = other.m_tiles[i];
        std::uint16_t mask = 0;
        for (int b = 0; b < kBlocksPerTile; ++b)
            if (t.block[static_cast<std::size_t>(b)] != 0) mask = static_cast<std::uint16_t>(mask | (1U << b));
        if (mask == 0) continue;
        other.tileCodes(t, codes);
        for (int c = 0; c < kCellsPerTile; ++c) {
            int r = codes[static_cast<std::size_t>(c)] == 0 ? kRunNone : other.runAt(t, c);
            if (r >= 0) r += run_offset;
            runs[static_cast<std::size_t>(c)] = r;
        }
        newly += mergeTile(t.key, mask, codes, runs);
    }
    return newly;
}

}  // namespace sg::coverage
