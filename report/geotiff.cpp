// Margin GeoTIFF writer; see geotiff.hpp.
#include "report/geotiff.hpp"

#include <algorithm>
#include <array>
#include <cmath>
#include <map>
#include <memory>
#include <stdexcept>
#include <utility>
#include <vector>

#include <cpl_conv.h>
#include <cpl_error.h>
#include <gdal_priv.h>
#include <ogr_spatialref.h>

namespace sg::report {

namespace {

constexpr int kBlock = 256;  // GeoTIFF block side (a multiple of the raster tile side)
static_assert(kBlock % coverage::kTileCells == 0);

std::int64_t floorDiv(std::int64_t a, std::int64_t b) {
    std::int64_t q = a / b;
    if ((a % b != 0) && ((a < 0) != (b < 0))) --q;
    return q;
}

[[noreturn]] void gdalFail(const std::string& what, const std::string& path) {
    throw std::runtime_error("GeoTIFF " + path + ": " + what + ": " + CPLGetLastErrorMsg());
}

struct DatasetCloser {
    void operator()(GDALDataset* ds) const { GDALClose(ds); }
};

}  // namespace

GeoTiffInfo writeMarginGeoTiff(const coverage::CoverageRaster& raster, int epsg,
                               const coverage::Box& extent, const std::string& path) {
    using coverage::kTileCells;
    GDALAllRegister();
    CPLErrorReset();
    const double cell = raster.cellSize();
    // Cell index range [ix0, ix1) x [iy0, iy1), aligned to whole tiles so that every raster tile
    // falls inside exactly one GeoTIFF block.
    std::int64_t ix0 = INT64_MAX, iy0 = INT64_MAX, ix1 = INT64_MIN, iy1 = INT64_MIN;
    const auto keys = raster.sortedTileKeys();
    for (auto k : keys) {
        const std::int64_t x = static_cast<std::int64_t>(coverage::tileX(k)) * kTileCells;
        const std::int64_t y = static_cast<std::int64_t>(coverage::tileY(k)) * kTileCells;
        ix0 = std::min(ix0, x);
        iy0 = std::min(iy0, y);
        ix1 = std::max(ix1, x + kTileCells);
        iy1 = std::max(iy1, y + kTileCells);
    }
    if (!extent.empty()) {
        ix0 = std::min(ix0, raster.cellX(extent.min_e));
        iy0 = std::min(iy0, raster.cellY(extent.min_n));
        ix1 = std::max(ix1, raster.cellX(extent.max_e) + 1);
        iy1 = std::max(iy1, raster.cellY(extent.max_n) + 1);
    }
    if (ix1 <= ix0 || iy1 <= iy0) throw std::runtime_error("GeoTIFF " + path + ": nothing to write (no swath, no area)");
    ix0 = floorDiv(ix0, kTileCells) * kTileCells;
    iy0 = floorDiv(iy0, kTileCells) * kTileCells;
    ix1 = (floorDiv(ix1 - 1, kTileCells) + 1) * kTileCells;
    iy1 = (floorDiv(iy1 - 1, kTileCells) + 1) * kTileCells;

    GeoTiffInfo info;
    info.width = ix1 - ix0;
    info.height = iy1 - iy0;
    info.pixel_m = cell;
    info.origin_e = raster.origin().e_m + static_cast<double>(ix0) * cell;
    info.origin_n = raster.origin().n_m + static_cast<double>(iy1) * cell;
    if (info.width > INT32_MAX || info.height > INT32_MAX)
        throw std::runtime_error("GeoTIFF " + path + ": raster too large for one file");

    auto* driver = GetGDALDriverManager()->GetDriverByName("GTiff");
    if (driver == nullptr) gdalFail("no GTiff driver", path);
    char** opts = nullptr;
    opts = CSLSetNameValue(opts, "TILED", "YES");
    opts = CSLSetNameValue(opts, "BLOCKXSIZE", "256");
    opts = CSLSetNameValue(opts, "BLOCKYSIZE", "256");
    opts = CSLSetNameValue(opts, "COMPRESS", "DEFLATE");
    opts = CSLSetNameValue(opts, "PREDICTOR", "3");  // floating-point predictor
    opts = CSLSetNameValue(opts, "SPARSE_OK", "TRUE");
    opts = CSLSetNameValue(opts, "BIGTIFF", "IF_SAFER");
    std::unique_ptr<GDALDataset, DatasetCloser> ds(driver->Create(
        path.c_str(), static_cast<int>(info.width), static_cast<int>(info.height), 1, GDT_Float32, opts));
    CSLDestroy(opts);
    if (!ds) gdalFail("cannot create", path);

    double gt[6] = {info.origin_e, cell, 0.0, info.origin_n, 0.0, -cell};
    if (ds->SetGeoTransform(gt) != CE_None) gdalFail("cannot set the geotransform", path);
    OGRSpatialReference srs;
    if (srs.importFromEPSG(epsg) != OGRERR_NONE) gdalFail("unknown EPSG code " + std::to_string(epsg), path);
    srs.SetAxisMappingStrategy(OAMS_TRADITIONAL_GIS_ORDER);
    if (ds->SetSpatialRef(&srs) != CE_None) gdalFail("cannot set the CRS", path);
    ds->SetMetadataItem("TIFFTAG_SOFTWARE", "swathguard");
    ds->SetMetadataItem("COVERAGE_RULE", "covered where margin >= 1 (peak anomaly / detection threshold)");
    GDALRasterBand* band = ds->GetRasterBand(1);
    band->SetNoDataValue(kMarginNoData);
    band->SetDescription("detection margin");
    band->SetUnitType("1");

    // Raster tiles grouped by GeoTIFF block, written block by block in file order.
    std::map<std::pair<std::int64_t, std::int64_t>, std::vector<coverage::TileKey>> blocks;  // (by, bx)
    for (auto k : keys) {
        const std::int64_t col = static_cast<std::int64_t>(coverage::tileX(k)) * kTileCells - ix0;
        const std::int64_t row = iy1 - (static_cast<std::int64_t>(coverage::tileY(k)) + 1) * kTileCells;
        blocks[{row / kBlock, col / kBlock}].push_back(k);
    }
    std::vector<float> buf(static_cast<std::size_t>(kBlock) * kBlock);
    std::array<std::uint8_t, coverage::kCellsPerTile> codes{};  // one tile, row-major, row = north
    for (const auto& [bk, tiles] : blocks) {
        std::fill(buf.begin(), buf.end(), static_cast<float>(kMarginNoData));
        bool any = false;
        for (auto k : tiles) {
            const auto* tile = raster.tile(coverage::tileX(k), coverage::tileY(k));
            if (tile == nullptr) continue;
            raster.tileCodes(*tile, codes);
            const std::int64_t tx0 = static_cast<std::int64_t>(coverage::tileX(k)) * kTileCells;
            const std::int64_t ty0 = static_cast<std::int64_t>(coverage::tileY(k)) * kTileCells;
            for (std::int64_t iy = ty0; iy < ty0 + kTileCells; ++iy) {
                const std::int64_t row = iy1 - 1 - iy - bk.first * kBlock;  // row within the block
                for (std::int64_t ix = tx0; ix < tx0 + kTileCells; ++ix) {
                    const std::uint8_t q = codes[static_cast<std::size_t>((iy - ty0) * kTileCells + (ix - tx0))];
                    if (q == 0) continue;
                    const std::int64_t col = ix - ix0 - bk.second * kBlock;
                    buf[static_cast<std::size_t>(row * kBlock + col)] =
                        static_cast<float>(coverage::marginFromCode(q));
                    ++info.data_pixels;
                    if (q >= coverage::kCoveredCode) ++info.covered_pixels;
                    any = true;
                }
            }
        }
        if (!any) continue;  // sparse: an all-nodata block is left out of the file
        if (band->WriteBlock(static_cast<int>(bk.second), static_cast<int>(bk.first), buf.data()) != CE_None)
            gdalFail("cannot write a block", path);
    }
    ds->FlushCache();
    if (CPLGetLastErrorType() >= CE_Failure) gdalFail("write failed", path);
    return info;
}

}  // namespace sg::report
