// The end-of-survey numbers in one place: coverage of the area, per-line runs, gaps, the infill
// plan and its proof, alarms and outages. `gaps --json`, the `replay` summary and the report all
// print from this one structure, so their numbers cannot disagree.
#pragma once

#include <optional>
#include <string>
#include <vector>

#include <nlohmann/json.hpp>

#include "coverage/gaps.hpp"
#include "coverage/survey_coverage.hpp"
#include "engine/picks_summary.hpp"
#include "engine/survey_engine.hpp"
#include "log/log_schema.hpp"

namespace sg::engine {

// Coverage of one planned line's corridor (line +- half the line spacing) at the end.
struct LineCoverage {
    std::string name;
    double length_m = 0.0;
    double corridor_half_width_m = 0.0;
    double corridor_covered_pct = 0.0;
    int runs = 0;  // line runs flown on it
};

// The detection model behind the coverage, as configured: what the numbers assume.
struct DetectionSummary {
    detect::GeomagneticField field;
    bool field_used = true;  // false: every class uses the mass rule; `field` is not printed
    detect::DetectionSettings settings;
    std::vector<detect::TargetClass> targets;
    std::size_t sensors = 0;
    double line_spacing_m = 0.0;
    double planned_altitude_m = 0.0;
    double planned_half_width_m = 0.0;             // coverage class, at the planned altitude
    std::optional<double> max_overlap_altitude_m;  // highest altitude keeping swaths overlapping
    double survey_heading_deg = 0.0;
    // Positions past the last fix: the tow point is carried on for at most this long ([vessel]
    // extrapolation_s; 0, the default: held at the last fix, no coverage beyond it), and a sample
    // further than fix_max_age_s from a fix covers nothing.
    double extrapolation_s = 0.0;
    double fix_max_age_s = 0.0;
};

// Why a gap may be there: the line runs that passed within one line spacing of it, the time each
// was abreast of it (interpolated along the run at its mean speed: an estimate), and the alarm
// episodes and outages active within a window around those times. No pass means the ground was
// never run over (off the plan, or the survey stopped short).
struct GapPass {
    int run = 0;
    std::string line;
    TimeNs t_ns = 0;       // when the run was abreast of the gap's centre (estimate)
    double offset_m = 0.0; // distance of the gap's centre from the run's track (m)
    std::vector<std::string> checks;   // alarm episodes active near t_ns, as "check (level)"
    std::vector<std::string> outages;  // link outages active near t_ns, as "link source"
};
struct GapCause {
    int gap_id = 0;
    std::vector<GapPass> passes;       // nearest first
    std::vector<std::string> checks;   // every check of the passes, without repeats
    std::string text;                  // one line for people
};

// A line run's profile for the report's line plots (coverage/run_profiles.hpp), with the picks
// that run saw placed along its line.
struct ProfilePick {
    int id = 0;            // pick id (P<id>)
    double along_m = 0.0;  // of this run's observation, along the plan line from its start (m)
    double snr = 0.0;      // |peak| / threshold of this observation
    double peak_nT = 0.0;  // signed
};
struct RunProfileSummary {
    coverage::RunProfile profile;
    std::vector<ProfilePick> picks;
};
// The check limits drawn on the line profiles (as in force at the end of the log).
struct ProfileLimits {
    checks::Limits altitude, deviation, noise;
};

// What the log adds to the engine's state (optional: the demo and tests have no log reader).
struct LogContext {
    std::string path;
    std::vector<log::EventRow> events;  // the log's events table (link outages among them)
    TimeNs first_ns = 0, last_ns = 0;   // UTC receive times of the first and last lines
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
    coverage::GapReport gaps;          // missed ground only; gaps[k].id is the stable number (G<id>)
    int next_gap_number = 1;           // the number the next new gap takes (committed state)
    coverage::SurveyCoverage::Infill infill;
    std::string infill_error;  // why no infill could be planned (e.g. swath narrower than a cell)
    std::vector<coverage::LineRun> runs;
    std::vector<std::string> line_names;  // by plan line index
    std::vector<AlarmSummary> alarms;
    std::uint64_t raster_hash = 0;
    std::uint64_t raster_covered_cells = 0;  // every covered cell, inside the area or not
    std::uint64_t lines_processed = 0;
    InvalidCounts invalid;
    std::uint64_t field_samples = 0;  // magnetometer samples with a total field (any sensor index)
    std::vector<std::pair<int, std::uint64_t>> unknown_sensors;  // index with no [[sensor]], samples
    std::string crs_problem;          // why fixes were refused (SurveyEngine::crsProblem)
    std::string log_path;
    TimeNs first_ns = 0, last_ns = 0;
    std::vector<LineCoverage> line_coverage;  // by plan line index
    std::vector<OutageSummary> outages;       // by start time
    std::vector<GapCause> gap_causes;         // same order as gaps.gaps
    DetectionSummary detection;
    // A site (docs/site.md): its sessions (logs) in time order; empty for a lone log.
    std::vector<SessionInfo> sessions;
    std::size_t vessels = 0;                  // distinct vessel names among the sessions
    std::vector<std::string> site_messages;   // logs skipped, recomputed, ... (for people)
    // Anomaly picks and the verification strip of the samples this engine processed (a site's
    // earlier logs are not re-picked: docs/picks.md).
    PicksSummary picks;
    // Altitude, deviation, noise and picks along each line run of this engine's session (not in
    // the JSON; a site's earlier sessions have none), and the limits to draw on them.
    std::vector<RunProfileSummary> profiles;
    ProfileLimits profile_limits;
};

// The alarm episodes and data outages of the engine's own session (no site history).
std::vector<AlarmSummary> sessionAlarms(const SurveyEngine& engine, int session);
std::vector<OutageSummary> sessionOutages(const SurveyEngine& engine, const LogContext& log, int session);

// Flushes the engine's coverage and computes everything above.
SurveySummary summarise(SurveyEngine& engine, std::uint64_t lines_processed, const LogContext& log = {});
// The name of plan line `line` (empty when out of range).
std::string lineName(const SurveySummary& s, int line);

nlohmann::json toJson(const SurveySummary& s);
// Samples that covered nothing, by reason ("no cable out 1200, no altitude 3"); empty when none.
std::string invalidReasonsText(const InvalidCounts& c);
// A run that covered nothing although magnetometer samples with a field arrived: the message
// with the counts by reason and the likely setup mistakes; nullopt when coverage was painted or
// when no sample with a field arrived. `engine` is the one `s` was summarised from.
std::optional<std::string> nothingCoveredProblem(const SurveySummary& s, const SurveyEngine& engine);
// The same straight from the engine (flushes its coverage; no gaps or infill computed), for the
// end of `record` and `import`.
std::optional<std::string> nothingCoveredProblem(SurveyEngine& engine);
// A few lines for the terminal: coverage, gaps, infill.
std::string toText(const SurveySummary& s);

// Writes gaps.geojson, gaps.csv, infill.geojson, infill.gpx, infill.csv, picks.csv,
// picks.geojson and verification.csv into `dir` (created
// if missing); returns the paths written. Needs the survey CRS for lon/lat.
std::vector<std::string> writeExports(const SurveySummary& s, const SurveyEngine& engine,
                                      const std::string& dir);

}  // namespace sg::engine
