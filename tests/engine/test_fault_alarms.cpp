// Each fault the demo scenario schedules shows in the core as the matching alarm or decode
// counter: the training scenarios rely on it. The faults and their times are in
// replay_logs/demo/scenario.toml ([[fault]] tables); the run covers the whole demo survey.
#include <gtest/gtest.h>

#include <map>

#include "common/line_framer.hpp"
#include "drivers_sim/simulator.hpp"
#include "engine/pipeline.hpp"

namespace {

struct Run {
    std::map<std::string, std::vector<sg::checks::Episode>> episodes;  // by check
    std::map<std::string, std::uint64_t> reasons;                      // all sources
    std::map<std::string, std::map<std::string, std::uint64_t>> by_source;
};

const Run& demoRun() {
    static const Run run = [] {
        Run r;
        const std::string dir = std::string(SG_SOURCE_DIR) + "/replay_logs/demo/";
        const auto cfg = sg::engine::loadSurveyConfig(dir + "survey.toml");
        sg::sim::Simulator sim(sg::sim::loadScenario(dir + "scenario.toml"), sg::sim::SimOptions{});
        std::int64_t id = 1;
        sg::engine::Pipeline pipe(cfg, [&] { return id++; });
        // Frame each channel's bytes as a reader would (garbage bursts may hold line breaks).
        std::map<int, std::unique_ptr<sg::LineFramer>> framers;
        sg::TimeNs now = 0;
        for (int c = 0; c < sg::sim::kChannelCount; ++c) {
            const std::string name = sg::sim::channelName(static_cast<sg::sim::Channel>(c));
            framers[c] = std::make_unique<sg::LineFramer>([&, name](std::string_view b, std::uint8_t f) {
                sg::ReceivedLine l;
                l.source = name;
                l.utc_ns = l.mono_ns = now;
                l.bytes = std::string(b);
                l.flags = f;
                pipe.feed(l);
            });
        }
        while (!sim.done()) {
            const auto& out = sim.step();
            for (const auto& l : out.lines) {
                now = l.utc_ns;
                framers[static_cast<int>(l.channel)]->feed(l.bytes + "\r\n");
            }
            pipe.tick(out.utc_ns);
        }
        for (const auto& ep : pipe.engine().checks().episodes()) r.episodes[ep.check].push_back(ep);
        for (const auto& [src, c] : pipe.decoder().counters())
            for (const auto& [reason, n] : c.by_reason) {
                r.reasons[reason] += n;
                r.by_source[src][reason] += n;
            }
        return r;
    }();
    return run;
}

// True when some episode of `check` starts within [from_s, to_s] of the survey start.
bool raisedBetween(const std::string& check, double from_s, double to_s) {
    const auto it = demoRun().episodes.find(check);
    if (it == demoRun().episodes.end()) return false;
    // The demo scenario starts at 2026-06-14T08:00:00Z (scenario.toml start_utc).
    const sg::TimeNs t0 = 1781424000LL * sg::kNsPerSecond;
    for (const auto& ep : it->second) {
        const double s = sg::toSeconds(ep.start_ns - t0);
        if (s >= from_s && s <= to_s) return true;
    }
    return false;
}

TEST(FaultAlarms, DegradedFixRaisesFixQualityAndPositionError) {
    EXPECT_TRUE(raisedBetween("fix_quality", 240, 260));
    EXPECT_TRUE(raisedBetween("position_error", 240, 260));
}

TEST(FaultAlarms, GnssLossRaisesGnssSilence) { EXPECT_TRUE(raisedBetween("gnss_silence", 520, 525)); }

TEST(FaultAlarms, OneSensorDropoutRaisesMagSilence) {
    EXPECT_TRUE(raisedBetween("mag_silence", 780, 785));
}

TEST(FaultAlarms, BadChecksumsAndGarbageAreCountedNotAlarmed) {
    EXPECT_GT(demoRun().by_source.at("mag").count("bad_checksum") ? demoRun().by_source.at("mag").at("bad_checksum") : 0u, 10u);
    std::uint64_t gnss_bad = 0;
    for (const auto& [reason, n] : demoRun().by_source.at("gnss"))
        if (reason != "ok") gnss_bad += n;
    EXPECT_GT(gnss_bad, 3u);  // garbage bursts on the GNSS port
}

TEST(FaultAlarms, NoiseBurstRaisesNoise) { EXPECT_TRUE(raisedBetween("noise", 1150, 1160)); }

TEST(FaultAlarms, AltitudeExcursionRaisesAltitude) { EXPECT_TRUE(raisedBetween("altitude", 1450, 1500)); }

}  // namespace
