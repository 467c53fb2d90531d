// `swathguard check --config FILE [--input NAME=PATH ...]`: the setup checks alone, before a
// survey: the config (every value the sensor position needs, the keys the detection models and
// the plan need, paths) and, with --input capture files, their first seconds through the core
// (sensor indices against [[sensor]], every configured sensor seen, no value missing on every
// sample). Each problem is one line on stderr naming the file, the key and the fix; the exit code
// is 0 when there is no error and 4 when there is one (warnings do not fail).
#include <cstdio>

#include <fmt/format.h>

#include "app/commands.hpp"
#include "app/setup_gate.hpp"
#include "engine/setup_check.hpp"
#include "io/importer.hpp"

namespace sg::app {

namespace {

struct CheckOptions {
    std::string config;
    std::vector<std::string> inputs;  // NAME=PATH
    double seconds = 120.0;
};

int runCheck(const CheckOptions& o) {
    engine::SurveyConfig cfg;
    // With captures the inputs come from the command line (as for import); without, as recorded.
    const auto use = o.inputs.empty() ? engine::SetupUse::kRecord : engine::SetupUse::kImport;
    auto report = engine::checkConfigFile(o.config, use, &cfg);
    if (cfg.table && !o.inputs.empty()) {
        std::vector<io::CaptureFile> files;
        for (const auto& s : o.inputs) {
            const auto eq = s.find('=');
            if (eq == std::string::npos || eq == 0 || eq + 1 == s.size())
                throw std::runtime_error(fmt::format("--input '{}': expected NAME=PATH", s));
            files.push_back({s.substr(0, eq), s.substr(eq + 1)});
        }
        try {
            const auto merged = io::mergeCaptures(cfg.inputs, cfg.fieldmaps, files, cfg.import);
            for (const auto& p : merged.problems)
                report.warning(o.config, "[import] max_clock_disagreement_s", "clock disagreement: " + p,
                               "check the captures' clocks, or raise the limit");
            engine::DataCheckOptions opt;
            opt.window_s = o.seconds;
            std::string names;
            for (const auto& f : files) names += (names.empty() ? "" : ", ") + f.path;
            engine::checkData(cfg, merged.lines, names, opt, report);
        } catch (const std::runtime_error& e) {
            report.error(o.config, "--input", e.what(), "give one readable capture per [[input]] NAME");
        }
    }
    const bool ok = printSetupReport(report, "check");
    const auto warnings = report.problems.size() - report.errors();
    if (ok) std::printf("check: %s: no error (%zu warning(s))\n", o.config.c_str(), warnings);
    else std::fprintf(stderr, "check: %zu error(s), %zu warning(s)\n", report.errors(), warnings);
    return ok ? 0 : kExitSetupError;
}

}  // namespace

void addCheckCommand(CLI::App& app) {
    auto opts = std::make_shared<CheckOptions>();
    auto* cmd = app.add_subcommand("check", "Check a survey setup (config, and capture files) before a run");
    cmd->add_option("--config", opts->config, "Survey configuration (TOML)")->required();
    cmd->add_option("--input", opts->inputs, "NAME=PATH: capture file of the [[input]] NAME");
    cmd->add_option("--seconds", opts->seconds, "Seconds of the captures to run through the core")
        ->capture_default_str()
        ->check(CLI::PositiveNumber);
    cmd->callback([opts] {
        const int rc = runCheck(*opts);
        if (rc != 0) throw CLI::RuntimeError(rc);
    });
}

}  // namespace sg::app
