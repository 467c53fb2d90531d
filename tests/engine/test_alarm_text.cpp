// engine::alarmStatement, the one sentence the screen's banner and the headless status line give
// for an alarm: a forming gap held open by its check's hold time after the width went back to zero
// is stated with the width and place it was raised with, never as 0.0 m wide.
#include <gtest/gtest.h>

#include "checks/check_set.hpp"
#include "engine/alarm_text.hpp"

namespace {

using sg::TimeNs;
using sg::engine::alarmStatement;

constexpr TimeNs kS = 1'000'000'000;
const char* const kRaisedAt = "line HF05, starboard, 6.5 m wide, at 256 m along the line";

// The catalogue's forming_gap check (alarm 2 m, hold 2 s) fed 6.5 m for 3 s, then 0 m: raised to
// alarm at 2 s, held until 5 s.
struct HeldGap {
    sg::checks::CheckSet checks;
    void feed(TimeNs from, TimeNs to, double width_m, const char* detail) {
        for (TimeNs t = from; t < to; t += kS / 10)
            checks.update("forming_gap", t, width_m, detail);
    }
    const sg::checks::Episode& episode() const { return checks.episodes().at(0); }
};

sg::engine::FormingGapSpot spotOf(double width_m) {
    sg::engine::FormingGapSpot f;
    f.line_name = "HF05";
    f.starboard = true;
    f.width_m = width_m;
    f.along_m = 270.0;
    return f;
}

TEST(AlarmStatement, HeldFormingGapStatesTheWidthItWasRaisedWithNotZero) {
    HeldGap g;
    g.feed(0, 3 * kS, 6.5, kRaisedAt);
    g.feed(3 * kS, 4 * kS, 0.0, "");
    ASSERT_EQ(g.checks.check("forming_gap").level(), sg::checks::Level::kAlarm);  // held
    ASSERT_EQ(*g.checks.check("forming_gap").lastValue(), 0.0);
    ASSERT_FALSE(g.episode().end_ns);
    const std::string held = alarmStatement(g.episode(), nullptr);
    EXPECT_EQ(
        held,
        "Gap forming: line HF05, starboard, 6.5 m wide, at 256 m along the line (when raised); "
        "no gap measured now, clearing");
    EXPECT_EQ(held.find("0.0 m"), std::string::npos);
    // A probe reading narrower than the one decimal shown is no width to state either.
    const auto hairline = spotOf(0.02);
    EXPECT_EQ(alarmStatement(g.episode(), &hairline), held);
}

TEST(AlarmStatement, OpenFormingGapMeasuredNowStatesTheLivePlace) {
    HeldGap g;
    g.feed(0, 3 * kS, 6.5, kRaisedAt);
    const auto live = spotOf(3.2);
    EXPECT_EQ(alarmStatement(g.episode(), &live),
              "Gap forming: line HF05, starboard, 3.2 m wide, at 270 m along the line");
}

TEST(AlarmStatement, EndedFormingGapStatesWhereItWasRaised) {
    HeldGap g;
    g.feed(0, 3 * kS, 6.5, kRaisedAt);
    g.feed(3 * kS, 6 * kS, 0.0, "");
    ASSERT_TRUE(g.episode().end_ns);
    const auto live = spotOf(3.2);  // a later gap does not rewrite an ended episode
    EXPECT_EQ(alarmStatement(g.episode(), &live), std::string("Gap forming: ") + kRaisedAt);
}

TEST(AlarmStatement, HeldFormingGapWithoutAPlaceStatesItsWorstWidth) {
    HeldGap g;
    g.feed(0, 3 * kS, 6.5, "");
    g.feed(3 * kS, 4 * kS, 0.0, "");
    ASSERT_FALSE(g.episode().end_ns);
    EXPECT_EQ(alarmStatement(g.episode(), nullptr),
              "Gap forming beside the last line: 6.5 m at worst; no gap measured now, clearing");
}

TEST(AlarmStatement, OtherChecksStateTheirWordsAndWorstValue) {
    sg::checks::CheckSet checks;
    for (TimeNs t = 0; t < 3 * kS; t += kS / 10) checks.update("deviation", t, 12.4);
    checks.update("deviation", 3 * kS, 1.0);  // back on line, still held
    ASSERT_FALSE(checks.episodes().at(0).end_ns);
    const auto live = spotOf(3.2);
    EXPECT_EQ(alarmStatement(checks.episodes().at(0), &live), "Off the active line: 12.4 m");
}

}  // namespace
