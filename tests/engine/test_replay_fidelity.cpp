// Replay reproduces the live session exactly: a 10-minute simulated session is fed live through
// the Pipeline and logged by the writer thread; replaying the log through a fresh Pipeline gives
// the same coverage raster (content hash), the same alarm episodes with the same times, and the
// same decode counters. Replayed again without picks (replay --no-picks): the same coverage and
// alarms, an empty pick list.
#include <gtest/gtest.h>

#include <filesystem>
#include <map>
#include <string>

#include "drivers_sim/pipeline_feed.hpp"
#include "drivers_sim/simulator.hpp"
#include "engine/log_replay.hpp"
#include "engine/pipeline.hpp"
#include "engine/survey_summary.hpp"
#include "io/log_writer.hpp"

namespace {

TEST(ReplayFidelity, TenMinuteSessionReplaysIdentically) {
    const std::string dir = std::string(SG_SOURCE_DIR) + "/replay_logs/demo/";
    const auto cfg = sg::engine::loadSurveyConfig(dir + "survey.toml");
    const auto log_path = (std::filesystem::temp_directory_path() /
                           ("sg_fidelity_" + std::to_string(::getpid()) + ".sglog")).string();
    std::filesystem::remove(log_path);

    sg::sim::SimOptions so;
    so.duration_s = 600.0;
    sg::sim::Simulator sim(sg::sim::loadScenario(dir + "scenario.toml"), so);
    std::uint64_t live_hash = 0;
    std::vector<sg::checks::Episode> live_episodes;
    std::uint64_t live_lines = 0;
    std::map<std::string, sg::engine::SourceCounters> live_counters;
    std::vector<int> live_gap_ids;  // stable gap numbers (issue #12), in report order
    std::size_t live_commits = 0;
    int live_next = 0;
    std::string live_picks;  // the pick list as JSON (docs/picks.md)
    {
        sg::io::LogWriter writer(log_path, {200, false},
                                 {{"config_text", cfg.text}, {"config_file", dir + "survey.toml"}});
        sg::engine::Pipeline live(cfg, [&] { return writer.nextEventId(); });
        sg::sim::feedToEnd(sim, live, [&](const sg::sim::StepOutput& out) {
            if (!out.lines.empty()) writer.post(live.takeBatch());
        });
        writer.post(live.takeBatch());
        writer.stop();
        live.engine().flushCoverage();
        live_hash = live.engine().raster().contentHash();
        live_episodes = live.engine().checks().episodes();
        live_lines = live.linesFed();
        live_counters = live.decoder().counters();
        for (const auto& g : live.engine().gapReport().gaps) live_gap_ids.push_back(g.id);
        live_commits = live.engine().gapNamer().commits();
        live_next = live.engine().gapNamer().nextNumber();
        live_picks = sg::engine::toJson(sg::engine::summarisePicks(live.engine())).dump();
    }
    ASSERT_GT(live_lines, 30000u);
    ASSERT_FALSE(live_episodes.empty());  // the demo's faults raise alarms in the first 10 min

    sg::engine::LogReplay replay(log_path, std::nullopt);
    EXPECT_EQ(replay.totalLines(), static_cast<std::int64_t>(live_lines));
    replay.runToEnd();
    auto& eng = replay.pipeline().engine();
    eng.flushCoverage();
    EXPECT_EQ(eng.raster().contentHash(), live_hash);
    // The same picks, to the last digit (the first run passes shells B and E: not an empty list).
    EXPECT_GT(nlohmann::json::parse(live_picks)["count"].get<int>(), 0);
    EXPECT_EQ(sg::engine::toJson(sg::engine::summarisePicks(eng)).dump(), live_picks);
    const auto& eps = eng.checks().episodes();
    ASSERT_EQ(eps.size(), live_episodes.size());
    for (std::size_t i = 0; i < eps.size(); ++i) {
        EXPECT_EQ(eps[i].check, live_episodes[i].check);
        EXPECT_EQ(eps[i].start_ns, live_episodes[i].start_ns);
        EXPECT_EQ(eps[i].end_ns, live_episodes[i].end_ns);
        EXPECT_EQ(eps[i].peak_level, live_episodes[i].peak_level);
        EXPECT_DOUBLE_EQ(eps[i].peak_value, live_episodes[i].peak_value);
        EXPECT_EQ(eps[i].detail, live_episodes[i].detail);  // e.g. where a forming gap was located
    }
    // The same gap names: committed at the same run ends, matched the same way.
    ASSERT_GE(live_commits, 1U);  // the first line ends within the first 10 minutes
    EXPECT_EQ(eng.gapNamer().commits(), live_commits);
    EXPECT_EQ(eng.gapNamer().nextNumber(), live_next);
    std::vector<int> ids;
    for (const auto& g : eng.gapReport().gaps) ids.push_back(g.id);
    EXPECT_EQ(ids, live_gap_ids);
    // The same decode counters, although the replay gathers no log rows (it writes no log).
    const auto& counters = replay.pipeline().decoder().counters();
    ASSERT_EQ(counters.size(), live_counters.size());
    for (const auto& [source, live_c] : live_counters) {
        SCOPED_TRACE(source);
        const auto& c = counters.at(source);
        EXPECT_EQ(c.lines, live_c.lines);
        EXPECT_EQ(c.ok, live_c.ok);
        EXPECT_EQ(c.rejected, live_c.rejected);
        EXPECT_EQ(c.unsupported, live_c.unsupported);
        EXPECT_EQ(c.not_decoded, live_c.not_decoded);
        EXPECT_EQ(c.by_reason, live_c.by_reason);
        EXPECT_EQ(c.last_field_nT, live_c.last_field_nT);
        EXPECT_EQ(c.last_lat_deg, live_c.last_lat_deg);
        EXPECT_EQ(c.last_value, live_c.last_value);
    }
    EXPECT_GT(counters.at("mag").ok, 0u);
    const auto batch = replay.pipeline().takeBatch();
    EXPECT_TRUE(batch.raw.empty());
    EXPECT_TRUE(batch.mags.empty());
    EXPECT_TRUE(batch.fixes.empty());
    // Seeking back rebuilds the same state.
    replay.restart();
    replay.runToEnd();
    replay.pipeline().engine().flushCoverage();
    EXPECT_EQ(replay.pipeline().engine().raster().contentHash(), live_hash);
    // `replay --no-picks` (LogReplay::switchOffPicks): the same coverage and alarms, no picks and
    // no verification passes; the config text kept as recorded.
    const std::string text_before = replay.config().text;
    replay.switchOffPicks();
    replay.runToEnd();
    auto& off = replay.pipeline().engine();
    off.flushCoverage();
    EXPECT_EQ(off.raster().contentHash(), live_hash);
    EXPECT_EQ(off.checks().episodes().size(), live_episodes.size());
    EXPECT_EQ(replay.config().text, text_before);
    const auto off_picks = sg::engine::toJson(sg::engine::summarisePicks(off));
    EXPECT_FALSE(off_picks["enabled"].get<bool>());
    EXPECT_EQ(off_picks["count"].get<int>(), 0);
    std::filesystem::remove(log_path);
    std::filesystem::remove(log_path + "-wal");
    std::filesystem::remove(log_path + "-shm");
}

}  // namespace
