// A coverage raster as bytes, for the per-log session summaries of a site (docs/site.md): every
// allocated block's margin codes and run indices with its tile's run palette, little-endian.
// Reading joins the cells into another raster (CoverageRaster::mergeTile), so a site opens by
// merging each log's bytes straight into the site raster, one tile at a time.
#pragma once

#include <cstdint>
#include <string>
#include <string_view>

#include "coverage/coverage_raster.hpp"

namespace sg::coverage {

// Format version written by rasterToBytes (bump on any change of the layout below).
inline constexpr std::uint32_t kRasterBytesVersion = 1;

// Layout: "SGRB", u32 version, f64 cell size (m), f64 origin E, f64 origin N, u64 tile count,
// then per tile: i32 tile x, i32 tile y, u16 block mask, u8 palette size n (<= 14), i32 run id
// of palette indices 1..n, then per block in the mask: 64 margin codes (row-major), u8 0 and
// one palette index (every painted cell), or u8 1 and 32 bytes of 4-bit indices.
std::string rasterToBytes(const CoverageRaster& raster);

struct RasterBytesInfo {
    double cell_size_m = 0.0;
    Point origin;
    std::uint64_t tiles = 0;
};
// Reads the header only. Throws std::runtime_error on a damaged or foreign byte string.
RasterBytesInfo rasterBytesInfo(std::string_view bytes);
// Joins the raster in `bytes` into `into` (same cell size and origin, else std::runtime_error),
// run ids >= 0 shifted by run_offset. Returns the cells that became covered.
std::uint64_t mergeRasterBytes(std::string_view bytes, CoverageRaster& into, int run_offset);

}  // namespace sg::coverage
