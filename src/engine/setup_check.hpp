// Setup validation: the checks `swathguard check` runs, and `record`, `import`, `gaps` and
// `report` run before they start, so that a wrong setup is an error naming the file, the key and
// the fix, never a quiet 0 % coverage.
//
// Two kinds of check:
// - checkConfig: the config alone (values the sensor position needs, the inputs the detection and
//   the plan need, the [plan] and its files, the CRS, paths). Needs no data, so `record` runs it
//   before acquisition starts.
// - checkData: the first seconds of data (capture files or a log) run through the same core
//   (engine::Pipeline): every sensor index in the strings has a [[sensor]], every [[sensor]]
//   is seen, and no value the position needs is missing on every sample.
// No I/O here beyond reading the config's plan files: the caller prints the report.
#pragma once

#include <cstddef>
#include <string>
#include <vector>

#include "common/received_line.hpp"
#include "engine/survey_config.hpp"

namespace sg::engine {

struct SetupProblem {
    bool error = true;   // false: a warning (the run goes on)
    std::string file;    // the config (or the data) the problem is in
    std::string key;     // the key to change, e.g. "[tow] cable_out_m"
    std::string what;    // what is wrong
    std::string fix;     // what to do about it
    // "error: FILE: key [tow] cable_out_m: WHAT; fix: FIX" on one line.
    std::string text() const;
};

struct SetupReport {
    std::vector<SetupProblem> problems;
    std::size_t errors() const;
    bool ok() const { return errors() == 0; }
    void error(std::string file, std::string key, std::string what, std::string fix);
    void warning(std::string file, std::string key, std::string what, std::string fix);
};

// What the config is about to be used for: input paths must exist only for `record` (the
// captures on `import`'s and `check`'s command line replace them).
enum class SetupUse { kRecord, kImport, kLog };

// Loads the config file and checks it. A config that does not parse is one error (its message
// names file, key and line); `cfg_out` receives the config when it parses.
SetupReport checkConfigFile(const std::string& path, SetupUse use, SurveyConfig* cfg_out = nullptr);
// Checks a parsed config (see the file comment). Appends to `out`.
void checkConfig(const SurveyConfig& cfg, SetupUse use, SetupReport& out);

struct DataCheckOptions {
    double window_s = 120.0;     // seconds of data (receive time) from the first line
    bool whole = false;          // ignore window_s: every line (import: the merged captures)
    bool require_samples = true; // no magnetometer sample in the window is an error (else a warning)
};
// Runs the data's first seconds through a fresh Pipeline built from `cfg` and checks what came
// out. `data_name` names the data in messages (capture files, a log path).
void checkData(const SurveyConfig& cfg, const std::vector<ReceivedLine>& lines,
               const std::string& data_name, const DataCheckOptions& options, SetupReport& out);

}  // namespace sg::engine
