// Simulating a site surveyed in several sessions, days and vessels: an acquisition window
// (--from/--to) splits one survey into sessions whose files concatenate to the whole run byte for
// byte, with turn windows to split where no line is being run; a route read from an infill
// GeoJSON (written by the core's own exporter) is flown within a few metres; --lines flies only
// the lines named; the second demo vessel's scenario and survey configs agree with the first's
// site and are read by the core's parsers.
#include <gtest/gtest.h>

#include <sys/wait.h>
#include <unistd.h>

#include <algorithm>
#include <cmath>
#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <map>
#include <set>

#include <nlohmann/json.hpp>

#include "common/config_section.hpp"
#include "coverage/exports.hpp"
#include "coverage/infill.hpp"
#include "coverage/survey_plan.hpp"
#include "decode/field_map.hpp"
#include "drivers_sim/pipeline_feed.hpp"
#include "drivers_sim/route_file.hpp"
#include "drivers_sim/run.hpp"
#include "engine/survey_config.hpp"
#include "nav/survey_crs.hpp"
#include "sim_test_util.hpp"

namespace sg::sim::test {
namespace {

namespace fs = std::filesystem;

std::string tempDir(const std::string& name) {
    const fs::path p = fs::temp_directory_path() /
                       ("sg_site_test_" + std::to_string(::getpid()) + "_" + name);
    fs::remove_all(p);
    fs::create_directories(p);
    return p.string();
}

RunResult runToFiles(const Scenario& sc, const std::string& dir, std::optional<double> from_s,
                     std::optional<double> to_s, bool truth = true) {
    RunOptions o;
    o.output = OutputKind::File;
    o.dir = dir;
    o.truth = truth;
    o.from_s = from_s;
    o.to_s = to_s;
    return runSimulation(sc, o, nullptr);
}

// The file without its first line (a CSV header).
std::string withoutHeader(const std::string& text) { return text.substr(text.find('\n') + 1); }

void expectConcatenationIsWhole(const std::string& whole, const std::string& a,
                                const std::string& b, bool truth = true) {
    for (int c = 0; c < kChannelCount; ++c) {
        const std::string n = std::string(channelName(static_cast<Channel>(c))) + ".log";
        const std::string first = readFile(a + "/" + n), second = readFile(b + "/" + n);
        EXPECT_FALSE(first.empty()) << n;
        EXPECT_FALSE(second.empty()) << n;
        EXPECT_TRUE(first + second == readFile(whole + "/" + n)) << n << ": the two windows differ from the whole run";
    }
    if (!truth) return;
    for (const std::string n : {"truth_mag.csv", "truth_nav.csv"}) {
        const std::string first = readFile(a + "/" + n), second = readFile(b + "/" + n);
        EXPECT_TRUE(first + withoutHeader(second) == readFile(whole + "/" + n)) << n;
    }
}

TEST(Site, TwoWindowsConcatenateToTheWholeRun) {
    // short.toml has a fault of every kind (spoiled checksums, garbage bytes, dropouts) within
    // its first 170 s; a split at 97.255 s (inside a noise burst, between ticks) must lose and
    // repeat nothing.
    const Scenario sc = loadScenario(dataPath("short.toml"));
    const std::string whole = tempDir("whole"), a = tempDir("a"), b = tempDir("b");
    const RunResult all = runToFiles(sc, whole, std::nullopt, 180.0);
    runToFiles(sc, a, std::nullopt, 97.255);
    const RunResult second = runToFiles(sc, b, 97.255, 180.0);
    expectConcatenationIsWhole(whole, a, b);
    // The first window ends with the last sample before the split, the second starts with the
    // first one at or after it (SGM time hhmmss.sss, 10 Hz).
    const std::string mag = readFile(b + "/mag.log");
    const std::string mag_a = readFile(a + "/mag.log");
    auto secondsOfDay = [](const std::string& line) {
        const std::string t = splitFields(line)[2];
        return std::stod(t.substr(0, 2)) * 3600 + std::stod(t.substr(2, 2)) * 60 + std::stod(t.substr(4));
    };
    const double start_s = static_cast<double>(sc.site.start_utc_ns % (86400 * kNsPerSecond)) / 1e9;
    // short.toml starts at 23:59:30 and crosses midnight.
    auto sinceStart = [&](double day_s) { return std::fmod(day_s - start_s + 2 * 86400.0, 86400.0); };
    const std::size_t last_a = mag_a.rfind('\n', mag_a.size() - 2) + 1;
    EXPECT_NEAR(sinceStart(secondsOfDay(mag_a.substr(last_a))), 97.2, 1e-6);
    EXPECT_NEAR(sinceStart(secondsOfDay(mag.substr(0, mag.find('\n')))), 97.3, 1e-6);
    // Its summary counts only its own lines, and says which window it holds.
    const auto j = nlohmann::json::parse(readFile(b + "/summary.json"));
    EXPECT_DOUBLE_EQ(j["window"]["from_s"].get<double>(), 97.255);
    EXPECT_EQ(j["channels"]["mag"]["sent"].get<std::uint64_t>(),
              static_cast<std::uint64_t>(std::count(mag.begin(), mag.end(), '\n')));
    EXPECT_LT(second.counts[static_cast<std::size_t>(Channel::Mag)].sent,
              all.counts[static_cast<std::size_t>(Channel::Mag)].sent);
    for (const auto& d : {whole, a, b}) fs::remove_all(d);
}

TEST(Site, DemoSplitInATurnNearTheMiddle) {
    const Scenario sc = loadScenario(demoPath("scenario.toml"));
    const std::string whole = tempDir("demo_whole"), a = tempDir("demo_a"), b = tempDir("demo_b");
    const RunResult all = runToFiles(sc, whole, std::nullopt, std::nullopt);
    // One run per line, each reached by antenna and fish, and a turn between each pair.
    ASSERT_EQ(all.runs.size(), sc.plan.lines.size());
    ASSERT_EQ(all.turns.size(), sc.plan.lines.size() - 1);
    for (const LineRunWindow& r : all.runs) {
        EXPECT_GT(r.antenna_off_s, r.antenna_on_s) << r.name;
        // The fish (tow point 14 m aft, about 29 m of layback) trails the antenna by 15-25 s at
        // 5 kn: it reaches and leaves each line later.
        EXPECT_GT(r.fish_on_s, r.antenna_on_s + 10.0) << r.name;
        if (&r != &all.runs.back()) {
            EXPECT_GT(r.fish_off_s, r.antenna_off_s + 10.0) << r.name;
        }
    }
    // The run ends when the antenna has run 25 m past the last line's end: the fish, 43 m
    // behind it, has not left that line yet (a known limit of the demo, kept so that its
    // output stays the same; --run-out lengthens the run-out of a new run).
    EXPECT_LT(all.runs.back().fish_off_s, 0.0);
    // The turn nearest the middle of the run.
    const TurnWindow turn = *std::min_element(all.turns.begin(), all.turns.end(), [&](auto& x, auto& y) {
        return std::abs(x.split_s - all.simulated_s / 2) < std::abs(y.split_s - all.simulated_s / 2);
    });
    EXPECT_EQ(turn.after, "HF03");
    EXPECT_EQ(turn.before, "HF04");
    EXPECT_EQ(std::fmod(turn.split_s, 1.0), 0.0);
    // Checked from the ground truth written by the whole run: at the split neither the antenna
    // nor the fish is on any plan line (its extent, within half a line spacing of its axis).
    const std::string nav = readFile(whole + "/truth_nav.csv");
    const Simulator probe(sc, SimOptions{});
    const Vec2 o = probe.origin_m();
    int rows = 0;
    for (std::size_t pos = nav.find('\n') + 1; pos < nav.size();) {
        const std::size_t end = nav.find('\n', pos);
        const auto f = splitFields(nav.substr(pos, end - pos));
        pos = end + 1;
        const double t = elapsedS(sc, parseUtc(f[0]));
        if (t < turn.split_s - 5.0 || t > turn.split_s + 5.0) continue;
        ++rows;
        EXPECT_TRUE(f[13].empty()) << "on line " << f[13] << " at " << t << " s";
        for (const Vec2 p : {Vec2{std::stod(f[1]), std::stod(f[2])}, Vec2{std::stod(f[5]), std::stod(f[6])}}) {
            for (const LineSpec& l : sc.plan.lines) {
                const Vec2 a0 = o + l.start_m, b0 = o + l.end_m;
                const double len = length(b0 - a0);
                const Vec2 u = (1.0 / len) * (b0 - a0);
                const double along = dot(p - a0, u), across = dot(p - a0, Vec2{u.n, -u.e});
                EXPECT_FALSE(along >= 0.0 && along <= len && std::abs(across) < 4.0)
                    << l.name << " at " << t << " s";
            }
        }
    }
    EXPECT_EQ(rows, 11);
    runToFiles(sc, a, std::nullopt, turn.split_s, false);
    runToFiles(sc, b, turn.split_s, std::nullopt, false);
    expectConcatenationIsWhole(whole, a, b, false);
    for (const auto& d : {whole, a, b}) fs::remove_all(d);
}

TEST(Site, InProcessSessionsTakeEveryLineOnce) {
    // One simulator, two sessions in one process (as a test feeding two pipelines would): the
    // first stops before the tick at T, the second continues from it.
    const Scenario sc = loadScenario(dataPath("short.toml"));
    const Recorded whole = runInMemory(sc, 1, 120.0);
    SimOptions o;
    o.duration_s = 120.0;
    Simulator sim(sc, o);
    std::vector<SimLine> first, second;
    stepUntil(sim, 97.255, [&](const StepOutput& s) { first.insert(first.end(), s.lines.begin(), s.lines.end()); });
    EXPECT_EQ(sim.elapsed_ns(), 97'250'000'000);  // the tick at 97.26 s not taken yet
    stepUntil(sim, 1e9, [&](const StepOutput& s) { second.insert(second.end(), s.lines.begin(), s.lines.end()); });
    ASSERT_EQ(first.size() + second.size(), whole.lines.size());
    for (std::size_t i = 0; i < whole.lines.size(); ++i) {
        const SimLine& l = i < first.size() ? first[i] : second[i - first.size()];
        ASSERT_EQ(l.bytes, whole.lines[i].bytes) << i;
        ASSERT_EQ(l.utc_ns, whole.lines[i].utc_ns) << i;
    }
    // The same split as the file window of runSimulation.
    const std::string d = tempDir("inproc");
    const RunResult r = runToFiles(sc, d, std::nullopt, 97.255, false);
    std::uint64_t sent = 0;
    for (const auto& c : r.counts) sent += c.sent;
    EXPECT_EQ(sent, first.size());
    fs::remove_all(d);
}

// The real binary: a window edge given as UTC is the same as in seconds; wrong setups exit 2
// with a message naming the problem, never 0 with nothing written.
int runSim(const std::string& args, const std::string& out_file) {
    const std::string cmd = std::string(SG_BINARY_DIR) + "/drivers_sim/swathguard-sim " + args +
                            " > " + out_file + " 2>&1";
    const int rc = std::system(cmd.c_str());
    return WIFEXITED(rc) ? WEXITSTATUS(rc) : -1;
}

TEST(Site, CommandLineWindowsLinesAndRoutes) {
    const std::string d = tempDir("cli");
    const std::string sc = dataPath("short.toml");
    // short.toml starts at 2026-03-01T23:59:30Z: 00:01:00 the next day is 90 s in.
    ASSERT_EQ(runSim("--scenario " + sc + " --dir " + d + "/utc --duration 120 --from 2026-03-02T00:01:00Z",
                     d + "/utc.txt"), 0) << readFile(d + "/utc.txt");
    ASSERT_EQ(runSim("--scenario " + sc + " --dir " + d + "/sec --duration 120 --from 90", d + "/sec.txt"), 0);
    EXPECT_FALSE(readFile(d + "/utc/mag.log").empty());
    EXPECT_EQ(readFile(d + "/utc/mag.log"), readFile(d + "/sec/mag.log"));
    EXPECT_NE(readFile(d + "/utc.txt").find("window: lines from 90.00 s"), std::string::npos);

    EXPECT_EQ(runSim("--scenario " + sc + " --dir " + d + "/late --duration 20 --from 30", d + "/late.txt"), 2);
    EXPECT_NE(readFile(d + "/late.txt").find("no line written"), std::string::npos) << readFile(d + "/late.txt");
    EXPECT_EQ(runSim("--scenario " + sc + " --dir " + d + "/x --from 50 --to 40", d + "/order.txt"), 2);
    EXPECT_NE(readFile(d + "/order.txt").find("--to"), std::string::npos);
    EXPECT_EQ(runSim("--scenario " + sc + " --dir " + d + "/x --from 08:00", d + "/bad.txt"), 2);
    EXPECT_EQ(runSim("--scenario " + sc + " --dir " + d + "/x --lines L01,L7", d + "/lines.txt"), 2);
    EXPECT_NE(readFile(d + "/lines.txt").find("'L7' is not in the plan"), std::string::npos) << readFile(d + "/lines.txt");
    {
        std::ofstream(d + "/none.geojson") << R"({"type": "FeatureCollection", "features": []})";
    }
    EXPECT_EQ(runSim("--scenario " + sc + " --dir " + d + "/x --route " + d + "/none.geojson", d + "/route.txt"), 2);
    EXPECT_NE(readFile(d + "/route.txt").find("none.geojson"), std::string::npos) << readFile(d + "/route.txt");
    fs::remove_all(d);
}

TEST(Site, AnEmptyWindowIsAnError) {
    Scenario sc = loadScenario(dataPath("short.toml"));
    const std::string d = tempDir("empty");
    RunOptions o;
    o.dir = d;
    o.sim.duration_s = 20.0;
    o.from_s = 25.0;  // after the end
    try {
        runSimulation(sc, o, nullptr);
        FAIL() << "a window after the end of the run must not succeed quietly";
    } catch (const std::invalid_argument& e) {
        EXPECT_NE(std::string(e.what()).find("no line written"), std::string::npos) << e.what();
    }
    fs::remove_all(d);
}

// Infill lines of the demo site as the core's exporter writes them (swathguard gaps --export):
// short lines between the planned lines, along the survey direction.
struct DemoFrame {
    Vec2 origin_m;     // projected origin of the scenario
    Vec2 first_m;      // start of HF01, relative to the origin
    Vec2 u, left;      // along the lines, and towards the next line (the plan's port side)
    Vec2 at(double along_m, double offset_m) const { return first_m + along_m * u + offset_m * left; }
};

DemoFrame demoFrame(const Scenario& sc) {
    const Simulator probe(sc, SimOptions{});
    DemoFrame f;
    f.origin_m = probe.origin_m();
    f.first_m = sc.plan.lines[0].start_m;
    const Vec2 d = sc.plan.lines[0].end_m - sc.plan.lines[0].start_m;
    f.u = (1.0 / length(d)) * d;
    f.left = {-f.u.n, f.u.e};
    return f;
}

std::string infillRouteGeoJson(const Scenario& sc, const DemoFrame& f) {
    coverage::InfillPlan plan;
    auto add = [&](const char* name, Vec2 a, Vec2 b) {
        coverage::InfillLine l;
        l.name = name;
        l.start = {f.origin_m.e + a.e, f.origin_m.n + a.n};
        l.end = {f.origin_m.e + b.e, f.origin_m.n + b.n};
        l.length_m = length(b - a);
        l.rank = static_cast<int>(plan.lines.size()) + 1;
        plan.lines.push_back(l);
    };
    add("INF-01", f.at(150.0, 12.0), f.at(330.0, 12.0));   // between HF02 and HF03
    add("INF-02", f.at(300.0, 36.0), f.at(450.0, 36.0));   // between HF05 and HF06
    add("INF-03", f.at(180.0, 20.0), f.at(40.0, 20.0));    // between HF03 and HF04, drawn backwards
    const nav::SurveyCrs crs(sc.site.epsg);
    auto j = nlohmann::json::parse(coverage::infillGeoJson(plan, coverage::toLonLatWith(crs)));
    // Optional properties the route reader honours: flown as drawn, a longer run-in.
    j["features"][2]["properties"]["direction"] = "as_drawn";
    j["features"][2]["properties"]["run_in_m"] = 80.0;
    return j.dump(1);
}

TEST(Site, RouteFromAnInfillGeoJsonIsFlown) {
    Scenario sc = loadScenario(demoPath("scenario.toml"));
    sc.faults.clear();
    const DemoFrame f = demoFrame(sc);
    const std::string dir = tempDir("route");
    const std::string route = dir + "/infill.geojson";
    {
        std::ofstream(route) << infillRouteGeoJson(sc, f);
    }
    loadRoute(route, sc);
    ASSERT_EQ(sc.route_lines.size(), 3u);
    EXPECT_EQ(sc.route_lines[0].name, "INF-01");
    EXPECT_FALSE(sc.route_lines[0].run_in_m.has_value());
    EXPECT_TRUE(sc.route_lines[2].as_drawn);
    EXPECT_DOUBLE_EQ(*sc.route_lines[2].run_in_m, 80.0);
    // lon/lat (8 decimals, about 1 mm) back to the grid: the lines where they were drawn.
    EXPECT_NEAR(length(sc.route_lines[0].start_m - f.at(150.0, 12.0)), 0.0, 0.01);
    EXPECT_NEAR(length(sc.route_lines[2].end_m - f.at(40.0, 20.0)), 0.0, 0.01);

    const RunResult r = runToFiles(sc, dir, std::nullopt, std::nullopt);
    // The plan files written beside the output stay the survey's plan, not the route.
    EXPECT_EQ(readFile(dir + "/plan_lines.geojson"), readFile(demoPath("plan_lines.geojson")));
    const auto summary = nlohmann::json::parse(readFile(dir + "/summary.json"));
    EXPECT_EQ(summary["route"], "infill.geojson");
    EXPECT_EQ(summary["lines_flown"], nlohmann::json({"INF-01", "INF-02", "INF-03"}));
    ASSERT_EQ(r.runs.size(), 3u);
    EXPECT_FALSE(r.runs[0].reversed);  // the first line as drawn
    EXPECT_TRUE(r.runs[1].reversed);   // back and forth
    EXPECT_FALSE(r.runs[2].reversed);  // "as_drawn", though the previous run went the same way

    // From the truth CSV: while on each route line, the antenna keeps within a few metres of it
    // (the autopilot's line keeping, about 2 m rms on the demo's lines), and it covers the line
    // from end to end; the fish, while it is on the line, too.
    const std::string nav = readFile(dir + "/truth_nav.csv");
    std::map<std::string, std::pair<double, double>> along_seen;  // line -> min, max along
    std::map<std::string, double> worst;
    double sum2 = 0.0;
    int n = 0;
    for (std::size_t pos = nav.find('\n') + 1; pos < nav.size();) {
        const std::size_t end = nav.find('\n', pos);
        const auto fields = splitFields(nav.substr(pos, end - pos));
        pos = end + 1;
        const double t = elapsedS(sc, parseUtc(fields[0]));
        for (std::size_t k = 0; k < r.runs.size(); ++k) {
            const LineSpec& l = sc.route_lines[static_cast<std::size_t>(r.runs[k].line)];
            const Vec2 a0 = f.origin_m + l.start_m, b0 = f.origin_m + l.end_m;
            const double len = length(b0 - a0);
            const Vec2 u = (1.0 / len) * (b0 - a0);
            if (fields[13] == l.name) {
                const Vec2 ant{std::stod(fields[1]), std::stod(fields[2])};
                const double across = dot(ant - a0, Vec2{u.n, -u.e});
                worst[l.name] = std::max(worst[l.name], std::abs(across));
                sum2 += across * across;
                ++n;
                auto& seen = along_seen.try_emplace(l.name, 1e9, -1e9).first->second;
                seen.first = std::min(seen.first, dot(ant - a0, u));
                seen.second = std::max(seen.second, dot(ant - a0, u));
            }
            if (t > r.runs[k].fish_on_s && t < r.runs[k].fish_off_s) {
                const Vec2 fish{std::stod(fields[5]), std::stod(fields[6])};
                const double across = dot(fish - a0, Vec2{u.n, -u.e});
                worst[l.name + " fish"] = std::max(worst[l.name + " fish"], std::abs(across));
            }
        }
    }
    ASSERT_GT(n, 0);
    for (const LineSpec& l : sc.route_lines) {
        SCOPED_TRACE(l.name);
        ASSERT_TRUE(along_seen.count(l.name));
        EXPECT_LT(worst[l.name], 5.0);
        EXPECT_GT(worst[l.name], 0.0);  // a real helmsman, not a ruler
        // The fish rides on the tow point's path: a cross current sets it down-stream of the
        // antenna's track by the crab angle (the demo shows up to about 5 m).
        EXPECT_LT(worst[l.name + " fish"], 7.0);
        const double len = length(l.end_m - l.start_m);
        EXPECT_LT(along_seen[l.name].first, 3.5);          // one row a second: 2.6 m apart at 5 kn
        EXPECT_GT(along_seen[l.name].second, len - 3.5);
    }
    EXPECT_LT(std::sqrt(sum2 / n), 2.5);
    fs::remove_all(dir);
}

TEST(Site, RouteErrorsNameTheFileAndTheFeature) {
    const Scenario sc = loadScenario(demoPath("scenario.toml"));
    auto message = [&](const std::string& text) {
        try {
            (void)parseRouteGeoJson(text, "route.geojson", sc);
        } catch (const config::ConfigError& e) {
            return std::string(e.what());
        }
        return std::string("no error");
    };
    const std::string empty = message(R"({"type": "FeatureCollection", "features": []})");
    EXPECT_NE(empty.find("route.geojson: "), std::string::npos) << empty;
    EXPECT_NE(empty.find("no features"), std::string::npos) << empty;
    // Projected coordinates where longitude, latitude belong.
    const std::string projected = message(R"({"type": "FeatureCollection", "features": [
        {"type": "Feature", "properties": {"name": "X1"}, "geometry": {"type": "LineString",
         "coordinates": [[508250.0, 5925500.0], [508450.0, 5925600.0]]}}]})");
    EXPECT_NE(projected.find("'X1'"), std::string::npos) << projected;
    EXPECT_NE(projected.find("longitude, latitude"), std::string::npos) << projected;
    // A route of another site: far from the scenario's origin.
    const std::string far = message(R"({"type": "FeatureCollection", "features": [
        {"type": "Feature", "properties": {}, "geometry": {"type": "LineString",
         "coordinates": [[2.0, 51.0], [2.001, 51.0]]}}]})");
    EXPECT_NE(far.find("feature 1"), std::string::npos) << far;
    EXPECT_NE(far.find("another site"), std::string::npos) << far;
    const std::string polygon = message(R"({"type": "FeatureCollection", "features": [
        {"type": "Feature", "properties": {"name": "A"}, "geometry": {"type": "Polygon",
         "coordinates": [[[3.125, 53.475], [3.126, 53.475], [3.126, 53.476], [3.125, 53.475]]]}}]})");
    EXPECT_NE(polygon.find("LineString"), std::string::npos) << polygon;
    const std::string bent = message(R"({"type": "FeatureCollection", "features": [
        {"type": "Feature", "properties": {"name": "B"}, "geometry": {"type": "LineString",
         "coordinates": [[3.125, 53.475], [3.126, 53.4755], [3.127, 53.475]]}}]})");
    EXPECT_NE(bent.find("not a straight line"), std::string::npos) << bent;
    const std::string direction = message(R"({"type": "FeatureCollection", "features": [
        {"type": "Feature", "properties": {"name": "C", "direction": "backwards"},
         "geometry": {"type": "LineString", "coordinates": [[3.125, 53.475], [3.126, 53.475]]}}]})");
    EXPECT_NE(direction.find("'direction'"), std::string::npos) << direction;
    EXPECT_NE(message("{").find("not valid JSON"), std::string::npos);
}

