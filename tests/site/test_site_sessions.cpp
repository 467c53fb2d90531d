// The site's promises end to end on the real binaries, with the simulator's invented demo survey
// (docs/site.md, docs/simulator.md "Sessions"):
//   - the survey split into two sessions (the simulator stopped in the HF03 -> HF04 turn and
//     started again) gives the coverage, gaps and infill of the survey in one log — once through
//     `demo --site` (simulator and core in one process: every line once) and once through two
//     `record --site` sessions over UDP;
//   - the infill lines `gaps` proposes, flown the next day as a route, leave no gap wider than the
//     small-gap limit: the product's main promise;
//   - two vessels with different arrays on halves of the plan merge into one coverage.
#include <gtest/gtest.h>

#include <array>
#include <chrono>
#include <cmath>
#include <csignal>
#include <cstdio>
#include <filesystem>
#include <fstream>
#include <memory>
#include <regex>
#include <set>
#include <sstream>
#include <string>
#include <thread>

#include <fcntl.h>
#include <spawn.h>
#include <sys/wait.h>
#include <unistd.h>

#include <nlohmann/json.hpp>

#include "site/run_command.hpp"
#include "../port_block.hpp"

extern char** environ;

namespace {

namespace fs = std::filesystem;

using sg::test::Result;
using sg::test::run;

std::string readFile(const std::string& path) {
    std::ifstream in(path);
    std::stringstream ss;
    ss << in.rdbuf();
    return ss.str();
}

const std::string kBin = std::string(SG_BINARY_DIR) + "/app/swathguard";
const std::string kSim = std::string(SG_BINARY_DIR) + "/drivers_sim/swathguard-sim";
const std::string kDemo = std::string(SG_SOURCE_DIR) + "/replay_logs/demo";
// The demo's turn nearest the middle (HF03 -> HF04), from the simulator's summary.json turns:
// 942.1 .. 1022.2 s; a whole second inside it.
constexpr int kSplitS = 982;

std::string workDir() {
    static const std::string d = [] {
        const auto p = (fs::temp_directory_path() / ("sg_sessions_" + std::to_string(::getpid()))).string();
        fs::remove_all(p);
        fs::create_directories(p);
        return p;
    }();
    return d;
}

// A site folder holding the demo config and its plan files.
std::string newSite(const std::string& name) {
    const auto dir = workDir() + "/" + name;
    fs::remove_all(dir);
    fs::create_directories(dir);
    for (const char* f : {"survey.toml", "plan_area.geojson", "plan_lines.geojson"}) fs::copy_file(kDemo + "/" + f, dir + "/" + f);
    return dir;
}

// One session of the simulated survey into the site (`demo --site`: the simulator's lines through
// the same framing and pipeline as record), or into a plain log with --out.
::testing::AssertionResult session(const std::string& scenario, const std::string& config, const std::string& extra) {
    const auto r = run(kBin + " demo --headless --scenario " + kDemo + "/" + scenario + " --config " + config + " " + extra);
    if (r.rc != 0) return ::testing::AssertionFailure() << "demo " << extra << ": " << r.out << r.err;
    return ::testing::AssertionSuccess();
}

nlohmann::json gaps(const std::string& args, Result* raw = nullptr) {
    const auto r = run(kBin + " gaps " + args + " --json");
    if (raw) *raw = r;
    if (r.rc != 0 || r.out.find('{') == std::string::npos) return {};
    return nlohmann::json::parse(r.out);
}

// The whole demo survey in one log (the reference), made once.
const nlohmann::json& singleLog() {
    static const nlohmann::json j = [] {
        const auto dir = workDir() + "/whole";
        if (!session("scenario.toml", kDemo + "/survey.toml", "--out " + dir)) return nlohmann::json();
        return gaps(dir + "/demo.sglog");
    }();
    return j;
}

TEST(SiteSessions, SurveySplitInTwoSessionsEqualsOneLog) {
    const auto& one = singleLog();
    ASSERT_FALSE(one.is_null());
    const auto site = newSite("split");
    const auto cfg = site + "/survey.toml";
    ASSERT_TRUE(session("scenario.toml", cfg, "--site " + site + " --to " + std::to_string(kSplitS)));
    ASSERT_TRUE(session("scenario.toml", cfg, "--site " + site + " --from " + std::to_string(kSplitS)));
    Result raw;
    const auto two = gaps(site, &raw);
    ASSERT_FALSE(two.is_null()) << raw.err;
    ASSERT_EQ(two["site"]["sessions"].size(), 2U);
    // The restart costs the second session its warm-up (noise window, fish path) in the turn,
    // outside the area: the coverage of the area, the gaps and the infill are the same.
    EXPECT_NEAR(two["coverage_pct"].get<double>(), one["coverage_pct"].get<double>(), 0.05);
    EXPECT_EQ(two["gap_count"], one["gap_count"]);
    EXPECT_EQ(two["infill"]["lines"].size(), one["infill"]["lines"].size());
    EXPECT_EQ(two["runs"].size(), one["runs"].size());
    for (std::size_t i = 0; i < one["gaps"].size() && i < two["gaps"].size(); ++i) {
        if (one["gaps"][i]["small"].get<bool>()) continue;
        EXPECT_NEAR(two["gaps"][i]["area_m2"].get<double>(), one["gaps"][i]["area_m2"].get<double>(),
                    0.01 * one["gaps"][i]["area_m2"].get<double>() + 1.0);
    }
    std::printf("split at %d s: one log %.4f %% hash %s; two sessions %.4f %% hash %s\n", kSplitS,
                one["coverage_pct"].get<double>(), one["raster_hash"].get<std::string>().c_str(),
                two["coverage_pct"].get<double>(), two["raster_hash"].get<std::string>().c_str());
}

TEST(SiteSessions, InfillFlownNextDayLeavesNoGap) {
    const auto& one = singleLog();
    ASSERT_FALSE(one.is_null());
    ASSERT_GT(one["gap_count"].get<int>(), 0);
    const auto site = newSite("infill");
    ASSERT_TRUE(session("scenario.toml", site + "/survey.toml", "--site " + site));
    Result day1;
    const auto before = gaps(site + " --export " + site + "/exports", &day1);
    ASSERT_FALSE(before.is_null()) << day1.err;
    ASSERT_TRUE(fs::exists(site + "/exports/infill.geojson"));
    // The next day: only the proposed infill lines, as a route, without faults.
    ASSERT_TRUE(session("scenario.toml", site + "/survey.toml",
                        "--site " + site + " --route " + site +
                            "/exports/infill.geojson --start 2026-06-15T08:00:00Z --no-faults"));
    Result day2;
    const auto after = gaps(site, &day2);
    ASSERT_FALSE(after.is_null()) << day2.err;
    EXPECT_EQ(after["site"]["sessions"].size(), 2U);
    EXPECT_EQ(after["gap_count"].get<int>(), 0) << after["gaps"].dump(1);
    EXPECT_GT(after["coverage_pct"].get<double>(), before["coverage_pct"].get<double>());
    EXPECT_GT(after["site"]["sessions"][1]["added_m2"].get<double>(), 0.0);
    std::printf("infill next day: %d gap(s), %.3f %% -> %d gap(s), %.3f %%\n", before["gap_count"].get<int>(),
                before["coverage_pct"].get<double>(), after["gap_count"].get<int>(), after["coverage_pct"].get<double>());
}

TEST(SiteSessions, TwoVesselsWithDifferentArraysMerge) {
    const auto site = newSite("vessels");
    ASSERT_TRUE(session("scenario.toml", kDemo + "/survey.toml", "--site " + site + " --lines HF01,HF02,HF03 --run-out 60"));
    ASSERT_TRUE(session("scenario_vessel2.toml", kDemo + "/survey_vessel2.toml",
                        "--site " + site + " --lines HF04,HF05,HF06 --run-out 60"));
    Result raw;
    const auto j = gaps(site, &raw);
    ASSERT_FALSE(j.is_null()) << raw.err;
    ASSERT_EQ(j["site"]["sessions"].size(), 2U);
    EXPECT_EQ(j["site"]["vessels"].get<int>(), 2);
    const auto& s = j["site"]["sessions"];
    EXPECT_EQ(s[0]["vessel"], "MV Harrow Tern");
    EXPECT_EQ(s[1]["vessel"], "MV Corran Sedge");
    EXPECT_EQ(s[0]["sensors"].get<int>(), 4);
    EXPECT_EQ(s[1]["sensors"].get<int>(), 2);
    // Each vessel covered its half; together more than either.
    EXPECT_GT(s[0]["own_covered_m2"].get<double>(), 0.0);
    EXPECT_GT(s[1]["added_m2"].get<double>(), 0.0);
    const auto half1 = gaps(site + "/logs/" + fs::path(s[0]["path"].get<std::string>()).filename().string());
    EXPECT_GT(j["coverage_pct"].get<double>(), half1["coverage_pct"].get<double>() + 20.0);
    // Runs of both vessels, on their own lines.
    std::set<std::string> lines0, lines1;
    for (const auto& r : j["runs"]) (r["session"].get<int>() == 0 ? lines0 : lines1).insert(r["line"].get<std::string>());
    EXPECT_TRUE(lines0.count("HF01") && !lines0.count("HF05"));
    EXPECT_TRUE(lines1.count("HF05") && !lines1.count("HF01"));
    // A vessel whose config differs in a site-wide key is refused before anything is imported.
    std::string other = readFile(kDemo + "/survey_vessel2.toml");
    other = std::regex_replace(other, std::regex("min_anomaly_nT = 1\\.0"), "min_anomaly_nT = 2.0");
    other = std::regex_replace(other, std::regex("\"plan_(area|lines)\\.geojson\""), "\"" + kDemo + "/plan_$1.geojson\"");
    std::ofstream(workDir() + "/other_vessel.toml") << other;
    const auto bad = run(kBin + " demo --headless --scenario " + kDemo + "/scenario_vessel2.toml --config " + workDir() +
                         "/other_vessel.toml --site " + site + " --lines HF04");
    EXPECT_NE(bad.rc, 0);
    EXPECT_NE(bad.err.find("[detection] min_anomaly_nT"), std::string::npos) << bad.err;
    EXPECT_EQ(gaps(site)["site"]["sessions"].size(), 2U);
    // The report of the site: its front page states logs, sessions and vessels, and a table lists
    // each log's vessel (the PDF's text read back with pdftotext, Debian poppler-utils).
    const auto rep = run(kBin + " report " + site + " --out " + site + "/report");
    ASSERT_EQ(rep.rc, 0) << rep.out << rep.err;
    const auto txt = run("pdftotext -layout " + site + "/report/report.pdf -");
    ASSERT_EQ(txt.rc, 0);
    EXPECT_NE(txt.out.find("2 logs, 2 sessions, 2 vessel(s)"), std::string::npos) << txt.out.substr(0, 2000);
    EXPECT_NE(txt.out.find("Sessions of the site"), std::string::npos);
    EXPECT_NE(txt.out.find("MV Corran Sedge"), std::string::npos);
    EXPECT_NE(txt.out.find("MV Harrow Tern"), std::string::npos);
}

// Two `record --site` sessions over UDP on loopback at 20x (the speed scripts/demo.sh records
// at), the simulator stopped in the turn and started again: the record path itself continues a
// site.
TEST(SiteSessions, TwoRecordSessionsOverUdpContinueTheSite) {
    const auto& one = singleLog();
    ASSERT_FALSE(one.is_null());
    const auto site = newSite("record");
    const sg::testdata::PortBlock ports(6);  // parallel test processes must not share them
    const int base = ports.base();
    std::string cfg = readFile(kDemo + "/survey.toml");
    for (int i = 0; i < 6; ++i)
        cfg = std::regex_replace(cfg, std::regex("127\\.0\\.0\\.1:4700" + std::to_string(i)),
                                 "127.0.0.1:" + std::to_string(base + i));
    cfg = std::regex_replace(cfg, std::regex("\"plan_(area|lines)\\.geojson\""), "\"" + site + "/plan_$1.geojson\"");
    const auto cfg_path = workDir() + "/record_udp.toml";
    std::ofstream(cfg_path) << cfg;
    for (int session = 0; session < 2; ++session) {
        const std::string out = workDir() + "/record" + std::to_string(session) + ".out";
        const char* argv[] = {kBin.c_str(), "record", "--site", site.c_str(), "--config", cfg_path.c_str(), "--headless",
                              nullptr};
        posix_spawn_file_actions_t fa;
        posix_spawn_file_actions_init(&fa);
        posix_spawn_file_actions_addopen(&fa, 1, out.c_str(), O_WRONLY | O_CREAT | O_TRUNC, 0644);
        pid_t rec = -1;
        ASSERT_EQ(posix_spawn(&rec, kBin.c_str(), &fa, nullptr, const_cast<char**>(argv), environ), 0);
        posix_spawn_file_actions_destroy(&fa);
        // Readers bound (and, in the second session, the first log summarised) before sending.
        for (int i = 0; i < 100 && readFile(out).find("joined") == std::string::npos; ++i)
            std::this_thread::sleep_for(std::chrono::milliseconds(100));
        std::this_thread::sleep_for(std::chrono::milliseconds(1000));
        const std::string window = session == 0 ? "--to " + std::to_string(kSplitS) : "--from " + std::to_string(kSplitS);
        const auto sim = run(kSim + " --scenario " + kDemo + "/scenario.toml --out udp --base-port " +
                             std::to_string(base) + " --speed 20 " + window + " --dir " + workDir() + "/udp" +
                             std::to_string(session));
        ASSERT_EQ(sim.rc, 0) << sim.err;
        std::this_thread::sleep_for(std::chrono::milliseconds(1500));  // last datagrams logged
        ::kill(rec, SIGINT);
        int status = 0;
        ::waitpid(rec, &status, 0);
        ASSERT_TRUE(WIFEXITED(status));
        EXPECT_EQ(WEXITSTATUS(status), 0) << readFile(out);
        const auto text = readFile(out);
        EXPECT_NE(text.find(session == 0 ? "0 earlier log(s) joined" : "1 earlier log(s) joined"), std::string::npos) << text;
        EXPECT_NE(text.find("session summary"), std::string::npos) << text;
    }
    Result raw;
    const auto two = gaps(site, &raw);
    ASSERT_FALSE(two.is_null()) << raw.err;
    EXPECT_EQ(two["site"]["sessions"].size(), 2U);
    EXPECT_NEAR(two["coverage_pct"].get<double>(), one["coverage_pct"].get<double>(), 0.05);
    EXPECT_EQ(two["gap_count"], one["gap_count"]);
    std::printf("two record sessions: %.4f %% (one log %.4f %%), %d gaps\n", two["coverage_pct"].get<double>(),
                one["coverage_pct"].get<double>(), two["gap_count"].get<int>());
}

}  // namespace

