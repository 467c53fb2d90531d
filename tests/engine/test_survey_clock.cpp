// The silence checks run on the survey (instrument) clock: a simulation sent 20x faster than
// real time compresses a 25 s GNSS loss into 1.25 s of receive time and must still raise the
// alarm at the instruments' times; when every input falls silent the receive clock carries the
// survey clock on, so the alarm still fires; and live ticks between lines change nothing a
// replay (lines only) would not reproduce. Rule: docs/checks.md, "The survey clock".
#include <gtest/gtest.h>

#include <map>

#include "common/line_framer.hpp"
#include "drivers_sim/simulator.hpp"
#include "engine/pipeline.hpp"

namespace {

using namespace sg;

// The demo scenario starts at 2026-06-14T08:00:00Z (replay_logs/demo/scenario.toml start_utc)
// and plants a 25 s GNSS loss at 520 s ([[fault]] gnss_loss).
constexpr TimeNs kT0 = 1781424000LL * kNsPerSecond;

struct Feed {
    // Receive time of a line sent at survey time t: `recv0 + (t - kT0) / speed`.
    double speed = 1.0;
    TimeNs recv0 = kT0;
    double until_s = 600.0;        // survey seconds fed
    double tick_every_s = 0.0;     // > 0: receive-clock ticks between lines (live)
    double silent_tail_s = 0.0;    // after the last line, ticks only for this much receive time
};

std::vector<checks::Episode> run(const Feed& f) {
    const std::string dir = std::string(SG_SOURCE_DIR) + "/replay_logs/demo/";
    const auto cfg = engine::loadSurveyConfig(dir + "survey.toml");
    sim::Simulator simulator(sim::loadScenario(dir + "scenario.toml"), sim::SimOptions{});
    std::int64_t id = 1;
    engine::Pipeline pipe(cfg, [&] { return id++; });
    std::map<int, std::unique_ptr<LineFramer>> framers;
    TimeNs now = 0;
    for (int c = 0; c < sim::kChannelCount; ++c) {
        const std::string name = sim::channelName(static_cast<sim::Channel>(c));
        framers[c] = std::make_unique<LineFramer>([&, name](std::string_view b, std::uint8_t fl) {
            ReceivedLine l;
            l.source = name;
            l.utc_ns = l.mono_ns = now;
            l.bytes = std::string(b);
            l.flags = fl;
            pipe.feed(l);
        });
    }
    const auto recv = [&](TimeNs t) {
        return f.recv0 + static_cast<TimeNs>(static_cast<double>(t - kT0) / f.speed);
    };
    const TimeNs tick_ns = static_cast<TimeNs>(f.tick_every_s * 1e9);
    TimeNs next_tick = f.recv0 + tick_ns;
    TimeNs last_recv = f.recv0;
    while (!simulator.done()) {
        const auto& out = simulator.step();
        if (toSeconds(out.utc_ns - kT0) > f.until_s) break;
        for (const auto& l : out.lines) {
            now = recv(l.utc_ns);
            while (tick_ns > 0 && next_tick < now) {
                pipe.tick(next_tick);
                next_tick += tick_ns;
            }
            framers[static_cast<int>(l.channel)]->feed(l.bytes + "\r\n");
            last_recv = now;
        }
    }
    const TimeNs tail_end = last_recv + static_cast<TimeNs>(f.silent_tail_s * 1e9);
    for (TimeNs t = last_recv + kNsPerSecond / 10; t <= tail_end; t += kNsPerSecond / 10) pipe.tick(t);
    return pipe.engine().checks().episodes();
}

std::vector<checks::Episode> of(const std::vector<checks::Episode>& all, const std::string& check) {
    std::vector<checks::Episode> out;
    for (const auto& e : all)
        if (e.check == check) out.push_back(e);
    return out;
}

TEST(SurveyClock, GnssLossAtTwentyTimesRealTimeRaisesTheAlarmAtInstrumentTimes) {
    Feed f;
    f.speed = 20.0;       // as scripts/demo.sh sends the demo
    f.tick_every_s = 0.1;  // the recorder's flush rhythm
    f.until_s = 600.0;
    const auto eps = of(run(f), "gnss_silence");
    ASSERT_EQ(eps.size(), 1u) << "the 25 s loss at 520 s, and nothing else";
    const auto& e = eps.front();
    // Times are survey (instrument) times: the episode starts ~1.5 s (warn limit, docs/checks.md)
    // after the last fix before 520 s, and its peak is the whole 25 s loss, not 25/20 s.
    EXPECT_NEAR(toSeconds(e.start_ns - kT0), 521.5, 1.0);
    EXPECT_EQ(e.peak_level, checks::Level::kAlarm);
    EXPECT_NEAR(e.peak_value, 25.0, 1.5);
    ASSERT_TRUE(e.end_ns.has_value());
    EXPECT_NEAR(toSeconds(*e.end_ns - kT0), 545.0, 1.0);
}

TEST(SurveyClock, EveryInputSilentStillRaisesTheAlarmOnTheReceiveClock) {
    Feed f;
    f.recv0 = kT0 + 86400LL * kNsPerSecond;  // the receive clock a day later: clocks apart
    f.until_s = 60.0;
    f.silent_tail_s = 5.0;
    const auto all = run(f);
    for (const char* check : {"gnss_silence", "mag_silence"}) {
        const auto eps = of(all, check);
        ASSERT_EQ(eps.size(), 1u) << check;
        // Survey time went on with the receive clock from the last line (60 s): the alarm limit
        // of 3 s is passed within the 5 s tail, and the episode is dated on the survey clock.
        EXPECT_EQ(eps[0].peak_level, checks::Level::kAlarm) << check;
        EXPECT_GE(eps[0].peak_value, 3.0) << check;
        EXPECT_NEAR(toSeconds(eps[0].start_ns - kT0), 61.5, 1.0) << check;
        EXPECT_FALSE(eps[0].end_ns.has_value()) << check;
    }
}

TEST(SurveyClock, LiveTicksBetweenLinesGiveTheSameEpisodesAsLinesAlone) {
    Feed live;
    live.speed = 4.0;
    live.tick_every_s = 0.1;
    live.until_s = 600.0;
    Feed replay = live;
    replay.tick_every_s = 0.0;
    const auto a = run(live);
    const auto b = run(replay);
    ASSERT_EQ(a.size(), b.size());
    ASSERT_FALSE(of(a, "gnss_silence").empty());
    for (std::size_t i = 0; i < a.size(); ++i) {
        EXPECT_EQ(a[i].check, b[i].check) << i;
        EXPECT_EQ(a[i].start_ns, b[i].start_ns) << a[i].check;
        EXPECT_EQ(a[i].end_ns, b[i].end_ns) << a[i].check;
        EXPECT_EQ(a[i].peak_level, b[i].peak_level) << a[i].check;
        EXPECT_DOUBLE_EQ(a[i].peak_value, b[i].peak_value) << a[i].check;
    }
}

}  // namespace
