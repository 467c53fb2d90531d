// Setup validation: the silent setup mistakes become errors naming the key (the real `swathguard`
// binary: check, import, gaps, record), live alarms within seconds (the core, fed line by line),
// the zone plausibility at the first fix, and `demo` from any folder.
//
// The data is a small single-sensor survey generated here (invented: three straight 200 m lines
// 8 m apart at 2 m/s off an invented coast; GGA + RMC at 1 Hz, magnetometer strings at 10 Hz in a
// layout of our own). Its detection model is the mass rule only (common practice: 1 short ton of
// steel gives about 1 nT at 100 ft), so it needs no [geomagnetic] table. With that model a 500 kg
// target is seen to about 25 m slant range, far wider than the 8 m line spacing: a right setup
// covers most of the area, a wrong one covers nothing.
#include <sys/wait.h>

#include <array>
#include <cmath>
#include <cstdio>
#include <filesystem>
#include <fstream>
#include <memory>
#include <random>
#include <sstream>
#include <string>
#include <vector>

#include <gtest/gtest.h>
#include <nlohmann/json.hpp>

#include "decode/nmea.hpp"
#include "engine/pipeline.hpp"
#include "engine/setup_check.hpp"
#include "engine/survey_config.hpp"
#include "engine/survey_summary.hpp"

namespace {

namespace fs = std::filesystem;
using sg::ReceivedLine;
using sg::TimeNs;

constexpr double kLat0 = 53.4750, kLon0 = 3.1250;  // invented site (UTM zone 31N)
constexpr double kMetresPerDegLat = 111320.0;       // spherical approximation; the truth of the
                                                    // positions does not matter here
constexpr TimeNs kT0 = 1780390800LL * sg::kNsPerSecond;  // 2026-06-02 09:00:00 UTC

struct TempDir {
    fs::path path;
    TempDir() {
        std::random_device rd;
        path = fs::temp_directory_path() / ("sgsetup-" + std::to_string(rd()) + std::to_string(rd()));
        fs::create_directories(path);
    }
    ~TempDir() {
        std::error_code ec;
        fs::remove_all(path, ec);
    }
    std::string file(const std::string& name) const { return (path / name).string(); }
};

void write(const std::string& path, const std::string& text) {
    std::ofstream f(path, std::ios::binary);
    f << text;
}

// Runs a shell command; returns its exit code, stdout and stderr apart.
struct RunResult {
    int rc = -1;
    std::string out, err;
};
RunResult run(const std::string& cmd, const TempDir& tmp) {
    const auto err_file = tmp.file("stderr.txt");
    RunResult r;
    std::unique_ptr<FILE, int (*)(FILE*)> p(popen((cmd + " 2>" + err_file).c_str(), "r"), pclose);
    if (!p) return r;
    std::array<char, 4096> buf{};
    while (fgets(buf.data(), static_cast<int>(buf.size()), p.get()) != nullptr) r.out += buf.data();
    const int status = pclose(p.release());
    r.rc = WIFEXITED(status) ? WEXITSTATUS(status) : -1;
    std::ifstream e(err_file);
    std::stringstream ss;
    ss << e.rdbuf();
    r.err = ss.str();
    return r;
}

std::string bin() { return std::string(SG_BINARY_DIR) + "/app/swathguard"; }

// "hhmmss.sss" of a UTC time.
std::string hhmmss(TimeNs t, int decimals) {
    const double tod = std::fmod(sg::toSeconds(t), 86400.0);
    const int h = static_cast<int>(tod / 3600), m = static_cast<int>((tod - h * 3600) / 60);
    char b[32];
    std::snprintf(b, sizeof b, "%02d%02d%0*.*f", h, m, decimals + 3, decimals, tod - h * 3600 - m * 60);
    return b;
}

struct LonLat {
    double lon, lat;
};
LonLat toLonLat(double e_m, double n_m) {
    return {kLon0 + e_m / (kMetresPerDegLat * std::cos(kLat0 * M_PI / 180.0)), kLat0 + n_m / kMetresPerDegLat};
}

// The generated survey: captures as text and as received lines (receive time = instrument time).
struct Survey {
    int sensor_index = 0;     // index carried by the magnetometer strings
    bool depth_field = true;  // the strings carry the fish depth
    double cable_until_s = -1.0;  // >= 0: a winch input sends cable out once a second until then
    std::string gnss, mag;
    std::vector<ReceivedLine> lines;  // merged by time