namespace {

// Gap name -> (centroid e, n, bbox) of the significant gaps of a `gaps --json`.
struct NamedGap {
    std::string name;
    int id = 0;
    double e = 0, n = 0;
    std::array<double, 4> bbox{};
};
std::vector<NamedGap> namedGaps(const nlohmann::json& j) {
    std::vector<NamedGap> out;
    for (const auto& g : j["gaps"]) {
        if (g["small"].get<bool>()) continue;
        out.push_back({g["name"].get<std::string>(), g["id"].get<int>(), g["centroid_e"].get<double>(),
                       g["centroid_n"].get<double>(),
                       {g["bbox"][0].get<double>(), g["bbox"][1].get<double>(), g["bbox"][2].get<double>(), g["bbox"][3].get<double>()}});
    }
    return out;
}

}  // namespace

// Issue #12: half-way through the survey (the first session stops in the HF03 -> HF04 turn) the
// ground of HF04..HF06 is not run yet: no gap, no infill there, and the summary says so; at the end
// the demo's figures are those of the whole survey; gap names survive the restart.
TEST(SiteSessions, HalfRunSurveyListsOnlyMissedGroundAndNamesSurvive) {
    const auto& one = singleLog();
    ASSERT_FALSE(one.is_null());
    // The demo's figures (docs/performance.md, DEVELOPERS.md: 96.03 %, 3 gaps + 9 small, 4 infill
    // lines of 661 m, since the swath tables solve next to their jumps) hold at the end of the
    // survey.
    EXPECT_NEAR(one["coverage_pct"].get<double>(), 96.03, 0.005);
    EXPECT_EQ(one["gap_count"].get<int>(), 3);
    EXPECT_EQ(one["small_gap_count"].get<int>(), 9);
    EXPECT_EQ(one["infill"]["lines"].size(), 4U);
    EXPECT_NEAR(one["infill"]["total_length_m"].get<double>(), 661.0, 0.5);
    EXPECT_TRUE(one["not_run_yet"]["lines"].empty());

    const auto site = newSite("halfrun");
    const auto cfg = site + "/survey.toml";
    ASSERT_TRUE(session("scenario.toml", cfg, "--site " + site + " --to " + std::to_string(kSplitS)));
    Result raw;
    const auto half = gaps(site, &raw);
    ASSERT_FALSE(half.is_null()) << raw.err;
    const auto& nry = half["not_run_yet"];
    EXPECT_EQ(nry["lines"], nlohmann::json::array({"HF04", "HF05", "HF06"})) << nry.dump();
    EXPECT_EQ(nry["message"].get<std::string>(),
              "3 of 6 planned lines not run yet: their ground is not counted as missed");
    // Half the area is ahead: its ground is not run yet, not missed.
    EXPECT_GT(nry["area_m2"].get<double>(), 0.3 * half["area_m2"].get<double>());
    double missed = 0.0;
    for (const auto& g : half["gaps"]) missed += g["area_m2"].get<double>();
    EXPECT_LT(missed, 0.1 * half["area_m2"].get<double>());
    // Infill only for missed ground: every line's gaps are gaps of the list, and it is short (an
    // infill line over the un-run lines would be a whole line long, 250 m and more).
    std::set<int> listed;
    for (const auto& g : half["gaps"]) listed.insert(g["id"].get<int>());
    for (const auto& l : half["infill"]["lines"]) {
        for (const auto& id : l["gap_ids"]) EXPECT_TRUE(listed.count(id.get<int>())) << l.dump();
        EXPECT_EQ(l["name"].get<std::string>().substr(0, 1), "I");
    }
    const int next_half = half["next_gap_number"].get<int>();

    ASSERT_TRUE(session("scenario.toml", cfg, "--site " + site + " --from " + std::to_string(kSplitS)));
    const auto full = gaps(site, &raw);
    ASSERT_FALSE(full.is_null()) << raw.err;
    EXPECT_TRUE(full["not_run_yet"]["lines"].empty());
    // A gap of the first half still there keeps its name; a name given later is a new number.
    const auto before = namedGaps(half), after = namedGaps(full);
    std::set<std::string> before_names;
    for (const auto& b : before) before_names.insert(b.name);
    int kept = 0;
    for (const auto& b : before)
        for (const auto& a : after)
            if (b.e >= a.bbox[0] && b.e <= a.bbox[2] && b.n >= a.bbox[1] && b.n <= a.bbox[3]) {
                EXPECT_EQ(a.name, b.name) << "gap at E " << b.e << " N " << b.n;
                ++kept;
            }
    EXPECT_GE(kept, 1);
    for (const auto& a : after)
        if (!before_names.count(a.name)) {
            EXPECT_GE(a.id, next_half) << a.name << " reuses a name";
        }
    std::printf("half-run: %s (%.0f m2 ahead); missed %.0f m2, %zu gap(s); names kept %d, next %d -> %d\n",
                nry["message"].get<std::string>().c_str(), nry["area_m2"].get<double>(), missed,
                before.size(), kept, next_half, full["next_gap_number"].get<int>());
}

