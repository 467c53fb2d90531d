// Feeding the simulator's lines straight into the core, in one process (tests, `demo`-like
// tools): each line becomes a ReceivedLine whose source is its channel's name and whose receive
// times are its simulated UTC time.
#pragma once

#include <cstdint>
#include <functional>

#include "drivers_sim/simulator.hpp"
#include "engine/pipeline.hpp"

namespace sg::sim {

// Steps `sim` to its end; returns the number of lines fed. `after_step` (optional) sees each step.
std::uint64_t feedToEnd(Simulator& sim, engine::Pipeline& pipeline,
                        const std::function<void(const StepOutput&)>& after_step = {});

}  // namespace sg::sim
