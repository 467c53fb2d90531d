// Report pages that show the anomaly picks in place (issue #13, docs/report.md):
// - the picks map: the coverage map with every pick as a filled diamond in the shared colour
//   code's pick colour (src/common/colour_code.hpp), labelled P<id>, with a legend and the
//   caution that a pick list is not a clearance;
// - the line profiles: for each planned line that was run, small multiples sharing one
//   along-track axis (metres from the line's start): sensor altitude, cross-track deviation,
//   magnetometer noise and the picks (peak / threshold), every run of the line overlaid, with the
//   warn and alarm limits of the altitude, deviation and noise checks drawn; three lines a page.
// The layouts are plain functions of the summary so that tests can find the marks on a raster of
// the page.
#pragma once

#include <array>
#include <vector>

#include "common/colour_code.hpp"
#include "engine/survey_summary.hpp"
#include "report/map_render.hpp"
#include "report/pdf_doc.hpp"

namespace sg::report {

// ---- picks map ---------------------------------------------------------------------------------

struct PicksMapLayout {
    bool landscape = false;
    MapFrame frame;  // page points, on the picks map page
};
// Where the picks map goes on its (own) page.
PicksMapLayout picksMapLayout(const MapInput& in);
// Half the diagonal of a pick diamond (pt at line_scale 1).
inline constexpr double kPickMarker_pt = 4.5;
// Draws one pick: a diamond of the shared pick colour with a white rim, and its label beside it.
void drawPickMarker(cairo_t* cr, double x, double y, double half_pt, const std::string& label);
// A new page with the picks map; nothing when picking is off or nothing was picked.
void picksMapPage(PdfDoc& d, const engine::SurveySummary& s, const MapInput& in);

// ---- line profiles -----------------------------------------------------------------------------

// One small multiple: its frame on the page (pt) and the value range it shows.
struct PlotPanel {
    double x = 0, y = 0, w = 0, h = 0;
    double lo = 0, hi = 1;
    double toY(double v) const { return y + h - (v - lo) / (hi - lo) * h; }
};
enum PanelKind : int { kAltitude = 0, kDeviation = 1, kNoise = 2, kPicks = 3 };
inline constexpr int kPanelCount = 4;

struct LineBlock {
    int line = -1;                // plan line index
    int page = 0;                 // 0 = the first line-profiles page
    double top = 0;               // of the block on its page (pt)
    double along_lo = 0, along_hi = 1;  // shared along-track axis (m from the line's start)
    std::array<PlotPanel, kPanelCount> panels;
    std::vector<const engine::RunProfileSummary*> runs;  // of this line, in run order
    double toX(double along_m) const {
        const auto& p = panels[0];
        return p.x + (along_m - along_lo) / (along_hi - along_lo) * p.w;
    }
};
inline constexpr int kLinesPerPage = 3;
// The blocks of the line-profiles pages (portrait A4), one per planned line with a profile.
std::vector<LineBlock> lineProfileLayout(const engine::SurveySummary& s);

// Trace colours of the runs of one line (first, second, third, then again): the report's own,
// chosen apart from the limit colour and the pick colour.
inline constexpr std::array<colour::Rgb8, 3> kRunTrace{{{28, 28, 32}, {0, 96, 200}, {150, 90, 0}}};
// Limit lines: alarm solid, warn dashed, both in this colour.
inline constexpr colour::Rgb8 kLimitColour{196, 20, 20};

// The line-profiles pages; returns the page number (1-based) of the first, 0 when none.
int lineProfilePages(PdfDoc& d, const engine::SurveySummary& s);

}  // namespace sg::report
