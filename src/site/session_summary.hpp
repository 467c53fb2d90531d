// The per-log session summary of a site (docs/site.md): everything a site needs of one log
// without replaying it — its coverage raster, line runs, alarm episodes, outages, counts and
// time span — computed by replaying the log alone under a given config, and kept in a file
// beside the log (`<log>.sgsum`) with the stamp and content hash of the log it came from and the
// hash of the site-wide config it was computed under. Never written into the log itself.
#pragma once

#include <cstdint>
#include <optional>
#include <stdexcept>
#include <string>
#include <vector>

#include "coverage/gap_names.hpp"
#include "coverage/line_runs.hpp"
#include "detect/anomaly_picker.hpp"
#include "detect/verification_strip.hpp"
#include "engine/site_history.hpp"
#include "engine/survey_config.hpp"
#include "log/log_schema.hpp"

namespace sg::site {

// Bump when the summary's content or layout changes: older summaries are rebuilt.
// 2: runs of infill lines; 3: picks, or the gap names the session recorded in its log (two
// changes made side by side); 4: both.
inline constexpr std::uint32_t kSessionSummaryVersion = 4;

// A log that cannot be read (not SQLite, truncated, failing SQLite's quick_check, no config).
class DamagedLog : public std::runtime_error {
public:
    using std::runtime_error::runtime_error;
};

// Size and modification time of a file: when both are unchanged the content hash is not
// recomputed (a site opens without reading its logs).
struct FileStamp {
    std::uint64_t size = 0;
    std::int64_t mtime_ns = 0;
    bool operator==(const FileStamp&) const = default;
};
FileStamp stampOf(const std::string& path);
// XXH3 64-bit hash of the file's bytes.
std::uint64_t fileContentHash(const std::string& path);

struct SessionSummary {
    std::uint32_t version = kSessionSummaryVersion;
    std::string log_name;            // file name of the log
    FileStamp log_stamp;
    std::uint64_t log_hash = 0;      // fileContentHash of the log
    std::uint64_t config_hash = 0;   // siteWideHash of the config it was computed under
    engine::SessionInfo info;        // index/first_run/added_m2 are filled in by the site
    int epsg = 0;                    // survey CRS it was computed in (0: no fix, no CRS)
    std::vector<coverage::LineRun> runs;            // ids 0..n-1 of this log alone
    std::vector<engine::AlarmSummary> alarms;
    std::vector<engine::OutageSummary> outages;
    std::uint64_t raster_hash = 0;   // content hash of this log's own raster
    std::uint64_t covered_cells = 0;
    double cell_size_m = 0.0;
    std::string raster_bytes;        // coverage::rasterToBytes (empty without a [plan])
    // The log's final anomaly picks and verification passes (SurveyEngine::picksNow at its end;
    // runs in this log's own ids; empty when [picks] enabled = false).
    std::vector<detect::AnomalyPick> picks;
    std::vector<detect::VerificationPass> verification_passes;
    // The gap names the live session committed at its end (log meta "gap_names", written by
    // recordGapNames), when they were computed under this config; else empty and `names_note`
    // says why (docs/site.md, "Gap names across sessions").
    std::optional<coverage::GapNamer::Committed> names;
    std::string names_note;
};

// Log meta key holding the names a live session committed at its end.
inline constexpr const char* kGapNamesMeta = "gap_names";
// A batch that writes `names` (with siteWideHash(config)) into meta "gap_names" of the log the
// live session is writing (its own log, posted before its writer stops; never an older log).
log::Batch gapNamesBatch(const coverage::GapNamer::Committed& names, const engine::SurveyConfig& config);

// Replays `log_path` alone under `config` and summarises it. Checks the log first (SQLite
// quick_check); throws DamagedLog naming the file and what is wrong.
SessionSummary buildSessionSummary(const std::string& log_path, const engine::SurveyConfig& config);

// Writes atomically (a temporary file renamed over `path`). Throws std::runtime_error.
void writeSessionSummary(const std::string& path, const SessionSummary& s);
// Reads a summary; with_raster == false leaves raster_bytes empty (the header and tables only).
// Throws std::runtime_error for a missing, damaged or foreign file.
SessionSummary readSessionSummary(const std::string& path, bool with_raster);
// Only the raster bytes of a summary file (for merging one log at a time): a view into `buffer`,
// which holds the whole file; reuse one buffer for many summaries.
std::string_view readSessionRaster(const std::string& path, std::string& buffer);

// Where the summary of a log lives: beside it, with the extension .sgsum.
std::string summaryPathFor(const std::string& log_path);

}  // namespace sg::site