// The picks of a site (docs/picks.md "A site", docs/site.md "Session summaries"): the demo survey
// split into two sessions at the HF03 -> HF04 turn (kSplitS) lists the picks of both sessions in
// `gaps SITE --json`, and the set equals the single log's (same count, each within 0.05 m, same
// id): the split lies in a turn, where no sample is picked (picks use line runs only), so no
// pass is cut in two. The first session's picks come from its summary (.sgsum), the second's from
// the replay. The site report lists the first session's picks in its table (pdftotext).
TEST(SiteSessions, PicksOfEverySessionAreListedAndReported) {
    const auto& one = singleLog();
    ASSERT_FALSE(one.is_null());
    const auto site = newSite("split_picks");
    const auto cfg = site + "/survey.toml";
    ASSERT_TRUE(session("scenario.toml", cfg, "--site " + site + " --to " + std::to_string(kSplitS)));
    ASSERT_TRUE(session("scenario.toml", cfg, "--site " + site + " --from " + std::to_string(kSplitS)));
    Result raw;
    const auto two = gaps(site, &raw);
    ASSERT_FALSE(two.is_null()) << raw.err;
    ASSERT_EQ(two["site"]["sessions"].size(), 2U);
    const auto& a = one["picks"]["items"];
    const auto& b = two["picks"]["items"];
    ASSERT_GE(a.size(), 2U);
    ASSERT_EQ(b.size(), a.size()) << two["picks"].dump(1);
    std::set<int> sessions_seen;
    for (std::size_t i = 0; i < a.size(); ++i) {
        double best = 1e9;
        const nlohmann::json* match = nullptr;
        for (const auto& k : b) {
            const double d = std::hypot(k["easting_m"].get<double>() - a[i]["easting_m"].get<double>(),
                                        k["northing_m"].get<double>() - a[i]["northing_m"].get<double>());
            if (d < best) {
                best = d;
                match = &k;
            }
        }
        EXPECT_LE(best, 0.05) << "pick " << a[i].dump();
        ASSERT_NE(match, nullptr);
        EXPECT_EQ((*match)["id"], a[i]["id"]);
        EXPECT_EQ((*match)["runs"], a[i]["runs"]);
        ASSERT_TRUE(match->contains("sessions")) << match->dump();
        for (const auto& s : (*match)["sessions"]) sessions_seen.insert(s.get<int>());
        ASSERT_TRUE(match->contains("logs"));
        EXPECT_EQ((*match)["logs"].size(), (*match)["sessions"].size());
        std::printf("pick P%d: %.3f m from the single log's, sessions %s\n", (*match)["id"].get<int>(), best,
                    (*match)["sessions"].dump().c_str());
    }
    EXPECT_EQ(sessions_seen, (std::set<int>{0, 1})) << "picks of both sessions";
    // Ids stay unique across the site.
    std::set<int> ids;
    for (const auto& k : b) EXPECT_TRUE(ids.insert(k["id"].get<int>()).second);

    // The report of the site lists the first session's picks.
    const auto out = workDir() + "/split_picks_report";
    fs::remove_all(out);
    const auto rep = run(kBin + " report " + site + " --out " + out);
    ASSERT_EQ(rep.rc, 0) << rep.out << rep.err;
    std::string pdf;
    for (const auto& e : fs::directory_iterator(out))
        if (e.path().extension() == ".pdf") pdf = e.path().string();
    ASSERT_FALSE(pdf.empty());
    const auto text = run("pdftotext -layout " + pdf + " -");
    ASSERT_EQ(text.rc, 0);
    int first_session_picks = 0;
    for (const auto& k : b) {
        bool first = false;
        for (const auto& s : k["sessions"]) first = first || s.get<int>() == 0;
        if (!first) continue;
        ++first_session_picks;
        // The table's row: "P<id>" and the easting to 0.1 m (report/site_report.cpp).
        char east[32];
        std::snprintf(east, sizeof east, "%.1f", k["easting_m"].get<double>());
        const std::regex row("P" + std::to_string(k["id"].get<int>()) + " +" + std::regex_replace(east, std::regex("\\."), "\\."));
        EXPECT_TRUE(std::regex_search(text.out, row)) << "report lacks P" << k["id"] << " at E " << east;
    }
    EXPECT_GE(first_session_picks, 1);
}

