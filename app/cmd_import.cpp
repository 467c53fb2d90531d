// `swathguard import`: builds a survey log from one capture file per instrument, merged by
// instrument time, as if recorded live (see io/importer.hpp).
#include <chrono>
#include <cstdio>
#include <fstream>
#include <sstream>

#include <fmt/format.h>

#include "app/commands.hpp"
#include "common/config_section.hpp"
#include "common/input_config.hpp"
#include "decode/field_map.hpp"
#include "io/importer.hpp"
#include "engine/survey_config.hpp"
#include "site/session_summary.hpp"
#include "site/site.hpp"
#include "site/site_config.hpp"

namespace sg::app {

namespace {

struct ImportOptions {
    std::string config;
    std::vector<std::string> inputs;  // NAME=PATH
    std::string log;
    std::string site;  // site folder: the new log goes to SITE/logs (named by the time of import)
    bool accept_disagreement = false;
};

int runImport(const ImportOptions& o) {
    std::ifstream in(o.config, std::ios::binary);
    if (!in) throw std::runtime_error(fmt::format("{}: cannot read the config file", o.config));
    std::stringstream text;
    text << in.rdbuf();
    const auto table = config::parseText(text.str(), o.config);
    const config::Section root(table, o.config);
    const auto inputs = config::parseInputs(root);
    const auto maps = decode::parseFieldMaps(root);
    const auto options = config::parseImport(root);
    std::vector<io::CaptureFile> files;
    for (const auto& s : o.inputs) {
        const auto eq = s.find('=');
        if (eq == std::string::npos || eq == 0 || eq + 1 == s.size())
            throw std::runtime_error(fmt::format("--input '{}': expected NAME=PATH", s));
        files.push_back({s.substr(0, eq), s.substr(eq + 1)});
    }
    std::string log_path = o.log;
    if (!o.site.empty()) {
        if (!o.log.empty()) throw std::runtime_error("--log and --site: a site names its logs itself (SITE/logs/)");
        // The same rule as record --site: the site-wide keys must match the site's config.
        const auto cfg = engine::loadSurveyConfig(o.config);
        const auto site = site::discoverSite({o.site}, std::nullopt);
        const engine::SurveyConfig* ref = site.config_in_force ? &*site.config_in_force : nullptr;
        for (const auto& l : site.logs)
            if (ref == nullptr && !l.skipped && l.config) ref = &*l.config;
        if (ref != nullptr)
            if (auto d = site::firstSiteWideDifference(cfg, *ref))
                throw config::ConfigError(fmt::format("{}: differs from the site's config {} in {} (docs/site.md)",
                                                      o.config, ref->file, *d));
        log_path = site::newLogPath(o.site, std::chrono::duration_cast<std::chrono::nanoseconds>(
                                                std::chrono::system_clock::now().time_since_epoch()).count());
    } else if (log_path.empty()) {
        throw std::runtime_error("--log FILE or --site DIR is required");
    }
    const auto r = io::importCaptures(inputs, maps, files, options, log_path, text.str(), o.config,
                                      o.accept_disagreement);
    for (const auto& c : r.merged.captures)
        std::printf("%s: %zu lines (%zu with instrument time) from %s, clock shift %+.3f s\n",
                    c.input.c_str(), c.lines, c.timed_lines, c.path.c_str(), c.shift_s);
    for (const auto& p : r.merged.problems) std::fprintf(stderr, "import: clock disagreement: %s\n", p.c_str());
    if (!r.written) {
        std::fprintf(stderr,
                     "import: not merged: the captures' clocks disagree (raise [import] "
                     "max_clock_disagreement_s or pass --accept-clock-disagreement)\n");
        return 3;
    }
    std::printf("import: %llu lines written to %s\n", static_cast<unsigned long long>(r.raw_lines),
                log_path.c_str());
    if (!o.site.empty()) {
        const auto sum = site::buildSessionSummary(log_path, engine::loadSurveyConfig(o.config));
        site::writeSessionSummary(site::summaryPathFor(log_path), sum);
        std::printf("import: session summary %s\n", site::summaryPathFor(log_path).c_str());
    }
    return 0;
}

}  // namespace

void addImportCommand(CLI::App& app) {
    auto opts = std::make_shared<ImportOptions>();
    auto* cmd = app.add_subcommand("import", "Build a survey log from capture files, by instrument time");
    cmd->add_option("--config", opts->config, "Survey configuration (TOML)")->required();
    cmd->add_option("--input", opts->inputs, "NAME=PATH: capture file of the [[input]] NAME")
        ->required();
    cmd->add_option("--log", opts->log, "Log file to create");
    cmd->add_option("--site", opts->site, "Site folder: the log goes to SITE/logs/ (instead of --log)");
    cmd->add_flag("--accept-clock-disagreement", opts->accept_disagreement,
                  "Merge even when a capture's clock disagrees (logged as an event)");
    cmd->callback([opts] {
        const int rc = runImport(*opts);
        if (rc != 0) throw CLI::RuntimeError(rc);
    });
}

}  // namespace sg::app
