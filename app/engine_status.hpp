// One-line summaries of the core's state for the headless status line and command output.
#pragma once

#include <string>

#include "engine/survey_engine.hpp"

namespace sg::app {

// "covered 12345 m2 | line L3 dev +1.2 m | alt 3.4 m | ALARM altitude 5.6 m, warn noise 0.31 nT"
std::string engineStatus(const engine::SurveyEngine& engine);

// "2026-12-02T10:11:12.3Z" (UTC, tenths of a second).
std::string utcText(TimeNs utc_ns);

}  // namespace sg::app
