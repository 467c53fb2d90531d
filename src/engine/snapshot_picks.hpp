// The screen's copy of the pick list and the verification strip (Snapshot::picks): plain data
// built from SurveyEngine::picksNow(), the same figures `gaps --json` and the report give at that
// moment (docs/picks.md). Kept apart from snapshot_builder.cpp so the conversion is testable alone.
#pragma once

#include <memory>
#include <vector>

#include "engine/snapshot.hpp"
#include "engine/survey_engine.hpp"

namespace sg::engine {

// `runs`: the snapshot's runs (RunView, in run-id order) to name the runs that saw a pick.
PicksView makePicksView(const SurveyEngine::PicksNow& now, bool enabled, const std::vector<RunView>& runs);

}  // namespace sg::engine
