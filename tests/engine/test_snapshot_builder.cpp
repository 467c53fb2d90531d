// The snapshot the screen draws, built from a short run of the simulated demo survey.
#include <gtest/gtest.h>

#include "common/line_framer.hpp"
#include "drivers_sim/pipeline_feed.hpp"
#include "drivers_sim/simulator.hpp"
#include "engine/pipeline.hpp"
#include "engine/snapshot_builder.hpp"

namespace {

TEST(SnapshotBuilder, DemoSnapshotHasTracksSeriesTilesAndPlan) {
    const std::string dir = std::string(SG_SOURCE_DIR) + "/replay_logs/demo/";
    const auto cfg = sg::engine::loadSurveyConfig(dir + "survey.toml");
    sg::sim::SimOptions so;
    so.duration_s = 240.0;
    sg::sim::Simulator sim(sg::sim::loadScenario(dir + "scenario.toml"), so);
    std::int64_t id = 1;
    sg::engine::Pipeline pipe(cfg, [&] { return id++; });
    sg::engine::SnapshotBuilder builder(pipe.engine());
    sg::sim::feedToEnd(sim, pipe);
    auto snap = builder.build(true);
    ASSERT_TRUE(snap);
    EXPECT_GT(snap->vessel.e_m, 100000.0);  // UTM easting, not the origin
    EXPECT_EQ(snap->sensors.size(), 4u);
    EXPECT_GT(snap->sensors[0].track.size(), 100u);
    EXPECT_GT(snap->tow_track.size(), 100u);
    EXPECT_EQ(snap->lines.size(), 6u);
    EXPECT_EQ(snap->area.size(), 1u);
    EXPECT_FALSE(snap->tiles.empty());
    std::size_t points = 0;
    for (const auto& g : snap->plots)
        for (const auto& s : g.series) points += s->points.size();
    EXPECT_GT(points, 1000u);
    EXPECT_FALSE(snap->runs.empty());
}

}  // namespace
