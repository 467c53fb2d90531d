// Why a gap is there: on the demo survey the simulator plants known faults (scenario.toml: a GNSS
// loss at 520 s, a magnetometer dropout at 780 s, a noise burst at 1150 s, an altitude excursion
// at 1450 s). The summary must tie each gap to the line runs that passed it, at the time the
// fault was planted, and to the alarm the fault raised; a gap no run passed is "not run".
#include <gtest/gtest.h>

#include <algorithm>

#include "drivers_sim/pipeline_feed.hpp"
#include "drivers_sim/simulator.hpp"
#include "engine/pipeline.hpp"
#include "engine/survey_summary.hpp"

namespace {

using sg::TimeNs;

struct DemoRun {
    sg::engine::SurveySummary summary;
    std::vector<sg::sim::FaultSpec> faults;
    TimeNs start_ns = 0;
};

const DemoRun& demo() {
    static const DemoRun run = [] {
        const std::string dir = std::string(SG_SOURCE_DIR) + "/replay_logs/demo/";
        DemoRun r;
        sg::sim::Simulator sim(sg::sim::loadScenario(dir + "scenario.toml"), sg::sim::SimOptions{});
        sg::engine::Pipeline p(sg::engine::loadSurveyConfig(dir + "survey.toml"), [] { return 0; });
        const auto lines = sg::sim::feedToEnd(sim, p);
        r.summary = sg::engine::summarise(p.engine(), lines);
        r.faults = sim.faults();
        r.start_ns = sim.start_utc_ns();
        return r;
    }();
    return run;
}

// A pass of some gap, during fault `kind` (+- the 15 s the attribution allows plus the gap's own
// running time), that names `check`.
bool faultExplainsAGap(sg::sim::FaultKind kind, const std::string& check) {
    const auto& d = demo();
    for (const auto& f : d.faults) {
        if (f.kind != kind) continue;
        const TimeNs t0 = d.start_ns + static_cast<TimeNs>((f.start_s - 60.0) * 1e9);
        const TimeNs t1 = d.start_ns + static_cast<TimeNs>((f.start_s + f.duration_s + 60.0) * 1e9);
        for (const auto& gc : d.summary.gap_causes)
            for (const auto& p : gc.passes)
                if (p.t_ns >= t0 && p.t_ns <= t1 &&
                    std::any_of(p.checks.begin(), p.checks.end(),
                                [&](const std::string& c) { return c.rfind(check + " ", 0) == 0; }))
                    return true;
    }
    return false;
}

TEST(GapCauses, OneEntryPerGapWithPassesNearestFirst) {
    const auto& s = demo().summary;
    ASSERT_EQ(s.gap_causes.size(), s.gaps.gaps.size());
    ASSERT_GT(s.significant_gaps, 0u);
    for (std::size_t i = 0; i < s.gaps.gaps.size(); ++i) {
        const auto& gc = s.gap_causes[i];
        EXPECT_EQ(gc.gap_id, s.gaps.gaps[i].id);
        EXPECT_FALSE(gc.text.empty());
        for (std::size_t k = 1; k < gc.passes.size(); ++k) EXPECT_LE(gc.passes[k - 1].offset_m, gc.passes[k].offset_m);
        for (const auto& p : gc.passes) {
            // A pass lies within one line spacing of the gap, inside its run's time span.
            EXPECT_LE(p.offset_m, s.detection.line_spacing_m);
            const auto& r = s.runs[static_cast<std::size_t>(p.run)];
            EXPECT_GE(p.t_ns, r.start_t_ns);
            EXPECT_LE(p.t_ns, r.end_t_ns);
            EXPECT_EQ(p.line, sg::engine::lineName(s, r.line));
        }
    }
}

TEST(GapCauses, PlantedFaultsExplainTheGapsTheyOpened) {
    EXPECT_TRUE(faultExplainsAGap(sg::sim::FaultKind::AltitudeExcursion, "altitude"));
    EXPECT_TRUE(faultExplainsAGap(sg::sim::FaultKind::GnssLoss, "gnss_silence"));
    EXPECT_TRUE(faultExplainsAGap(sg::sim::FaultKind::MagDropout, "mag_silence"));
    EXPECT_TRUE(faultExplainsAGap(sg::sim::FaultKind::NoiseBurst, "noise"));
    // And the largest gap, opened by the altitude excursion, names it.
    const auto& s = demo().summary;
    const auto& checks = s.gap_causes.front().checks;
    EXPECT_NE(std::find(checks.begin(), checks.end(), "altitude"), checks.end()) << s.gap_causes.front().text;
}

TEST(GapCauses, GroundNoRunPassedIsNotRun) {
    const auto& s = demo().summary;
    // The demo's area reaches past the south-west end of its lines: a gap there had no pass.
    const auto it = std::find_if(s.gap_causes.begin(), s.gap_causes.end(),
                                 [](const sg::engine::GapCause& gc) { return gc.passes.empty(); });
    ASSERT_NE(it, s.gap_causes.end());
    EXPECT_NE(it->text.find("not run over"), std::string::npos);
    EXPECT_TRUE(it->checks.empty());
}

}  // namespace
