// `import`: two captures (GNSS and magnetometer) merged by instrument time give the same log
// whatever the order they are given in, the same content as the same lines recorded live,
// handle a midnight crossing, and report a capture whose clock disagrees.
#include <gtest/gtest.h>

#include <fstream>

#include "common/config_section.hpp"
#include "io/importer.hpp"
#include "io/log_writer.hpp"
#include "io/recorder.hpp"
#include "io_test_util.hpp"
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

}  // namespace
