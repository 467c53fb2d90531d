// Reading the [coverage] and [gaps] config tables; see coverage_config.hpp.
#include "coverage/coverage_config.hpp"

namespace sg::coverage {

CoverageOptions loadCoverageOptions(const config::Section& coverage) {
    coverage.allowOnly({"cell_size_m", "max_sample_step_m"});
    CoverageOptions o;
    o.cell_size_m = coverage.number("cell_size_m", 0.05, 100.0, 0.5);
    o.max_sample_step_m = coverage.number("max_sample_step_m", 0.1, 1000.0, 20.0);
    return o;
}

GapOptions loadGapOptions(const config::Section& gaps, double survey_heading_deg) {
    gaps.allowOnly({"min_width_m"});
    GapOptions o;
    o.min_width_m = gaps.number("min_width_m", 0.0, 1000.0, 1.0);
    o.survey_heading_deg = survey_heading_deg;
    return o;
}

}  // namespace sg::coverage
