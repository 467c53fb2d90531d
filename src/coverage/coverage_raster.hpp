// The coverage raster: the survey area in the survey CRS, cut into square tiles of kTileCells x
// kTileCells cells, a tile allocated only where a swath passes (open-addressing hash map tile
// index -> tile), so memory grows with the surveyed strip and not with the bounding box. A tile is
// itself 4 x 4 blocks of 8 x 8 cells, and a block is allocated only when a swath paints one of its
// cells, so an isolated swath costs blocks along its edges, not whole tiles.
//
// Each cell keeps the best detection margin achieved over it (peak anomaly / threshold of the
// configured target class, the smallest one the survey must find) and the line run that achieved
// it (see docs/coverage.md, "Memory"):
//   - margin: 8 bits, code q = floor(16 * margin) clamped to 0..255 (steps of 1/16, rounded DOWN so
//     a cell is never reported better than computed; saturates at 255/16 = 15.94). Code 0 means
//     "never touched or margin below 1/16". A cell is COVERED when q >= 16 (margin >= 1).
//   - run: a 4-bit index into the tile's palette of at most 14 run ids (index 0: no run, index
//     15: palette overflow, run not recorded). A block whose painted cells all hold the same index
//     keeps that one index; the first cell that takes another index gives the block a plane of
//     64 4-bit indices. An untouched cell (code 0) has no run. The earliest run reaching the best
//     margin keeps the cell (ties do not move it), so the result does not depend on tile visit
//     order.
// Blocks, tiles and run planes live in chunked pools (no per-block allocation, indices stay valid
// when the pools grow). Each tile carries the raster generation at its last change: the screen
// re-uploads only tiles changed since the generation it last saw.
#pragma once

#include <algorithm>
#include <array>
#include <cstdint>
#include <functional>
#include <memory>
#include <span>
#include <stdexcept>
#include <vector>

#include "coverage/geometry.hpp"

namespace sg::coverage {

inline constexpr int kTileShift = 5;
inline constexpr int kTileCells = 1 << kTileShift;  // 32 cells per tile side
inline constexpr int kCellsPerTile = kTileCells * kTileCells;
inline constexpr int kBlockShift = 3;
inline constexpr int kBlockCells = 1 << kBlockShift;  // 8 cells per block side
inline constexpr int kCellsPerBlock = kBlockCells * kBlockCells;
inline constexpr int kBlocksPerSide = kTileCells / kBlockCells;  // 4
inline constexpr int kBlocksPerTile = kBlocksPerSide * kBlocksPerSide;
inline constexpr int kPaletteSize = 16;              // 4-bit run index
inline constexpr int kRunNone = -1;                  // cell not covered by any run
inline constexpr int kRunOverflow = -2;              // tile palette was full: run not recorded
inline constexpr std::uint8_t kCoveredCode = 16;     // margin code of margin 1.0

// Margin <-> 8-bit code (see the file comment).
std::uint8_t marginCode(double margin);
double marginFromCode(std::uint8_t code);

// 8 x 8 cells: margin codes row-major (row = north), and the run index of the whole block or the
// index of its run plane.
struct CoverageBlock {
    static constexpr std::uint32_t kPlaneBit = 0x80000000U;
    std::array<std::uint8_t, kCellsPerBlock> margin{};
    // kPlaneBit clear: low 4 bits = the palette index of every painted cell of the block.
    // kPlaneBit set: the other bits = index of the block's run plane (one 4-bit index per cell).
    std::uint32_t runs = 0;
};

// One 4-bit palette index per cell of a block, two per byte (low nibble = even cell).
struct RunPlane {
    std::array<std::uint8_t, kCellsPerBlock / 2> nibble{};
};

// Tile index packed into 64 bits: (tile_x, tile_y) as two int32.
using TileKey = std::uint64_t;
inline TileKey tileKey(std::int32_t tx, std::int32_t ty) {
    return (static_cast<std::uint64_t>(static_cast<std::uint32_t>(tx)) << 32) |
           static_cast<std::uint32_t>(ty);
}
inline std::int32_t tileX(TileKey k) { return static_cast<std::int32_t>(k >> 32); }
inline std::int32_t tileY(TileKey k) { return static_cast<std::int32_t>(k & 0xFFFFFFFFU); }

// 32 x 32 cells. Cell index c = row * kTileCells + col (row = north); it lies in block
// (row / 8) * 4 + col / 8 at (row % 8) * 8 + col % 8.
struct CoverageTile {
    TileKey key = 0;
    std::uint64_t generation = 0;  // raster generation at last change
    // 1 + index of the block in the raster's block pool; 0: no block (every cell untouched).
    std::array<std::uint32_t, kBlocksPerTile> block{};
    std::array<std::int32_t, kPaletteSize - 2> palette{};  // run ids of palette indices 1..14
    std::uint8_t palette_used = 1;                         // next free palette index
    std::uint8_t dirty = 0;                                // in the raster's dirty list

