// Config tables of the coverage module: [coverage] (raster) and [gaps]. [plan] is read by
// survey_plan.hpp, [infill] by infill.hpp. Every key is documented in docs/coverage.md.
#pragma once

#include "common/config_section.hpp"
#include "coverage/gaps.hpp"

namespace sg::coverage {

struct CoverageOptions {
    double cell_size_m = 0.5;         // raster cell size (m)
    double max_sample_step_m = 20.0;  // longer steps between samples break the swath chain (m)
};

// [coverage] cell_size_m (0.05..100, default 0.5), max_sample_step_m (0.1..1000, default 20).
CoverageOptions loadCoverageOptions(const config::Section& coverage);
// [gaps] min_width_m (0..1000, default 1.0). The heading is the survey heading (SurveyPlan).
GapOptions loadGapOptions(const config::Section& gaps, double survey_heading_deg);

}  // namespace sg::coverage
