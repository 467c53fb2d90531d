// Simulator -> Pipeline in one process; see pipeline_feed.hpp.
#include "drivers_sim/pipeline_feed.hpp"

#include <cmath>

namespace sg::sim {

namespace {

std::uint64_t feedLines(const StepOutput& out, engine::Pipeline& pipeline) {
    ReceivedLine r;
    for (const auto& l : out.lines) {
        r.source = channelName(l.channel);
        r.utc_ns = r.mono_ns = l.utc_ns;
        r.bytes = l.bytes;
        r.flags = 0;
        pipeline.feed(r);
    }
    return out.lines.size();
}

}  // namespace

std::uint64_t feedToEnd(Simulator& sim, engine::Pipeline& pipeline,
                        const std::function<void(const StepOutput&)>& after_step) {
    std::uint64_t n = 0;
    while (!sim.done()) {
        const auto& out = sim.step();
        n += feedLines(out, pipeline);
        if (after_step) after_step(out);
    }
    return n;
}

void stepUntil(Simulator& sim, double to_s, const std::function<void(const StepOutput&)>& each) {
    // The same rule as runSimulation's window: a tick belongs to [from, to) by its elapsed time.
    const TimeNs to_ns = static_cast<TimeNs>(std::llround(to_s * 1e9));
    while (!sim.done() && sim.elapsed_ns() + kTickNs < to_ns) {
        const auto& out = sim.step();
        if (each) each(out);
    }
}

std::uint64_t feedUntil(Simulator& sim, engine::Pipeline& pipeline, double to_s,
                        const std::function<void(const StepOutput&)>& after_step) {
    std::uint64_t n = 0;
    stepUntil(sim, to_s, [&](const StepOutput& out) {
        n += feedLines(out, pipeline);
        if (after_step) after_step(out);
    });
    return n;
}

}  // namespace sg::sim
