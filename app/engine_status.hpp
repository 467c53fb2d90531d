// One-line summaries of the core's state for the headless status line and command output.
#pragma once

#include <string>

#include "engine/survey_engine.hpp"

namespace sg::app {

// "covered 12345 m2 | line HF05 dev +1.2 m | alt 3.4 m | *ALARM Gap forming: line HF05, starboard,
// 6.5 m wide, at 256 m along the line *warn Magnetometer noise high: 0.31 nT": each open episode
// ("*" until acknowledged) by engine::alarmStatement, the sentence the screen's banner shows.
std::string engineStatus(const engine::SurveyEngine& engine);

// "2026-12-02T10:11:12.3Z" (UTC, tenths of a second).
std::string utcText(TimeNs utc_ns);

}  // namespace sg::app
