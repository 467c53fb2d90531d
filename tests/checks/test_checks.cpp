// Live checks: limits, hysteresis, hold times, episodes and acknowledgement.
#include <gtest/gtest.h>

#include <cmath>

#include "checks/check_set.hpp"

namespace {

using sg::TimeNs;
using sg::checks::Check;
using sg::checks::CheckSet;
using sg::checks::Direction;
using sg::checks::Level;
using sg::checks::Limits;

constexpr TimeNs kS = sg::kNsPerSecond;

TEST(Check, RaisesWarnThenAlarmAboveLimits) {
    Check c("altitude", "m", Limits{true, Direction::kAbove, 4.0, 5.0, 0.0, 0.0});
    EXPECT_EQ(c.update(0, 3.9), Level::kOk);
    EXPECT_EQ(c.update(1, 4.1), Level::kWarn);
    EXPECT_EQ(c.update(2, 5.1), Level::kAlarm);
    EXPECT_EQ(c.update(3, 4.5), Level::kWarn);
    EXPECT_EQ(c.update(4, 3.0), Level::kOk);
}

TEST(Check, BelowDirection) {
    Check c("signal_quality", "%", Limits{true, Direction::kBelow, 60.0, 40.0, 0.0, 0.0});
    EXPECT_EQ(c.update(0, 80), Level::kOk);
    EXPECT_EQ(c.update(1, 55), Level::kWarn);
    EXPECT_EQ(c.update(2, 30), Level::kAlarm);
}

TEST(Check, HysteresisStopsFlappingAroundTheLimit) {
    // A value oscillating +-0.05 around the 4.0 m warn limit with 0.2 m hysteresis: one episode.
    Check c("altitude", "m", Limits{true, Direction::kAbove, 4.0, 5.0, 0.2, 0.0});
    int transitions = 0;
    Level prev = Level::kOk;
    for (int i = 0; i < 200; ++i) {
        const double v = 4.0 + 0.05 * std::sin(i * 0.7);
        const Level l = c.update(i * kS / 10, v);
        if (l != prev) ++transitions;
        prev = l;
    }
    EXPECT_EQ(transitions, 1);  // raised once, never cleared while within the hysteresis band
    EXPECT_EQ(c.update(300 * kS, 3.85), Level::kWarn);  // 3.85 > 4.0 - 0.2: still bad
    EXPECT_EQ(c.update(301 * kS, 3.79), Level::kOk);
}

TEST(Check, WithoutHysteresisTheSameSignalFlaps) {
    // The control for the test above: it shows the oscillation really crosses the limit.
    Check c("altitude", "m", Limits{true, Direction::kAbove, 4.0, 5.0, 0.0, 0.0});
    int transitions = 0;
    Level prev = Level::kOk;
    for (int i = 0; i < 200; ++i) {
        const Level l = c.update(i * kS / 10, 4.0 + 0.05 * std::sin(i * 0.7));
        if (l != prev) ++transitions;
        prev = l;
    }
    EXPECT_GT(transitions, 20);
}

TEST(Check, HoldTimeDelaysRaiseAndClear) {
    Check c("deviation", "m", Limits{true, Direction::kAbove, 5.0, 10.0, 0.0, 2.0});
    EXPECT_EQ(c.update(0 * kS, 6.0), Level::kOk);             // bad since t=0
    EXPECT_EQ(c.update(1 * kS, 6.0), Level::kOk);             // 1 s < 2 s hold
    EXPECT_EQ(c.update(2 * kS, 6.0), Level::kWarn);           // held 2 s
    EXPECT_EQ(c.update(3 * kS, 1.0), Level::kWarn);           // good for 0 s
    EXPECT_EQ(c.update(4 * kS, 6.0), Level::kWarn);           // bad again: clear timer restarts
    EXPECT_EQ(c.update(5 * kS, 1.0), Level::kWarn);
    EXPECT_EQ(c.update(6 * kS, 1.0), Level::kWarn);           // good for 1 s
    EXPECT_EQ(c.update(7 * kS, 1.0), Level::kOk);             // good for 2 s
    // A short spike shorter than the hold time never raises.
    EXPECT_EQ(c.update(8 * kS, 50.0), Level::kOk);
    EXPECT_EQ(c.update(9 * kS, 1.0), Level::kOk);
}

TEST(Check, MissingValueLeavesStateAlone) {
    Check c("noise", "nT", Limits{true, Direction::kAbove, 0.3, 0.5, 0.0, 0.0});
    EXPECT_EQ(c.update(0, 0.6), Level::kAlarm);
    EXPECT_EQ(c.update(1, std::nullopt), Level::kAlarm);
}

TEST(CheckSet, EpisodesRecordStartEndPeakAndAck) {
    CheckSet set;
    set.update("deviation", 0, 1.0);
    set.update("deviation", 10 * kS, 7.0);   // deviation default hold 2 s
    set.update("deviation", 12 * kS, 12.0);  // warn held 2 s: warn; alarm not yet held
    set.update("deviation", 15 * kS, 14.0);  // alarm held 3 s: escalated
    set.update("deviation", 16 * kS, 1.0);
    set.update("deviation", 19 * kS, 1.0);
    ASSERT_EQ(set.episodes().size(), 1u);
    const auto& ep = set.episodes()[0];
    EXPECT_EQ(ep.check, "deviation");
    EXPECT_EQ(ep.start_ns, 12 * kS);
    ASSERT_TRUE(ep.end_ns.has_value());
    EXPECT_EQ(*ep.end_ns, 19 * kS);
    EXPECT_EQ(ep.peak_level, Level::kAlarm);
    EXPECT_DOUBLE_EQ(ep.peak_value, 14.0);
    EXPECT_TRUE(set.active().empty());
    EXPECT_TRUE(set.acknowledge(ep.id, 20 * kS));
    EXPECT_FALSE(set.acknowledge(ep.id, 21 * kS));  // only once
    auto changes = set.drainChanges();
    ASSERT_EQ(changes.size(), 4u);  // started, escalated, ended, acknowledged
    EXPECT_EQ(changes[0].kind, sg::checks::EpisodeChange::Kind::kStarted);
    EXPECT_EQ(changes[0].episode.peak_level, Level::kWarn);
    EXPECT_EQ(changes[1].kind, sg::checks::EpisodeChange::Kind::kEscalated);
    EXPECT_EQ(changes[2].kind, sg::checks::EpisodeChange::Kind::kEnded);
    EXPECT_EQ(changes[3].kind, sg::checks::EpisodeChange::Kind::kAcknowledged);
    EXPECT_TRUE(set.drainChanges().empty());
}

TEST(CheckSet, ConfigOverridesAndErrors) {
    auto t = sg::config::parseText(
        "[checks.noise]\nwarn = 0.2\nalarm = 0.4\n[checks.deviation]\nenabled = false\n", "c.toml");
    auto set = CheckSet::fromConfig(sg::config::Section(t, "c.toml"));
    EXPECT_DOUBLE_EQ(set.check("noise").limits().warn, 0.2);
    EXPECT_FALSE(set.check("deviation").limits().enabled);
    EXPECT_DOUBLE_EQ(set.check("altitude").limits().alarm, 5.0);

    auto bad = sg::config::parseText("[checks.nosie]\nwarn = 1\n", "b.toml");
    try {
        CheckSet::fromConfig(sg::config::Section(bad, "b.toml"));
        FAIL() << "expected an error";
    } catch (const sg::config::ConfigError& e) {
        EXPECT_NE(std::string(e.what()).find("checks.nosie"), std::string::npos) << e.what();
    }
    auto inverted = sg::config::parseText("[checks.noise]\nwarn = 0.5\nalarm = 0.2\n", "i.toml");
    EXPECT_THROW(CheckSet::fromConfig(sg::config::Section(inverted, "i.toml")),
                 sg::config::ConfigError);
}

TEST(CheckSet, FixQualityRankFollowsGgaIndicator) {
    // GGA quality indicator values per NMEA 0183 (0 invalid, 1 GPS, 2 DGPS, 4 RTK, 5 float).
    EXPECT_LT(sg::checks::fixQualityRank(4), sg::checks::fixQualityRank(5));
    EXPECT_LT(sg::checks::fixQualityRank(5), sg::checks::fixQualityRank(2));
    EXPECT_LT(sg::checks::fixQualityRank(2), sg::checks::fixQualityRank(1));
    EXPECT_LT(sg::checks::fixQualityRank(1), sg::checks::fixQualityRank(0));
}

}  // namespace
