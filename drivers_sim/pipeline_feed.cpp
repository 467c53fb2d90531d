// Simulator -> Pipeline in one process; see pipeline_feed.hpp.
#include "drivers_sim/pipeline_feed.hpp"

namespace sg::sim {

std::uint64_t feedToEnd(Simulator& sim, engine::Pipeline& pipeline,
                        const std::function<void(const StepOutput&)>& after_step) {
    std::uint64_t n = 0;
    ReceivedLine r;
    while (!sim.done()) {
        const auto& out = sim.step();
        for (const auto& l : out.lines) {
            r.source = channelName(l.channel);
            r.utc_ns = r.mono_ns = l.utc_ns;
            r.bytes = l.bytes;
            r.flags = 0;
            pipeline.feed(r);
            ++n;
        }
        if (after_step) after_step(out);
    }
    return n;
}

}  // namespace sg::sim
