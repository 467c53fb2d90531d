// `swathguard import`: builds a survey log from one capture file per instrument, merged by
// instrument time, as if recorded live (see io/importer.hpp).
#include <cstdio>
#include <filesystem>
#include <fstream>
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

namespace sg::app {

namespace {

struct ImportOptions {
    std::string config;
    std::vector<std::string> inputs;  // NAME=PATH
    std::string log;
    bool accept_disagreement = false;
};

int runImport(const ImportOptions& o) {
    // The whole config, checked as for an import ([[input]] transport and path are not needed:
    // --input gives the files).
    engine::SurveyConfig cfg;
    if (!printSetupReport(engine::checkConfigFile(o.config, engine::SetupUse::kImport, &cfg), "import"))
        return kExitSetupError;
    std::vector<io::CaptureFile> files;
    for (const auto& s : o.inputs) {
        const auto eq = s.find('=');
        if (eq == std::string::npos || eq == 0 || eq + 1 == s.size())
            throw std::runtime_error(fmt::format("--input '{}': expected NAME=PATH", s));
        files.push_back({s.substr(0, eq), s.substr(eq + 1)});
    }
    auto merged = io::mergeCaptures(cfg.inputs, cfg.fieldmaps, files, cfg.import);
    // The merged data through the core before anything is written: sensor indices, pose inputs,
    // and a run that would cover nothing are errors, and no log is left behind.
    if (merged.problems.empty() || o.accept_disagreement) {  // (else not merged: exit 3 below)
        engine::SetupReport report;
        engine::DataCheckOptions opt;
        opt.whole = true;
        std::string names;
        for (const auto& f : files) names += (names.empty() ? "" : ", ") + f.path;
        engine::checkData(cfg, merged.lines, names, opt, report);
        if (!printSetupReport(report, "import")) return kExitSetupError;
    }
    // The config's path is stored absolute so that `gaps`/`replay`/`report` find its plan files
    // from any working folder.
    const auto config_file = std::filesystem::absolute(o.config).lexically_normal().string();
    const auto r = io::importMerged(std::move(merged), cfg.inputs, cfg.fieldmaps, o.log, cfg.text,
                                    config_file, o.accept_disagreement);
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
                o.log.c_str());
    return 0;
}

}  // namespace

void addImportCommand(CLI::App& app) {
    auto opts = std::make_shared<ImportOptions>();
    auto* cmd = app.add_subcommand("import", "Build a survey log from capture files, by instrument time");
    cmd->add_option("--config", opts->config, "Survey configuration (TOML)")->required();
    cmd->add_option("--input", opts->inputs, "NAME=PATH: capture file of the [[input]] NAME")
        ->required();
    cmd->add_option("--log", opts->log, "Log file to create")->required();
    cmd->add_flag("--accept-clock-disagreement", opts->accept_disagreement,
                  "Merge even when a capture's clock disagrees (logged as an event)");
    cmd->callback([opts] {
        const int rc = runImport(*opts);
        if (rc != 0) throw CLI::RuntimeError(rc);
    });
}

}  // namespace sg::app
