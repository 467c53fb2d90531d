// The margin GeoTIFF read back with GDAL (the library and its command-line tools, Debian gdal-bin)
// as any GIS would: CRS by EPSG code, pixel size, origin, nodata outside the swath, the covered
// cell count against the core's raster, and the value at a known place through gdallocationinfo.
#include <gtest/gtest.h>

#include <array>
#include <cmath>
#include <cstdio>
#include <filesystem>
#include <memory>
#include <string>

#include <gdal_priv.h>
#include <ogr_spatialref.h>

#include "coverage/coverage_test_util.hpp"
#include "report/geotiff.hpp"

namespace {

using sg::coverage::CoverageRaster;
using sg::coverage::Point;

constexpr double kCell = 0.5;
const Point kOrigin{500000.0, 5925000.0};  // in UTM zone 31N (EPSG:32631)

std::string run(const std::string& cmd) {
    std::string out;
    std::unique_ptr<FILE, int (*)(FILE*)> p(popen(cmd.c_str(), "r"), pclose);
    if (!p) return out;
    std::array<char, 4096> buf{};
    while (fgets(buf.data(), static_cast<int>(buf.size()), p.get()) != nullptr) out += buf.data();
    return out;
}

struct Fixture {
    CoverageRaster raster{kCell, kOrigin};
    std::string path;
    Fixture() {
        // Two oblique passes, half-width 8 m, centre margin 3, with a 10 m break in the first.
        sg::coverage::SwathPainter p(raster);
        for (const auto& s : sg::coverage::test::samplesAlong(
                 {{kOrigin.e_m + 20, kOrigin.n_m + 10}, {kOrigin.e_m + 220, kOrigin.n_m + 90}}, 1.0, 8, 8, 3.0f))
            p.add(s);
        p.reset();
        for (const auto& s : sg::coverage::test::samplesAlong(
                 {{kOrigin.e_m + 20, kOrigin.n_m + 40}, {kOrigin.e_m + 220, kOrigin.n_m + 120}}, 1.0, 8, 8, 3.0f, 0, 1))
            p.add(s);
        p.flush();
        path = (std::filesystem::temp_directory_path() / ("sg_margin_" + std::to_string(::getpid()) + ".tif")).string();
    }
    ~Fixture() { std::filesystem::remove(path); }
};

TEST(GeoTiff, ReadsBackWithCrsPixelSizeOriginAndCoveredCount) {
    Fixture f;
    const sg::coverage::Box area{kOrigin.e_m, kOrigin.n_m, kOrigin.e_m + 250, kOrigin.n_m + 150};
    const auto info = sg::report::writeMarginGeoTiff(f.raster, 32631, area, f.path);
    EXPECT_EQ(info.covered_pixels, f.raster.coveredCells());
    ASSERT_GT(info.covered_pixels, 10000u);

    GDALAllRegister();
    std::unique_ptr<GDALDataset> ds(GDALDataset::Open(f.path.c_str(), GDAL_OF_RASTER | GDAL_OF_READONLY));
    ASSERT_TRUE(ds);
    // CRS: the EPSG code of the survey CRS.
    const OGRSpatialReference* srs = ds->GetSpatialRef();
    ASSERT_NE(srs, nullptr);
    ASSERT_NE(srs->GetAuthorityCode(nullptr), nullptr);
    EXPECT_STREQ(srs->GetAuthorityCode(nullptr), "32631");
    // Pixel size = cell size, north up; origin = outer corner of the top-left cell, on the cell
    // grid of the raster (a whole number of cells from its origin) and covering the area.
    double gt[6];
    ASSERT_EQ(ds->GetGeoTransform(gt), CE_None);
    EXPECT_DOUBLE_EQ(gt[1], kCell);
    EXPECT_DOUBLE_EQ(gt[5], -kCell);
    EXPECT_DOUBLE_EQ(gt[2], 0.0);
    EXPECT_DOUBLE_EQ(gt[4], 0.0);
    EXPECT_DOUBLE_EQ(gt[0], info.origin_e);
    EXPECT_DOUBLE_EQ(gt[3], info.origin_n);
    EXPECT_DOUBLE_EQ(std::fmod(gt[0] - kOrigin.e_m, kCell), 0.0);
    EXPECT_DOUBLE_EQ(std::fmod(gt[3] - kOrigin.n_m, kCell), 0.0);
    EXPECT_LE(gt[0], area.min_e);
    EXPECT_GE(gt[3], area.max_n);
    EXPECT_GE(gt[0] + kCell * ds->GetRasterXSize(), area.max_e);
    EXPECT_LE(gt[3] - kCell * ds->GetRasterYSize(), area.min_n);

    // Covered-cell count: every pixel >= 1, counted here from GDAL's own reading.
    auto* band = ds->GetRasterBand(1);
    int has_nodata = 0;
    EXPECT_DOUBLE_EQ(band->GetNoDataValue(&has_nodata), sg::report::kMarginNoData);
    EXPECT_TRUE(has_nodata);
    const int w = ds->GetRasterXSize(), h = ds->GetRasterYSize();
    std::vector<float> row(static_cast<std::size_t>(w));
    std::uint64_t covered = 0, nodata = 0;
    for (int y = 0; y < h; ++y) {
        ASSERT_EQ(band->RasterIO(GF_Read, 0, y, w, 1, row.data(), w, 1, GDT_Float32, 0, 0), CE_None);
        for (float v : row) {
            covered += v >= 1.0f ? 1 : 0;
            nodata += v == static_cast<float>(sg::report::kMarginNoData) ? 1 : 0;
        }
    }
    EXPECT_EQ(covered, f.raster.coveredCells());
    // Nodata outside the swath: every pixel that is not a touched cell.
    EXPECT_EQ(nodata, static_cast<std::uint64_t>(w) * static_cast<std::uint64_t>(h) - f.raster.touchedCells());

    // gdallocationinfo (GDAL's command-line tool) at survey coordinates: on the first pass's track
    // the margin is the centre margin 3 less a hair (the cell centre is 0.07 m off the track),
    // rounded down to 1/16, and exactly what the raster holds for that cell; beyond the passes,
    // nodata.
    const std::string tool = "gdallocationinfo -valonly -geoloc " + f.path + " ";
    const Point on_track{kOrigin.e_m + 120.2, kOrigin.n_m + 50.1};
    const double v = std::stod(run(tool + std::to_string(on_track.e_m) + " " + std::to_string(on_track.n_m)));
    EXPECT_DOUBLE_EQ(v, f.raster.cellAt(on_track).margin);
    EXPECT_NEAR(v, 3.0, 1.0 / 16.0 + 1e-9);
    EXPECT_DOUBLE_EQ(v * 16.0, std::floor(v * 16.0));
    EXPECT_DOUBLE_EQ(std::stod(run(tool + std::to_string(kOrigin.e_m + 240) + " " + std::to_string(kOrigin.n_m + 5))),
                     sg::report::kMarginNoData);
}

TEST(GeoTiff, GdalinfoSeesTheCrsAndNodata) {
    Fixture f;
    sg::report::writeMarginGeoTiff(f.raster, 32631, {1, 1, 0, 0}, f.path);
    const auto out = run("gdalinfo " + f.path);
    EXPECT_NE(out.find("WGS 84 / UTM zone 31N"), std::string::npos) << out;
    EXPECT_NE(out.find("Pixel Size = (0.500000000000000,-0.500000000000000)"), std::string::npos) << out;
    EXPECT_NE(out.find("NoData Value=-1"), std::string::npos) << out;
    EXPECT_NE(out.find("Type=Float32"), std::string::npos) << out;
}

TEST(GeoTiff, EmptyRasterWithoutAreaIsAClearError) {
    CoverageRaster empty(kCell, kOrigin);
    EXPECT_THROW(sg::report::writeMarginGeoTiff(empty, 32631, {1, 1, 0, 0}, "/tmp/never.tif"), std::runtime_error);
}

TEST(GeoTiff, UnknownEpsgNamesTheCode) {
    Fixture f;
    try {
        sg::report::writeMarginGeoTiff(f.raster, 999999, {1, 1, 0, 0}, f.path);
        FAIL() << "expected an error";
    } catch (const std::runtime_error& e) {
        EXPECT_NE(std::string(e.what()).find("999999"), std::string::npos) << e.what();
    }
}

}  // namespace