TEST(Site, LinesFliesOnlyTheLinesNamed) {
    Scenario sc = loadScenario(demoPath("scenario.toml"));
    sc.faults.clear();
    sc.run_lines = {"HF05", "HF02"};
    const Recorded rec = runInMemory(sc, 1);
    // In the order named, each once.
    std::vector<int> order;
    for (const NavTruth& t : rec.nav) {
        if (t.line >= 0 && (order.empty() || order.back() != t.line)) order.push_back(t.line);
    }
    EXPECT_EQ(order, (std::vector<int>{4, 1}));
    // Independently of the route's own bookkeeping: the fish travels along HF05 and HF02 (within
    // half a line spacing of the axis most of the line's time; the current sets it off by 1-3 m)
    // and never along any other line (within 1.5 m of its axis, inside its extent).
    std::vector<int> near(sc.plan.lines.size(), 0), on_axis(sc.plan.lines.size(), 0);
    for (std::size_t i = 0; i < rec.nav.size(); i += 10) {  // every 0.1 s
        for (std::size_t k = 0; k < sc.plan.lines.size(); ++k) {
            const LineSpec& l = sc.plan.lines[k];
            const double len = length(l.end_m - l.start_m);
            const Vec2 u = (1.0 / len) * (l.end_m - l.start_m);
            const Vec2 d = rec.nav[i].fish_m - l.start_m;
            if (dot(d, u) < 0.0 || dot(d, u) > len) continue;
            const double across = std::abs(dot(d, Vec2{u.n, -u.e}));
            if (across < 0.5 * sc.plan.line_spacing_m) ++near[k];
            if (across < 1.5) ++on_axis[k];
        }
    }
    const double line_s = length(sc.plan.lines[0].end_m - sc.plan.lines[0].start_m) / sc.vessel.speed_mps;
    for (std::size_t k = 0; k < near.size(); ++k) {
        if (k == 1 || k == 4) {
            EXPECT_GT(near[k], 0.7 * line_s * 10.0) << sc.plan.lines[k].name;
        } else {
            EXPECT_EQ(on_axis[k], 0) << sc.plan.lines[k].name;
        }
    }
    // Magnetometer lines only while flying those two (and the turn between): far fewer than the
    // whole plan's.
    const auto mag = std::count_if(rec.lines.begin(), rec.lines.end(),
                                   [](const SimLine& l) { return l.channel == Channel::Mag; });
    EXPECT_GT(mag, 2 * static_cast<long>(line_s) * 10 * 4);
    EXPECT_LT(mag, 77532 / 2);  // the whole demo: 77 532 magnetometer lines
    // An unknown name is refused with the names there are.
    sc.run_lines = {"HF02", "HF9"};
    try {
        (void)flightPlan(sc);
        FAIL() << "an unknown line name must be refused";
    } catch (const config::ConfigError& e) {
        EXPECT_NE(std::string(e.what()).find("'HF9'"), std::string::npos) << e.what();
        EXPECT_NE(std::string(e.what()).find("HF01, HF02"), std::string::npos) << e.what();
    }
    // The scenario key does the same, and names the file and key when wrong.
    const std::string text = readFile(demoPath("scenario.toml")) + "\n[run]\nlines = [\"HF03\", \"HFX\"]\n";
    try {
        (void)parseScenario(text, "with_lines.toml");
        FAIL() << "an unknown line name in [run] lines must be refused";
    } catch (const config::ConfigError& e) {
        EXPECT_NE(std::string(e.what()).find("with_lines.toml: key 'run.lines'"), std::string::npos) << e.what();
    }
    const Scenario keyed = parseScenario(readFile(demoPath("scenario.toml")) + "\n[run]\nlines = [\"HF03\"]\n", "k.toml");
    EXPECT_EQ(flightPlan(keyed).order, std::vector<int>{2});
}

