// Gaps: connected components (8-connectivity) of uncovered cells (margin < 1) whose centres lie
// inside the survey area, with their size and place, and the coverage percentage of the area.
// A gap narrower than min_width_m is flagged `small` and listed apart, never dropped.
#pragma once

#include <array>
#include <cstdint>
#include <string>
#include <vector>

#include "coverage/coverage_raster.hpp"
#include "coverage/geometry.hpp"

namespace sg::coverage {

struct GapOptions {
    double min_width_m = 1.0;          // gaps narrower than this are `small` (m, >= 0)
    double survey_heading_deg = 0.0;   // main survey direction, grid bearing (degrees)
};

// Cells [i0, i1) of raster row `row` belonging to gap `gap` (index into GapReport::gaps).
struct GapRun {
    std::int64_t row = 0;
    std::int64_t i0 = 0, i1 = 0;
    int gap = 0;
};

struct Gap {
    int id = 0;                   // the gap's number: 1-based report order from findGaps; stable
                                  // for the life of a site once GapNamer has named it ("G<id>")
    std::int64_t cells = 0;
    double area_m2 = 0.0;         // cells * cell_size^2
    Box bbox;                     // of the cells (outer cell edges), survey CRS
    Point centroid;               // mean of the cell centres
    double along_length_m = 0.0;  // extent along the survey direction (cell centres + one cell)
    double across_width_m = 0.0;  // extent across the survey direction (cell centres + one cell)
    double width_m = 0.0;         // min(along_length_m, area_m2 / along_length_m): mean width
    bool small = false;           // width_m < min_width_m
};

struct GapReport {
    double cell_size_m = 0.0;
    Point origin;
    double survey_heading_deg = 0.0;
    double min_width_m = 0.0;
    // Significant gaps first (largest area first), then small ones (largest first).
    std::vector<Gap> gaps;
    std::vector<GapRun> runs;  // sorted by row, then i0
    std::int64_t area_cells = 0;     // cells whose centre is inside the area
    std::int64_t covered_cells = 0;  // of those, margin >= 1
    // Uncovered cells on ground not run yet (planned lines ahead): in no gap, not counted as missed.
    std::int64_t not_run_cells = 0;
    int lines_total = 0;                // planned lines (0 without a plan's lines)
    std::vector<std::string> lines_not_run;  // names of the planned lines with a stretch not run yet

    double areaM2() const { return static_cast<double>(area_cells) * cell_size_m * cell_size_m; }
    double coveragePercent() const {
        return area_cells > 0 ? 100.0 * static_cast<double>(covered_cells) / static_cast<double>(area_cells)
                              : 0.0;
    }
    double notRunM2() const { return static_cast<double>(not_run_cells) * cell_size_m * cell_size_m; }
    // "3 of 12 planned lines not run yet: their ground is not counted as missed"; empty when none.
    std::string notRunMessage() const;
    std::size_t significantCount() const;
    std::size_t smallCount() const { return gaps.size() - significantCount(); }
};

// A convex quadrilateral of ground not run yet (LineTracker::pendingGround).
using GroundQuad = std::array<Point, 4>;

// Scans the area row by row (untouched tiles are skipped in whole 32-cell segments). Uncovered
// cells whose centre lies inside one of `not_run_yet` (may be null) belong to no gap: they are
// counted in not_run_cells (docs/coverage.md, "Not run yet and missed").
GapReport findGaps(const CoverageRaster& raster, const MultiPolygon& area, const GapOptions& options,
                   const std::vector<GroundQuad>* not_run_yet = nullptr);

// Outline of one gap in the survey CRS, traced along cell edges: exteriors counter-clockwise,
// holes clockwise; parts touching only at a corner become separate polygons (so each ring is
// simple). Collinear vertices are removed.
MultiPolygon gapOutline(const GapReport& report, int gap_index);
// The outlines of all gaps, in report order (one pass over the runs).
std::vector<MultiPolygon> gapOutlines(const GapReport& report);

}  // namespace sg::coverage
