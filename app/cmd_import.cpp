// `swathguard import`: builds a survey log from one capture file per instrument, merged by
// instrument time, as if recorded live (see io/importer.hpp).
#include <algorithm>
#include <chrono>
#include <cstdio>
#include <filesystem>
#include <fstream>
#include <map>
#include <sstream>

#include <fmt/format.h>

#include "app/commands.hpp"
#include "common/config_section.hpp"
#include "common/input_config.hpp"
#include "decode/field_map.hpp"
#include "app/setup_gate.hpp"
#include "engine/setup_check.hpp"
#include "engine/survey_config.hpp"
#include "io/importer.hpp"
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
    // The whole config, checked as for an import ([[input]] transport and path are not needed:
    // --input gives the files).
    engine::SurveyConfig cfg;
    if (!printSetupReport(engine::checkConfigFile(o.config, engine::SetupUse::kImport, &cfg), "import"))
        return kExitSetupError;
    const config::Section root = cfg.root();
    const auto& inputs = cfg.inputs;

    std::map<std::string, std::string> given;  // NAME -> PATH from --input
    for (const auto& s : o.inputs) {
        const auto eq = s.find('=');
        if (eq == std::string::npos || eq == 0 || eq + 1 == s.size())
            throw std::runtime_error(fmt::format("--input '{}': expected NAME=PATH", s));
        const std::string name = s.substr(0, eq);
        if (std::none_of(inputs.begin(), inputs.end(), [&](const auto& i) { return i.name == name; })) {
            std::string names;
            for (const auto& i : inputs) names += (names.empty() ? "" : ", ") + i.name;
            throw std::runtime_error(fmt::format("--input {}: no [[input]] named '{}' in {} (inputs: {})",
                                                 s, name, o.config, names));
        }
        if (!given.emplace(name, s.substr(eq + 1)).second)
            throw std::runtime_error(fmt::format("--input {}: input '{}' is given twice", s, name));
    }

    std::string log_path = o.log;
    if (!o.site.empty()) {
        if (!o.log.empty()) throw std::runtime_error("--log and --site: a site names its logs itself (SITE/logs/)");
        // The same rule as record --site: the site-wide keys must match the site's config.
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

    // Which file each input is read from: --input NAME=PATH wins over the [[input]] path (the
    // output says so); an input without --input is read from its [[input]] path (transport
    // "file"; relative to the config's folder), which must then exist; any other input is not
    // imported, and the output says so.
    const std::filesystem::path cfg_dir = std::filesystem::path(o.config).parent_path();
    auto fromConfig = [&](const std::string& p) {
        return std::filesystem::path(p).is_absolute() ? p : (cfg_dir / p).string();
    };
    const auto tables = root.tables("input");
    std::vector<io::CaptureFile> files;
    std::vector<std::string> skipped;
    for (std::size_t i = 0; i < inputs.size(); ++i) {
        const auto& input = inputs[i];
        const bool file_in_config = input.transport_given && input.transport == config::Transport::File;
        if (const auto g = given.find(input.name); g != given.end()) {
            std::string origin = "--input";
            std::error_code ec;
            const bool same = file_in_config &&
                              std::filesystem::equivalent(fromConfig(input.path), g->second, ec);
            if (file_in_config && !same)
                origin = fmt::format("--input, not the [[input]] path {}", fromConfig(input.path));
            files.push_back({input.name, g->second, origin});
        } else if (file_in_config) {
            const std::string path = fromConfig(input.path);
            if (!std::filesystem::is_regular_file(path))
                tables[i].fail("path", fmt::format("an existing capture file (import reads input '{}' "
                                                   "from {} since no --input {}=PATH is given)",
                                                   input.name, path, input.name));
            files.push_back({input.name, path, "[[input]] path"});
        } else {
            skipped.push_back(fmt::format(
                "{}: not imported (no --input {}=PATH{})", input.name, input.name,
                input.transport_given ? fmt::format(", and its transport is {}, not a file",
                                                 config::toString(input.transport))
                                   : std::string()));
        }
    }
    if (files.empty())
        throw std::runtime_error(fmt::format(
            "nothing to import: give --input NAME=PATH for the inputs of {}", o.config));

    auto merged = io::mergeCaptures(cfg.inputs, cfg.fieldmaps, files, cfg.import);
    // The merged data through the core before anything is written: sensor indices, pose inputs,
    // and a run that would cover nothing are errors, and no log is left behind.
    if (merged.problems.empty() || o.accept_disagreement) {  // (else not merged: exit 3 below)
        engine::SetupReport report;
        engine::DataCheckOptions opt;
        opt.whole = true;
        // A capture set without the magnetometer (navigation only, imported on purpose) is not
        // held to "samples must arrive"; with one, a run that would cover nothing is an error.
        bool mag_imported = false;
        for (const auto& f : files)
            for (const auto& in : cfg.inputs) mag_imported = mag_imported || (in.name == f.input && in.role == "mag");
        opt.require_samples = mag_imported;
        std::string names;
        for (const auto& f : files) names += (names.empty() ? "" : ", ") + f.path;
        engine::checkData(cfg, merged.lines, names, opt, report);
        if (!printSetupReport(report, "import")) return kExitSetupError;
    }
    // The config's path is stored absolute so that `gaps`/`replay`/`report` find its plan files
    // from any working folder.
    const auto config_file = std::filesystem::absolute(o.config).lexically_normal().string();
    const auto r = io::importMerged(std::move(merged), cfg.inputs, cfg.fieldmaps, log_path, cfg.text,
                                    config_file, o.accept_disagreement);
    auto originOf = [&](const std::string& input) {
        for (const auto& f : files)
            if (f.input == input) return f.origin;
        return std::string();
    };
    for (const auto& c : r.merged.captures) {
        if (c.placed)
            std::printf("%s: %zu lines from %s (%s): %s\n", c.input.c_str(), c.lines, c.path.c_str(),
                        originOf(c.input).c_str(), c.assumption.c_str());
        else
            std::printf("%s: %zu lines (%zu with instrument time) from %s (%s), clock shift %+.3f s\n",
                        c.input.c_str(), c.lines, c.timed_lines, c.path.c_str(),
                        originOf(c.input).c_str(), c.shift_s);
    }
    for (const auto& sk : skipped) std::printf("%s\n", sk.c_str());
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
        const auto sum = site::buildSessionSummary(log_path, cfg);
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
    cmd->add_option("--input", opts->inputs,
                    "NAME=PATH: capture file of the [[input]] NAME (wins over its [[input]] path)");
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