TEST(Site, SecondVesselSharesTheSiteWithADifferentArray) {
    const Scenario one = loadScenario(demoPath("scenario.toml"));
    const Scenario two = loadScenario(demoPath("scenario_vessel2.toml"));
    EXPECT_EQ(two.site.name, one.site.name);
    EXPECT_NE(two.site.vessel, one.site.vessel);
    EXPECT_EQ(two.site.epsg, one.site.epsg);
    EXPECT_EQ(two.site.origin_lon_deg, one.site.origin_lon_deg);
    EXPECT_EQ(two.site.origin_lat_deg, one.site.origin_lat_deg);
    EXPECT_EQ(two.targets.size(), one.targets.size());
    for (std::size_t i = 0; i < one.targets.size(); ++i) {
        EXPECT_EQ(two.targets[i].name, one.targets[i].name);
        EXPECT_EQ(length(two.targets[i].position_m - one.targets[i].position_m), 0.0);
        EXPECT_EQ(two.targets[i].moment_Am2, one.targets[i].moment_Am2);
    }
    EXPECT_EQ(two.geomag.inclination_deg, one.geomag.inclination_deg);
    EXPECT_EQ(two.seabed.base_depth_m, one.seabed.base_depth_m);
    // The same plan: the plan GeoJSON it writes is the committed demo plan, byte for byte.
    const Simulator sim(two, SimOptions{});
    EXPECT_EQ(planLinesGeoJson(sim), readFile(demoPath("plan_lines.geojson")));
    EXPECT_EQ(planAreaGeoJson(sim), readFile(demoPath("plan_area.geojson")));
    // A different array: a transverse pair, other offsets, other cable and tow point.
    ASSERT_EQ(two.mag.sensors.size(), 2u);
    EXPECT_NE(two.mag.sensors.size(), one.mag.sensors.size());
    EXPECT_NE(two.tow.cable_out_m, one.tow.cable_out_m);
    EXPECT_NE(two.vessel.tow_point_m, one.vessel.tow_point_m);
    // Later the same day, so the two vessels' logs neither overlap in time nor share a name.
    EXPECT_GT(two.site.start_utc_ns, one.site.start_utc_ns + 40LL * 60 * kNsPerSecond);
}

