// A site on the real binaries (docs/site.md): logs made by `swathguard demo` (the invented demo
// survey), read back with `swathguard gaps` as a site folder or a list of logs. Checks: every order
// of the logs gives the same raster hash; summaries are reused (no replay) and rebuilt when the log
// or the config in force changes, with a message naming the key; damaged, empty and foreign logs
// are skipped by name while the others still count; logs of another CRS stop a site without a
// config in force, naming the key. The outside judge for damaged logs is the sqlite3 shell.
#include <gtest/gtest.h>

#include <array>
#include <cstdio>
#include <filesystem>
#include <fstream>
#include <memory>
#include <sstream>
#include <string>
#include <vector>

#include <nlohmann/json.hpp>

#include "site/run_command.hpp"

namespace {

namespace fs = std::filesystem;

using sg::test::Result;
using sg::test::run;

const std::string kBin = std::string(SG_BINARY_DIR) + "/app/swathguard";
const std::string kSrc = SG_SOURCE_DIR;

// Three short demo logs (seeds 1..3, 420 s each: the first two lines), made once.
struct Logs {
    std::string dir;
    std::vector<std::string> logs;
    std::string error;
};

const Logs& demoLogs() {
    static const Logs l = [] {
        Logs x;
        x.dir = (fs::temp_directory_path() / ("sg_site_" + std::to_string(::getpid()))).string();
        fs::remove_all(x.dir);
        for (int seed = 1; seed <= 3; ++seed) {
            const auto out = x.dir + "/demo" + std::to_string(seed);
            const auto r = run(kBin + " demo --headless --scenario " + kSrc + "/replay_logs/demo/scenario.toml --config " +
                               kSrc + "/replay_logs/demo/survey.toml --duration 420 --seed " + std::to_string(seed) +
                               " --out " + out);
            if (r.rc != 0) {
                x.error = "demo failed: " + r.out + r.err;
                return x;
            }
            x.logs.push_back(out + "/demo.sglog");
        }
        return x;
    }();
    return l;
}

nlohmann::json gapsJson(const std::string& args, Result* raw = nullptr) {
    const auto r = run(kBin + " gaps " + args + " --json");
    if (raw) *raw = r;
    if (r.rc != 0 || r.out.find('{') == std::string::npos) return {};
    return nlohmann::json::parse(r.out);
}

// A fresh site folder with copies of the given logs (named as record names them) and the demo
// survey config as the config in force.
std::string makeSite(const std::string& name, const std::vector<std::string>& logs) {
    const auto dir = demoLogs().dir + "/" + name;
    fs::remove_all(dir);
    fs::create_directories(dir + "/logs");
    for (std::size_t i = 0; i < logs.size(); ++i)
        fs::copy_file(logs[i], dir + "/logs/2026061" + std::to_string(4 + i) + "T080000Z.sglog");
    // The config in force: the demo config with its plan files beside it.
    for (const char* f : {"survey.toml", "plan_area.geojson", "plan_lines.geojson"})
        fs::copy_file(kSrc + "/replay_logs/demo/" + f, dir + "/" + f);
    return dir;
}

TEST(SiteCli, EveryOrderOfTheLogsGivesTheSameRaster) {
    const auto& d = demoLogs();
    ASSERT_TRUE(d.error.empty()) << d.error;
    std::vector<std::string> order = d.logs;
    std::sort(order.begin(), order.end());
    std::string hash;
    int n = 0;
    do {
        Result raw;
        const auto j = gapsJson(order[0] + " " + order[1] + " " + order[2], &raw);
        ASSERT_FALSE(j.is_null()) << raw.out << raw.err;
        if (hash.empty()) hash = j["raster_hash"];
        EXPECT_EQ(j["raster_hash"], hash);
        ASSERT_TRUE(j.contains("site"));
        EXPECT_EQ(j["site"]["sessions"].size(), 3U);
        ++n;
    } while (std::next_permutation(order.begin(), order.end()));
    EXPECT_EQ(n, 6);
    // The join is more than any one log: each log alone has another hash and less coverage.
    const auto one = gapsJson(d.logs[0]);
    ASSERT_FALSE(one.is_null());
    EXPECT_NE(one["raster_hash"], hash);
    const auto all = gapsJson(d.logs[0] + " " + d.logs[1] + " " + d.logs[2]);
    EXPECT_GE(all["coverage_pct"].get<double>(), one["coverage_pct"].get<double>());
    // Runs are numbered across the site, each with its session.
    int max_session = 0;
    for (const auto& r : all["runs"]) max_session = std::max(max_session, r["session"].get<int>());
    EXPECT_EQ(max_session, 2);
    std::size_t runs = 0;
    for (const auto& log : d.logs) runs += gapsJson(log)["runs"].size();
    EXPECT_EQ(all["runs"].size(), runs);
}

TEST(SiteCli, OneLogAsASiteEqualsItsReplay) {
    // The summary of a log (its raster through the bytes of the .sgsum) gives the coverage of a
    // plain replay of that log: the site path and the replay path agree.
    const auto& d = demoLogs();
    ASSERT_TRUE(d.error.empty()) << d.error;
    const auto site = makeSite("one", {d.logs[0]});
    const auto replayed = gapsJson(d.logs[0]);
    Result raw;
    const auto as_site = gapsJson(site, &raw);
    ASSERT_FALSE(as_site.is_null()) << raw.err;
    EXPECT_EQ(as_site["raster_hash"], replayed["raster_hash"]);
    EXPECT_DOUBLE_EQ(as_site["coverage_pct"].get<double>(), replayed["coverage_pct"].get<double>());
    EXPECT_EQ(as_site["gap_count"], replayed["gap_count"]);
    EXPECT_EQ(as_site["infill"]["lines"].size(), replayed["infill"]["lines"].size());
    EXPECT_EQ(as_site["runs"].size(), replayed["runs"].size());
}

TEST(SiteCli, SummariesAreReusedAndRebuiltWhenStale) {
    const auto& d = demoLogs();
    ASSERT_TRUE(d.error.empty()) << d.error;
    const auto site = makeSite("stale", {d.logs[0], d.logs[1]});
    Result first;
    const auto j1 = gapsJson(site, &first);
    ASSERT_FALSE(j1.is_null()) << first.err;
    EXPECT_NE(first.err.find("summarising 2 of 2"), std::string::npos) << first.err;
    EXPECT_TRUE(fs::exists(site + "/logs/20260614T080000Z.sgsum"));
    // Second opening: nothing replayed, same answer.
    Result second;
    const auto j2 = gapsJson(site, &second);
    EXPECT_EQ(second.err.find("summarising"), std::string::npos) << second.err;
    EXPECT_EQ(j2["raster_hash"], j1["raster_hash"]);
    // A copied site (new modification time, same bytes) is not replayed either.
    fs::last_write_time(site + "/logs/20260614T080000Z.sglog",
                        fs::last_write_time(site + "/logs/20260614T080000Z.sglog") + std::chrono::hours(1));
    Result touched;
    gapsJson(site, &touched);
    EXPECT_EQ(touched.err.find("summarising"), std::string::npos) << touched.err;
    // The config in force changes a site-wide key: every log is recomputed, and the message says
    // which log and which key.
    {
        std::ifstream in(site + "/survey.toml");
        std::stringstream ss;
        ss << in.rdbuf();
        std::string text = ss.str();
        const auto at = text.find("min_anomaly_nT = 1.0");
        ASSERT_NE(at, std::string::npos);
        text.replace(at, 20, "min_anomaly_nT = 3.0");
        std::ofstream(site + "/survey.toml") << text;
    }
    Result changed;
    const auto j3 = gapsJson(site, &changed);
    ASSERT_FALSE(j3.is_null()) << changed.err;
    EXPECT_NE(changed.err.find("summarising 2 of 2"), std::string::npos) << changed.err;
    EXPECT_NE(changed.err.find("20260614T080000Z.sglog: recorded with another [detection] min_anomaly_nT"), std::string::npos)
        << changed.err;
    // A higher minimum anomaly covers less.
    EXPECT_LT(j3["coverage_pct"].get<double>(), j1["coverage_pct"].get<double>());
    EXPECT_TRUE(j3["site"]["sessions"][0]["recomputed"].get<bool>());
}

TEST(SiteCli, DamagedAndEmptyLogsAreSkippedByName) {
    const auto& d = demoLogs();
    ASSERT_TRUE(d.error.empty()) << d.error;
    const auto good = makeSite("good", {d.logs[0], d.logs[1]});
    const auto j_good = gapsJson(good);
    ASSERT_FALSE(j_good.is_null());
    const auto site = makeSite("damaged", {d.logs[0], d.logs[1]});
    // Truncated: half the file of the third log.
    {
        std::ifstream in(d.logs[2], std::ios::binary);
        std::string bytes((std::istreambuf_iterator<char>(in)), std::istreambuf_iterator<char>());
        std::ofstream(site + "/logs/20260620T080000Z.sglog", std::ios::binary).write(bytes.data(),
                                                                                     static_cast<std::streamsize>(bytes.size() / 2));
    }
    // Not SQLite at all.
    std::ofstream(site + "/logs/20260621T080000Z.sglog") << "this is not a survey log\n";
    // Empty: a real log with every raw line removed (the sqlite3 shell as the outside tool).
    fs::copy_file(d.logs[2], site + "/logs/20260622T080000Z.sglog");
    ASSERT_EQ(run("sqlite3 " + site + "/logs/20260622T080000Z.sglog 'DELETE FROM fixes; DELETE FROM headings; DELETE FROM "
                  "depths; DELETE FROM mag_samples; DELETE FROM aux; DELETE FROM raw_lines;'").rc, 0);
    Result r;
    const auto j = gapsJson(site, &r);
    ASSERT_FALSE(j.is_null()) << r.err;
    EXPECT_NE(r.err.find("20260620T080000Z.sglog: skipped"), std::string::npos) << r.err;
    EXPECT_NE(r.err.find("20260621T080000Z.sglog: skipped"), std::string::npos) << r.err;
    EXPECT_NE(r.err.find("20260622T080000Z.sglog: skipped: empty log"), std::string::npos) << r.err;
    // The good logs still count, exactly as without the bad ones.
    EXPECT_EQ(j["raster_hash"], j_good["raster_hash"]);
    EXPECT_EQ(j["site"]["sessions"].size(), 2U);
    // Nothing was written into any log: the truncated one is byte-for-byte what was put there.
    EXPECT_EQ(fs::file_size(site + "/logs/20260621T080000Z.sglog"), 25U);
}

TEST(SiteCli, LogsOfAnotherCrsAreRefusedWithoutAConfigInForce) {
    const auto& d = demoLogs();
    ASSERT_TRUE(d.error.empty()) << d.error;
    const auto dir = demoLogs().dir + "/crs";
    fs::remove_all(dir);
    fs::create_directories(dir);
    const auto other = dir + "/other.sglog";
    fs::copy_file(d.logs[1], other);
    // The same log, recorded (as its stored config says) in a fixed CRS: ETRS89 / UTM 31N.
    ASSERT_EQ(run("sqlite3 " + other + " \"UPDATE meta SET value = replace(value, '[survey]', '[survey]' || char(10) || "
                  "'epsg = 25831') WHERE key = 'config_text'\"").rc, 0);
    Result r;
    const auto j = gapsJson(d.logs[0] + " " + other, &r);
    EXPECT_TRUE(j.is_null());
    EXPECT_NE(r.rc, 0);
    EXPECT_NE(r.err.find("[survey] epsg"), std::string::npos) << r.err;
    EXPECT_NE(r.err.find("other.sglog"), std::string::npos) << r.err;
    // With a config in force both are computed under it (the one CRS of the site).
    Result forced;
    const auto jf = gapsJson(d.logs[0] + " " + other + " --config " + kSrc + "/replay_logs/demo/survey.toml", &forced);
    ASSERT_FALSE(jf.is_null()) << forced.err;
    EXPECT_NE(forced.err.find("other.sglog: recorded with another [survey] epsg"), std::string::npos) << forced.err;
}

TEST(SiteCli, ReplayOfASiteJoinsTheEarlierLogsFirst) {
    const auto& d = demoLogs();
    ASSERT_TRUE(d.error.empty()) << d.error;
    const auto site = makeSite("replay", {d.logs[0], d.logs[1]});
    const auto j = gapsJson(site);
    ASSERT_FALSE(j.is_null());
    const auto r = run(kBin + " replay " + site + " --headless");
    ASSERT_EQ(r.rc, 0) << r.out << r.err;
    EXPECT_NE(r.out.find("1 earlier log(s) joined"), std::string::npos) << r.out;
    // The replay of the newest log on top of the earlier one ends on the site's raster.
    EXPECT_NE(r.out.find("raster hash " + j["raster_hash"].get<std::string>()), std::string::npos) << r.out;
}

}  // namespace
