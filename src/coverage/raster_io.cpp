// Coverage raster to and from bytes; see raster_io.hpp.
#include "coverage/raster_io.hpp"

#include <array>
#include <cstring>
#include <stdexcept>

namespace sg::coverage {

namespace {

constexpr char kMagic[4] = {'S', 'G', 'R', 'B'};

template <class T>
void put(std::string& out, T v) {
    char b[sizeof(T)];
    std::memcpy(b, &v, sizeof(T));  // the machines we build for are little-endian (x86-64, arm64)
    out.append(b, sizeof(T));
}

class Reader {
public:
    explicit Reader(std::string_view bytes) : m_b(bytes) {}
    template <class T>
    T get() {
        need(sizeof(T));
        T v;
        std::memcpy(&v, m_b.data() + m_pos, sizeof(T));
        m_pos += sizeof(T);
        return v;
    }
    const std::uint8_t* take(std::size_t n) {
        need(n);
        const auto* p = reinterpret_cast<const std::uint8_t*>(m_b.data() + m_pos);
        m_pos += n;
        return p;
    }

private:
    void need(std::size_t n) const {
        if (m_b.size() - m_pos < n) throw std::runtime_error("coverage raster bytes: truncated");
    }
    std::string_view m_b;
    std::size_t m_pos = 0;
};

RasterBytesInfo readHeader(Reader& r) {
    const auto* magic = r.take(4);
    if (std::memcmp(magic, kMagic, 4) != 0) throw std::runtime_error("coverage raster bytes: not a raster");
    const auto version = r.get<std::uint32_t>();
    if (version != kRasterBytesVersion)
        throw std::runtime_error("coverage raster bytes: version " + std::to_string(version) + " not known");
    RasterBytesInfo info;
    info.cell_size_m = r.get<double>();
    info.origin.e_m = r.get<double>();
    info.origin.n_m = r.get<double>();
    info.tiles = r.get<std::uint64_t>();
    return info;
}

}  // namespace

std::string rasterToBytes(const CoverageRaster& raster) {
    std::string out;
    out.append(kMagic, 4);
    put(out, kRasterBytesVersion);
    put(out, raster.cellSize());
    put(out, raster.origin().e_m);
    put(out, raster.origin().n_m);
    const auto keys = raster.sortedTileKeys();
    put(out, static_cast<std::uint64_t>(keys.size()));
    for (TileKey key : keys) {
        const CoverageTile& t = *raster.tile(tileX(key), tileY(key));
        std::uint16_t mask = 0;
        for (int b = 0; b < kBlocksPerTile; ++b)
            if (raster.block(t, b) != nullptr) mask = static_cast<std::uint16_t>(mask | (1U << b));
        put(out, tileX(key));
        put(out, tileY(key));
        put(out, mask);
        const int n = t.palette_used - 1;
        put(out, static_cast<std::uint8_t>(n));
        for (int i = 0; i < n; ++i) put(out, t.palette[static_cast<std::size_t>(i)]);
        for (int b = 0; b < kBlocksPerTile; ++b) {
            const CoverageBlock* blk = raster.block(t, b);
            if (blk == nullptr) continue;
            out.append(reinterpret_cast<const char*>(blk->margin.data()), kCellsPerBlock);
            if ((blk->runs & CoverageBlock::kPlaneBit) == 0) {
                put(out, std::uint8_t{0});
                put(out, static_cast<std::uint8_t>(blk->runs & 0xFU));
            } else {
                put(out, std::uint8_t{1});
                // The plane itself is private to the raster: rebuild the nibbles from runAt.
                std::array<std::uint8_t, kCellsPerBlock / 2> nib{};
                const int row0 = (b / kBlocksPerSide) * kBlockCells, col0 = (b % kBlocksPerSide) * kBlockCells;
                for (int off = 0; off < kCellsPerBlock; ++off) {
                    const int cell = (row0 + (off >> kBlockShift)) * kTileCells + col0 + (off & (kBlockCells - 1));
                    const int run = raster.runAt(t, cell);
                    int idx = 0;
                    if (run == kRunOverflow) idx = kPaletteSize - 1;
                    for (int i = 0; i < n && run >= 0; ++i)
                        if (t.palette[static_cast<std::size_t>(i)] == run) idx = i + 1;
                    nib[static_cast<std::size_t>(off >> 1)] |= static_cast<std::uint8_t>(idx << ((off & 1) * 4));
                }
                out.append(reinterpret_cast<const char*>(nib.data()), nib.size());
            }
        }
    }
    return out;
}

RasterBytesInfo rasterBytesInfo(std::string_view bytes) {
    Reader r(bytes);
    return readHeader(r);
}

std::uint64_t mergeRasterBytes(std::string_view bytes, CoverageRaster& into, int run_offset) {
    Reader r(bytes);
    const auto info = readHeader(r);
    if (info.cell_size_m != into.cellSize() || info.origin.e_m != into.origin().e_m ||
        info.origin.n_m != into.origin().n_m) {
        throw std::runtime_error("coverage raster bytes: another cell size or origin than the site's raster");
    }
    std::uint64_t newly = 0;
    std::array<std::uint8_t, kCellsPerTile> codes{};
    std::array<std::int32_t, kCellsPerTile> runs{};
    std::array<std::int32_t, kPaletteSize> pal{};
    for (std::uint64_t k = 0; k < info.tiles; ++k) {
        const auto tx = r.get<std::int32_t>();
        const auto ty = r.get<std::int32_t>();
        const auto mask = r.get<std::uint16_t>();
        const int n = r.get<std::uint8_t>();
        if (n > kPaletteSize - 2) throw std::runtime_error("coverage raster bytes: bad palette");
        pal.fill(kRunNone);
        for (int i = 1; i <= n; ++i) {
            const auto id = r.get<std::int32_t>();
            pal[static_cast<std::size_t>(i)] = id >= 0 ? id + run_offset : id;
        }
        pal[kPaletteSize - 1] = kRunOverflow;
        for (int b = 0; b < kBlocksPerTile; ++b) {
            if ((mask & (1U << b)) == 0) continue;
            const std::uint8_t* m = r.take(kCellsPerBlock);
            const auto kind = r.get<std::uint8_t>();
            const std::uint8_t* nib = nullptr;
            int uniform = 0;
            if (kind == 0) uniform = r.get<std::uint8_t>() & 0xF;
            else if (kind == 1) nib = r.take(kCellsPerBlock / 2);
            else throw std::runtime_error("coverage raster bytes: bad block");
            const int row0 = (b / kBlocksPerSide) * kBlockCells, col0 = (b % kBlocksPerSide) * kBlockCells;
            for (int off = 0; off < kCellsPerBlock; ++off) {
                const int ci = (row0 + (off >> kBlockShift)) * kTileCells + col0 + (off & (kBlockCells - 1));
                const int idx = nib == nullptr ? uniform : (nib[off >> 1] >> ((off & 1) * 4)) & 0xF;
                codes[static_cast<std::size_t>(ci)] = m[off];
                runs[static_cast<std::size_t>(ci)] = m[off] == 0 ? kRunNone : pal[static_cast<std::size_t>(idx)];
            }
        }
        newly += into.mergeTile(tileKey(tx, ty), mask, codes, runs);
        // Only the blocks in the mask were written: clear them for the next tile.
        for (int b = 0; b < kBlocksPerTile; ++b) {
            if ((mask & (1U << b)) == 0) continue;
            const int row0 = (b / kBlocksPerSide) * kBlockCells, col0 = (b % kBlocksPerSide) * kBlockCells;
            for (int rr = 0; rr < kBlockCells; ++rr)
                std::fill_n(codes.data() + (row0 + rr) * kTileCells + col0, kBlockCells, std::uint8_t{0});
        }
    }
    return newly;
}

}  // namespace sg::coverage
