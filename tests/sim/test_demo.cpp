// The demo survey (replay_logs/demo): its survey configs are read by the core's own parsers and
// agree with the scenario the simulator runs (inputs per channel, field maps that decode the
// simulator's strings, sensor offsets, geomagnetic field, plan), and the demo stays small.
#include <gtest/gtest.h>

#include <algorithm>
#include <cmath>
#include <set>

#include "common/config_section.hpp"
#include "common/input_config.hpp"
#include "coverage/geometry.hpp"
#include "coverage/survey_plan.hpp"
#include "decode/field_map.hpp"
#include "detect/target_model.hpp"
#include "drivers_sim/run.hpp"
#include "nav/nav_config.hpp"
#include "sim_test_util.hpp"

namespace sg::sim::test {
namespace {

std::string logsPath(const std::string& dir, const std::string& name) {
    return std::string(SG_SOURCE_DIR) + "/replay_logs/" + dir + "/" + name;
}

// `dir`: the folder under replay_logs/ (demo, day12h).
void checkSurveyConfig(const std::string& dir, const std::string& file, bool udp) {
    SCOPED_TRACE(dir + "/" + file);
    const Scenario sc = loadScenario(logsPath(dir, "scenario.toml"));
    const toml::table tbl = config::parseFile(logsPath(dir, file));
    const config::Section root(tbl, logsPath(dir, file));

    const auto inputs = config::parseInputs(root);
    ASSERT_EQ(inputs.size(), static_cast<std::size_t>(kChannelCount));
    for (int c = 0; c < kChannelCount; ++c) {
        const auto& in = inputs[static_cast<std::size_t>(c)];
        EXPECT_EQ(in.name, channelName(static_cast<Channel>(c)));
        if (udp) {
            EXPECT_EQ(in.transport, config::Transport::Udp);
            EXPECT_EQ(in.listen_host, "127.0.0.1");
            EXPECT_EQ(in.listen_port, 47000 + c);  // swathguard-sim --base-port 47000
        } else {
            EXPECT_EQ(in.transport, config::Transport::File);
            EXPECT_EQ(in.path, std::string("sim_out/") + channelName(static_cast<Channel>(c)) + ".log");
        }
    }

    // The configured field maps decode what the simulator sends, to the same values.
    const auto maps = decode::parseFieldMaps(root);
    ASSERT_EQ(maps.size(), 3u);
    Scenario clean = sc;
    clean.faults.clear();
    const Recorded rec = runInMemory(clean, 1, 5.0);
    int decoded = 0;
    for (const SimLine& l : rec.lines) {
        if (l.channel != Channel::Mag && l.channel != Channel::Altimeter && l.channel != Channel::Cable)
            continue;
        const auto m = decode::decodeWithMaps(maps, l.bytes);
        ASSERT_EQ(m.record.reason, decode::Reason::Ok) << l.bytes << ": " << m.record.detail;
        const auto b = body(l.bytes);
        if (l.channel == Channel::Mag) {
            EXPECT_EQ(m.record.sensor, std::stoi(b[1]));
            EXPECT_DOUBLE_EQ(*m.record.field_nT, std::stod(b[3]));
            EXPECT_DOUBLE_EQ(*m.record.altitude_m, std::stod(b[6]));
        } else if (l.channel == Channel::Cable) {
            EXPECT_DOUBLE_EQ(*m.record.cable_out_m, std::stod(b[2]));
        } else {
            EXPECT_DOUBLE_EQ(*m.record.altitude_m, std::stod(b[2]));
        }
        ++decoded;
    }
    EXPECT_EQ(decoded, 5 * (10 * 4 + 5 + 1));

    const auto nav = nav::parseVesselConfig(root);
    ASSERT_EQ(nav.sensors.size(), sc.mag.sensors.size());
    for (std::size_t i = 0; i < nav.sensors.size(); ++i) {
        EXPECT_EQ(nav.sensors[i].index, static_cast<int>(i));
        EXPECT_DOUBLE_EQ(nav.sensors[i].cross_m, sc.mag.sensors[i].cross_m);
        EXPECT_DOUBLE_EQ(nav.sensors[i].along_m, sc.mag.sensors[i].along_m);
    }
    // Tow point relative to the antenna, as the scenario gives it; heights above the water.
    EXPECT_DOUBLE_EQ(nav.vessel.tow_point_m[0] - nav.vessel.antenna_m[0], sc.vessel.tow_point_m[0]);
    EXPECT_DOUBLE_EQ(nav.vessel.tow_point_m[1] - nav.vessel.antenna_m[1], sc.vessel.tow_point_m[1]);
    EXPECT_DOUBLE_EQ(nav.vessel.tow_point_m[2], sc.tow.tow_point_height_m);
    EXPECT_DOUBLE_EQ(nav.vessel.antenna_m[2], sc.vessel.antenna_height_m);

    const auto det = detect::parseDetectionConfig(root);
    EXPECT_DOUBLE_EQ(det.field.inclination_deg, sc.geomag.inclination_deg);
    EXPECT_DOUBLE_EQ(det.field.declination_deg, sc.geomag.declination_deg);
    EXPECT_DOUBLE_EQ(det.field.intensity_nT, sc.geomag.intensity_nT);

    const config::Section plan = root.table("plan");
    EXPECT_EQ(plan.string("area"), sc.plan.area_file);
    EXPECT_EQ(plan.string("lines"), sc.plan.lines_file);
    EXPECT_DOUBLE_EQ(plan.number("line_spacing_m"), sc.plan.line_spacing_m);
    EXPECT_DOUBLE_EQ(plan.number("planned_altitude_m"), sc.tow.altitude_m);
}

TEST(Demo, CoreReadsThePlanGeoJson) {
    // The core's plan loader (src/coverage) reads the simulator's GeoJSON back to the scenario's
    // lines and area in the survey CRS.
    const Scenario sc = loadScenario(demoPath("scenario.toml"));
    const Simulator sim(sc, SimOptions{});
    const toml::table tbl = config::parseFile(demoPath("survey.toml"));
    const config::Section root(tbl, demoPath("survey.toml"));
    const nav::SurveyCrs crs(sc.site.epsg);
    const coverage::SurveyPlan plan = coverage::loadPlan(root.table("plan"), coverage::toGridWith(crs));
    ASSERT_EQ(plan.lines.size(), sc.plan.lines.size());
    const Vec2 o = sim.origin_m();
    for (std::size_t i = 0; i < plan.lines.size(); ++i) {
        EXPECT_EQ(plan.lines[i].name, sc.plan.lines[i].name);
        EXPECT_NEAR(plan.lines[i].start.e_m, o.e + sc.plan.lines[i].start_m.e, 0.01);
        EXPECT_NEAR(plan.lines[i].start.n_m, o.n + sc.plan.lines[i].start_m.n, 0.01);
        EXPECT_NEAR(plan.lines[i].end.e_m, o.e + sc.plan.lines[i].end_m.e, 0.01);
        EXPECT_NEAR(plan.lines[i].end.n_m, o.n + sc.plan.lines[i].end_m.n, 0.01);
    }
    // Default area: the block of the parallel lines, widened across by area_margin_m on each
    // side and ending at the line ends: line length x (outer line separation + 2 margins).
    const auto& first = sc.plan.lines.front();
    const auto& last = sc.plan.lines.back();
    const double len = std::hypot(first.end_m.e - first.start_m.e, first.end_m.n - first.start_m.n);
    const double ue = (first.end_m.e - first.start_m.e) / len, un = (first.end_m.n - first.start_m.n) / len;
    const double across = std::abs((last.start_m.e - first.start_m.e) * -un + (last.start_m.n - first.start_m.n) * ue);
    const double m = 4.0;  // area_margin_m of the demo
    EXPECT_NEAR(coverage::area(plan.area), len * (across + 2 * m), 1.0);
    EXPECT_NO_THROW(coverage::checkLinesAgainstArea(plan.area, plan.lines, plan.lines_file));
}

TEST(Demo, UdpSurveyConfigMatchesTheScenario) { checkSurveyConfig("demo", "survey.toml", true); }
TEST(Demo, FileSurveyConfigMatchesTheScenario) { checkSurveyConfig("demo", "survey_files.toml", false); }

// The 12-hour survey day of the replay benchmark (bench/bench_replay_day.sh): its config agrees
// with its scenario, its committed plan files are current, and it is a full day's work: 4
// sensors at 10 Hz, GNSS at 10 Hz, and a route of at least 12 hours at the planned speed
// (the benchmark prints the simulated duration, 43 254 s when measured).
TEST(Day12h, SurveyConfigMatchesTheScenario) { checkSurveyConfig("day12h", "survey.toml", true); }

TEST(Day12h, IsATwelveHourDayWithItsPlanFiles) {
    const Scenario sc = loadScenario(logsPath("day12h", "scenario.toml"));
    EXPECT_EQ(sc.mag.sensors.size(), 4u);
    EXPECT_DOUBLE_EQ(sc.mag.rate_hz, 10.0);
    EXPECT_DOUBLE_EQ(sc.gnss.rate_hz, 10.0);
    EXPECT_DOUBLE_EQ(sc.gyro.rate_hz, 10.0);
    const Simulator sim(sc, SimOptions{});
    EXPECT_EQ(readFile(logsPath("day12h", sc.plan.area_file)), planAreaGeoJson(sim));
    EXPECT_EQ(readFile(logsPath("day12h", sc.plan.lines_file)), planLinesGeoJson(sim));
    // Lines alone at the speed through the water (5 kn = 2.572 m/s): 10.6 h, before run-ins,
    // turns and current; the whole route lasts a little over 12 h.
    double line_m = 0.0;
    for (const auto& l : sc.plan.lines) line_m += length(l.end_m - l.start_m);
    // knot = 1852 m / h (the simulator rounds it to 0.514444 m/s)
    EXPECT_NEAR(sc.vessel.speed_mps, 5.0 * 1852.0 / 3600.0, 1e-5);
    EXPECT_GT(line_m / sc.vessel.speed_mps, 10.5 * 3600.0);
}

TEST(Demo, IsSmallAndShowsItsFaults) {
    const Scenario sc = loadScenario(demoPath("scenario.toml"));
    EXPECT_GE(sc.plan.lines.size(), 6u);
    EXPECT_LE(sc.plan.lines.size(), 8u);
    for (const auto& l : sc.plan.lines) {
        EXPECT_GE(length(l.end_m - l.start_m), 550.0);
        EXPECT_LE(length(l.end_m - l.start_m), 800.0);
    }
    SimOptions o;
    Simulator sim(sc, o);
    while (!sim.done()) sim.step();
    // About 25-35 minutes simulated.
    EXPECT_GT(sim.elapsed_s(), 25.0 * 60.0);
    EXPECT_LT(sim.elapsed_s(), 36.0 * 60.0);
    // Every scheduled fault starts before the end of the run.
    std::set<FaultKind> kinds;
    for (const FaultSpec& f : sim.faults()) {
        EXPECT_LT(f.start_s + f.duration_s, sim.elapsed_s());
        kinds.insert(f.kind);
    }
    EXPECT_TRUE(kinds.count(FaultKind::GnssLoss));
    EXPECT_TRUE(kinds.count(FaultKind::MagDropout));
    EXPECT_TRUE(kinds.count(FaultKind::AltitudeExcursion));
}

}  // namespace
}  // namespace sg::sim::test