// Everything but the inputs and the vessel's own geometry is the same in both vessels' configs.
void expectSameSiteSections(const std::string& first, const std::string& second) {
    const toml::table a = config::parseFile(demoPath(first));
    const toml::table b = config::parseFile(demoPath(second));
    std::set<std::string> keys;
    for (const auto& [k, v] : a) keys.insert(std::string(k.str()));
    for (const auto& [k, v] : b) keys.insert(std::string(k.str()));
    for (const std::string& k : keys) {
        if (k == "input" || k == "vessel" || k == "tow" || k == "sensor") continue;
        const toml::node* x = a.get(k);
        const toml::node* y = b.get(k);
        ASSERT_TRUE(x != nullptr && y != nullptr) << "[" << k << "] only in one of " << first << ", " << second;
        std::ostringstream sx, sy;
        x->visit([&](auto&& n) { sx << n; });
        y->visit([&](auto&& n) { sy << n; });
        EXPECT_EQ(sx.str(), sy.str()) << "[" << k << "] differs between " << first << " and " << second;
    }
}

void checkVessel2Config(const std::string& file, bool udp) {
    SCOPED_TRACE(file);
    const Scenario sc = loadScenario(demoPath("scenario_vessel2.toml"));
    // The whole core parser, as `swathguard record --config` runs it.
    const engine::SurveyConfig cfg = engine::loadSurveyConfig(demoPath(file));
    ASSERT_EQ(cfg.inputs.size(), static_cast<std::size_t>(kChannelCount));
    for (int c = 0; c < kChannelCount; ++c) {
        const auto& in = cfg.inputs[static_cast<std::size_t>(c)];
        EXPECT_EQ(in.name, channelName(static_cast<Channel>(c)));
        if (udp) {
            EXPECT_EQ(in.transport, config::Transport::Udp);
            EXPECT_EQ(in.listen_port, 47010 + c);  // swathguard-sim --base-port 47010
        } else {
            EXPECT_EQ(in.path, std::string("sim_out_vessel2/") + channelName(static_cast<Channel>(c)) + ".log");
        }
    }
    ASSERT_EQ(cfg.nav.sensors.size(), sc.mag.sensors.size());
    for (std::size_t i = 0; i < cfg.nav.sensors.size(); ++i) {
        EXPECT_EQ(cfg.nav.sensors[i].index, static_cast<int>(i));
        EXPECT_DOUBLE_EQ(cfg.nav.sensors[i].cross_m, sc.mag.sensors[i].cross_m);
        EXPECT_DOUBLE_EQ(cfg.nav.sensors[i].along_m, sc.mag.sensors[i].along_m);
    }
    const auto& v = cfg.nav.vessel;
    EXPECT_DOUBLE_EQ(v.tow_point_m[0] - v.antenna_m[0], sc.vessel.tow_point_m[0]);
    EXPECT_DOUBLE_EQ(v.tow_point_m[1] - v.antenna_m[1], sc.vessel.tow_point_m[1]);
    EXPECT_DOUBLE_EQ(v.tow_point_m[2], sc.tow.tow_point_height_m);
    EXPECT_DOUBLE_EQ(v.antenna_m[2], sc.vessel.antenna_height_m);
    EXPECT_DOUBLE_EQ(cfg.detection.field.inclination_deg, sc.geomag.inclination_deg);
    // The configured field maps decode the second vessel's strings (two sensors).
    Scenario clean = sc;
    clean.faults.clear();
    const Recorded rec = runInMemory(clean, 1, 3.0);
    int mags = 0;
    for (const SimLine& l : rec.lines) {
        if (l.channel != Channel::Mag) continue;
        const auto m = decode::decodeWithMaps(cfg.fieldmaps, l.bytes);
        ASSERT_EQ(m.record.reason, decode::Reason::Ok) << l.bytes;
        EXPECT_EQ(m.record.sensor, mags % 2);
        ++mags;
    }
    EXPECT_EQ(mags, 3 * 10 * 2);
}

TEST(Site, SecondVesselConfigsParseAndMatchItsScenario) {
    checkVessel2Config("survey_vessel2.toml", true);
    checkVessel2Config("survey_vessel2_files.toml", false);
    expectSameSiteSections("survey.toml", "survey_vessel2.toml");
    expectSameSiteSections("survey_files.toml", "survey_vessel2_files.toml");
}

}  // namespace
}  // namespace sg::sim::test
