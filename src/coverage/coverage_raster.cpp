// The tiled coverage raster and its scanline fill of swept quadrilaterals; see coverage_raster.hpp.
#include "coverage/coverage_raster.hpp"

#include <algorithm>
#include <bit>
#include <cmath>
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

int CoverageTile::runAt(int cell) const {
    const int idx = runIndexAt(cell);
    if (idx == 0) return kRunNone;
    if (idx == kPaletteSize - 1) return kRunOverflow;
    return palette[static_cast<std::size_t>(idx)];
}

CoverageRaster::CoverageRaster(double cell_size_m, Point origin)
    : m_cell_m(cell_size_m), m_inv_cell(1.0 / cell_size_m), m_origin(origin) {
    if (!(cell_size_m > 0.0 && cell_size_m <= 1000.0)) {
        throw std::invalid_argument("coverage raster: cell size must be in (0, 1000] m");
    }
}

CoverageRaster::CoverageRaster(const CoverageRaster& other)
    : m_cell_m(other.m_cell_m), m_inv_cell(other.m_inv_cell), m_origin(other.m_origin),
      m_generation(other.m_generation), m_palette_overflows(other.m_palette_overflows) {
    m_tiles.reserve(other.m_tiles.size());
    for (const auto& [key, t] : other.m_tiles) m_tiles.emplace(key, std::make_unique<CoverageTile>(*t));
}

CoverageRaster& CoverageRaster::operator=(const CoverageRaster& other) {
    if (this != &other) {
        CoverageRaster copy(other);
        *this = std::move(copy);
    }
    return *this;
}

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
    auto it = m_tiles.find(tileKey(tx, ty));
    return it == m_tiles.end() ? nullptr : it->second.get();
}

std::uint8_t CoverageRaster::code(std::int64_t ix, std::int64_t iy) const {
    const CoverageTile* t = tile(static_cast<std::int32_t>(ix >> kTileShift),
                                 static_cast<std::int32_t>(iy >> kTileShift));
    if (t == nullptr) return 0;
    const int c = static_cast<int>(((iy & (kTileCells - 1)) << kTileShift) | (ix & (kTileCells - 1)));
    return t->margin[static_cast<std::size_t>(c)];
}

CoverageRaster::Cell CoverageRaster::cell(std::int64_t ix, std::int64_t iy) const {
    const CoverageTile* t = tile(static_cast<std::int32_t>(ix >> kTileShift),
                                 static_cast<std::int32_t>(iy >> kTileShift));
    if (t == nullptr) return {};
    const int c = static_cast<int>(((iy & (kTileCells - 1)) << kTileShift) | (ix & (kTileCells - 1)));
    return {marginFromCode(t->margin[static_cast<std::size_t>(c)]), t->runAt(c)};
}

CoverageTile& CoverageRaster::tileFor(std::int32_t tx, std::int32_t ty) {
    const TileKey key = tileKey(tx, ty);
    if (m_last_tile != nullptr && m_last_key == key) return *m_last_tile;
    auto& slot = m_tiles[key];
    if (!slot) slot = std::make_unique<CoverageTile>();
    m_last_key = key;
    m_last_tile = slot.get();
    return *slot;
}