    void generate() {
        // Track: three lines north/south at e = 0, 8, 16 m from n = -30 to 230 m, joined by 8 m legs.
        std::vector<std::pair<double, double>> pts = {{0, -30}, {0, 230}, {8, 230}, {8, -30}, {16, -30}, {16, 230}};
        std::vector<double> cum{0.0};
        for (std::size_t i = 1; i < pts.size(); ++i)
            cum.push_back(cum.back() + std::hypot(pts[i].first - pts[i - 1].first, pts[i].second - pts[i - 1].second));
        const double speed = 2.0;
        const auto at = [&](double s, double& e, double& n, double& cog) {
            std::size_t i = 1;
            while (i + 1 < pts.size() && cum[i] < s) ++i;
            const double f = std::clamp((s - cum[i - 1]) / (cum[i] - cum[i - 1]), 0.0, 1.0);
            const double de = pts[i].first - pts[i - 1].first, dn = pts[i].second - pts[i - 1].second;
            e = pts[i - 1].first + f * de;
            n = pts[i - 1].second + f * dn;
            cog = std::fmod(std::atan2(de, dn) * 180.0 / M_PI + 360.0, 360.0);
        };
        const double duration_s = cum.back() / speed;
        std::mt19937 rng(7);
        std::normal_distribution<double> noise(0.0, 0.02);
        std::ostringstream g, m;
        const auto add = [this](const char* src, TimeNs t, const std::string& bytes) {
            ReceivedLine l;
            l.source = src;
            l.mono_ns = t - kT0;
            l.utc_ns = t;
            l.bytes = bytes;
            lines.push_back(std::move(l));
        };
        for (int k = 0; k * 0.1 <= duration_s; ++k) {
            const TimeNs t = kT0 + static_cast<TimeNs>(k) * 100'000'000LL;
            double e = 0, n = 0, cog = 0;
            at(speed * k * 0.1, e, n, cog);
            if (k % 10 == 0) {
                const auto ll = toLonLat(e, n);
                const double lat_min = (ll.lat - 53.0) * 60.0, lon_min = (ll.lon - 3.0) * 60.0;
                char body[200];
                std::snprintf(body, sizeof body, "GPRMC,%s,A,53%07.4f,N,003%07.4f,E,%.2f,%.1f,020626,,,A",
                              hhmmss(t, 2).c_str(), lat_min, lon_min, speed / 0.514444, cog);
                const auto rmc = sg::decode::nmeaWithChecksum(body);
                std::snprintf(body, sizeof body, "GPGGA,%s,53%07.4f,N,003%07.4f,E,4,12,0.7,2.0,M,45.0,M,,",
                              hhmmss(t, 2).c_str(), lat_min, lon_min);
                const auto gga = sg::decode::nmeaWithChecksum(body);
                g << rmc << "\r\n" << gga << "\r\n";
                add("gnss", t, rmc);
                add("gnss", t, gga);
            }
            if (cable_until_s >= 0.0 && k % 10 == 5 && k * 0.1 <= cable_until_s) {
                char cb[80];
                std::snprintf(cb, sizeof cb, "CB,%s,12.0", hhmmss(t, 3).c_str());
                add("winch", t, cb);
            }
            char line[160];
            if (depth_field)
                std::snprintf(line, sizeof line, "TM,%d,%s,%.3f,3.00,4.00", sensor_index, hhmmss(t, 3).c_str(),
                              50000.0 + noise(rng));
            else
                std::snprintf(line, sizeof line, "TM,%d,%s,%.3f,3.00", sensor_index, hhmmss(t, 3).c_str(),
                              50000.0 + noise(rng));
            m << line << "\r\n";
            add("mag", t, line);
        }
        gnss = g.str();
        mag = m.str();
    }
};

// Plan files of the generated survey: the area e -8..24, n 0..200 and the three lines.
void writePlan(const TempDir& d) {
    const auto pos = [](double e, double n) {
        const auto ll = toLonLat(e, n);
        return nlohmann::json::array({ll.lon, ll.lat});
    };
    nlohmann::json area = {{"type", "Feature"},
                           {"properties", nlohmann::json::object()},
                           {"geometry",
                            {{"type", "Polygon"},
                             {"coordinates", {{pos(-8, 0), pos(24, 0), pos(24, 200), pos(-8, 200), pos(-8, 0)}}}}}};
    write(d.file("area.geojson"), nlohmann::json({{"type", "FeatureCollection"}, {"features", {area}}}).dump());
    nlohmann::json lines = nlohmann::json::array();
    for (int i = 0; i < 3; ++i)
        lines.push_back({{"type", "Feature"},
                         {"properties", {{"name", "L" + std::to_string(i + 1)}}},
                         {"geometry", {{"type", "LineString"}, {"coordinates", {pos(8.0 * i, 0), pos(8.0 * i, 200)}}}}});
    write(d.file("lines.geojson"), nlohmann::json({{"type", "FeatureCollection"}, {"features", lines}}).dump());
}

struct ConfigSpec {
    bool cable = true;          // [tow] cable_out_m
    bool depth = false;         // [tow] sensor_depth_m (the strings carry it by default)
    bool depth_in_map = true;   // depth_m in the field map
    std::string sensors = "[[sensor]]\nindex = 0\n";
    std::string tow_extra;      // more [tow] keys
    std::string survey_extra;   // more [survey] keys
    std::string plan = "[plan]\narea = \"area.geojson\"\nlines = \"lines.geojson\"\nline_spacing_m = 8.0\n"
                       "planned_altitude_m = 3.0\n";
    std::string extra;
    bool file_inputs = false;   // transport = "file" (for record)
};

std::string config(const ConfigSpec& c) {
    std::string t = "[survey]\nname = \"generated\"\n" + c.survey_extra + "\n";
    t += "[[input]]\nname = \"gnss\"\nkind = \"nmea\"\nrole = \"gnss\"\nclock = \"instrument\"\n";
    if (c.file_inputs) t += "transport = \"file\"\npath = \"gnss.txt\"\n";
    t += "[[input]]\nname = \"mag\"\nkind = \"fieldmap\"\nfieldmap = \"tm\"\nrole = \"mag\"\nclock = \"instrument\"\n";
    if (c.file_inputs) t += "transport = \"file\"\npath = \"mag.txt\"\n";
    t += "[fieldmap.tm]\nstart = \"TM\"\ndelimiter = \",\"\ntime = 2\ntime_format = \"hhmmss.sss\"\nsensor = 1\n"
         "field_nT = 3\naltitude_m = 4\n";
    if (c.depth_in_map) t += "depth_m = 5\n";
    t += "[vessel]\nantenna_m = [0.0, 0.0, 2.0]\ntow_point_m = [-2.0, 0.0, 1.0]\n";
    t += "[tow]\n";
    if (c.cable) t += "cable_out_m = 12.0\n";
    if (c.depth) t += "sensor_depth_m = 4.0\n";
    t += c.tow_extra + "\n";
    t += c.sensors + "\n";
    t += "[detection]\nk = 3.0\nmin_anomaly_nT = 1.0\n";
    t += "[[target]]\nname = \"anchor 500 kg\"\nmodel = \"mass_rule\"\nmass_kg = 500.0\nburial_m = 0.5\n";
    t += c.plan + "\n" + c.extra;
    return t;
}

// A folder with the plan, the captures and one config.
struct SurveyFolder {
    TempDir dir;
    Survey survey;
    std::string cfg, gnss, mag;
    explicit SurveyFolder(const ConfigSpec& spec, Survey s = {}) : survey(std::move(s)) {
        survey.generate();
        writePlan(dir);
        cfg = dir.file("survey.toml");
        gnss = dir.file("gnss.txt");
        mag = dir.file("mag.txt");
        write(cfg, config(spec));
        write(gnss, survey.gnss);
        write(mag, survey.mag);
    }
    std::string inputs() const { return " --input gnss=" + gnss + " --input mag=" + mag; }
    RunResult check() const { return run(bin() + " check --config " + cfg + inputs(), dir); }
    RunResult import(const std::string& log) const {
        return run(bin() + " import --config " + cfg + inputs() + " --log " + log, dir);
    }
};

double coverageOf(const std::string& gaps_json) {
    return nlohmann::json::parse(gaps_json).at("coverage_pct").get<double>();
}

// --- the right setup ---------------------------------------------------------------------------

// A mass-rule-only survey needs no [geomagnetic]: check, import and gaps all succeed and the
// generated lines cover most of the area. (Also: [[input]] tables without transport/path, which
// import does not need.)
TEST(SetupCheck, MassRuleOnlySurveyNeedsNoGeomagneticAndCovers) {
    SurveyFolder s(ConfigSpec{});
    const auto c = s.check();
    EXPECT_EQ(c.rc, 0) << c.out << c.err;
    // Imported with a relative --config from the survey's folder; gaps run from another folder
    // still finds the plan files (the log keeps the config's absolute path).
    const auto log = s.dir.file("ok.sglog");
    const auto i = run("cd " + s.dir.path.string() + " && " + bin() +
                           " import --config survey.toml --input gnss=gnss.txt --input mag=mag.txt --log ok.sglog",
                       s.dir);
    ASSERT_EQ(i.rc, 0) << i.out << i.err;
    TempDir elsewhere;
    const auto g = run("cd " + elsewhere.path.string() + " && " + bin() + " gaps " + log + " --json", s.dir);
    ASSERT_EQ(g.rc, 0) << g.err;
    EXPECT_GT(coverageOf(g.out), 50.0) << g.out;
}

// --- the three silent cases: non-zero exit, a message naming the key, no log left ---------------

// The strings carry sensor index 1; no [[sensor]] table, so index 0 is assumed.
TEST(SetupCheck, SensorIndexWithNoSensorTableIsAnErrorNamingTheKey) {
    ConfigSpec spec;
    spec.sensors = "";
    Survey sv;
    sv.sensor_index = 1;
    SurveyFolder s(spec, sv);
    const auto c = s.check();
    EXPECT_EQ(c.rc, 4) << c.out << c.err;
    EXPECT_NE(c.err.find("[[sensor]] index"), std::string::npos) << c.err;
    EXPECT_NE(c.err.find("sensor index 1"), std::string::npos) << c.err;
    const auto log = s.dir.file("bad.sglog");
    const auto i = s.import(log);
    EXPECT_EQ(i.rc, 4) << i.out << i.err;
    EXPECT_NE(i.err.find("[[sensor]] index"), std::string::npos) << i.err;
    EXPECT_FALSE(fs::exists(log));
}

TEST(SetupCheck, MissingCableOutIsAnErrorNamingTheKey) {
    ConfigSpec spec;
    spec.cable = false;
    SurveyFolder s(spec);
    const auto c = s.check();
    EXPECT_EQ(c.rc, 4) << c.out << c.err;
    EXPECT_NE(c.err.find("[tow] cable_out_m"), std::string::npos) << c.err;
    const auto log = s.dir.file("bad.sglog");
    const auto i = s.import(log);
    EXPECT_EQ(i.rc, 4) << i.err;
    EXPECT_NE(i.err.find("[tow] cable_out_m"), std::string::npos) << i.err;
    EXPECT_FALSE(fs::exists(log));
}

TEST(SetupCheck, MissingSensorDepthIsAnErrorNamingTheKey) {
    ConfigSpec spec;
    spec.depth_in_map = false;
    Survey sv;
    sv.depth_field = false;
    SurveyFolder s(spec, sv);
    const auto c = s.check();
    EXPECT_EQ(c.rc, 4) << c.out << c.err;
    EXPECT_NE(c.err.find("[tow] sensor_depth_m"), std::string::npos) << c.err;
    const auto log = s.dir.file("bad.sglog");
    const auto i = s.import(log);
    EXPECT_EQ(i.rc, 4) << i.err;
    EXPECT_NE(i.err.find("[tow] sensor_depth_m"), std::string::npos) << i.err;
    EXPECT_FALSE(fs::exists(log));
}

// The explicit "sensor at the antenna" needs neither cable nor depth, and covers.
TEST(SetupCheck, SensorAtTheAntennaNeedsNoCableNorDepth) {
    ConfigSpec spec;
    spec.cable = false;
    spec.depth_in_map = false;
    spec.tow_extra = "sensor_at_antenna = true\n";
    Survey sv;
    sv.depth_field = false;
    SurveyFolder s(spec, sv);
    // [vessel] tow_point_m contradicts it: refused, naming the key.
    const auto c = s.check();
    EXPECT_EQ(c.rc, 4) << c.err;
    EXPECT_NE(c.err.find("tow_point_m"), std::string::npos) << c.err;
    auto text = config(spec);
    text.replace(text.find("tow_point_m"), text.find('\n', text.find("tow_point_m")) - text.find("tow_point_m"), "");
    write(s.cfg, text);
    const auto c2 = s.check();
    EXPECT_EQ(c2.rc, 0) << c2.err;
    const auto log = s.dir.file("antenna.sglog");
    ASSERT_EQ(s.import(log).rc, 0);
    const auto g = run(bin() + " gaps " + log + " --json", s.dir);
    ASSERT_EQ(g.rc, 0) << g.err;
    EXPECT_GT(coverageOf(g.out), 50.0);
}

// --- a run that covers nothing ends non-zero, with the counts and the likely mistake ------------

// A log made with a right setup, replayed with a config whose noise limit no sample meets: the
// config and the first seconds pass the checks, but nothing is covered. gaps says so (exit 5),
// with the counts by reason, and the gaps' cause does not say "not run over".
TEST(SetupCheck, GapsThatCoverNothingEndNonZeroWithTheReasons) {
    SurveyFolder s(ConfigSpec{});
    const auto log = s.dir.file("ok.sglog");
    ASSERT_EQ(s.import(log).rc, 0);
    ConfigSpec noisy;
    noisy.extra = "[checks.noise]\nwarn = 0.0001\nalarm = 0.0001\n";
    const auto cfg2 = s.dir.file("noisy.toml");
    write(cfg2, config(noisy));
    const auto g = run(bin() + " gaps " + log + " --json --config " + cfg2, s.dir);
    EXPECT_EQ(g.rc, 5) << g.err;
    EXPECT_NE(g.err.find("nothing was covered"), std::string::npos) << g.err;
    EXPECT_NE(g.err.find("noisy"), std::string::npos) << g.err;
    const auto j = nlohmann::json::parse(g.out);
    EXPECT_EQ(j.at("coverage_pct").get<double>(), 0.0);
    ASSERT_FALSE(j.at("gaps").empty());
    for (const auto& gap : j.at("gaps")) {  // run over, with the noise alarm: said so
        const auto text = gap.at("cause").at("text").get<std::string>();
        EXPECT_EQ(text.find("not run over"), std::string::npos) << text;
        EXPECT_NE(text.find("noise"), std::string::npos) << text;
    }
    // The same log with a config whose sensor index misses the strings: refused at the start.
    ConfigSpec wrong;
    wrong.sensors = "[[sensor]]\nindex = 3\n";
    write(cfg2, config(wrong));
    const auto g2 = run(bin() + " gaps " + log + " --config " + cfg2, s.dir);
    EXPECT_EQ(g2.rc, 4) << g2.err;
    EXPECT_NE(g2.err.find("sensor index 0"), std::string::npos) << g2.err;
}

// --- all config checks before acquisition; no log left behind ----------------------------------

TEST(SetupCheck, RecordWithABadPlanAndNoEpsgFailsBeforeAcquiringAndLeavesNoLog) {
    struct Case {
        const char* what;
        std::string plan;
        const char* key;
    };
    const std::vector<Case> cases = {
        {"misspelt key",
         "[plan]\narea = \"area.geojson\"\nlines = \"lines.geojson\"\nline_spacing = 8.0\nplanned_altitude_m = 3.0\n",
         "line_spacing"},
        {"negative altitude",
         "[plan]\narea = \"area.geojson\"\nline_spacing_m = 8.0\nplanned_altitude_m = -3.0\n",
         "planned_altitude_m"},
        {"missing area file",
         "[plan]\narea = \"nowhere.geojson\"\nline_spacing_m = 8.0\nplanned_altitude_m = 3.0\n",
         "nowhere.geojson"},
    };
    for (const auto& c : cases) {
        ConfigSpec spec;
        spec.plan = c.plan;
        spec.file_inputs = true;
        SurveyFolder s(spec);
        const auto log = s.dir.file("rec.sglog");
        const auto r = run(bin() + " record --config " + s.cfg + " --log " + log + " --duration 20", s.dir);
        EXPECT_EQ(r.rc, 4) << c.what << ": " << r.out << r.err;
        EXPECT_NE(r.err.find(c.key), std::string::npos) << c.what << ": " << r.err;
        EXPECT_EQ(r.out.find(c.key), std::string::npos) << c.what << ": errors go to stderr";
        EXPECT_FALSE(fs::exists(log)) << c.what;
    }
}

// A CRS error names the file and the key, and leaves no log.
TEST(SetupCheck, RecordWithAWrongEpsgNamesFileAndKey) {
    ConfigSpec spec;
    spec.survey_extra = "epsg = 4326\n";  // geographic, not projected
    spec.file_inputs = true;
    SurveyFolder s(spec);
    const auto log = s.dir.file("rec.sglog");
    const auto r = run(bin() + " record --config " + s.cfg + " --log " + log, s.dir);
    EXPECT_EQ(r.rc, 4) << r.err;
    EXPECT_NE(r.err.find(s.cfg), std::string::npos) << r.err;
    EXPECT_NE(r.err.find("[survey] epsg"), std::string::npos) << r.err;
    EXPECT_FALSE(fs::exists(log));
}

// A UTM zone far from the data: the plan is refused before a run, and the data at the first fix.
TEST(SetupCheck, UtmZoneFarFromTheDataIsRefused) {
    ConfigSpec spec;
    spec.survey_extra = "epsg = 32610\n";  // WGS 84 / UTM zone 10N (123 W); the data is at 3 E
    SurveyFolder s(spec);
    const auto c = s.check();
    EXPECT_EQ(c.rc, 4) << c.err;
    EXPECT_NE(c.err.find("[survey] epsg"), std::string::npos) << c.err;
    EXPECT_NE(c.err.find("area of use"), std::string::npos) << c.err;

    // The core, with no plan (so the plan does not stop it first): the first fix is refused with
    // an alarm, and nothing is covered.
    ConfigSpec no_plan = spec;
    no_plan.plan = "";
    const auto cfg = sg::engine::parseSurveyConfig(config(no_plan), "survey.toml", s.dir.path.string(), sg::config::InputUse::Offline);
    std::int64_t id = 1;
    sg::engine::Pipeline p(cfg, [&id] { return id++; });
    for (const auto& l : s.survey.lines) p.feed(l);
    const auto& eng = p.engine();
    EXPECT_NE(eng.crsProblem().find("area of use of EPSG:32610"), std::string::npos) << eng.crsProblem();
    bool alarm = false;
    for (const auto& ep : eng.checks().episodes())
        alarm = alarm || (ep.check == "crs_area" && ep.peak_level == sg::checks::Level::kAlarm);
    EXPECT_TRUE(alarm);
    EXPECT_GT(eng.invalidCounts().pose_no_fix, 0u);
}

// --- live: the same conditions raise an alarm within seconds ------------------------------------

// First episode of `check` (nullptr if none).
const sg::checks::Episode* firstEpisode(const sg::engine::SurveyEngine& eng, const std::string& check) {
    for (const auto& ep : eng.checks().episodes())
        if (ep.check == check) return &ep;
    return nullptr;
}

TEST(SetupCheck, LiveAlarmForASensorIndexWithNoSensor) {
    ConfigSpec spec;
    spec.sensors = "";
    Survey sv;
    sv.sensor_index = 1;
    sv.generate();
    TempDir d;
    writePlan(d);
    const auto cfg = sg::engine::parseSurveyConfig(config(spec), d.file("survey.toml"), d.path.string(), sg::config::InputUse::Offline);
    std::int64_t id = 1;
    sg::engine::Pipeline p(cfg, [&id] { return id++; });
    for (const auto& l : sv.lines) p.feed(l);
    const auto* ep = firstEpisode(p.engine(), "unknown_sensor");
    ASSERT_NE(ep, nullptr);
    EXPECT_EQ(ep->peak_level, sg::checks::Level::kAlarm);
    EXPECT_LE(sg::toSeconds(ep->start_ns - kT0), 3.0);  // hold 1 s after the first string
    EXPECT_NE(ep->detail.find("magnetometer sensor 1 has no configured offsets"), std::string::npos) << ep->detail;
    // Logged as an event with that text.
    const auto batch = p.takeBatch();
    bool logged = false;
    for (const auto& e : batch.events)
        logged = logged || (e.kind == "alarm.unknown_sensor" && e.detail.find("sensor 1") != std::string::npos);
    EXPECT_TRUE(logged);
}

TEST(SetupCheck, LiveAlarmForAMissingCableOut) {
    ConfigSpec spec;
    spec.cable = false;
    Survey sv;
    sv.generate();
    TempDir d;
    writePlan(d);
    const auto cfg = sg::engine::parseSurveyConfig(config(spec), d.file("survey.toml"), d.path.string(), sg::config::InputUse::Offline);
    std::int64_t id = 1;
    sg::engine::Pipeline p(cfg, [&id] { return id++; });
    for (const auto& l : sv.lines) p.feed(l);
    const auto* ep = firstEpisode(p.engine(), "pose_inputs");
    ASSERT_NE(ep, nullptr);
    EXPECT_EQ(ep->peak_level, sg::checks::Level::kAlarm);
    EXPECT_LE(sg::toSeconds(ep->start_ns - kT0), 5.0);
    EXPECT_NE(ep->detail.find("no cable out"), std::string::npos) << ep->detail;
    // No sample could be placed, so no line run exists; but the vessel went over the area: the
    // gaps' cause says the ground was run over with a setup problem, not "not run over".
    auto summary = sg::engine::summarise(p.engine(), p.linesFed());
    EXPECT_EQ(summary.raster_covered_cells, 0u);
    EXPECT_GT(summary.invalid.pose_no_cable_out, 0u);
    ASSERT_FALSE(summary.gap_causes.empty());
    for (const auto& gc : summary.gap_causes) {
        EXPECT_EQ(gc.text.find("not run over"), std::string::npos) << gc.text;
        EXPECT_NE(gc.text.find("vessel passed"), std::string::npos) << gc.text;
        EXPECT_NE(gc.text.find("no cable out"), std::string::npos) << gc.text;
    }
    const auto problem = sg::engine::nothingCoveredProblem(summary, p.engine());
    ASSERT_TRUE(problem.has_value());
    EXPECT_NE(problem->find("[tow] cable_out_m"), std::string::npos) << *problem;
    // The right setup raises neither alarm.
    const auto good = sg::engine::parseSurveyConfig(config(ConfigSpec{}), d.file("survey.toml"), d.path.string(), sg::config::InputUse::Offline);
    sg::engine::Pipeline q(good, [&id] { return id++; });
    for (const auto& l : sv.lines) q.feed(l);
    EXPECT_EQ(firstEpisode(q.engine(), "pose_inputs"), nullptr);
    EXPECT_EQ(firstEpisode(q.engine(), "unknown_sensor"), nullptr);
    EXPECT_EQ(firstEpisode(q.engine(), "crs_area"), nullptr);
}

TEST(SetupCheck, LiveAlarmForACableOutThatStops) {
    // Cable out from a winch input arrives once a second for the first 40 s of survey time, then
    // stops (the survey runs about 400 s). The pose may bridge [tow] cable_max_age_s = 3 s (set
    // here; default 30 s): pose_inputs raises its alarm within seconds of that, naming the input.
    ConfigSpec spec;
    spec.cable = false;
    spec.tow_extra = "cable_max_age_s = 3.0\n";
    spec.extra = "[[input]]\nname = \"winch\"\nkind = \"fieldmap\"\nfieldmap = \"cb\"\nrole = \"cable\"\n"
                 "clock = \"instrument\"\n[fieldmap.cb]\nstart = \"CB\"\ndelimiter = \",\"\ntime = 1\n"
                 "time_format = \"hhmmss.sss\"\ncable_out_m = 2\n";
    Survey sv;
    sv.cable_until_s = 40.0;
    sv.generate();
    TempDir d;
    writePlan(d);
    const auto cfg = sg::engine::parseSurveyConfig(config(spec), d.file("survey.toml"), d.path.string(),
                                                   sg::config::InputUse::Offline);
    std::int64_t id = 1;
    sg::engine::Pipeline p(cfg, [&id] { return id++; });
    for (const auto& l : sv.lines) p.feed(l);
    const auto* ep = firstEpisode(p.engine(), "pose_inputs");
    ASSERT_NE(ep, nullptr) << "a cable out that stops raises no alarm";
    EXPECT_EQ(ep->peak_level, sg::checks::Level::kAlarm);
    // Last value at 39.5 s; stale after 3 s; the check warns at 2 s and alarms at 3 s of it.
    const double start_s = sg::toSeconds(ep->start_ns - kT0);
    EXPECT_GE(start_s, 39.5) << "no alarm while the winch was sending";
    EXPECT_LE(start_s, 39.5 + 3.0 + 3.0 + 0.5);
    EXPECT_NE(ep->detail.find("cable out stopped arriving from input 'winch'"), std::string::npos) << ep->detail;
    EXPECT_EQ(ep->detail.find("no cable out (set"), std::string::npos) << "it did arrive: " << ep->detail;
    // Samples were placed while the cable out came, and not after.
    auto summary = sg::engine::summarise(p.engine(), p.linesFed());
    EXPECT_GT(summary.raster_covered_cells, 0u);
    EXPECT_GT(summary.invalid.pose_no_cable_out, 0u);

    // The same winch sending to the end raises no pose_inputs alarm.
    Survey all;
    all.cable_until_s = 1e9;
    all.generate();
    sg::engine::Pipeline q(cfg, [&id] { return id++; });
    for (const auto& l : all.lines) q.feed(l);
    EXPECT_EQ(firstEpisode(q.engine(), "pose_inputs"), nullptr);
    EXPECT_GT(sg::engine::summarise(q.engine(), q.linesFed()).raster_covered_cells,
              summary.raster_covered_cells);
}

// --- demo from any folder ----------------------------------------------------------------------

TEST(SetupCheck, DemoRunsFromAnotherFolder) {
    TempDir d;
    const auto r = run("cd " + d.path.string() + " && " + bin() + " demo --duration 240 --out out", d);
    EXPECT_EQ(r.rc, 0) << r.out << r.err;
    EXPECT_TRUE(fs::exists(d.path / "out" / "demo.sglog"));
    EXPECT_NE(r.out.find("coverage:"), std::string::npos) << r.out;
}

}  // namespace
