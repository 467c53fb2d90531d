// The end-of-survey numbers in one place: coverage of the area, per-line runs, gaps, the infill
// plan and its proof, alarms and outages. `gaps --json`, the `replay` summary and the report all
// print from this one structure, so their numbers cannot disagree.
#pragma once

#include <string>
#include <vector>

#include <nlohmann/json.hpp>

#include "coverage/gaps.hpp"
#include "coverage/survey_coverage.hpp"
#include "engine/survey_engine.hpp"

namespace sg::engine {

struct AlarmSummary {
    std::string check;
    std::string unit;
    TimeNs start_ns = 0;
    std::optional<TimeNs> end_ns;
    std::string peak_level;
    double peak_value = 0.0;
    std::optional<TimeNs> ack_ns;
};

struct SurveySummary {
    std::string survey_name;
    int epsg = 0;
    std::string crs_name;
    std::string coverage_class;
    double cell_size_m = 0.0;
    double area_m2 = 0.0;
    double covered_m2 = 0.0;
    double coverage_pct = 0.0;
    std::size_t significant_gaps = 0;
    std::size_t small_gaps = 0;
    coverage::GapReport gaps;
    coverage::SurveyCoverage::Infill infill;
    std::string infill_error;  // why no infill could be planned (e.g. swath narrower than a cell)
    std::vector<coverage::LineRun> runs;
    std::vector<std::string> line_names;  // by plan line index
    std::vector<AlarmSummary> alarms;
    std::uint64_t raster_hash = 0;
    std::uint64_t lines_processed = 0;
    InvalidCounts invalid;
};

// Flushes the engine's coverage and computes everything above.
SurveySummary summarise(SurveyEngine& engine, std::uint64_t lines_processed);

nlohmann::json toJson(const SurveySummary& s);
// A few lines for the terminal: coverage, gaps, infill.
std::string toText(const SurveySummary& s);

// Writes gaps.geojson, gaps.csv, infill.geojson, infill.gpx and infill.csv into `dir` (created
// if missing); returns the paths written. Needs the survey CRS for lon/lat.
std::vector<std::string> writeExports(const SurveySummary& s, const SurveyEngine& engine,
                                      const std::string& dir);

}  // namespace sg::engine
