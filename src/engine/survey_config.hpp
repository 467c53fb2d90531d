// The whole survey configuration: one TOML file per survey, every section parsed by the module
// that owns it and gathered here. The file's text is kept so `record` can store it in the log and
// `replay`/`gaps`/`report` can rebuild the same survey from the log alone.
// Every key is documented in docs/config.md.
#pragma once

#include <memory>
#include <optional>
#include <string>
#include <vector>

#include "checks/check_set.hpp"
#include "common/config_section.hpp"
#include "common/input_config.hpp"
#include "decode/field_map.hpp"
#include "detect/target_model.hpp"
#include "helm/helm_config.hpp"
#include "nav/nav_config.hpp"

namespace sg::engine {

struct SurveyInfo {
    std::string name;            // free text, shown on the screen and in reports
    std::optional<int> epsg;     // projected survey CRS; empty = UTM zone of the first fix
    std::string coverage_class;  // target class whose margin the coverage raster keeps
};

struct SurveyConfig {
    std::string file;  // where it was read from ("log:<path>" when taken from a log)
    std::string text;  // the TOML text itself
    std::string dir;   // folder of the file: relative paths in the config start here

    SurveyInfo survey;
    std::vector<config::InputConfig> inputs;
    std::vector<decode::FieldMap> fieldmaps;
    config::LogConfig log;
    config::ImportConfig import;
    nav::NavConfig nav;
    detect::DetectionConfig detection;
    std::vector<helm::OutputConfig> outputs;  // [[output]]: steering sentences for the bridge

    // The parsed TOML, for sections read by later stages ([checks] with limits derived from the
    // detection model, [plan] files resolved against `dir`).
    std::shared_ptr<const toml::table> table;
    config::Section root() const { return config::Section(*table, file); }
};

// The same config with anomaly picks and the verification strip switched off for this run only,
// as if it said `[picks] enabled = false` (the other [picks] keys are kept). The stored text is
// left as it was: it is what the survey was recorded with. Used by `replay --no-picks` and
// `gaps --no-picks` to measure what detection costs (bench/bench_replay_day.sh).
void switchOffPicks(SurveyConfig& cfg);

// Reads and validates a config file. Throws config::ConfigError naming file, key and line.
// `use`: Offline for reading a log back (an [[input]] may then have no transport, as `import`
// allows), Acquisition for `record` and the demo.
SurveyConfig loadSurveyConfig(const std::string& path,
                              config::InputUse use = config::InputUse::Acquisition);
// The same from text (e.g. the copy stored in a log); `name` stands for the file in messages and
// `dir` is where relative paths start.
SurveyConfig parseSurveyConfig(const std::string& text, const std::string& name,
                               const std::string& dir,
                               config::InputUse use = config::InputUse::Acquisition);

}  // namespace sg::engine
