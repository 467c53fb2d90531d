// World model: the fish lies on the path the tow point travelled (it cuts the corner on a turn,
// it is not straight astern of the vessel), the vessel follows the lines, the fish rides high
// over the channel, the plan GeoJSON (RFC 7946) matches the scenario, and scenario errors name
// the file and the key.
#include <gtest/gtest.h>

#include <algorithm>
#include <cmath>
#include <set>

#include <GeographicLib/UTMUPS.hpp>
#include <nlohmann/json.hpp>

#include "common/config_section.hpp"
#include "drivers_sim/run.hpp"
#include "sim_test_util.hpp"

namespace sg::sim::test {
namespace {

double distanceToSegment(Vec2 p, Vec2 a, Vec2 b) {
    const Vec2 ab = b - a;
    const double l2 = dot(ab, ab);
    const double t = l2 > 0.0 ? std::clamp(dot(p - a, ab) / l2, 0.0, 1.0) : 0.0;
    return length(p - (a + t * ab));
}

TEST(World, FishOnTheTravelledPathNotStraightAstern) {
    Scenario sc = loadScenario(dataPath("short.toml"));
    sc.faults.clear();
    const Recorded rec = runInMemory(sc, 5);
    // Convergence is needed to turn the logged true heading back into a grid direction.
    SimOptions o;
    const Simulator probe(sc, o);
    const double conv = probe.convergence_deg();

    int turn_samples = 0;
    double max_off_path = 0.0;
    double max_astern_gap = 0.0;
    for (std::size_t i = 3000; i < rec.nav.size(); i += 50) {
        const NavTruth& now = rec.nav[i];
        const NavTruth& before = rec.nav[i - 2000];  // 20 s earlier
        double turned = std::abs(now.heading_true_deg - before.heading_true_deg);
        turned = std::min(turned, 360.0 - turned);
        if (turned < 45.0) continue;
        ++turn_samples;
        // Distance from the fish to the tow point's track over the last 60 s.
        double best = 1e9;
        for (std::size_t j = i - 3000; j < i; ++j)
            best = std::min(best, distanceToSegment(now.fish_m, rec.nav[j].tow_point_m,
                                                    rec.nav[j + 1].tow_point_m));
        max_off_path = std::max(max_off_path, best);
        // Where a straight-astern model would put it.
        const double h = (now.heading_true_deg - conv) * M_PI / 180.0;
        const Vec2 astern = now.tow_point_m - now.layback_m * bearingUnit(h);
        max_astern_gap = std::max(max_astern_gap, length(now.fish_m - astern));
        // And the layback is measured along that path: the chord is never longer.
        EXPECT_LE(length(now.fish_m - now.tow_point_m), now.layback_m + 0.01);
    }
    ASSERT_GT(turn_samples, 5);
    EXPECT_LT(max_off_path, 0.05);     // on the path (path points every >= 5 cm)
    EXPECT_GT(max_astern_gap, 5.0);    // clearly not astern on a turn
}

TEST(World, VesselFollowsTheLinesWithRealisticError) {
    Scenario sc = loadScenario(demoPath("scenario.toml"));
    sc.faults.clear();
    const Recorded rec = runInMemory(sc, 1);
    double sum2 = 0.0, worst = 0.0;
    std::size_t n = 0;
    std::set<int> lines;
    for (const NavTruth& t : rec.nav) {
        if (t.line < 0) continue;
        lines.insert(t.line);
        sum2 += t.cross_track_m * t.cross_track_m;
        worst = std::max(worst, std::abs(t.cross_track_m));
        ++n;
    }
    EXPECT_EQ(lines.size(), sc.plan.lines.size());  // every line run
    const double rms = std::sqrt(sum2 / static_cast<double>(n));
    // Common practice: a small survey vessel holds a line to a few metres; not perfectly.
    EXPECT_GT(rms, 0.2);
    EXPECT_LT(rms, 4.0);
    EXPECT_LT(worst, 12.0);
}

TEST(World, FishFliesHighOverTheChannel) {
    // Demo: a 5 m deep channel 70 m wide; the fish (12 s lag) cannot follow it down at once.
    Scenario sc = loadScenario(demoPath("scenario.toml"));
    sc.faults.clear();
    const Recorded rec = runInMemory(sc, 1);
    double over_channel = 0.0, elsewhere = 0.0;
    for (const NavTruth& t : rec.nav) {
        if (t.line < 0) continue;
        const auto& c = sc.seabed.channels.at(0);
        const double across = std::abs(dot(t.fish_m - c.point_m, bearingUnit((c.azimuth_deg + 90.0) * M_PI / 180.0)));
        if (across < 10.0) over_channel = std::max(over_channel, t.fish_altitude_m);
        if (across > 80.0) elsewhere = std::max(elsewhere, t.fish_altitude_m);
    }
    EXPECT_GT(over_channel, sc.tow.altitude_m + 2.0);
    EXPECT_GT(over_channel, elsewhere + 1.0);
}

TEST(World, PlanGeoJsonMatchesTheScenario) {
    const Scenario sc = loadScenario(demoPath("scenario.toml"));
    const Simulator sim(sc, SimOptions{});
    const auto area = nlohmann::json::parse(planAreaGeoJson(sim));
    const auto lines = nlohmann::json::parse(planLinesGeoJson(sim));
    int zone = 0;
    bool northp = false;
    double e0 = 0, n0 = 0, gamma = 0, k = 0;
    GeographicLib::UTMUPS::Forward(sc.site.origin_lat_deg, sc.site.origin_lon_deg, zone, northp,
                                   e0, n0, gamma, k);
    auto grid = [&](const nlohmann::json& lonlat) {
        double e = 0, n = 0;
        GeographicLib::UTMUPS::Forward(lonlat[1].get<double>(), lonlat[0].get<double>(), zone,
                                       northp, e, n, gamma, k, 31);
        return Vec2{e - e0, n - n0};
    };
    // RFC 7946 3.1.6: a closed linear ring, exterior counterclockwise (positive shoelace area).
    ASSERT_EQ(area["features"].size(), 1u);
    const auto& ring = area["features"][0]["geometry"]["coordinates"][0];
    EXPECT_EQ(area["features"][0]["geometry"]["type"], "Polygon");
    ASSERT_GE(ring.size(), 4u);
    EXPECT_EQ(ring.front(), ring.back());
    double twice = 0.0;
    for (std::size_t i = 0; i + 1 < ring.size(); ++i)
        twice += ring[i][0].get<double>() * ring[i + 1][1].get<double>() -
                 ring[i + 1][0].get<double>() * ring[i][1].get<double>();
    EXPECT_GT(twice, 0.0);
    // Lines: names and end points (1e-8 degree = about 1 mm).
    ASSERT_EQ(lines["features"].size(), sc.plan.lines.size());
    for (std::size_t i = 0; i < sc.plan.lines.size(); ++i) {
        const auto& f = lines["features"][i];
        EXPECT_EQ(f["properties"]["name"], sc.plan.lines[i].name);
        EXPECT_EQ(f["geometry"]["type"], "LineString");
        const Vec2 a = grid(f["geometry"]["coordinates"][0]);
        const Vec2 b = grid(f["geometry"]["coordinates"][1]);
        EXPECT_NEAR(a.e, sc.plan.lines[i].start_m.e, 0.005);
        EXPECT_NEAR(a.n, sc.plan.lines[i].start_m.n, 0.005);
        EXPECT_NEAR(b.e, sc.plan.lines[i].end_m.e, 0.005);
        EXPECT_NEAR(b.n, sc.plan.lines[i].end_m.n, 0.005);
    }
    // The committed demo files are these (regenerate: swathguard-sim --plan-only, see docs).
    EXPECT_EQ(readFile(demoPath(sc.plan.area_file)), planAreaGeoJson(sim));
    EXPECT_EQ(readFile(demoPath(sc.plan.lines_file)), planLinesGeoJson(sim));
}

TEST(World, ScenarioErrorsNameFileAndKey) {
    const std::string good = readFile(dataPath("short.toml"));
    auto message = [](const std::string& text) {
        try {
            parseScenario(text, "bad.toml");
        } catch (const config::ConfigError& e) {
            return std::string(e.what());
        }
        return std::string("no error");
    };
    std::string typo = good;
    typo.replace(typo.find("speed_kn"), 8, "speed_kt");
    EXPECT_NE(message(typo).find("vessel.speed_kt"), std::string::npos) << message(typo);
    std::string kind = good;
    kind.replace(kind.find("\"gnss_loss\""), 11, "\"gps_gone\"");
    EXPECT_NE(message(kind).find("bad.toml"), std::string::npos);
    EXPECT_NE(message(kind).find("kind"), std::string::npos) << message(kind);
    std::string order = good + "";
    order.replace(order.find("turn_radius_m"), 0, "order = [1, 3]\n");
    EXPECT_NE(message(order).find("plan.order"), std::string::npos) << message(order);
}

}  // namespace
}  // namespace sg::sim::test