// The ids of the gaps a session exported (gaps.csv of `demo --out`), in report order, with areas.
std::vector<std::pair<int, double>> exportedGaps(const std::string& csv_path) {
    std::vector<std::pair<int, double>> out;
    std::istringstream in(readFile(csv_path));
    std::string line;
    std::getline(in, line);  // header
    while (std::getline(in, line)) {
        if (line.empty()) continue;
        std::istringstream f(line);
        std::string id, kind, area;
        std::getline(f, id, ',');
        std::getline(f, kind, ',');
        std::getline(f, area, ',');
        out.emplace_back(std::stoi(id), std::stod(area));
    }
    return out;
}

// A gap and its infill line keep their name for the life of the site (docs/coverage.md, "Gap
// names"; docs/site.md, "Gap names across sessions"): the second half of the demo survey, flown
// as the newest session of a site, opens gaps at several of its run ends; `gaps SITE` afterwards
// gives every gap the name the live session gave it (its gaps.csv export), not a renumbering by
// one commit for the whole session.
TEST(SiteSessions, NewestSessionNamesEqualLiveNames) {
    const auto site = newSite("livenames");
    const auto cfg = site + "/survey.toml";
    ASSERT_TRUE(session("scenario.toml", cfg, "--site " + site + " --to " + std::to_string(kSplitS)));
    const auto out = site + "/live2";
    const auto second = run(kBin + " demo --headless --scenario " + kDemo + "/scenario.toml --config " + cfg +
                            " --site " + site + " --from " + std::to_string(kSplitS) + " --out " + out);
    ASSERT_EQ(second.rc, 0) << second.out << second.err;
    // The next free number the live session ended with (app/cmd_demo.cpp prints it).
    std::smatch m;
    ASSERT_TRUE(std::regex_search(second.out, m, std::regex(R"(gap names recorded: \d+ gap run\(s\), next G(\d+))")))
        << second.out;
    const int live_next = std::stoi(m[1].str());
    const auto live = exportedGaps(out + "/gaps.csv");
    ASSERT_FALSE(live.empty());
    Result raw;
    const auto opened = gaps(site, &raw);
    ASSERT_FALSE(opened.is_null()) << raw.err;
    ASSERT_EQ(opened["gaps"].size(), live.size());
    std::string live_names, site_names;
    for (std::size_t i = 0; i < live.size(); ++i) {
        const auto& g = opened["gaps"][i];
        EXPECT_NEAR(g["area_m2"].get<double>(), live[i].second, 0.01) << "gap " << i;
        EXPECT_EQ(g["id"].get<int>(), live[i].first) << "gap " << i << " of " << g["area_m2"].get<double>() << " m2";
        live_names += " G" + std::to_string(live[i].first);
        site_names += " " + g["name"].get<std::string>();
    }
    EXPECT_EQ(opened["next_gap_number"].get<int>(), live_next);
    std::printf("newest session: live%s, next G%d; gaps SITE%s, next G%d\n", live_names.c_str(), live_next,
                site_names.c_str(), opened["next_gap_number"].get<int>());
}
