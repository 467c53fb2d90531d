// The coverage raster: the survey area in the survey CRS, cut into square tiles of kTileCells x
// kTileCells cells, a tile allocated only where a swath passes (hash map tile index -> tile), so
// memory grows with the surveyed strip and not with the bounding box.
//
// Each cell keeps the best detection margin achieved over it (peak anomaly / threshold of the
// configured target class, the smallest one the survey must find) and the line run that achieved
// it, in 1.5 bytes per allocated cell (see docs/coverage.md):
//   - margin: 8 bits, code q = floor(16 * margin) clamped to 0..255 (steps of 1/16, rounded DOWN so
//     a cell is never reported better than computed; saturates at 255/16 = 15.94). Code 0 means
//     "never touched or margin below 1/16". A cell is COVERED when q >= 16 (margin >= 1).
//   - run: 4 bits, an index into the tile's palette of at most 14 run ids (index 0: no run,
//     index 15: palette overflow, run not recorded). The earliest run reaching the best margin
//     keeps the cell (ties do not move it), so the result does not depend on tile visit order.
// Each tile carries the raster generation at its last change: the screen re-uploads only tiles
// changed since the generation it last saw.
#pragma once

#include <array>
#include <cstdint>
#include <functional>
#include <memory>
#include <unordered_map>
#include <vector>

#include "coverage/geometry.hpp"

namespace sg::coverage {

inline constexpr int kTileShift = 5;
inline constexpr int kTileCells = 1 << kTileShift;  // 32 cells per tile side
inline constexpr int kCellsPerTile = kTileCells * kTileCells;
inline constexpr int kPaletteSize = 16;              // 4-bit run index
inline constexpr int kRunNone = -1;                  // cell not covered by any run
inline constexpr int kRunOverflow = -2;              // tile palette was full: run not recorded
inline constexpr std::uint8_t kCoveredCode = 16;     // margin code of margin 1.0

// Margin <-> 8-bit code (see the file comment).
std::uint8_t marginCode(double margin);
double marginFromCode(std::uint8_t code);

struct CoverageTile {
    std::array<std::uint8_t, kCellsPerTile> margin{};       // margin codes, row-major (row = north)
    std::array<std::uint8_t, kCellsPerTile / 2> run_nibble{}; // two 4-bit palette indices per byte
    std::array<std::int32_t, kPaletteSize> palette{};       // [0] unused (none), [15] overflow
    std::uint8_t palette_used = 1;                          // next free palette slot
    std::uint64_t generation = 0;                           // raster generation at last change

    int runIndexAt(int cell) const {
        return (run_nibble[static_cast<std::size_t>(cell >> 1)] >> ((cell & 1) * 4)) & 0xF;
    }
    int runAt(int cell) const;
};

// Tile index packed into 64 bits: (tile_x, tile_y) as two int32.
using TileKey = std::uint64_t;
inline TileKey tileKey(std::int32_t tx, std::int32_t ty) {
    return (static_cast<std::uint64_t>(static_cast<std::uint32_t>(tx)) << 32) |
           static_cast<std::uint32_t>(ty);
}
inline std::int32_t tileX(TileKey k) { return static_cast<std::int32_t>(k >> 32); }
inline std::int32_t tileY(TileKey k) { return static_cast<std::int32_t>(k & 0xFFFFFFFFU); }

// The margin profile over one swept quadrilateral (see docs/coverage.md, "Margin across the
// swath"): mass-rule shape M(u) = M0 * (1 + k u^2)^(-3/2), u = cross-track offset / half-width of
// that side, k = M0^(2/3) - 1, so M(0) = M0 and M(1) = 1 exactly. Inside the quad M >= 1.
struct QuadProfile {
    Point centre0, centre1;   // sensor positions of the two samples (m)
    double dir_e = 0.0, dir_n = 1.0;  // mean unit direction of travel
    double left_m = 0.0, right_m = 0.0;  // mean half-widths of the two samples (m)
    double centre_margin = 1.0;          // min of the two samples' centre margins (>= 1)
};

class CoverageRaster {
public:
    // cell_size_m in (0, 1000]; origin: any point near the survey (keeps cell indices small).
    explicit CoverageRaster(double cell_size_m = 0.5, Point origin = {});
    CoverageRaster(const CoverageRaster& other);
    CoverageRaster& operator=(const CoverageRaster& other);
    CoverageRaster(CoverageRaster&&) noexcept = default;
    CoverageRaster& operator=(CoverageRaster&&) noexcept = default;
    ~CoverageRaster() = default;

    double cellSize() const { return m_cell_m; }
    Point origin() const { return m_origin; }

    // Paints the quadrilateral corners[0..3] (any order around the outline; a bow-tie is filled as
    // its two lobes) with the margin profile, for line run `run` (kRunNone when off line).
    // A cell is painted when its centre lies inside (half-open rule: consecutive quads sharing an
    // edge paint every cell on it exactly once, so no holes and no double counting).
    void paintQuad(const std::array<Point, 4>& corners, const QuadProfile& profile, int run);

    // Cell index of a survey point and the centre of a cell.
    std::int64_t cellX(double e_m) const;
    std::int64_t cellY(double n_m) const;
    Point cellCentre(std::int64_t ix, std::int64_t iy) const;

    struct Cell {
        double margin = 0.0;   // quantised, 0 when untouched
        int run = kRunNone;
        bool covered() const { return margin >= 1.0; }
    };
    Cell cell(std::int64_t ix, std::int64_t iy) const;
    Cell cellAt(Point p) const { return cell(cellX(p.e_m), cellY(p.n_m)); }
    std::uint8_t code(std::int64_t ix, std::int64_t iy) const;

    const CoverageTile* tile(std::int32_t tx, std::int32_t ty) const;
    std::size_t tileCount() const { return m_tiles.size(); }
    // Every tile, in no particular order (use sortedTileKeys() for a stable order).
    void forEachTile(const std::function<void(TileKey, const CoverageTile&)>& fn) const;
    std::vector<TileKey> sortedTileKeys() const;

    // Generation: incremented by every paint; tiles changed since `since` (for the screen).
    std::uint64_t generation() const { return m_generation; }
    std::vector<TileKey> tilesChangedSince(std::uint64_t since) const;

    // Cells with code > 0 and cells with margin >= 1, over the whole raster.
    std::uint64_t touchedCells() const;
    std::uint64_t coveredCells() const;
    // Bytes held by tiles, palette and the hash map (an estimate of the heap in use).
    std::size_t memoryBytes() const;
    // Tiles whose run palette overflowed at least once (cells painted with kRunOverflow).
    std::uint64_t paletteOverflows() const { return m_palette_overflows; }

    // Stable 64-bit content hash over (tile index, margin codes, run ids) in tile-key order;
    // independent of hash-map layout and paint order of equal results.
    std::uint64_t contentHash() const;

private:
    CoverageTile& tileFor(std::int32_t tx, std::int32_t ty);
    int paletteIndex(CoverageTile& t, int run);

    double m_cell_m;
    double m_inv_cell;
    Point m_origin;
    std::unordered_map<TileKey, std::unique_ptr<CoverageTile>> m_tiles;
    std::uint64_t m_generation = 0;
    std::uint64_t m_palette_overflows = 0;
    // Last tile looked up by paintQuad (spans mostly stay in one tile).
    TileKey m_last_key = 0;
    CoverageTile* m_last_tile = nullptr;
};

}  // namespace sg::coverage
