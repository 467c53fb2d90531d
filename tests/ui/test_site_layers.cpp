// A site on the screen: the snapshot of a session seeded with an earlier session carries the
// site's whole coverage and this session's own as a separate layer, the plan draws one or the
// other, and the tile textures keep the two layers apart. Data: two halves of the simulated demo
// survey (invented), fed straight into two pipelines.
#include <gtest/gtest.h>

#include <functional>
#include <map>
#include <utility>

#include "drivers_sim/pipeline_feed.hpp"
#include "drivers_sim/simulator.hpp"
#include "engine/pipeline.hpp"
#include "engine/snapshot_builder.hpp"
#include "ui/palette.hpp"
#include "ui/plan_view.hpp"
#include "ui/tile_textures.hpp"

namespace {

using sg::engine::CoverageTileView;

// Covered cells per tile layer: key (tx, ty) -> cells with q > 0.
std::map<std::pair<int, int>, std::vector<bool>> coveredCells(const std::vector<CoverageTileView>& tiles) {
    std::map<std::pair<int, int>, std::vector<bool>> out;
    for (const auto& t : tiles) {
        auto& v = out[{t.tx, t.ty}];
        v.assign(t.margin_q->size(), false);
        for (std::size_t i = 0; i < t.margin_q->size(); ++i) v[i] = (*t.margin_q)[i] > 0;
    }
    return out;
}

std::size_t count(const std::map<std::pair<int, int>, std::vector<bool>>& m) {
    std::size_t n = 0;
    for (const auto& [k, v] : m)
        for (bool b : v) n += b ? 1 : 0;
    return n;
}

TEST(SiteLayers, SessionTilesHoldOnlyThisSessionsCoverageAndThePlanCanShowThem) {
    const std::string dir = std::string(SG_SOURCE_DIR) + "/replay_logs/demo/";
    const auto cfg = sg::engine::loadSurveyConfig(dir + "survey.toml");
    const auto scenario = sg::sim::loadScenario(dir + "scenario.toml");

    // The earlier session: the first 400 s.
    std::int64_t id = 1;
    sg::sim::SimOptions first;
    first.duration_s = 400.0;
    sg::sim::Simulator sim_a(scenario, first);
    sg::engine::Pipeline a(cfg, [&] { return id++; });
    sg::sim::feedToEnd(sim_a, a);
    ASSERT_NE(a.engine().coverage(), nullptr);
    ASSERT_NE(a.engine().crs(), nullptr);
    const auto& raster_a = a.engine().coverage()->raster();
    ASSERT_GT(raster_a.coveredCells(), 1000u);

    // This session: 400 s to 800 s, seeded with the earlier one.
    sg::engine::SiteSeed seed;
    seed.epsg = a.engine().crs()->epsg();
    sg::engine::SessionInfo earlier;
    earlier.log = "earlier.sglog";
    seed.sessions.push_back(earlier);
    seed.merge_into = [&raster_a](sg::coverage::CoverageRaster& site, std::vector<sg::engine::SessionInfo>&,
                                  const std::function<void(std::size_t)>& joined) {
        site.mergeFrom(raster_a, 0);
        if (joined) joined(0);
    };
    // The world runs from the start; only its lines from 400 s on are fed (as `demo --from`).
    sg::sim::SimOptions second;
    second.duration_s = 800.0;
    sg::sim::Simulator sim_b(scenario, second);
    sg::sim::skipUntil(sim_b, 400.0);
    sg::engine::Pipeline b(cfg, [&] { return id++; });
    b.engine().seedSite(std::move(seed));
    sg::engine::SnapshotBuilder builder(b.engine());
    sg::sim::feedToEnd(sim_b, b);
    const auto snap = builder.build(true);
    ASSERT_TRUE(snap);

    EXPECT_EQ(snap->earlier_sessions, 1);
    ASSERT_FALSE(snap->session_tiles.empty());
    for (const auto& t : snap->tiles) EXPECT_EQ(t.layer, 0);
    for (const auto& t : snap->session_tiles) EXPECT_EQ(t.layer, 1);
    const auto site = coveredCells(snap->tiles);
    const auto own = coveredCells(snap->session_tiles);
    // The layers agree with the engine's two rasters (the join of both sessions; this one alone).
    EXPECT_EQ(count(site), b.engine().coverage()->raster().coveredCells());
    EXPECT_EQ(count(own), b.engine().coverage()->sessionRaster().coveredCells());
    // This session's cells are a part of the site's (the join is a per-cell maximum), and the
    // earlier session adds cells this one never covered.
    for (const auto& [key, cells] : own) {
        const auto it = site.find(key);
        ASSERT_NE(it, site.end());
        for (std::size_t i = 0; i < cells.size(); ++i) {
            if (!cells[i]) continue;
            ASSERT_TRUE(it->second[i]) << "a cell of this session not covered in the site layer";
        }
    }
    EXPECT_GT(count(site), count(own) + 1000);

    // The plan draws the site, or this session's own layer when earlier sessions are hidden.
    EXPECT_EQ(&sg::ui::planTiles(*snap, false), &snap->tiles);
    EXPECT_EQ(&sg::ui::planTiles(*snap, true), &snap->session_tiles);
    // A single log has no earlier sessions: hiding them never hides its own coverage.
    sg::engine::Snapshot single = *snap;
    single.earlier_sessions = 0;
    EXPECT_EQ(&sg::ui::planTiles(single, true), &single.tiles);
}

// The texture cache must keep a tile of the site and the same tile of this session apart, even
// when their generation counters happen to agree (two rasters count generations separately).
TEST(SiteLayers, TextureCacheKeepsTheTwoLayersApart) {
    struct CountingBackend : sg::ui::TextureBackend {
        int created = 0, uploads = 0;
        ImTextureID create(int) override { return reinterpret_cast<ImTextureID>(static_cast<std::intptr_t>(++created)); }
        void upload(ImTextureID, int, const std::vector<ImU32>&) override { ++uploads; }
        void destroy(ImTextureID) override {}
    };
    auto backend = std::make_unique<CountingBackend>();
    auto* counts = backend.get();
    sg::ui::TileTextureCache cache(std::move(backend), 10);
    CoverageTileView site;
    site.size_cells = 4;
    site.generation = 7;
    site.margin_q = std::make_shared<const std::vector<std::uint8_t>>(16, 100);
    CoverageTileView own = site;
    own.layer = 1;
    own.margin_q = std::make_shared<const std::vector<std::uint8_t>>(16, 0);
    const sg::ui::Palette& pal = sg::ui::dayPalette();
    const ImTextureID t_site = cache.textureFor(site, pal);
    const ImTextureID t_own = cache.textureFor(own, pal);
    EXPECT_NE(t_site, t_own);
    EXPECT_EQ(counts->uploads, 2);
    EXPECT_EQ(cache.textureFor(site, pal), t_site);  // unchanged: no new upload
    EXPECT_EQ(counts->uploads, 2);
}

}  // namespace
