// The setup checks as the commands use them: print the problems on stderr, stop before the run on
// an error, and end a run that covered nothing (although magnetometer samples arrived) with a
// non-zero exit code and the reasons. Exit codes: docs/config.md, "Setup validation".
#pragma once

#include <string>
#include <vector>

#include "common/received_line.hpp"
#include "engine/setup_check.hpp"
#include "engine/survey_summary.hpp"

namespace sg::app {

inline constexpr int kExitSetupError = 4;      // the setup checks found an error: nothing was run
inline constexpr int kExitNothingCovered = 5;  // samples arrived but nothing was covered

// Prints every problem on stderr as "COMMAND: error: ..." / "COMMAND: warning: ...".
// Returns true when there is no error.
bool printSetupReport(const engine::SetupReport& report, const char* command);

// After a run: when nothing was covered although magnetometer samples with a field arrived,
// prints why on stderr and returns kExitNothingCovered; else 0.
int nothingCoveredExit(const engine::SurveySummary& summary, const engine::SurveyEngine& engine,
                       const char* command);
// The same straight from the engine (record: no summary is computed).
int nothingCoveredExit(engine::SurveyEngine& engine, const char* command);

// The lines of the first `window_s` seconds (receive time) of a log.
std::vector<ReceivedLine> firstLinesOfLog(const std::string& log_path, double window_s);

// The checks `gaps` and `report` run before replaying a log: the config (as used for a log) and
// the log's first seconds. Prints the problems; returns true when there is no error.
bool checkLogSetup(const std::string& log_path, const engine::SurveyConfig& config, const char* command);

}  // namespace sg::app
