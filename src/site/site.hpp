// A site (docs/site.md): the unit of a survey that runs for days, several sessions and sometimes
// several vessels. On disk, a folder:
//   SITE/survey.toml          the config in force (site-wide keys: see site_config.hpp)
//   SITE/logs/<UTC start>.sglog   one log per acquisition session, never written after it closed
//   SITE/logs/<UTC start>.sgsum   its session summary (rebuilt when stale)
// or, without a folder, a list of log files (each with its own config; their site-wide keys
// must agree unless a config in force is given).
//
// The site's coverage is the per-cell join (CoverageRaster::mergeTile) of every log's own raster,
// independent of the order and grouping of the logs. Runs are numbered across the site in time
// order of the logs (the first line's receive time, then the file name).
//
// No threads here: refreshSummaries takes a job runner (io::runJobs uses every core).
#pragma once

#include <functional>
#include <optional>
#include <stdexcept>
#include <string>
#include <vector>

#include "engine/survey_config.hpp"
#include "engine/survey_engine.hpp"
#include "site/session_summary.hpp"

namespace sg::site {

class SiteError : public std::runtime_error {
public:
    using std::runtime_error::runtime_error;
};

struct SiteLog {
    std::string path;
    std::string summary_path;
    std::optional<engine::SurveyConfig> config;  // effective config (nullopt when unreadable)
    std::optional<SessionSummary> summary;       // without raster bytes, unless kept in memory
    bool raster_in_memory = false;               // summary could not be written beside the log
    std::string stale_reason;                    // why the summary is (re)built; empty: fresh
    bool skipped = false;
    std::string skip_reason;
};

struct Site {
    std::string dir;                                      // empty: a list of log files
    std::optional<engine::SurveyConfig> config_in_force;  // SITE/survey.toml or --config
    std::vector<SiteLog> logs;                            // in time order once summarised
    std::vector<std::string> messages;                    // for people: skipped, recomputed, ...

    // The logs that count (not skipped), in time order.
    std::vector<const SiteLog*> usable() const;
    // The config an engine reading the whole site uses: the config in force, else the earliest
    // usable log's own (all agree on the site-wide keys).
    engine::SurveyConfig engineConfig() const;
};

// True when `path` is a site folder (a folder holding survey.toml or logs/).
bool isSiteDir(const std::string& path);
// The folder for new logs of a site, and a fresh log name there from a UTC time (ns):
// SITE/logs/YYYYMMDDTHHMMSSZ.sglog (with -2, -3, ... when taken).
std::string newLogPath(const std::string& site_dir, TimeNs utc_ns);

// Finds the logs (a site folder, or log files), reads each log's own config, applies the config
// in force (`config_path`, else SITE/survey.toml when present) and decides which summaries are
// stale. Damaged logs are marked skipped with the reason. Without a config in force the
// site-wide keys of every log must agree: otherwise SiteError names the key and the two logs.
// `exclude`: a log path to leave out (the one being recorded).
Site discoverSite(const std::vector<std::string>& paths, const std::optional<std::string>& config_path,
                  const std::string& exclude = "");

// Runs a list of independent jobs (one per stale log); the default runs them one after another.
using JobRunner = std::function<void(std::vector<std::function<void()>>&)>;
void runSequential(std::vector<std::function<void()>>& jobs);

// Builds the summaries of stale logs (replaying each alone under its effective config) with
// `run`, writes them beside their logs (kept in memory when the folder is read-only), puts the
// logs in time order and records a message for every log recomputed or skipped. Afterwards every
// usable log has its summary. Throws SiteError when two usable logs lie in different CRSs and
// no config in force fixes one.
void refreshSummaries(Site& site, const JobRunner& run = runSequential);

// The engine seed of the usable logs: their rasters joined in time order (each log's summary
// read and merged one at a time), their runs renumbered across the site, their alarms and
// outages, and one SessionInfo each (with what it added). `upto`: only the first `upto` usable
// logs (for replaying the last one on top of the others).
engine::SiteSeed siteSeed(const Site& site, std::optional<std::size_t> upto = std::nullopt);

}  // namespace sg::site
