// The coverage map drawn with Cairo, for the PDF pages and the PNG files alike: the raster
// coloured by detection margin (each pixel shows the WEAKEST cell under it, so a gap narrower than
// a pixel still shows), the area outline, the planned lines, the gap outlines with their ids, the
// infill lines with their names, a scale bar and grid north. Colours: the light scheme of the
// shared colour code, src/common/colour_code.hpp (the day screen uses the same table).
#pragma once

#include <string>
#include <vector>

#include <cairo.h>

#include "common/colour_code.hpp"
#include "coverage/coverage_raster.hpp"
#include "coverage/gaps.hpp"
#include "coverage/geometry.hpp"
#include "coverage/infill.hpp"
#include "coverage/survey_plan.hpp"

namespace sg::report {

struct Rgb {
    double r = 0, g = 0, b = 0;
};
// A colour of the shared colour code (src/common/colour_code.hpp) as Cairo wants it (0..1).
Rgb toRgb(colour::Rgb8 c);

// The margin classes of the map legend, weakest first.
struct MarginClass {
    const char* label;
    Rgb colour;
};
const std::vector<MarginClass>& marginClasses();
// Index into marginClasses() of a margin code (0: no swath; 1: seen, below threshold; ...).
int marginClassOf(std::uint8_t code);

struct MapInput {
    const coverage::CoverageRaster* raster = nullptr;
    const coverage::MultiPolygon* area = nullptr;
    const std::vector<coverage::PlanLine>* lines = nullptr;
    const coverage::GapReport* gaps = nullptr;
    const std::vector<coverage::MultiPolygon>* gap_outlines = nullptr;  // same order as gaps->gaps
    const coverage::InfillPlan* infill = nullptr;
};

// World window (survey CRS) onto a device rectangle, north up, equal scale on both axes: the
// window is widened in one direction to fit the rectangle's shape.
struct MapFrame {
    coverage::Box world;
    double x = 0, y = 0, w = 0, h = 0;  // device rectangle
    double scale = 1;                   // device units per metre
    double toX(double e_m) const { return x + (e_m - world.min_e) * scale; }
    double toY(double n_m) const { return y + (world.max_n - n_m) * scale; }
};
MapFrame fitFrame(coverage::Box world, double x, double y, double w, double h);
// The window for the whole survey: the area and every tile, with a small border.
coverage::Box surveyWindow(const MapInput& in);

struct MapOptions {
    double pixels_per_unit = 1.0;  // raster image resolution per device unit (PDF: 2-3 per pt)
    double line_scale = 1.0;       // multiplies line widths and text sizes
    bool label_gaps = true;
    bool label_infill = true;
    int highlight_gap = 0;         // a gap id drawn thicker (detail maps); 0 = none
};

// Draws the map into `frame` on `cr` (clipped to the frame).
void drawMap(cairo_t* cr, const MapInput& in, const MapFrame& frame, const MapOptions& options);
// Draws the legend (margin classes, then plan line, gap and infill symbols) starting at (x, y),
// swatch side `size`, in a column or a row; returns the height (column) or width (row) used.
double drawLegend(cairo_t* cr, double x, double y, double size, bool row);

// Writes a PNG of the map, long side `long_px` pixels, with legend and title strip; returns the
// image size in pixels.
struct PngSize {
    int width = 0, height = 0;
};
PngSize writeMapPng(const MapInput& in, const coverage::Box& world, int long_px, const std::string& title,
                    const std::string& path, int highlight_gap = 0);

}  // namespace sg::report
