// exploratory
#include <gtest/gtest.h>

#include <cstdio>

#include "drivers_sim/pipeline_feed.hpp"
#include "drivers_sim/planted_field.hpp"
#include "drivers_sim/simulator.hpp"
#include "engine/pipeline.hpp"
#include "engine/survey_summary.hpp"

namespace {

TEST(PicksDemo, Explore) {
    const std::string dir = std::string(SG_SOURCE_DIR) + "/replay_logs/demo/";
    const auto cfg = sg::engine::loadSurveyConfig(dir + "survey.toml");
    sg::sim::Simulator sim(sg::sim::loadScenario(dir + "scenario.toml"), {});
    std::int64_t n = 0;
    sg::engine::Pipeline pipe(cfg, [&] { return ++n; });
    sg::sim::feedToEnd(sim, pipe);
    const auto p = sg::engine::summarisePicks(pipe.engine());
    for (const auto& it : sg::sim::plantedItems(sim))
        std::printf("truth %s E %.2f N %.2f seabed %.2f burial %.2f m %.1f\n", it.name.c_str(), it.easting_m,
                    it.northing_m, it.seabed_depth_m, it.burial_m, it.moment_Am2);
    for (const auto& k : p.picks)
        std::printf("pick %d E %.2f N %.2f peak %.2f w %.1f alt %.2f burial %.2f m %.2f ang %.0f r2 %.2f snr %.1f %s runs %zu obs %zu\n",
                    k.id, k.easting_m, k.northing_m, k.peak_nT, k.width_m, k.altitude_m, k.burial_m.value_or(-99),
                    k.moment_Am2.value_or(-1), k.angle_to_field_deg.value_or(-1), k.fit_r2, k.snr, k.quality.c_str(),
                    k.runs.size(), k.observations.size());
    std::printf("peaks %llu\n", static_cast<unsigned long long>(p.peaks));
}

}  // namespace
