// The one sentence that states an alarm episode to the operator. The screen's banner (through
// AlarmView::text, ui/alarm_banner.cpp) and the headless status line (app/engine_status.cpp) both
// print it, so the two never give different figures for the same alarm (docs/checks.md,
// "How an alarm is stated").
#pragma once

#include <string>

#include "checks/check.hpp"
#include "engine/survey_engine.hpp"

namespace sg::engine {

// The check in words and the episode's worst value ("Off the active line: 5.2 m"), except for a
// forming gap, which says where it is:
// - open, and the probe measures a gap now (`live`, SurveyEngine::formingGapSpot, at least
//   0.05 m wide): the place and width measured now,
//   "Gap forming: line HF05, starboard, 6.5 m wide, at 256 m along the line";
// - open, but no gap is measured now (the check's hold keeps the episode open after the width
//   went back to zero, or the vessel left the line): the place and width when it was raised or
//   escalated, said to be so, and that none is measured now, never a width of 0.0 m,
//   "Gap forming: line HF05, starboard, 6.5 m wide, at 256 m along the line (when raised); no gap
//   measured now, clearing";
// - ended: where it was raised or escalated, "Gap forming: line HF05, starboard, ...".
// An episode without a recorded place falls back to the words and the worst value. `live` is
// ignored for any other check and for an ended episode; it may be null.
std::string alarmStatement(const checks::Episode& episode, const FormingGapSpot* live);

}  // namespace sg::engine