int CoverageRaster::paletteIndex(CoverageTile& t, int run) {
    if (run < 0) return 0;
    for (int i = 1; i < t.palette_used; ++i) {
        if (t.palette[static_cast<std::size_t>(i)] == run) return i;
    }
    if (t.palette_used < kPaletteSize - 1) {
        t.palette[t.palette_used] = run;
        return t.palette_used++;
    }
    ++m_palette_overflows;
    return kPaletteSize - 1;
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
        const int row_base = static_cast<int>((j & (kTileCells - 1)) << kTileShift);
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
                CoverageTile& t = tileFor(tx, ty);
                int pal = -1;  // palette slot taken on the first improved cell only
                bool changed = false;
                int cidx = row_base + static_cast<int>(i & (kTileCells - 1));
                double d = d_row + nx * static_cast<double>(i);
                for (; i < seg_end; ++i, ++cidx, d += nx) {
                    int q;
                    if (flat) {
                        q = kCoveredCode;
                    } else {
                        const double u2 = d * d * (d > 0.0 ? inv_r2 : inv_l2);
                        const double sfac = 1.0 + k * u2;
                        const double m = m0_scaled / (sfac * std::sqrt(sfac));
                        q = m >= 255.0 ? 255 : std::max(static_cast<int>(m), int{kCoveredCode});
                    }
                    auto& cell = t.margin[static_cast<std::size_t>(cidx)];
                    if (q > cell) {
                        cell = static_cast<std::uint8_t>(q);
                        if (pal < 0) pal = paletteIndex(t, run);
                        auto& nib = t.run_nibble[static_cast<std::size_t>(cidx >> 1)];
                        const int shift = (cidx & 1) * 4;
                        nib = static_cast<std::uint8_t>((nib & ~(0xF << shift)) | (pal << shift));
                        changed = true;
                    }
                }
                if (changed) t.generation = m_generation;
            }
        }
    }
}

void CoverageRaster::forEachTile(const std::function<void(TileKey, const CoverageTile&)>& fn) const {
    for (const auto& [key, t] : m_tiles) fn(key, *t);
}

std::vector<TileKey> CoverageRaster::sortedTileKeys() const {
    std::vector<TileKey> keys;
    keys.reserve(m_tiles.size());
    for (const auto& kv : m_tiles) keys.push_back(kv.first);
    std::sort(keys.begin(), keys.end(), [](TileKey a, TileKey b) {
        return tileY(a) != tileY(b) ? tileY(a) < tileY(b) : tileX(a) < tileX(b);
    });
    return keys;
}

std::vector<TileKey> CoverageRaster::tilesChangedSince(std::uint64_t since) const {
    std::vector<TileKey> keys;
    for (const auto& [key, t] : m_tiles) {
        if (t->generation > since) keys.push_back(key);
    }
    return keys;
}

std::uint64_t CoverageRaster::touchedCells() const {
    std::uint64_t n = 0;
    for (const auto& kv : m_tiles) {
        for (std::uint8_t q : kv.second->margin) n += q > 0 ? 1U : 0U;
    }
    return n;
}

std::uint64_t CoverageRaster::coveredCells() const {
    std::uint64_t n = 0;
    for (const auto& kv : m_tiles) {
        for (std::uint8_t q : kv.second->margin) n += q >= kCoveredCode ? 1U : 0U;
    }
    return n;
}

std::size_t CoverageRaster::memoryBytes() const {
    // Tile payload + allocator header (16 B) + hash node (next, key, value: 24 B + 16 B header)
    // + one bucket pointer per bucket. An estimate of libstdc++'s layout, not a measurement.
    const std::size_t per_tile = sizeof(CoverageTile) + 16 + 24 + 16;
    return m_tiles.size() * per_tile + m_tiles.bucket_count() * sizeof(void*) + sizeof(*this);
}

std::uint64_t CoverageRaster::contentHash() const {
    std::uint64_t h = mix(0, std::bit_cast<std::uint64_t>(m_cell_m));
    h = mix(h, std::bit_cast<std::uint64_t>(m_origin.e_m));
    h = mix(h, std::bit_cast<std::uint64_t>(m_origin.n_m));
    for (TileKey key : sortedTileKeys()) {
        const CoverageTile& t = *m_tiles.at(key);
        bool any = false;
        for (std::uint8_t q : t.margin) any = any || q > 0;
        if (!any) continue;  // an allocated but empty tile is the same content as no tile
        h = mix(h, key);
        for (int c = 0; c < kCellsPerTile; ++c) {
            const std::uint64_t v =
                (static_cast<std::uint64_t>(t.margin[static_cast<std::size_t>(c)]) << 32) |
                static_cast<std::uint32_t>(t.runAt(c));
            h = mix(h, v);
        }
    }
    return h;
}

}  // namespace sg::coverage
