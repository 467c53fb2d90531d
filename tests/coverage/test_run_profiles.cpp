// Run profiles (the report's line plots, issue #13): one-metre bins along the line, each keeping
// the worst value that fell in it; runs apart; nothing kept off a run; a run that changes line
// while settling starts again. The figures are worked by hand from the bin rule in
// run_profiles.hpp (floor(along / 1 m) names the bin).
#include <cstdint>
#include <optional>

#include <gtest/gtest.h>

#include "coverage/line_runs.hpp"
#include "coverage/run_profiles.hpp"

namespace sg::coverage {
namespace {

constexpr std::int64_t kS = 1'000'000'000;

TEST(RunProfiles, BinsOfOneMetreKeepTheWorstValue) {
    RunProfiles p;
    // Three samples in bin [10, 11): altitudes 3.0, 4.5, 3.2 -> 4.5; deviations +0.4, -1.1, +0.9 ->
    // -1.1 (largest magnitude, sign kept); noise 0.02 then 0.05 -> 0.05.
    p.addPosition(0, 2, 1 * kS, 10.1, 3.0, 0.4);
    p.addNoise(0, 0.02);
    p.addPosition(0, 2, 2 * kS, 10.5, 4.5, -1.1);
    p.addNoise(0, 0.05);
    p.addPosition(0, 2, 3 * kS, 10.9, 3.2, 0.9);
    p.addNoise(0, 0.03);
    // Next bin [11, 12): altitude unknown, deviation 0.2.
    p.addPosition(0, 2, 4 * kS, 11.3, std::nullopt, 0.2);
    ASSERT_EQ(p.profiles().size(), 1u);
    const auto& r = p.profiles()[0];
    EXPECT_EQ(r.run, 0);
    EXPECT_EQ(r.line, 2);
    ASSERT_EQ(r.bins.size(), 2u);
    EXPECT_DOUBLE_EQ(r.bins[0].along_m, 10.1);  // the first sample's place and time
    EXPECT_EQ(r.bins[0].t_ns, 1 * kS);
    EXPECT_DOUBLE_EQ(r.bins[0].altitude_m.value(), 4.5);
    EXPECT_DOUBLE_EQ(r.bins[0].deviation_m.value(), -1.1);
    EXPECT_DOUBLE_EQ(r.bins[0].noise_nT.value(), 0.05);
    EXPECT_FALSE(r.bins[1].altitude_m.has_value());
    EXPECT_DOUBLE_EQ(r.bins[1].deviation_m.value(), 0.2);
    EXPECT_FALSE(r.bins[1].noise_nT.has_value());
}

TEST(RunProfiles, ReversedRunsBinDownTheLineAndRunsStayApart) {
    RunProfiles p;
    // Run 1 along line 0 in reverse: 20.7 -> 19.2 -> 18.6: bins 20, 19, 18 in the order run.
    p.addPosition(1, 0, 1 * kS, 20.7, 3.0, 0.0);
    p.addPosition(1, 0, 2 * kS, 19.2, 3.0, 0.0);
    p.addPosition(1, 0, 3 * kS, 18.6, 3.0, 0.0);
    // Run 2 on line 1 forward.
    p.addPosition(2, 1, 4 * kS, 0.5, 2.0, 0.1);
    p.addNoise(2, 0.04);
    ASSERT_EQ(p.profiles().size(), 2u);
    ASSERT_EQ(p.profiles()[0].bins.size(), 3u);
    EXPECT_DOUBLE_EQ(p.profiles()[0].bins[2].along_m, 18.6);
    // Run 2's noise went to run 2, not to run 1's last bin.
    EXPECT_FALSE(p.profiles()[0].bins[2].noise_nT.has_value());
    EXPECT_DOUBLE_EQ(p.profiles()[1].bins[0].noise_nT.value(), 0.04);
    // Noise for run 1 again (the engine's noise lags its position by a sample) still lands in run 1.
    p.addNoise(1, 0.07);
    EXPECT_DOUBLE_EQ(p.profiles()[0].bins[2].noise_nT.value(), 0.07);
}

TEST(RunProfiles, NothingOffARunAndALineChangeStartsAgain) {
    RunProfiles p;
    p.addPosition(kRunNone, 0, 1 * kS, 5.0, 3.0, 0.0);
    p.addPosition(0, -1, 1 * kS, 5.0, 3.0, 0.0);
    p.addNoise(0, 0.05);  // no run 0 yet
    p.addNoise(kRunNone, 0.05);
    EXPECT_TRUE(p.profiles().empty());
    // Run 0 starts on line 1, then (settling) takes line 2: the line-1 bins go.
    p.addPosition(0, 1, 1 * kS, 3.0, 9.0, 4.0);
    p.addPosition(0, 1, 2 * kS, 4.0, 9.0, 4.0);
    p.addPosition(0, 2, 3 * kS, 4.2, 3.0, -0.5);
    ASSERT_EQ(p.profiles().size(), 1u);
    EXPECT_EQ(p.profiles()[0].line, 2);
    ASSERT_EQ(p.profiles()[0].bins.size(), 1u);
    EXPECT_DOUBLE_EQ(p.profiles()[0].bins[0].deviation_m.value(), -0.5);
}

}  // namespace
}  // namespace sg::coverage
