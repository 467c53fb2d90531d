// Opening a site (or several logs) for the commands: discovery, summaries rebuilt on every core
// with progress on stderr, the site's messages on stderr, and a summary of the whole site from an
// engine seeded with every usable log (docs/site.md).
#pragma once

#include <memory>
#include <optional>
#include <string>
#include <vector>

#include "engine/survey_engine.hpp"
#include "engine/survey_summary.hpp"
#include "site/site.hpp"

namespace sg::app {

// True when the command line names a site rather than one log: a site folder, or several logs.
bool namesSite(const std::vector<std::string>& paths);

// Discovers and summarises the site (stale summaries rebuilt in parallel) and prints what was
// recomputed or skipped on stderr. Throws site::SiteError when no usable log remains and
// `need_logs` is set.
site::Site openSite(const std::vector<std::string>& paths, const std::optional<std::string>& config,
                    const std::string& exclude = "", bool need_logs = true);

// The whole site in one engine (no lines fed) and its summary.
struct SiteView {
    std::unique_ptr<engine::SurveyEngine> engine;
    engine::SurveySummary summary;
};
SiteView summariseSite(const site::Site& site);

// One line per session for the terminal.
std::string sessionsText(const engine::SurveySummary& s);

}  // namespace sg::app
