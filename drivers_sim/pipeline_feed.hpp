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

// Sessions in one process. stepUntil steps `sim` through every tick before `to_s` (simulated
// seconds since the start) and stops without taking the tick at `to_s`: a later call on the same
// simulator (stepUntil, feedUntil, feedToEnd) continues with it, so the lines of [0, T) and
// [T, end) are every line of the run, once. `each` sees each step taken.
void stepUntil(Simulator& sim, double to_s, const std::function<void(const StepOutput&)>& each);
// The same, feeding the lines into `pipeline` (a session that ends at to_s); returns the count.
std::uint64_t feedUntil(Simulator& sim, engine::Pipeline& pipeline, double to_s,
                        const std::function<void(const StepOutput&)>& after_step = {});
// A session that starts later: steps without feeding through the ticks before from_s.
inline void skipUntil(Simulator& sim, double from_s) { stepUntil(sim, from_s, {}); }

}  // namespace sg::sim