    // Run id of palette index `idx` (0..15).
    int runOfIndex(int idx) const {
        if (idx == 0) return kRunNone;
        if (idx == kPaletteSize - 1) return kRunOverflow;
        return palette[static_cast<std::size_t>(idx - 1)];
    }
};

// Allocator header of one heap block (glibc malloc on 64-bit), counted in memoryBytes().
inline constexpr std::size_t kMallocHeaderBytes = 16;

// Fixed-size chunks of default-constructed T, addressed by a 32-bit index: no per-element
// allocation, no moves when growing (indices and references stay valid), at most one partly used
// chunk.
template <class T, int kChunkShift>
class ChunkPool {
public:
    static constexpr std::uint32_t kChunk = 1U << kChunkShift;
    ChunkPool() = default;
    ChunkPool(const ChunkPool& other) : m_size(other.m_size) {
        m_chunks.reserve(other.m_chunks.size());
        for (const auto& c : other.m_chunks) {
            auto copy = std::make_unique<T[]>(kChunk);
            std::copy(c.get(), c.get() + kChunk, copy.get());
            m_chunks.push_back(std::move(copy));
        }
    }
    ChunkPool& operator=(const ChunkPool& other) {
        if (this != &other) *this = ChunkPool(other);
        return *this;
    }
    ChunkPool(ChunkPool&&) noexcept = default;
    ChunkPool& operator=(ChunkPool&&) noexcept = default;
    ~ChunkPool() = default;

    // Appends a default T and returns its index.
    std::uint32_t add();
    T& operator[](std::uint32_t i) { return m_chunks[i >> kChunkShift][i & (kChunk - 1)]; }
    const T& operator[](std::uint32_t i) const { return m_chunks[i >> kChunkShift][i & (kChunk - 1)]; }
    std::uint32_t size() const { return m_size; }
    // Heap bytes: whole chunks (allocated and zeroed at once) with their allocator header, and
    // the chunk pointer array.
    std::size_t bytes() const {
        return m_chunks.size() * (sizeof(T) * kChunk + kMallocHeaderBytes) +
               m_chunks.capacity() * sizeof(std::unique_ptr<T[]>);
    }

private:
    std::vector<std::unique_ptr<T[]>> m_chunks;
    std::uint32_t m_size = 0;
};

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
    // Block b (0..15) of a tile of this raster, nullptr when not allocated (all cells untouched).
    const CoverageBlock* block(const CoverageTile& t, int b) const {
        const std::uint32_t slot = t.block[static_cast<std::size_t>(b)];
        return slot == 0 ? nullptr : &m_blocks[slot - 1];
    }
    // Margin codes / run ids of a tile of this raster, row-major (index = row * 32 + col).
    void tileCodes(const CoverageTile& t, std::span<std::uint8_t, kCellsPerTile> out) const;
    int runAt(const CoverageTile& t, int cell) const;
    // Every tile, in no particular order (use sortedTileKeys() for a stable order).
    void forEachTile(const std::function<void(TileKey, const CoverageTile&)>& fn) const;
    std::vector<TileKey> sortedTileKeys() const;

    // Walks cells [i0, i1) of row j in pieces that lie in one block: fn(begin, end, codes) with
    // codes[k] the margin code of cell begin + k, or codes == nullptr when no swath touched any
    // cell of the piece (all codes 0). For gap and corridor scans.
    template <class F>
    void forEachRowPiece(std::int64_t j, std::int64_t i0, std::int64_t i1, F&& fn) const;

    // Generation: incremented by every paint; tiles changed since `since` (for the screen).
    std::uint64_t generation() const { return m_generation; }
    std::vector<TileKey> tilesChangedSince(std::uint64_t since) const;

    // Cells with code > 0 and cells with margin >= 1, over the whole raster.
    std::uint64_t touchedCells() const;
    std::uint64_t coveredCells() const;
    // Allocated blocks and run planes (for the memory benchmark).
    std::size_t blockCount() const { return m_blocks.size(); }
    std::size_t runPlaneCount() const { return m_planes.size(); }
    // Heap bytes held by the pools and the hash map, counted from their capacities (what the
    // allocator handed out), plus the object itself.
    std::size_t memoryBytes() const;
    // Tiles whose run palette overflowed at least once (cells painted with kRunOverflow).
    std::uint64_t paletteOverflows() const { return m_palette_overflows; }

    // Stable 64-bit content hash over (tile index, margin codes, run ids) in tile-key order;
    // independent of hash-map layout and paint order of equal results.
    std::uint64_t contentHash() const;

