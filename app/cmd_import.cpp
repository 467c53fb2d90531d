// `swathguard import`: builds a survey log from one capture file per instrument, merged by
// instrument time, as if recorded live (see io/importer.hpp).
#include <cstdio>
#include <fstream>
#include <sstream>

#include <fmt/format.h>

#include "app/commands.hpp"
#include "common/config_section.hpp"
#include "common/input_config.hpp"
#include "decode/field_map.hpp"
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
    const auto r = io::importCaptures(inputs, maps, files, options, o.log, text.str(), o.config,
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
