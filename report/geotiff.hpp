// The coverage margin as a GeoTIFF in the survey CRS, for any GIS: one Float32 band holding the
// best detection margin of each cell (peak anomaly / threshold of the coverage class, quantised
// to 1/16 as the raster keeps it; >= 1 is covered), nodata outside the swath (cells never reached,
// margin code 0). North-up, pixel = one raster cell, tiled 256 x 256 and DEFLATE-compressed;
// blocks with no swath are not written at all (SPARSE_OK), so a 20 km site stays small.
#pragma once

#include <cstdint>
#include <string>

#include "coverage/coverage_raster.hpp"
#include "coverage/geometry.hpp"

namespace sg::report {

inline constexpr double kMarginNoData = -1.0;

struct GeoTiffInfo {
    std::int64_t width = 0, height = 0;  // pixels
    double origin_e = 0.0, origin_n = 0.0;  // outer corner of the top-left pixel (m)
    double pixel_m = 0.0;
    std::uint64_t covered_pixels = 0;  // pixels written with margin >= 1
    std::uint64_t data_pixels = 0;     // pixels written with data (margin > 0)
};

// Writes `path` covering the union of the raster's tiles and `extent` (e.g. the survey area's
// bounds; may be empty). epsg: the survey CRS. Throws std::runtime_error with GDAL's message.
GeoTiffInfo writeMarginGeoTiff(const coverage::CoverageRaster& raster, int epsg,
                               const coverage::Box& extent, const std::string& path);

}  // namespace sg::report