    // ---- merging (a site: the per-cell best over several sessions; docs/site.md) -------------
    // The join of two cells: the higher margin code wins; at equal codes the run that ranks first
    // (mergeRank: real run ids ascending, then "no run", then "run not recorded"). The join is
    // commutative, associative and idempotent, so a merge of any set of rasters in any order and
    // grouping gives the same cells (exactly while no tile needs more than 14 runs: past that a
    // cell records kRunOverflow, and which cells do can depend on the order).
    static int mergeRank(int run) {
        return run >= 0 ? run : (run == kRunNone ? 0x7FFFFFFE : 0x7FFFFFFF);
    }
    // Joins the cells of one tile: codes and runs row-major (index = row * 32 + col), cells with
    // code 0 ignored; `block_mask` bit b set when block b may hold painted cells. Returns the
    // number of cells that became covered (code reached kCoveredCode) by this merge.
    std::uint64_t mergeTile(TileKey key, std::uint16_t block_mask,
                            std::span<const std::uint8_t, kCellsPerTile> codes,
                            std::span<const std::int32_t, kCellsPerTile> runs);
    // Joins every cell of `other` (same cell size and origin, else std::invalid_argument), its
    // run ids >= 0 shifted by run_offset. Returns the cells that became covered.
    std::uint64_t mergeFrom(const CoverageRaster& other, int run_offset = 0);

    // Dirty tiles (for a live site view that joins a session's raster into the site's): when on,
    // every tile a paint or merge changes is listed once until takeDirtyTiles() hands the list out.
    void setTrackDirty(bool on) { m_track_dirty = on; }
    std::vector<TileKey> takeDirtyTiles();

private:
    // Open addressing, linear probing, load <= 3/4: tile key -> 1 + tile index (0 = empty slot).
    class TileIndex {
    public:
        std::uint32_t find(TileKey key) const;
        void insert(TileKey key, std::uint32_t value);  // key not present
        std::size_t bytes() const {
            return m_keys.capacity() * sizeof(TileKey) + m_values.capacity() * sizeof(std::uint32_t) +
                   (m_keys.capacity() > 0 ? 2 * kMallocHeaderBytes : 0);
        }

    private:
        void grow();
        std::vector<TileKey> m_keys;
        std::vector<std::uint32_t> m_values;
        std::size_t m_count = 0;
    };

    CoverageTile& tileFor(std::int32_t tx, std::int32_t ty);
    int paletteIndex(CoverageTile& t, int run);
    void setRuns(CoverageBlock& b, int first_cell, unsigned mask, int pal);

    double m_cell_m;
    double m_inv_cell;
    Point m_origin;
    TileIndex m_index;
    ChunkPool<CoverageTile, 8> m_tiles;     // 256 tiles (36 KiB) per chunk
    ChunkPool<CoverageBlock, 9> m_blocks;   // 512 blocks (34 KiB) per chunk
    ChunkPool<RunPlane, 10> m_planes;       // 1024 planes (32 KiB) per chunk
    std::uint64_t m_generation = 0;
    std::uint64_t m_palette_overflows = 0;
    bool m_track_dirty = false;
    std::vector<std::uint32_t> m_dirty;  // tile pool indices
    void markDirty(CoverageTile& t);
    // Last tile looked up by paintQuad (spans mostly stay in one tile): key and 1 + index.
    TileKey m_last_key = 0;
    std::uint32_t m_last_tile = 0;
};

template <class T, int kChunkShift>
std::uint32_t ChunkPool<T, kChunkShift>::add() {
    if (m_size == 0xFFFFFFFFU) throw std::length_error("coverage raster: pool index overflow");
    if ((m_size & (kChunk - 1)) == 0 && (m_size >> kChunkShift) == m_chunks.size()) {
        m_chunks.push_back(std::make_unique<T[]>(kChunk));
    }
    return m_size++;
}

template <class F>
void CoverageRaster::forEachRowPiece(std::int64_t j, std::int64_t i0, std::int64_t i1, F&& fn) const {
    const std::int32_t ty = static_cast<std::int32_t>(j >> kTileShift);
    const int brow = static_cast<int>((j >> kBlockShift) & (kBlocksPerSide - 1)) * kBlocksPerSide;
    const int row_off = static_cast<int>(j & (kBlockCells - 1)) * kBlockCells;
    std::int64_t i = i0;
    while (i < i1) {
        const std::int32_t tx = static_cast<std::int32_t>(i >> kTileShift);
        const std::int64_t tile_end = std::min(i1, (static_cast<std::int64_t>(tx) + 1) << kTileShift);
        const CoverageTile* t = tile(tx, ty);
        if (t == nullptr) {
            fn(i, tile_end, static_cast<const std::uint8_t*>(nullptr));
            i = tile_end;
            continue;
        }
        while (i < tile_end) {
            const std::int64_t end = std::min(tile_end, (i | (kBlockCells - 1)) + 1);
            const int b = brow + static_cast<int>((i >> kBlockShift) & (kBlocksPerSide - 1));
            const CoverageBlock* blk = block(*t, b);
            fn(i, end, blk == nullptr ? nullptr : blk->margin.data() + row_off + (i & (kBlockCells - 1)));
            i = end;
        }
    }
}

}  // namespace sg::coverage
