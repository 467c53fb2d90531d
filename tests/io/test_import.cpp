// `import`: two captures (GNSS and magnetometer) merged by instrument time give the same log
// whatever the order they are given in, the same content as the same lines recorded live,
// handle a midnight crossing, and report a capture whose clock disagrees. Captures without any
// instrument time (HDT, a field map without `time`) are placed in receive order over a timed
// capture's span; ISO 8601 strings are merged by their own time; the real binary reads inputs
// whose transport is left out, and says which path wins.
#include <gtest/gtest.h>

#include <cstdio>
#include <fstream>
#include <sstream>

#include "common/config_section.hpp"
#include "io/importer.hpp"
#include "io/log_writer.hpp"
#include "io/recorder.hpp"
#include "io_test_util.hpp"
#include "decode/nmea.hpp"
#include "engine/log_replay.hpp"
#include "log/log_reader.hpp"

namespace {

using namespace sg;

// 2026-12-01T00:00:00Z in Unix seconds; checked with GNU date:
//   date -u -d 2026-12-01T00:00:00Z +%s  ->  1796083200
constexpr TimeNs kDec1 = 1796083200LL * kNsPerSecond;
constexpr TimeNs kDay = 86400LL * kNsPerSecond;

struct Captures {
    test::TempDir dir;
    std::string gnss = dir.file("gnss.nmea");
    std::string mag = dir.file("mag.txt");
    std::vector<config::InputConfig> inputs;
    std::vector<decode::FieldMap> maps;
    toml::table table;

