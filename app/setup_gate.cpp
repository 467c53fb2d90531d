// Setup checks for the commands; see setup_gate.hpp.
#include "app/setup_gate.hpp"

#include <cstdio>

#include "log/log_reader.hpp"

namespace sg::app {

bool printSetupReport(const engine::SetupReport& report, const char* command) {
    for (const auto& p : report.problems) std::fprintf(stderr, "%s: %s\n", command, p.text().c_str());
    return report.ok();
}

int nothingCoveredExit(const engine::SurveySummary& summary, const engine::SurveyEngine& engine,
                       const char* command) {
    const auto problem = engine::nothingCoveredProblem(summary, engine);
    if (!problem) return 0;
    std::fprintf(stderr, "%s: error: %s\n", command, problem->c_str());
    return kExitNothingCovered;
}

int nothingCoveredExit(engine::SurveyEngine& engine, const char* command) {
    const auto problem = engine::nothingCoveredProblem(engine);
    if (!problem) return 0;
    std::fprintf(stderr, "%s: error: %s\n", command, problem->c_str());
    return kExitNothingCovered;
}

std::vector<ReceivedLine> firstLinesOfLog(const std::string& log_path, double window_s) {
    std::vector<ReceivedLine> out;
    log::LogReader reader(log_path);
    ReceivedLine l;
    const auto window_ns = static_cast<TimeNs>(window_s * 1e9);
    while (reader.next(l)) {
        if (!out.empty() && l.utc_ns - out.front().utc_ns > window_ns) break;
        out.push_back(l);
    }
    return out;
}

bool checkLogSetup(const std::string& log_path, const engine::SurveyConfig& config, const char* command) {
    engine::SetupReport report;
    engine::checkConfig(config, engine::SetupUse::kLog, report);
    engine::DataCheckOptions opt;
    // A log may begin before the magnetometer: no sample in its first seconds is only a warning
    // (the run's end says so if nothing was covered at all).
    opt.require_samples = false;
    engine::checkData(config, firstLinesOfLog(log_path, opt.window_s), log_path, opt, report);
    return printSetupReport(report, command);
}

}  // namespace sg::app
