// Infill planner: the fewest, shortest lines along the survey direction (or a chosen heading)
// whose predicted swath covers every gap, with run-in and run-out, merged where one line closes
// several gaps, ranked by gap area closed per km. And the proof: fly the proposals over a copy of
// the raster with synthetic swath samples and find the gaps again.
#pragma once

#include <cstdint>
#include <optional>
#include <string>
#include <vector>

#include "common/config_section.hpp"
#include "coverage/coverage_raster.hpp"
#include "coverage/gaps.hpp"
#include "coverage/geometry.hpp"

namespace sg::coverage {

struct InfillOptions {
    double half_width_m = 5.0;     // predicted detectable half-width at the planned altitude (m, > 0)
    double heading_deg = 0.0;      // line direction, grid bearing (degrees; 0..180 used as an axis)
    double run_in_m = 50.0;        // straight approach before the first gap cell (m, >= 0)
    double run_out_m = 50.0;       // straight run past the last gap cell (m, >= 0)
    bool include_small_gaps = false;  // also plan for gaps flagged small
    // Each line is named after the gap it covers most of: "I7" for gap G7, then "I7b", "I7c" for
    // further lines whose main gap is G7 (in across-track order); see docs/coverage.md.
    std::string name_prefix = "I";
    // Refuse to plan over more uncovered cells than this (an unsurveyed block is not a gap: plan
    // lines for it, not infill). 10 million cells = 2.5 km^2 at 0.5 m.
    std::int64_t max_cells = 10'000'000;
};

// Reads [infill] run_in_m (0..10000, default 50), run_out_m (0..10000, default 50), heading_deg
// (optional, 0..360; default: the survey heading passed in), include_small_gaps (default false).
// half_width_m is not a config key: it comes from the detection model at the planned altitude.
InfillOptions loadInfillOptions(const config::Section& infill, double survey_heading_deg,
                                double half_width_m);

struct InfillLine {
    std::string name;
    Point start, end;              // survey CRS (m), flown start -> end
    double length_m = 0.0;
    std::vector<int> gap_ids;      // ids of the gaps this line covers (fully or in part)
    std::vector<int> closes_ids;   // ids of the gaps this line closes on its own
    double area_closed_m2 = 0.0;   // gap area inside this line's swath (m^2)
    double area_per_km = 0.0;      // ranking key: area_closed_m2 / (length_m / 1000)
    int rank = 0;                  // 1 = best
    int main_gap_id = 0;           // the gap it covers most cells of (ties: the lower number)
};

struct InfillPlan {
    InfillOptions options;
    std::vector<InfillLine> lines;  // ranked, best first
    std::vector<int> planned_gap_ids;
    double totalLength_m() const;
};

// Plans lines over the gaps of `report` (significant ones, plus small ones if asked).
// Algorithm (docs/coverage.md): gaps are clustered by overlapping along-track extents; in each
// cluster the gap cells are covered across-track by a greedy interval cover (optimal in count for
// points on a line: each line is placed so its swath starts at the first uncovered cell), each
// line is then split where its cells leave an along-track hole longer than run-in + run-out.
InfillPlan planInfill(const GapReport& report, const InfillOptions& options);

// Flies `plan` over a copy of `raster` (synthetic samples every sample_step_m at half-width
// options.half_width_m with centre margin `centre_margin`), and returns the gaps found afterwards.
struct InfillCheck {
    CoverageRaster raster;  // the copy after flying
    GapReport after;
};
InfillCheck flyInfill(const CoverageRaster& raster, const MultiPolygon& area, const InfillPlan& plan,
                      const GapOptions& gap_options, double centre_margin = 2.0,
                      double sample_step_m = 1.0, const std::vector<GroundQuad>* not_run_yet = nullptr);

}  // namespace sg::coverage