    Captures() {
        const std::string toml =
            "[[input]]\nname = \"gnss\"\nkind = \"nmea\"\nrole = \"gnss\"\ntransport = \"file\"\n"
            "path = \"" + gnss + "\"\n\n[[input]]\nname = \"mag\"\nkind = \"fieldmap\"\n"
            "fieldmap = \"sgm\"\nrole = \"mag\"\ntransport = \"file\"\npath = \"" + mag + "\"\n\n" +
            test::fieldMapToml();
        table = config::parseText(toml, "survey.toml");
        config::Section root(table, "survey.toml");
        inputs = config::parseInputs(root);
        maps = decode::parseFieldMaps(root);
    }
    // GNSS at 1 Hz (GGA + RMC) from t0 for n s; magnetometer at 2 Hz from t0 + 0.25 + shift.
    // Times of day wrap at midnight; the RMC date follows (ddmmyy of day0 / day0+1).
    void write(double t0_tod, int n, double mag_shift_s = 0.0) {
        std::ofstream g(gnss, std::ios::binary), m(mag, std::ios::binary);
        m << "SGM,0,junk before any time\r\n";  // takes the time of the first timed line
        for (int i = 0; i < n; ++i) {
            double tod = t0_tod + i;
            const bool next_day = tod >= 86400.0;
            if (next_day) tod -= 86400.0;
            g << test::gga(tod, i * 0.01) << "\r\n"
              << test::rmc(tod, next_day ? "021226" : "011226") << "\r\n";
            if (i % 7 == 3) g << "$GPGGA,broken\r\n";  // no time: takes the previous line's
            for (int k = 0; k < 2; ++k) {
                double mt = t0_tod + i + 0.25 + 0.5 * k + mag_shift_s;
                if (mt >= 86400.0) mt -= 86400.0;
                m << test::sgm(mt, 48000.0 + i + 0.5 * k) << "\r\n";
            }
        }
    }
};

struct Row {
    std::string source, bytes, status, reason;
    TimeNs utc_ns;
    bool operator==(const Row&) const = default;
};

std::vector<Row> rows(const std::string& path, bool with_time) {
    log::LogReader r(path);
    std::vector<Row> out;
    std::int64_t id = 0;
    log::RawRow x;
    while (r.next(id, x))
        out.push_back({x.source, x.bytes, log::toString(x.status), x.reason, with_time ? x.utc_ns : 0});
    return out;
}

TEST(Import, OrderOfInputsDoesNotMatterAndTimesAreInstrumentTimes) {
    Captures s;
    s.write(36000.0, 20);
    const auto a = s.dir.file("a.sqlite"), b = s.dir.file("b.sqlite");
    auto r1 = io::importCaptures(s.inputs, s.maps, {{"gnss", s.gnss}, {"mag", s.mag}}, {}, a, "x",
                                 "survey.toml", false);
    auto r2 = io::importCaptures(s.inputs, s.maps, {{"mag", s.mag}, {"gnss", s.gnss}}, {}, b, "x",
                                 "survey.toml", false);
    ASSERT_TRUE(r1.written && r2.written);
    const auto ra = rows(a, true);
    EXPECT_EQ(ra, rows(b, true));
    ASSERT_EQ(ra.size(), 20u * 2 + 3 + 1 + 40);
    // Receive times are the instrument times, never decreasing; the junk line before any time
    // takes the first magnetometer time (10:00:00.25).
    for (std::size_t i = 1; i < ra.size(); ++i) EXPECT_GE(ra[i].utc_ns, ra[i - 1].utc_ns) << i;
    EXPECT_EQ(ra[0].bytes, test::gga(36000.0, 0.0));
    EXPECT_EQ(ra[0].utc_ns, kDec1 + 36000LL * kNsPerSecond);
    EXPECT_EQ(ra[2].bytes, "SGM,0,junk before any time");
    EXPECT_EQ(ra[2].utc_ns, kDec1 + 36000LL * kNsPerSecond + 250'000'000);
    EXPECT_EQ(ra[2].status, "rejected");
    // GGA(t), RMC(t), junk, SGM(t+.25), SGM(t+.75), GGA(t+1)...
    EXPECT_EQ(ra[3].source, "mag");
    EXPECT_EQ(ra[5].bytes, test::gga(36001.0, 0.01));
    EXPECT_EQ(test::shell("sqlite3 " + a + " 'select count(*) from mag_samples'"), "40");
    EXPECT_EQ(test::shell("sqlite3 " + a + " \"select value from meta where key='config_text'\""), "x");
}

TEST(Import, SameContentAsTheSameLinesRecordedLive) {
    Captures s;
    s.write(36000.0, 20);
    const auto imported = s.dir.file("imp.sqlite"), live = s.dir.file("live.sqlite");
    ASSERT_TRUE(io::importCaptures(s.inputs, s.maps, {{"gnss", s.gnss}, {"mag", s.mag}}, {},
                                   imported, "x", "survey.toml", false)
                    .written);
    {
        boost::asio::io_context io;
        io::LogWriter w(live, {100, false});
        io::Recorder rec(io, s.inputs, s.maps, w);  // file sources, read once
        rec.start();
        ASSERT_TRUE(test::runUntil(io, [&] { return rec.allFinished(); }));
        rec.stop();
        w.stop();
    }
    // Per source, the same bytes in the same order with the same statuses and reasons.
    auto bySource = [](const std::vector<Row>& all, const std::string& src) {
        std::vector<Row> out;
        for (const auto& r : all)
            if (r.source == src) out.push_back(r);
        return out;
    };
    const auto ri = rows(imported, false), rl = rows(live, false);
    EXPECT_EQ(bySource(ri, "gnss"), bySource(rl, "gnss"));
    EXPECT_EQ(bySource(ri, "mag"), bySource(rl, "mag"));
    // Decoded tables match too, instrument times included.
    for (const char* q : {"select lat_deg, lon_deg, time_utc_ns, sentence from fixes f join raw_lines r on r.id = f.raw_id order by r.source, f.time_utc_ns, sentence",
                          "select field_nT, time_utc_ns, sensor from mag_samples order by time_utc_ns"}) {
        const auto qi = test::shell("sqlite3 " + imported + " '" + q + "'");
        EXPECT_FALSE(qi.empty());
        EXPECT_EQ(qi, test::shell("sqlite3 " + live + " '" + q + "'")) << q;
    }
}

TEST(Import, MidnightCrossingMovesToTheNextDay) {
    Captures s;
    s.write(86400.0 - 5.0, 10);  // 23:59:55 .. 00:00:04
    const auto p = s.dir.file("m.sqlite");
    ASSERT_TRUE(io::importCaptures(s.inputs, s.maps, {{"mag", s.mag}, {"gnss", s.gnss}}, {}, p, "x",
                                   "survey.toml", false)
                    .written);
    const auto r = rows(p, true);
    for (std::size_t i = 1; i < r.size(); ++i) EXPECT_GE(r[i].utc_ns, r[i - 1].utc_ns) << i;
    EXPECT_EQ(r.front().utc_ns, kDec1 + kDay - 5 * kNsPerSecond);
    // Last magnetometer sample: 00:00:04.75 on 2 December.
    const auto last_mag = test::shell("sqlite3 " + p + " 'select max(time_utc_ns) from mag_samples'");
    EXPECT_EQ(last_mag, std::to_string(kDec1 + kDay + 4'750'000'000LL));
    const auto last = r.back();
    EXPECT_EQ(last.source, "mag");
    EXPECT_EQ(last.utc_ns, kDec1 + kDay + 4'750'000'000LL);
}

TEST(Import, ClockDisagreementIsReportedNotMerged) {
    Captures s;
    s.write(36000.0, 30, 10.0);  // magnetometer clock 10 s ahead
    const auto p = s.dir.file("d.sqlite");
    config::ImportConfig opt;
    opt.max_clock_disagreement_s = 2.0;
    auto r = io::importCaptures(s.inputs, s.maps, {{"gnss", s.gnss}, {"mag", s.mag}}, opt, p, "x",
                                "survey.toml", false);
    EXPECT_FALSE(r.written);
    EXPECT_FALSE(std::filesystem::exists(p));
    ASSERT_EQ(r.merged.problems.size(), 1u);
    EXPECT_NE(r.merged.problems[0].find("mag"), std::string::npos) << r.merged.problems[0];
    EXPECT_NEAR(r.merged.captures[1].shift_s, 10.0, 0.3);

    // Within the limit: merged silently.
    opt.max_clock_disagreement_s = 15.0;
    EXPECT_TRUE(io::mergeCaptures(s.inputs, s.maps, {{"gnss", s.gnss}, {"mag", s.mag}}, opt)
                    .problems.empty());

    // Accepted: merged, and the disagreement is an event in the log.
    opt.max_clock_disagreement_s = 2.0;
    r = io::importCaptures(s.inputs, s.maps, {{"gnss", s.gnss}, {"mag", s.mag}}, opt, p, "x",
                           "survey.toml", true);
    ASSERT_TRUE(r.written);
    log::LogReader lr(p);
    const auto ev = lr.events();
    ASSERT_EQ(ev.size(), 1u);
    EXPECT_EQ(ev[0].kind, "clock_disagreement");
    EXPECT_EQ(ev[0].source, "mag");
    EXPECT_NEAR(ev[0].value.value_or(0), 10.0, 0.3);
}

TEST(Import, CaptureThatOnlyStartsLaterDoesNotDisagree) {
    Captures s;
    s.write(36000.0, 30);
    // Drop the magnetometer's first 10 s: it started late, its clock is right.
    std::ifstream in(s.mag);
    std::string line, kept;
    int n = 0;
    while (std::getline(in, line))
        if (n++ > 20) kept += line + "\n";
    in.close();
    std::ofstream(s.mag) << kept;
    const auto m = io::mergeCaptures(s.inputs, s.maps, {{"gnss", s.gnss}, {"mag", s.mag}}, {});
    EXPECT_TRUE(m.problems.empty()) << m.problems.front();
}

TEST(Import, UnknownInputAndTimelessCaptureAreErrors) {
    Captures s;
    s.write(36000.0, 3);
    EXPECT_THROW(io::mergeCaptures(s.inputs, s.maps, {{"nope", s.gnss}}, {}), std::runtime_error);
    std::ofstream(s.mag) << "no time here\n";
    try {
        io::mergeCaptures(s.inputs, s.maps, {{"gnss", s.gnss}, {"mag", s.mag}}, {});
        FAIL();
    } catch (const std::runtime_error& e) {
        EXPECT_NE(std::string(e.what()).find(s.mag), std::string::npos) << e.what();
    }
}

// ---- Captures without instrument time ------------------------------------------------------

// GNSS at 1 Hz from 10:00:00 on 2026-12-01 for n s; a heading capture (HDT only, no time at all)
// of m lines; a depth field map without a `time` index; an ISO 8601 magnetometer string.
struct Session {
    test::TempDir dir;
    std::string gnss = dir.file("gnss.nmea");
    std::string hdg = dir.file("hdg.nmea");
    std::string dep = dir.file("dep.txt");
    std::string mag = dir.file("mag.txt");
    std::vector<config::InputConfig> inputs;
    std::vector<decode::FieldMap> maps;
    toml::table table;

    explicit Session(const std::string& hdg_extra = "") {
        // No transport, no path: import takes the files from --input (InputUse::Offline).
        const std::string toml =
            "[[input]]\nname = \"gnss\"\nkind = \"nmea\"\nrole = \"gnss\"\n\n"
            "[[input]]\nname = \"hdg\"\nkind = \"nmea\"\nrole = \"heading\"\n" + hdg_extra + "\n"
            "[[input]]\nname = \"dep\"\nkind = \"fieldmap\"\nfieldmap = \"dep\"\nrole = \"altimeter\"\n\n"
            "[[input]]\nname = \"mag\"\nkind = \"fieldmap\"\nfieldmap = \"iso\"\nrole = \"mag\"\n\n"
            "[fieldmap.dep]\nstart = \"DEP\"\naltitude_m = 1\n\n"
            "[fieldmap.iso]\nstart = \"ISOM\"\ndelimiter = \";\"\ntime = 1\ntime_format = \"iso8601\"\n"
            "time_zone = \"+01:00\"\nfield_nT = 2\n";
        table = config::parseText(toml, "survey.toml");
        config::Section root(table, "survey.toml");
        inputs = config::parseInputs(root, config::InputUse::Offline);
        maps = decode::parseFieldMaps(root);
    }
    void writeGnss(int n) {
        std::ofstream g(gnss, std::ios::binary);
        for (int i = 0; i < n; ++i)
            g << test::gga(36000.0 + i, i * 0.01) << "\r\n" << test::rmc(36000.0 + i, "011226") << "\r\n";
    }
    // Heading k = k / 10 degrees, so the file order can be read back from the log.
    void writeHeading(int m) {
        std::ofstream h(hdg, std::ios::binary);
        for (int k = 0; k < m; ++k) {
            char body[40];
            std::snprintf(body, sizeof body, "HEHDT,%.1f,T", k * 0.1);
            h << decode::nmeaWithChecksum(body) << "\r\n";
        }
    }
    void writeDepth(int m) {
        std::ofstream d(dep, std::ios::binary);
        for (int k = 0; k < m; ++k) d << "DEP," << 10 + k << ".5\n";
    }
};

struct TimedRow {
    std::int64_t id;
    std::string source;
    std::string bytes;
    TimeNs utc_ns;
};

std::vector<TimedRow> timedRows(const std::string& path) {
    log::LogReader r(path);
    std::vector<TimedRow> out;
    std::int64_t id = 0;
    log::RawRow x;
    while (r.next(id, x)) out.push_back({id, x.source, x.bytes, x.utc_ns});
    return out;
}

TEST(ImportUntimed, HeadingWithoutTimeLiesBetweenTheGnssTimesAsStated) {
    Session s;
    s.writeGnss(20);     // 10:00:00 .. 10:00:19: a span of 19 s
    s.writeHeading(191); // 10 Hz over the same 19 s: the k-th line at 10:00:00 + k * 0.1 s
    const auto p = s.dir.file("h.sqlite");
    const auto r = io::importCaptures(s.inputs, s.maps, {{"hdg", s.hdg}, {"gnss", s.gnss}}, {}, p,
                                      "x", "survey.toml", false);
    ASSERT_TRUE(r.written);
    ASSERT_EQ(r.merged.captures.size(), 2u);
    const auto& h = r.merged.captures[1];
    EXPECT_TRUE(h.placed);
    EXPECT_EQ(h.aligned_to, "gnss");
    EXPECT_EQ(h.timed_lines, 0u);
    EXPECT_NEAR(h.implied_rate_hz, 10.0, 1e-9);  // 190 intervals / 19 s
    EXPECT_NE(h.assumption.find("same period"), std::string::npos) << h.assumption;
    EXPECT_NE(h.assumption.find("2026-12-01T10:00:00.000Z .. 2026-12-01T10:00:19.000Z"),
              std::string::npos)
        << h.assumption;

    const auto rows = timedRows(p);
    ASSERT_EQ(rows.size(), 40u + 191u);
    int k = 0;
    for (std::size_t i = 0; i < rows.size(); ++i) {
        if (rows[i].source != "hdg") continue;
        // File order kept: the k-th heading line holds k / 10 degrees.
        char want[40];
        std::snprintf(want, sizeof want, "HEHDT,%.1f,T", k * 0.1);
        EXPECT_EQ(rows[i].bytes, decode::nmeaWithChecksum(want));
        // The stated rule: 10:00:00 (2026-12-01, GNU date: 1796083200 + 36000 s) + k * 0.1 s.
        EXPECT_EQ(rows[i].utc_ns, kDec1 + 36000LL * kNsPerSecond + k * 100'000'000LL) << k;
        // And it lies between the GNSS lines logged before and after it.
        TimeNs before = std::numeric_limits<TimeNs>::min(), after = std::numeric_limits<TimeNs>::max();
        for (std::size_t j = i; j-- > 0;)
            if (rows[j].source == "gnss") {
                before = rows[j].utc_ns;
                break;
            }
        for (std::size_t j = i + 1; j < rows.size(); ++j)
            if (rows[j].source == "gnss") {
                after = rows[j].utc_ns;
                break;
            }
        EXPECT_LE(before, rows[i].utc_ns) << k;
        EXPECT_GE(after, rows[i].utc_ns) << k;
        if (k % 10 == 5) {  // half way between two fixes: the GNSS second before, and after
            EXPECT_EQ(before, kDec1 + (36000LL + k / 10) * kNsPerSecond) << k;
            EXPECT_EQ(after, kDec1 + (36000LL + k / 10 + 1) * kNsPerSecond) << k;
        }
        ++k;
    }
    EXPECT_EQ(k, 191);
    // The heading lines decode as live ones do (HDT rows in the log), and the assumption is in
    // the log: an event with the span and the implied rate, and a meta line (sqlite3 shell).
    EXPECT_EQ(test::shell("sqlite3 " + p + " \"select count(*) from raw_lines where source='hdg' and status='ok'\""),
              "191");
    EXPECT_EQ(test::shell("sqlite3 " + p + " \"select kind, source, start_utc_ns, end_utc_ns, "
                          "printf('%.3f', value) from events\""),
              "untimed_placement|hdg|" + std::to_string(kDec1 + 36000LL * kNsPerSecond) + "|" +
                  std::to_string(kDec1 + 36019LL * kNsPerSecond) + "|10.000");
    const auto meta = test::shell("sqlite3 " + p + " \"select value from meta where key='import_placement'\"");
    EXPECT_NE(meta.find("hdg=" + s.hdg + ": 191 lines without instrument time"), std::string::npos) << meta;
}

TEST(ImportUntimed, FieldMapWithoutTimeAndAlignToAnotherCapture) {
    Session s("import_align = \"mag\"\n");
    s.writeGnss(10);
    s.writeHeading(11);
    s.writeDepth(5);
    // ISO 8601 magnetometer, written at +01:00 (the map's time_zone applies to the undesignated
    // ones): 10:00:02.5Z .. 10:00:07.5Z.
    {
        std::ofstream m(s.mag, std::ios::binary);
        m << "ISOM;2026-12-01T11:00:02.5;48000.0\n"        // no designator: +01:00 (time_zone)
          << "ISOM;2026-12-01T10:00:04.000Z;48001.0\n"
          << "ISOM;2026-02-30T10:00:05Z;48009.0\n"          // no such date: rejected, kept
          << "ISOM;2026-12-01T11:00:06,25+01:00;48002.0\n"
          << "ISOM;2026-12-01T10:00:07.5000000000Z;48003.0\n";
    }
    const auto p = s.dir.file("a.sqlite");
    const auto r = io::importCaptures(s.inputs, s.maps,
                                      {{"gnss", s.gnss}, {"hdg", s.hdg}, {"dep", s.dep}, {"mag", s.mag}},
                                      {}, p, "x", "survey.toml", false);
    ASSERT_TRUE(r.written) << (r.merged.problems.empty() ? "" : r.merged.problems[0]);
    ASSERT_EQ(r.merged.captures.size(), 4u);
    // The depth strings (no `time` in their layout) follow the reference (GNSS, 10:00:00..09);
    // the heading follows the magnetometer, as import_align says.
    EXPECT_TRUE(r.merged.captures[2].placed);
    EXPECT_EQ(r.merged.captures[2].aligned_to, "gnss");
    EXPECT_TRUE(r.merged.captures[1].placed);
    EXPECT_EQ(r.merged.captures[1].aligned_to, "mag");
    EXPECT_FALSE(r.merged.captures[3].placed);

    // Magnetometer sample times against GNU date (coreutils): date -u -d '...' +%s%N.
    auto gnu = [](const std::string& when) {
        return test::shell("date -u -d '" + when + "' +%s%N");
    };
    EXPECT_EQ(test::shell("sqlite3 " + p + " 'select time_utc_ns from mag_samples order by field_nT'"),
              gnu("2026-12-01T11:00:02.5+01:00") + "\n" + gnu("2026-12-01T10:00:04Z") + "\n" +
                  gnu("2026-12-01T11:00:06.25+01:00") + "\n" + gnu("2026-12-01T10:00:07.5Z"));
    const auto rows = timedRows(p);
    std::vector<TimeNs> hdg, dep;
    for (const auto& x : rows) {
        if (x.source == "hdg") hdg.push_back(x.utc_ns);
        if (x.source == "dep") dep.push_back(x.utc_ns);
    }
    // 11 heading lines over 10:00:02.5 .. 10:00:07.5 (0.5 s apart); 5 depth lines over
    // 10:00:00 .. 10:00:09 (2.25 s apart).
    ASSERT_EQ(hdg.size(), 11u);
    ASSERT_EQ(dep.size(), 5u);
    const TimeNs t10 = kDec1 + 36000LL * kNsPerSecond;
    for (std::size_t k = 0; k < hdg.size(); ++k)
        EXPECT_EQ(hdg[k], t10 + 2'500'000'000LL + static_cast<TimeNs>(k) * 500'000'000LL) << k;
    for (std::size_t k = 0; k < dep.size(); ++k)
        EXPECT_EQ(dep[k], t10 + static_cast<TimeNs>(k) * 2'250'000'000LL) << k;
    EXPECT_EQ(test::shell("sqlite3 " + p + " \"select count(*) from events where kind='untimed_placement'\""),
              "2");
    // The bad time is counted with its reason and kept raw; it is no sample.
    EXPECT_EQ(test::shell("sqlite3 " + p + " \"select bytes, status, reason from raw_lines where "
                          "source='mag' and status != 'ok'\""),
              "ISOM;2026-02-30T10:00:05Z;48009.0|rejected|bad_field: field 1 (time): not a calendar date");
    EXPECT_EQ(test::shell("sqlite3 " + p + " 'select count(*) from mag_samples'"), "4");
    // The depth values reach the log as altitude rows, placed at the stated times.
    EXPECT_EQ(test::shell("sqlite3 " + p + " \"select count(*) from aux where kind='altitude_m'\""), "5");
}

TEST(ImportUntimed, RateThatContradictsTheSpanIsReportedNotMerged) {
    // 191 heading lines at a stated 5 Hz would last 38 s, but the GNSS spans 19 s.
    Session bad("import_rate_hz = 5.0\n");
    bad.writeGnss(20);
    bad.writeHeading(191);
    const auto p = bad.dir.file("r.sqlite");
    auto r = io::importCaptures(bad.inputs, bad.maps, {{"gnss", bad.gnss}, {"hdg", bad.hdg}}, {}, p,
                                "x", "survey.toml", false);
    EXPECT_FALSE(r.written);
    EXPECT_FALSE(std::filesystem::exists(p));
    ASSERT_EQ(r.merged.problems.size(), 1u);
    EXPECT_NE(r.merged.problems[0].find("import_rate_hz = 5 Hz last 38.000 s"), std::string::npos)
        << r.merged.problems[0];
    EXPECT_NEAR(r.merged.captures[1].shift_s, 19.0, 1e-9);
    // Accepted: merged, with the contradiction logged beside the placement.
    r = io::importCaptures(bad.inputs, bad.maps, {{"gnss", bad.gnss}, {"hdg", bad.hdg}}, {}, p, "x",
                           "survey.toml", true);
    ASSERT_TRUE(r.written);
    EXPECT_EQ(test::shell("sqlite3 " + p + " \"select kind, printf('%.1f', value) from events order by id\""),
              "untimed_placement|10.0\nclock_disagreement|19.0");

    // The right rate agrees (within [import] max_clock_disagreement_s).
    Session good("import_rate_hz = 10.0\n");
    good.writeGnss(20);
    good.writeHeading(191);
    const auto m = io::mergeCaptures(good.inputs, good.maps, {{"gnss", good.gnss}, {"hdg", good.hdg}}, {});
    EXPECT_TRUE(m.problems.empty()) << m.problems.front();
    EXPECT_NEAR(m.captures[1].shift_s, 0.0, 1e-9);
}

TEST(ImportUntimed, NothingToAlignToIsAnError) {
    Session s;
    s.writeHeading(10);
    s.writeDepth(3);
    try {
        io::mergeCaptures(s.inputs, s.maps, {{"hdg", s.hdg}, {"dep", s.dep}}, {});
        FAIL() << "no error";
    } catch (const std::runtime_error& e) {
        EXPECT_NE(std::string(e.what()).find("no capture carries an instrument time"), std::string::npos)
            << e.what();
    }
    // import_align naming an input that is not imported.
    Session a("import_align = \"mag\"\n");
    a.writeGnss(3);
    a.writeHeading(10);
    try {
        io::mergeCaptures(a.inputs, a.maps, {{"gnss", a.gnss}, {"hdg", a.hdg}}, {});
        FAIL() << "no error";
    } catch (const std::runtime_error& e) {
        EXPECT_NE(std::string(e.what()).find("import_align = \"mag\""), std::string::npos) << e.what();
    }
    // A capture none of whose lines decodes is not "untimed": it is the wrong file.
    std::ofstream(s.hdg) << "hello\nworld\n";
    s.writeGnss(3);
    try {
        io::mergeCaptures(s.inputs, s.maps, {{"gnss", s.gnss}, {"hdg", s.hdg}}, {});
        FAIL() << "no error";
    } catch (const std::runtime_error& e) {
        const std::string msg = e.what();
        EXPECT_NE(msg.find(s.hdg + ": no line decodes as input 'hdg'"), std::string::npos) << msg;
        EXPECT_NE(msg.find("line 1: not_nmea"), std::string::npos) << msg;
    }
}

TEST(ImportConfig, TransportIsOptionalForImportOnly) {
    const std::string toml = "[[input]]\nname = \"gnss\"\nkind = \"nmea\"\nrole = \"gnss\"\n";
    const auto t = config::parseText(toml, "survey.toml");
    const config::Section root(t, "survey.toml");
    const auto in = config::parseInputs(root, config::InputUse::Offline);
    ASSERT_EQ(in.size(), 1u);
    EXPECT_FALSE(in[0].transport_given);
    // Acquisition still needs it, and says which key.
    try {
        config::parseInputs(root);
        FAIL();
    } catch (const config::ConfigError& e) {
        EXPECT_NE(std::string(e.what()).find("input[0].transport"), std::string::npos) << e.what();
    }
    // A transport key without a transport is refused, naming the key.
    const auto t2 = config::parseText(toml + "path = \"x.nmea\"\n", "survey.toml");
    try {
        config::parseInputs(config::Section(t2, "survey.toml"), config::InputUse::Offline);
        FAIL();
    } catch (const config::ConfigError& e) {
        EXPECT_NE(std::string(e.what()).find("input[0].path"), std::string::npos) << e.what();
    }
    // import_align must name another input.
    const auto t3 = config::parseText(toml + "import_align = \"gyro\"\n", "survey.toml");
    try {
        config::parseInputs(config::Section(t3, "survey.toml"), config::InputUse::Offline);
        FAIL();
    } catch (const config::ConfigError& e) {
        EXPECT_NE(std::string(e.what()).find("input[0].import_align"), std::string::npos) << e.what();
    }
}

// ---- The real binary ------------------------------------------------------------------------

struct Run {
    int rc = -1;
    std::string out;  // stdout and stderr
};

Run runImport(const std::string& args) {
    const std::string bin = std::string(SG_BINARY_DIR) + "/app/swathguard";
    const std::string all = test::shell(bin + " import " + args + " 2>&1; echo \"rc=$?\"");
    Run r;
    const auto pos = all.rfind("rc=");
    if (pos == std::string::npos) return r;
    r.rc = std::stoi(all.substr(pos + 3));
    r.out = all.substr(0, pos);
    return r;
}

// What the setup checks (engine::checkConfig) demand of any survey that import accepts, beside
// the inputs a test is about: a magnetometer input, a sensor depth, a cable out, an altitude
// source (an echo sounder input) and a target class. Inputs without --input are not imported.
const char* kRestOfSurvey =
    "[[input]]\nname = \"sounder\"\nkind = \"nmea\"\nrole = \"depth\"\ntransport = \"udp\"\n"
    "listen = \"127.0.0.1:47998\"\n"
    "[tow]\ncable_out_m = 30.0\nsensor_depth_m = 2.0\n";

TEST(ImportBinary, InputOverridesAConfigWithoutTransportOrPath) {
    Session s;
    s.writeGnss(20);
    s.writeHeading(191);
    // The config has no transport and no path for gnss and hdg; --input gives the files.
    const auto cfg = s.dir.file("survey.toml");
    {
        std::ofstream c(cfg);
        c << "[[input]]\nname = \"gnss\"\nkind = \"nmea\"\nrole = \"gnss\"\n\n"
          << "[[input]]\nname = \"hdg\"\nkind = \"nmea\"\nrole = \"heading\"\n\n"
          << "[[input]]\nname = \"mag\"\nkind = \"nmea\"\nrole = \"mag\"\ntransport = \"udp\"\n"
          << "listen = \"127.0.0.1:47999\"\n"
          // The whole core (replay, below) needs a field and a target class.
          << "[geomagnetic]\ninclination_deg = 66.0\nintensity_nT = 50000.0\n"
          << "[[target]]\nname = \"t\"\nmodel = \"mass_rule\"\nmass_kg = 50.0\n"
          << kRestOfSurvey;
    }
    const auto log = s.dir.file("out.sqlite");
    const auto r = runImport("--config " + cfg + " --input gnss=" + s.gnss + " --input hdg=" + s.hdg +
                             " --log " + log);
    ASSERT_EQ(r.rc, 0) << r.out;
    EXPECT_NE(r.out.find("gnss: 40 lines (40 with instrument time) from " + s.gnss + " (--input)"),
              std::string::npos)
        << r.out;
    // The placement and its assumption are printed, and the input left out is named.
    EXPECT_NE(r.out.find("hdg: 191 lines from " + s.hdg + " (--input): 191 lines without instrument "
                         "time placed in file order, evenly over the time span of 'gnss'"),
              std::string::npos)
        << r.out;
    EXPECT_NE(r.out.find("assumes both captures were logged over the same period"), std::string::npos) << r.out;
    EXPECT_NE(r.out.find("mag: not imported (no --input mag=PATH, and its transport is udp, not a file)"),
              std::string::npos)
        << r.out;
    EXPECT_NE(r.out.find("import: 231 lines written to " + log), std::string::npos) << r.out;
    EXPECT_EQ(test::shell("sqlite3 " + log + " \"select source, count(*) from raw_lines group by 1\""),
              "gnss|40\nhdg|191");
    // The log reads back (replay, gaps, report) with the config it holds, transport-less inputs
    // included: every line through the core, the headings among them.
    engine::LogReplay replay(log, std::nullopt);
    EXPECT_EQ(replay.runToEnd(), 231u);
    EXPECT_EQ(test::shell("sqlite3 " + log + " 'select count(*) from headings'"), "191");
}

TEST(ImportBinary, WhichPathWinsIsSaidAndABogusConfigPathIsAnError) {
    Session s;
    s.writeGnss(5);
    const auto cfg = s.dir.file("survey.toml");
    {
        std::ofstream c(cfg);
        // A relative path: it starts at the config's folder (as for record), and does not exist.
        c << "[[input]]\nname = \"gnss\"\nkind = \"nmea\"\nrole = \"gnss\"\ntransport = \"file\"\n"
          << "path = \"bogus/gnss.nmea\"\n"
          << "[[input]]\nname = \"mag\"\nkind = \"nmea\"\nrole = \"mag\"\ntransport = \"udp\"\n"
          << "listen = \"127.0.0.1:47999\"\n"
          << "[[target]]\nname = \"t\"\nmodel = \"mass_rule\"\nmass_kg = 50.0\n"
          << kRestOfSurvey;
    }
    // Used (no --input): the bogus path is an error naming the key, the file and the fix.
    const auto log1 = s.dir.file("a.sqlite");
    const auto used = runImport("--config " + cfg + " --log " + log1);
    EXPECT_NE(used.rc, 0) << used.out;
    EXPECT_NE(used.out.find("key 'input[0].path'"), std::string::npos) << used.out;
    EXPECT_NE(used.out.find((s.dir.path() / "bogus/gnss.nmea").string()), std::string::npos) << used.out;
    EXPECT_NE(used.out.find("--input gnss=PATH"), std::string::npos) << used.out;
    EXPECT_FALSE(std::filesystem::exists(log1));
    // Overridden: --input wins, and the output says it did and which path was not used.
    const auto log2 = s.dir.file("b.sqlite");
    const auto over = runImport("--config " + cfg + " --input gnss=" + s.gnss + " --log " + log2);
    ASSERT_EQ(over.rc, 0) << over.out;
    EXPECT_NE(over.out.find("from " + s.gnss + " (--input, not the [[input]] path " +
                            (s.dir.path() / "bogus/gnss.nmea").string() + ")"),
              std::string::npos)
        << over.out;
    // The config's path used when it exists: relative to the config's folder, whatever the
    // working directory.
    std::filesystem::create_directories(s.dir.path() / "bogus");
    std::filesystem::copy_file(s.gnss, s.dir.path() / "bogus/gnss.nmea");
    const auto log3 = s.dir.file("c.sqlite");
    const auto cfgpath = runImport("--config " + cfg + " --log " + log3);
    ASSERT_EQ(cfgpath.rc, 0) << cfgpath.out;
    EXPECT_NE(cfgpath.out.find("gnss: 10 lines (10 with instrument time) from " +
                               (s.dir.path() / "bogus/gnss.nmea").string() + " ([[input]] path)"),
              std::string::npos)
        << cfgpath.out;
    // An --input name that is no [[input]] is an error naming the inputs there are.
    const auto unknown = runImport("--config " + cfg + " --input gyro=" + s.gnss + " --log " +
                                   s.dir.file("d.sqlite"));
    EXPECT_NE(unknown.rc, 0);
    EXPECT_NE(unknown.out.find("no [[input]] named 'gyro'"), std::string::npos) << unknown.out;
    EXPECT_NE(unknown.out.find("(inputs: gnss, mag, sounder)"), std::string::npos) << unknown.out;
}

// A multiplexed port (common practice on survey vessels: a GNSS that sends checksums and a gyro
// that never does, merged onto one serial port) captured to one file. With
// checksum_optional_talkers = ["HE"] the gyro's lines are decoded when recorded live (file
// reader), imported by the real binary and replayed from the config the log holds; without it
// they are missing_checksum in all three. A checksum is NMEA 0183's XOR (nmeaWithChecksum; the
// decode tests check that against a hand-written XOR).
TEST(ImportBinary, MultiplexedGyroWithoutChecksumsDecodesAlikeLiveImportedAndReplayed) {
    test::TempDir dir;
    const std::string nav = dir.file("nav.nmea");
    {
        std::ofstream f(nav, std::ios::binary);
        for (int i = 0; i < 20; ++i) {
            std::string gga = test::gga(36000.0 + i, i * 0.01);
            if (i == 7) gga[gga.size() - 3] = ',';  // '*' hit in transit: missing_checksum
            f << gga << "\r\n" << test::rmc(36000.0 + i, "011226") << "\r\n";
            char body[40];
            std::snprintf(body, sizeof body, "HEHDT,%.1f,T", 90.0 + i * 0.5);
            if (i == 11) {  // the gyro's one checksummed line, with a wrong checksum
                std::string bad = decode::nmeaWithChecksum(body);
                bad.back() = bad.back() == '0' ? '1' : '0';
                f << bad << "\r\n";
            } else {
                f << "$" << body << "\r\n";  // as the gyro sends it: no '*hh'
            }
        }
    }
    auto writeConfig = [&](const std::string& name, const std::string& key) {
        const auto cfg = dir.file(name);
        std::ofstream c(cfg);
        c << "[[input]]\nname = \"nav\"\nkind = \"nmea\"\nrole = \"gnss\"\ntransport = \"file\"\n"
          << "path = \"" << nav << "\"\n" << key
          << "[[input]]\nname = \"mag\"\nkind = \"nmea\"\nrole = \"mag\"\ntransport = \"udp\"\n"
          << "listen = \"127.0.0.1:47999\"\n"
          << "[geomagnetic]\ninclination_deg = 66.0\nintensity_nT = 50000.0\n"
          << "[[target]]\nname = \"t\"\nmodel = \"mass_rule\"\nmass_kg = 50.0\n"
          << kRestOfSurvey;
        return cfg;
    };
    const auto cfg_mux = writeConfig("mux.toml", "checksum_optional_talkers = [\"HE\"]\n");
    const auto cfg_plain = writeConfig("plain.toml", "");

    // Statuses and reason codes of the nav lines, in log order: "bytes|status|reason code".
    auto statuses = [](const std::string& log) {
        return test::shell("sqlite3 " + log +
                           " \"select substr(bytes, 1, 6) || '|' || status || '|' || "
                           "coalesce(substr(reason, 1, instr(reason || ':', ':') - 1), '') "
                           "from raw_lines where source = 'nav' order by id\"");
    };
    auto countOf = [](const std::string& text, const std::string& what) {
        std::size_t n = 0;
        for (auto at = text.find(what); at != std::string::npos; at = text.find(what, at + 1)) ++n;
        return n;
    };
    // Replay with the config stored in the log (no override): the decode counters of 'nav'.
    auto replayed = [](const std::string& log) {
        engine::LogReplay replay(log, std::nullopt);
        replay.runToEnd();
        return replay.pipeline().decoder().counters().at("nav").by_reason;
    };
    using ByReason = std::map<std::string, std::uint64_t, std::less<>>;
    auto reasonCount = [](const ByReason& m, const char* r) {
        const auto it = m.find(r);
        return it == m.end() ? std::uint64_t{0} : it->second;
    };

    for (const bool exempt : {true, false}) {
        SCOPED_TRACE(exempt ? "checksum_optional_talkers = [\"HE\"]" : "no key");
        const auto& cfg = exempt ? cfg_mux : cfg_plain;
        const auto imported = dir.file(exempt ? "mux.sglog" : "plain.sglog");
        const auto r = runImport("--config " + cfg + " --log " + imported);
        ASSERT_EQ(r.rc, 0) << r.out;
        const std::string st = statuses(imported);
        // The GNSS keeps the rule; the gyro's one checksum is verified.
        EXPECT_EQ(countOf(st, "$GPGGA|rejected|missing_checksum"), 1u) << st;
        EXPECT_EQ(countOf(st, "$HEHDT|rejected|bad_checksum"), 1u) << st;
        EXPECT_EQ(countOf(st, "$HEHDT|ok|no_checksum"), exempt ? 19u : 0u) << st;
        EXPECT_EQ(countOf(st, "$HEHDT|rejected|missing_checksum"), exempt ? 0u : 19u) << st;
        EXPECT_EQ(test::shell("sqlite3 " + imported + " 'select count(*) from headings'"),
                  exempt ? "19" : "0");
        if (exempt) {
            EXPECT_EQ(test::shell("sqlite3 " + imported +
                                  " \"select printf('%.1f', min(heading_deg)) || '|' || "
                                  "printf('%.1f', max(heading_deg)) from headings\""),
                      "90.0|99.5");
        }

        // Live: the same file through a file reader and the record path's decoder.
        const auto live = dir.file(exempt ? "mux_live.sglog" : "plain_live.sglog");
        {
            const auto table = config::parseFile(cfg);
            auto inputs = config::parseInputs(config::Section(table, cfg));
            inputs.resize(1);  // nav only: no UDP socket for the unused mag input
            boost::asio::io_context io;
            io::LogWriter w(live, {100, false});
            io::Recorder rec(io, inputs, {}, w);
            rec.start();
            ASSERT_TRUE(test::runUntil(io, [&] { return rec.allFinished(); }));
            rec.stop();
            w.stop();
        }
        EXPECT_EQ(statuses(live), st);

        // Replay: the key comes from the config stored with the log.
        const auto by = replayed(imported);
        EXPECT_EQ(reasonCount(by, "no_checksum"), exempt ? 19u : 0u);
        EXPECT_EQ(reasonCount(by, "missing_checksum"), exempt ? 1u : 20u);
        EXPECT_EQ(reasonCount(by, "bad_checksum"), 1u);
    }
}

TEST(ImportBinary, DemoCapturesWithUntimedGyroAndSounderReplayAsTheLiveDemo) {
    // The simulator writes the demo survey to files; the gyro (HDT) and sounder (DPT) files carry
    // no time. Imported (those two placed in receive order over the GNSS span) and replayed with
    // the demo's config, the log must give the same raster as the live demo run in one process.
    test::TempDir d;
    const std::string src = SG_SOURCE_DIR;
    const std::string bin = std::string(SG_BINARY_DIR) + "/app/swathguard";
    const std::string sim = std::string(SG_BINARY_DIR) + "/drivers_sim/swathguard-sim";
    const std::string files = d.file("sim_out");
    ASSERT_EQ(test::shell("cd " + src + " && " + sim +
                          " --scenario replay_logs/demo/scenario.toml --out file --dir " + files +
                          " >/dev/null 2>&1; echo $?"),
              "0");
    std::string args = "--config " + src + "/replay_logs/demo/survey_files.toml --log " +
                       d.file("imported.sglog");
    for (const char* in : {"gnss", "gyro", "sounder", "mag", "altimeter", "cable"})
        args += std::string(" --input ") + in + "=" + files + "/" + in + ".log";
    const auto imp = runImport(args);
    ASSERT_EQ(imp.rc, 0) << imp.out;
    for (const char* untimed : {"gyro", "sounder"})
        EXPECT_NE(imp.out.find(std::string(untimed) + ".log (--input, not the [[input]] path "),
                  std::string::npos)
            << imp.out;
    EXPECT_NE(imp.out.find("lines without instrument time placed in file order, evenly over the "
                           "time span of 'gnss'"),
              std::string::npos)
        << imp.out;
    auto hashOf = [&](const std::string& log) {
        return test::shell(bin + " replay " + log + " --config " + src +
                           "/replay_logs/demo/survey.toml --headless 2>&1 | grep 'raster hash'");
    };
    ASSERT_EQ(test::shell("cd " + src + " && " + bin + " demo --headless --out " + d.file("demo") +
                          " >/dev/null 2>&1; echo $?"),
              "0");
    const auto live = hashOf(d.file("demo") + "/demo.sglog");
    EXPECT_FALSE(live.empty());
    EXPECT_EQ(hashOf(d.file("imported.sglog")), live);
}

}  // namespace
