// The coverage map as a person sees it: render into an image and read pixels back. A covered
// cell shows its margin class colour, an unreached cell inside the area the "no swath" colour,
// and when a pixel spans several cells, one unreached cell among them makes the whole pixel show
// "no swath" (the weakest cell wins, so a hole narrower than a pixel cannot vanish).
#include <gtest/gtest.h>

#include <cmath>
#include <filesystem>

#include <cairo.h>

#include "common/colour_code.hpp"
#include "coverage/coverage_test_util.hpp"
#include "report/map_render.hpp"

namespace {

using sg::coverage::CoverageRaster;
using sg::coverage::Point;
using sg::report::Rgb;

constexpr double kCell = 0.5;
const Point kOrigin{500000.0, 5925000.0};

std::uint32_t rgb(Rgb c) {
    const auto u = [](double v) { return static_cast<std::uint32_t>(std::lround(v * 255)); };
    return (u(c.r) << 16) | (u(c.g) << 8) | u(c.b);
}

struct Image {
    cairo_surface_t* s;
    int stride;
    explicit Image(int w, int h) : s(cairo_image_surface_create(CAIRO_FORMAT_RGB24, w, h)), stride(cairo_image_surface_get_stride(s)) {}
    ~Image() { cairo_surface_destroy(s); }
    std::uint32_t at(int x, int y) {
        cairo_surface_flush(s);
        const auto* row = reinterpret_cast<const std::uint32_t*>(cairo_image_surface_get_data(s) + static_cast<std::ptrdiff_t>(y) * stride);
        return row[x] & 0xFFFFFFU;
    }
};

// An area 0..100 x 0..100 m (from the origin); a north-going pass at E 50 m, half-width 9 m,
// centre margin 3 (edge margin 1: the mass-rule profile across the swath), broken for one row of
// cells at N 49..50 m.
struct Scene {
    CoverageRaster raster{kCell, kOrigin};
    sg::coverage::MultiPolygon area{{{{kOrigin.e_m, kOrigin.n_m},
                                       {kOrigin.e_m + 100, kOrigin.n_m},
                                       {kOrigin.e_m + 100, kOrigin.n_m + 100},
                                       {kOrigin.e_m, kOrigin.n_m + 100}},
                                      {}}};
    Scene() {
        sg::coverage::SwathPainter p(raster);
        for (const auto& s : sg::coverage::test::samplesAlong({{kOrigin.e_m + 50, kOrigin.n_m - 10}, {kOrigin.e_m + 50, kOrigin.n_m + 49}},
                                                             1.0, 9, 9, 3.0f))
            p.add(s);
        p.reset();
        // Second stretch after a 1-cell break: the row of cells with centres at N 49.25..49.75 is
        // not painted (the chain breaks, the next quad starts at N 50).
        for (const auto& s : sg::coverage::test::samplesAlong({{kOrigin.e_m + 50, kOrigin.n_m + 50}, {kOrigin.e_m + 50, kOrigin.n_m + 110}},
                                                             1.0, 9, 9, 3.0f))
            p.add(s);
        p.flush();
    }
};

TEST(MapRender, CellColoursAtOnePixelPerCell) {
    Scene sc;
    ASSERT_EQ(sc.raster.cellAt({kOrigin.e_m + 50.25, kOrigin.n_m + 49.25}).margin, 0.0);  // the break row
    ASSERT_GE(sc.raster.cellAt({kOrigin.e_m + 50.25, kOrigin.n_m + 30.25}).margin, 2.0);
    // 200 x 200 px for 100 x 100 m: 2 px per metre, one cell = 1 px.
    Image img(200, 200);
    cairo_t* cr = cairo_create(img.s);
    sg::report::MapInput in;
    in.raster = &sc.raster;
    in.area = &sc.area;
    const auto frame = sg::report::fitFrame({kOrigin.e_m, kOrigin.n_m, kOrigin.e_m + 100, kOrigin.n_m + 100}, 0, 0, 200, 200);
    sg::report::MapOptions o;
    drawMap(cr, in, frame, o);
    cairo_destroy(cr);
    const auto px = [&](double e, double n) {
        return img.at(static_cast<int>(frame.toX(kOrigin.e_m + e)), static_cast<int>(frame.toY(kOrigin.n_m + n)));
    };
    const auto& classes = sg::report::marginClasses();
    // On the track at N 30: margin 3 -> class "2 - 4".
    EXPECT_EQ(px(50.25, 30.25), rgb(classes[3].colour));
    // 8.75 m off the track: the profile is just above 1 -> class "1 - 2".
    EXPECT_EQ(px(58.75, 30.25), rgb(classes[2].colour));
    // Far from the pass inside the area: no swath.
    EXPECT_EQ(px(20.25, 70.25), rgb(classes[0].colour));
    // The unpainted row across the track: no swath.
    EXPECT_EQ(px(50.25, 49.25), rgb(classes[0].colour));
}

TEST(MapRender, WeakestCellWinsWhenPixelsSpanSeveralCells) {
    Scene sc;
    // 2 m per pixel: one pixel = 4 x 4 cells. The one-cell break row must still show. (The window
    // is 800 m wide so the scale bar and north arrow in the frame corners stay off the area.)
    Image img(400, 400);
    cairo_t* cr = cairo_create(img.s);
    sg::report::MapInput in;
    in.raster = &sc.raster;
    in.area = &sc.area;
    const auto frame =
        sg::report::fitFrame({kOrigin.e_m - 350, kOrigin.n_m - 350, kOrigin.e_m + 450, kOrigin.n_m + 450}, 0, 0, 400, 400);
    ASSERT_DOUBLE_EQ(frame.scale, 0.5);
    drawMap(cr, in, frame, {});
    cairo_destroy(cr);
    const auto& classes = sg::report::marginClasses();
    const int x = static_cast<int>(frame.toX(kOrigin.e_m + 50.25));
    EXPECT_EQ(img.at(x, static_cast<int>(frame.toY(kOrigin.n_m + 49.25))), rgb(classes[0].colour));
    EXPECT_EQ(img.at(x, static_cast<int>(frame.toY(kOrigin.n_m + 30.25))), rgb(classes[3].colour));
    // The pixel E 58..60 m holds the swath edge at E 59 (cells inside and outside): no swath too.
    EXPECT_EQ(img.at(static_cast<int>(frame.toX(kOrigin.e_m + 59.0)), static_cast<int>(frame.toY(kOrigin.n_m + 30.25))),
              rgb(classes[0].colour));
}

// One colour code for screen and paper: the PNG map the report writes, read back from the file by
// Cairo's PNG reader, shows at a known covered cell exactly the colour of the shared table
// (src/common/colour_code.hpp, light scheme) that the day screen also uses (tests/ui checks the
// screen side), and the area no pass reached shows the table's quiet "not run yet" ground.
TEST(MapRender, PngMapUsesTheSharedColourCode) {
    Scene sc;
    ASSERT_GE(sc.raster.cellAt({kOrigin.e_m + 50.25, kOrigin.n_m + 30.25}).margin, 2.0);
    ASSERT_LT(sc.raster.cellAt({kOrigin.e_m + 50.25, kOrigin.n_m + 30.25}).margin, 4.0);
    sg::report::MapInput in;
    in.raster = &sc.raster;
    in.area = &sc.area;
    const sg::coverage::Box world{kOrigin.e_m - 10, kOrigin.n_m - 10, kOrigin.e_m + 110, kOrigin.n_m + 110};
    const auto path = (std::filesystem::path(SG_BINARY_DIR) / "test_report_shared_colours.png").string();
    const auto size = sg::report::writeMapPng(in, world, 900, "shared colours", path);
    cairo_surface_t* png = cairo_image_surface_create_from_png(path.c_str());
    ASSERT_EQ(cairo_surface_status(png), CAIRO_STATUS_SUCCESS);
    ASSERT_EQ(cairo_image_surface_get_width(png), size.width);
    // The map frame inside the PNG, as writeMapPng lays it out (title strip on top).
    const double ls = 1.0;
    const int top = static_cast<int>(28 * ls), mw = 900, mh = 900;
    const auto frame = sg::report::fitFrame(world, (size.width - mw) / 2.0, top, mw, mh);
    cairo_surface_flush(png);
    const auto at = [&](double e, double n) {
        const int x = static_cast<int>(frame.toX(kOrigin.e_m + e)), y = static_cast<int>(frame.toY(kOrigin.n_m + n));
        const auto* row = reinterpret_cast<const std::uint32_t*>(cairo_image_surface_get_data(png) +
                                                                 static_cast<std::ptrdiff_t>(y) * cairo_image_surface_get_stride(png));
        const std::uint32_t v = row[x];
        return sg::colour::Rgb8{static_cast<std::uint8_t>(v >> 16), static_cast<std::uint8_t>(v >> 8),
                                static_cast<std::uint8_t>(v)};
    };
    const auto& code = sg::colour::kLight;
    EXPECT_EQ(at(50.25, 30.25), code.marginColour(sg::colour::MarginClass::kGood));  // margin 3 on the track
    EXPECT_EQ(at(58.75, 30.25), code.marginColour(sg::colour::MarginClass::kWeak));  // just above 1 at the edge
    EXPECT_EQ(at(20.25, 70.25), code.not_run_yet);                                   // inside the area, no pass
    cairo_surface_destroy(png);
}

}  // namespace
