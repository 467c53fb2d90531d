// Field-map decoder: the team's default layouts (SGM, SGA, SGC), maps read from TOML, and every
// way a line can be bad. Checksums of built lines are computed independently in this file.
#include <gtest/gtest.h>

#include <cstdio>
#include <string>

#include "common/config_section.hpp"
#include "decode/field_map.hpp"
#include "decode/instrument_clock.hpp"
#include "decode/nmea.hpp"
#include "reason_printer.hpp"

namespace {

using namespace sg::decode;

// XOR of every byte before '*', two upper-case hex digits (our layouts, docs/formats.md).
std::string sealed(const std::string& body) {
    unsigned x = 0;
    for (unsigned char c : body) x ^= c;
    char hex[3];
    std::snprintf(hex, sizeof hex, "%02X", x & 0xFFu);
    return body + "*" + hex;
}

TEST(FieldMapDefault, MagnetometerExample) {
    const std::string line = sealed("SGM,2,004512.300,48213.417,97,12.40,4.10");
    const auto r = decodeFieldMap(defaultMagnetometerMap(), line);
    ASSERT_EQ(r.reason, Reason::Ok) << r.detail;
    EXPECT_EQ(r.sensor, 2);
    EXPECT_NEAR(*r.tod_s, 45 * 60 + 12.3, 1e-9);
    EXPECT_DOUBLE_EQ(*r.field_nT, 48213.417);
    EXPECT_DOUBLE_EQ(*r.quality, 97);
    EXPECT_DOUBLE_EQ(*r.depth_m, 12.40);
    EXPECT_DOUBLE_EQ(*r.altitude_m, 4.10);
    EXPECT_FALSE(r.cable_out_m);
}

TEST(FieldMapDefault, MagnetometerWithoutAltitude) {
    const auto r = decodeFieldMap(defaultMagnetometerMap(),
                                  sealed("SGM,0,235959.900,51000.000,80,3.00,"));
    ASSERT_EQ(r.reason, Reason::Ok) << r.detail;
    EXPECT_FALSE(r.altitude_m);
}

TEST(FieldMapDefault, AltimeterAndCable) {
    const auto a = decodeFieldMap(defaultAltimeterMap(), sealed("SGA,004512.30,4.10"));
    ASSERT_EQ(a.reason, Reason::Ok) << a.detail;
    EXPECT_DOUBLE_EQ(*a.altitude_m, 4.10);
    const auto c = decodeFieldMap(defaultCableMap(), sealed("SGC,004512.30,152.5"));
    ASSERT_EQ(c.reason, Reason::Ok) << c.detail;
    EXPECT_DOUBLE_EQ(*c.cable_out_m, 152.5);
    EXPECT_NEAR(*c.tod_s, 2712.3, 1e-9);
}

TEST(FieldMapDefault, WithXorChecksumMatchesIndependentXor) {
    const std::string body = "SGM,2,004512.300,48213.417,97,12.40,4.10";
    EXPECT_EQ(withXorChecksum(body), sealed(body));
}

TEST(FieldMapDefault, FieldOutsideEarthRange) {
    const auto r = decodeFieldMap(defaultMagnetometerMap(),
                                  sealed("SGM,2,004512.300,4821.341,97,12.40,4.10"));
    EXPECT_EQ(r.reason, Reason::BadField);
    EXPECT_NE(r.detail.find("field_nT"), std::string::npos) << r.detail;
}

TEST(FieldMapReasons, EveryFieldMapReason) {
    const FieldMap mag = defaultMagnetometerMap();
    const std::string good = sealed("SGM,2,004512.300,48213.417,97,12.40,4.10");
    EXPECT_EQ(decodeFieldMap(mag, good).reason, Reason::Ok);
    // A terminator left on is tolerated.
    EXPECT_EQ(decodeFieldMap(mag, good + "\r\n").reason, Reason::Ok);

    // BadChecksum: wrong, missing, malformed.
    std::string wrong = good;
    wrong[wrong.size() - 1] = wrong.back() == '0' ? '1' : '0';
    EXPECT_EQ(decodeFieldMap(mag, wrong).reason, Reason::BadChecksum);
    EXPECT_EQ(decodeFieldMap(mag, "SGM,2,004512.300,48213.417,97,12.40,4.10").reason,
              Reason::BadChecksum);
    EXPECT_EQ(decodeFieldMap(mag, "SGM,2,004512.300,48213.417,97,12.40,4.10*Z1").reason,
              Reason::BadChecksum);
    // A corrupted digit in the value is caught by the checksum, not passed on as data.
    std::string flipped = good;
    flipped[good.find("48213") + 2] = '9';
    EXPECT_EQ(decodeFieldMap(mag, flipped).reason, Reason::BadChecksum);

    // Truncated: fields missing (the checksum of what is left is right).
    const auto t = decodeFieldMap(mag, sealed("SGM,2,004512.300,48213.417"));
    EXPECT_EQ(t.reason, Reason::Truncated);
    EXPECT_NE(t.detail.find("needs 7"), std::string::npos) << t.detail;

    // BadField, each naming the field.
    const std::pair<const char*, const char*> bad[] = {
        {"SGM,2,254512.300,48213.417,97,12.40,4.10", "time"},
        {"SGM,2,,48213.417,97,12.40,4.10", "time"},
        {"SGM,x,004512.300,48213.417,97,12.40,4.10", "sensor"},
        {"SGM,100,004512.300,48213.417,97,12.40,4.10", "sensor"},
        {"SGM,,004512.300,48213.417,97,12.40,4.10", "sensor"},
        {"SGM,2,004512.300,48213.4.17,97,12.40,4.10", "field_nT"},
        {"SGM,2,004512.300,148213.417,97,12.40,4.10", "field_nT"},
        {"SGM,2,004512.300,48213.417,-1,12.40,4.10", "quality"},
        {"SGM,2,004512.300,48213.417,97,12.40,-4.10", "altitude_m"},
        {"SGM,2,004512.300,48213.417,97,1e1,4.10", "depth_m"},
    };
    for (const auto& [body, field] : bad) {
        const auto r = decodeFieldMap(mag, sealed(body));
        EXPECT_EQ(r.reason, Reason::BadField) << body;
        EXPECT_NE(r.detail.find(field), std::string::npos) << body << " -> " << r.detail;
    }

    // BadStart: another layout's line.
    EXPECT_EQ(decodeFieldMap(mag, sealed("SGA,004512.30,4.10")).reason, Reason::BadStart);
    // BinaryBytes, TooLong, EmptyLine.
    std::string nul = good;
    nul[5] = '\0';
    EXPECT_EQ(decodeFieldMap(mag, nul).reason, Reason::BinaryBytes);
    EXPECT_EQ(decodeFieldMap(mag, nul).detail, "byte 0x00 at offset 5");  // value in hex
    EXPECT_EQ(decodeFieldMap(mag, "SGM," + std::string(10 * 1024, '7')).reason, Reason::TooLong);
    EXPECT_EQ(decodeFieldMap(mag, "").reason, Reason::EmptyLine);
    EXPECT_EQ(decodeFieldMap(mag, "  ").reason, Reason::EmptyLine);
}

// Parses TOML text and returns the maps of its [fieldmap.*] tables.
std::vector<FieldMap> mapsFrom(const std::string& text) {
    static toml::table root;  // must outlive the Section while parsing
    root = sg::config::parseText(text, "test.toml");
    return parseFieldMaps(sg::config::Section(root, "test.toml"));
}

TEST(FieldMapConfig, ReadsTablesInNameOrder) {
    const auto maps = mapsFrom(R"(
[fieldmap.a_towfish]
start = "MAGX"
delimiter = ";"
checksum = "xor"
time = 1
field_nT = 2
sensor = 3

[fieldmap.b_tab]
delimiter = "\t"
time = 0
time_format = "unix_s"
field_nT = 1
quality = 2

[fieldmap.c_sod]
time = 0
time_format = "seconds_of_day"
cable_out_m = 1
)");
    ASSERT_EQ(maps.size(), 3u);
    EXPECT_EQ(maps[0].name, "a_towfish");
    EXPECT_EQ(maps[0].start, "MAGX");
    EXPECT_EQ(maps[0].delimiter, ';');
    EXPECT_EQ(maps[0].checksum, MapChecksum::Xor);
    EXPECT_EQ(maps[0].minFields(), 4);
    EXPECT_EQ(maps[1].delimiter, '\t');
    EXPECT_EQ(maps[1].time_format, TimeFormat::UnixS);
    EXPECT_EQ(maps[2].checksum, MapChecksum::None);

    const auto a = decodeFieldMap(maps[0], sealed("MAGX;123000.5;50123.25;3"));
    ASSERT_EQ(a.reason, Reason::Ok) << a.detail;
    EXPECT_EQ(a.sensor, 3);
    EXPECT_DOUBLE_EQ(*a.tod_s, 12 * 3600 + 30 * 60 + 0.5);

    // unix_s is kept exactly to the nanosecond: 2026-12-02T01:00:00Z = 1796173200 (GNU date).
    const auto b = decodeFieldMap(maps[1], "1796173200.123456789\t47000.5\t88");
    ASSERT_EQ(b.reason, Reason::Ok) << b.detail;
    EXPECT_EQ(*b.utc_ns, 1'796'173'200'123'456'789LL);
    EXPECT_FALSE(b.tod_s);
    EXPECT_EQ(decodeFieldMap(maps[1], "-5\t47000.5\t88").reason, Reason::BadField);

    const auto c = decodeFieldMap(maps[2], "86399.5,250.0");
    ASSERT_EQ(c.reason, Reason::Ok) << c.detail;
    EXPECT_DOUBLE_EQ(*c.tod_s, 86399.5);
    EXPECT_DOUBLE_EQ(*c.cable_out_m, 250.0);
    EXPECT_EQ(decodeFieldMap(maps[2], "86401,250.0").reason, Reason::BadField);
    // A map without a checksum accepts extra trailing fields.
    EXPECT_EQ(decodeFieldMap(maps[2], "10,250.0,extra").reason, Reason::Ok);
}

TEST(FieldMapConfig, NoFieldmapTableGivesNoMaps) {
    EXPECT_TRUE(mapsFrom("[other]\nx = 1\n").empty());
}

struct ConfigErrorCase {
    const char* toml;
    const char* key;  // full key path expected in the message
};

class FieldMapConfigError : public ::testing::TestWithParam<ConfigErrorCase> {};

TEST_P(FieldMapConfigError, NamesFileAndKey) {
    try {
        mapsFrom(GetParam().toml);
        FAIL() << "no error for " << GetParam().toml;
    } catch (const sg::config::ConfigError& e) {
        const std::string msg = e.what();
        EXPECT_NE(msg.find("test.toml"), std::string::npos) << msg;
        EXPECT_NE(msg.find(GetParam().key), std::string::npos) << msg;
    }
}

INSTANTIATE_TEST_SUITE_P(
    Cases, FieldMapConfigError,
    ::testing::Values(
        ConfigErrorCase{"[fieldmap.m]\ntime = 0\nfeild_nT = 1\n", "feild_nT"},
        ConfigErrorCase{"[fieldmap.m]\ntime = 0\nfield_nT = 0\n", "fieldmap.m.field_nT"},
        ConfigErrorCase{"[fieldmap.m]\nstart = \"X\"\ntime = 0\nfield_nT = 1\n", "fieldmap.m.time"},
        ConfigErrorCase{"[fieldmap.m]\ntime = 0\nfield_nT = 64\n", "fieldmap.m.field_nT"},
        ConfigErrorCase{"[fieldmap.m]\ntime = 0\nfield_nT = \"3\"\n", "fieldmap.m.field_nT"},
        ConfigErrorCase{"[fieldmap.m]\ndelimiter = \",,\"\nfield_nT = 1\n", "fieldmap.m.delimiter"},
        ConfigErrorCase{"[fieldmap.m]\ndelimiter = \".\"\nfield_nT = 1\n", "fieldmap.m.delimiter"},
        ConfigErrorCase{"[fieldmap.m]\nchecksum = \"crc\"\nfield_nT = 1\n", "fieldmap.m.checksum"},
        ConfigErrorCase{"[fieldmap.m]\ntime_format = \"iso\"\nfield_nT = 1\n", "fieldmap.m.time_format"},
        ConfigErrorCase{"[fieldmap.m]\nstart = \"A,B\"\nfield_nT = 1\n", "fieldmap.m.start"},
        ConfigErrorCase{"[fieldmap.m]\ntime = 0\n", "fieldmap.m.field_nT"},
        // time_zone: only with iso8601, and a real offset; a time format needs a time field.
        ConfigErrorCase{"[fieldmap.m]\ntime = 0\ntime_zone = \"+01:00\"\nfield_nT = 1\n",
                        "fieldmap.m.time_zone"},
        ConfigErrorCase{"[fieldmap.m]\ntime = 0\ntime_format = \"iso8601\"\ntime_zone = \"CET\"\n"
                        "field_nT = 1\n",
                        "fieldmap.m.time_zone"},
        ConfigErrorCase{"[fieldmap.m]\ntime = 0\ntime_format = \"iso8601\"\ntime_zone = \"+15:00\"\n"
                        "field_nT = 1\n",
                        "fieldmap.m.time_zone"},
        ConfigErrorCase{"[fieldmap.m]\ntime_format = \"unix_s\"\nfield_nT = 1\n",
                        "fieldmap.m.time_format"}));

TEST(FieldMapMatch, PicksTheLayoutByStartToken) {
    const auto maps = defaultFieldMaps();
    const auto m = decodeWithMaps(maps, sealed("SGA,004512.30,4.10"));
    EXPECT_EQ(m.map_index, 1);
    EXPECT_EQ(m.record.reason, Reason::Ok);
    const auto c = decodeWithMaps(maps, sealed("SGC,004512.30,152.5"));
    EXPECT_EQ(c.map_index, 2);
    // Right layout, bad line: the map is named and the reason is the line's own.
    const auto bad = decodeWithMaps(maps, "SGC,004512.30,152.5*00");
    EXPECT_EQ(bad.map_index, 2);
    EXPECT_EQ(bad.record.reason, Reason::BadChecksum);
    const auto none = decodeWithMaps(maps, sealed("XYZ,1,2"));
    EXPECT_EQ(none.map_index, -1);
    EXPECT_EQ(none.record.reason, Reason::BadStart);
    EXPECT_EQ(decodeWithMaps(maps, "").record.reason, Reason::EmptyLine);
    EXPECT_EQ(decodeWithMaps(maps, std::string("SG\0M", 4)).record.reason, Reason::BinaryBytes);
}

// ---- Time formats -------------------------------------------------------------------------
// Reference values come from GNU date (coreutils), run by the test itself:
//   date -u -d '2026-06-02T09:00:00.123+02:00' +%s%N
// so the expected nanoseconds are computed outside the project for every case.

std::int64_t gnuDateNs(const std::string& when) {
    const std::string cmd = "date -u -d '" + when + "' +%s%N";
    std::string out;
    FILE* p = ::popen(cmd.c_str(), "r");
    if (p == nullptr) return -1;
    char buf[64];
    while (std::fgets(buf, sizeof buf, p) != nullptr) out += buf;
    const int rc = ::pclose(p);
    if (rc != 0 || out.empty()) return -1;
    return std::stoll(out);
}

FieldMap isoMap(int zone_s = 0) {
    FieldMap m;
    m.name = "iso";
    m.delimiter = ';';  // ',' is the ISO 8601 decimal comma
    m.time = 0;
    m.time_format = TimeFormat::Iso8601;
    m.time_zone_s = zone_s;
    m.field_nT = 1;
    return m;
}

struct IsoCase {
    const char* field;  // as the instrument writes it
    const char* gnu;    // the same instant as GNU date reads it
};

TEST(FieldMapTime, Iso8601MatchesGnuDate) {
    const IsoCase cases[] = {
        {"2026-06-02T09:00:00.000Z", "2026-06-02T09:00:00.000Z"},
        {"2026-06-02T09:00:00Z", "2026-06-02T09:00:00Z"},
        {"2026-06-02t09:00:00z", "2026-06-02T09:00:00Z"},
        {"2026-06-02 09:00:00Z", "2026-06-02T09:00:00Z"},
        {"2026-06-02T09:00:00.1Z", "2026-06-02T09:00:00.1Z"},
        {"2026-06-02T09:00:00.123456789Z", "2026-06-02T09:00:00.123456789Z"},
        {"2026-06-02T09:00:00,25Z", "2026-06-02T09:00:00.25Z"},  // ISO 8601 decimal comma
        {"2026-06-02T09:00:00.123+02:00", "2026-06-02T09:00:00.123+02:00"},
        {"2026-06-02T09:00:00-05:30", "2026-06-02T09:00:00-05:30"},
        {"2026-06-02T09:00:00+0100", "2026-06-02T09:00:00+01:00"},
        {"2026-06-02T09:00:00+01", "2026-06-02T09:00:00+01:00"},
        {"2026-06-02T09:00:00-00:00", "2026-06-02T09:00:00Z"},    // RFC 3339: UTC
        {"20260602T090000.5Z", "2026-06-02T09:00:00.5Z"},          // basic format
        {"2024-02-29T23:59:59.5Z", "2024-02-29T23:59:59.5Z"},      // leap day
        {"2026-12-31T23:59:59.999999999Z", "2026-12-31T23:59:59.999999999Z"},
        {"2026-01-01T00:30:00+01:00", "2025-12-31T23:30:00Z"},     // the date changes
        {"1970-01-01T00:00:00Z", "1970-01-01T00:00:00Z"},
        {"2199-12-31T23:59:59Z", "2199-12-31T23:59:59Z"},
    };
    for (const auto& c : cases) {
        const std::int64_t want = gnuDateNs(c.gnu);
        ASSERT_NE(want, -1) << "GNU date could not read " << c.gnu;
        const auto r = decodeFieldMap(isoMap(), std::string(c.field) + ";48000.5");
        ASSERT_EQ(r.reason, Reason::Ok) << c.field << ": " << r.detail;
        ASSERT_TRUE(r.utc_ns) << c.field;
        EXPECT_EQ(*r.utc_ns, want) << c.field;
        EXPECT_FALSE(r.tod_s) << c.field;
    }
}

TEST(FieldMapTime, Iso8601FractionOfAnyLengthRoundsToTheNanosecond) {
    // Hand-computed: 2026-06-02T09:00:00Z is 1780390800 s (GNU date, checked below); the 10th
    // decimal rounds the 9th (half up), and a carry reaches the whole second.
    const std::int64_t base = gnuDateNs("2026-06-02T09:00:00Z");
    ASSERT_EQ(base, 1'780'390'800'000'000'000LL);
    const std::pair<const char*, std::int64_t> cases[] = {
        {"2026-06-02T09:00:00.1234567894Z", base + 123'456'789},
        {"2026-06-02T09:00:00.1234567895Z", base + 123'456'790},
        {"2026-06-02T09:00:00.12345678949999999999Z", base + 123'456'789},
        {"2026-06-02T09:00:00.9999999999Z", base + 1'000'000'000},
        {"2026-06-02T09:00:00.000000000000000001Z", base},
    };
    for (const auto& [field, want] : cases) {
        const auto r = decodeFieldMap(isoMap(), std::string(field) + ";48000.5");
        ASSERT_EQ(r.reason, Reason::Ok) << field << ": " << r.detail;
        EXPECT_EQ(*r.utc_ns, want) << field;
    }
}

TEST(FieldMapTime, Iso8601WithoutZoneTakesTheMapsTimeZone) {
    // Without a designator ISO 8601 means local time: the map's time_zone says which.
    const auto utc = decodeFieldMap(isoMap(), "2026-06-02T09:00:00.5;48000.5");
    ASSERT_EQ(utc.reason, Reason::Ok) << utc.detail;
    EXPECT_EQ(*utc.utc_ns, gnuDateNs("2026-06-02T09:00:00.5Z"));
    const auto cest = decodeFieldMap(isoMap(2 * 3600), "2026-06-02T09:00:00.5;48000.5");
    ASSERT_EQ(cest.reason, Reason::Ok) << cest.detail;
    EXPECT_EQ(*cest.utc_ns, gnuDateNs("2026-06-02T09:00:00.5+02:00"));
    // An explicit designator wins over the map's zone.
    const auto z = decodeFieldMap(isoMap(2 * 3600), "2026-06-02T09:00:00.5Z;48000.5");
    EXPECT_EQ(*z.utc_ns, gnuDateNs("2026-06-02T09:00:00.5Z"));
    const auto west = decodeFieldMap(isoMap(-(3 * 3600 + 30 * 60)), "2026-06-02T09:00:00;48000.5");
    EXPECT_EQ(*west.utc_ns, gnuDateNs("2026-06-02T09:00:00-03:30"));
}

TEST(FieldMapTime, BadIso8601IsABadTimeFieldNeverACrash) {
    const char* bad[] = {
        "",                               // empty: a mapped time is required
        "2026-06-02",                     // date only
        "2026-06-02T09:00Z",              // no seconds
        "2026-06-02T09:00:00.Z",          // decimal sign without digits
        "2026-02-30T09:00:00Z",           // not a calendar date
        "2027-02-29T09:00:00Z",           // not a leap year
        "2026-13-02T09:00:00Z",           // month 13
        "2026-00-02T09:00:00Z",           // month 0
        "2026-06-00T09:00:00Z",           // day 0
        "2026-06-02T24:00:00Z",           // hours 24
        "2026-06-02T09:60:00Z",           // minutes 60
        "2026-06-02T09:00:61Z",           // seconds 61
        "2026-06-02X09:00:00Z",           // separator
        "2026-6-2T09:00:00Z",             // one-digit month and day
        "2026-06-02T9:00:00Z",            // one-digit hour
        "2026-06-02T09:00:00ZZ",          // trailing bytes
        "2026-06-02T09:00:00 Z",          // space before the designator
        "2026-06-02T09:00:00+15:00",      // offset beyond 14 h
        "2026-06-02T09:00:00+01:60",      // offset minutes
        "2026-06-02T09:00:00+01:",        // offset cut
        "2026-06-02T09:00:00+1",          // one-digit offset
        "1969-12-31T23:59:59Z",           // before 1970
        "2200-01-01T00:00:00Z",           // 2200 and later
        "1780390800",                     // unix seconds in an ISO map
        "090000.00",                      // a time of day in an ISO map
        "2026-06-02T09:00:00.5.5Z",       // two fractions
        "+2026-06-02T09:00:00Z",          // expanded year
    };
    for (const char* field : bad) {
        const auto r = decodeFieldMap(isoMap(), std::string(field) + ";48000.5");
        EXPECT_EQ(r.reason, Reason::BadField) << "'" << field << "'";
        EXPECT_NE(r.detail.find("field 0 (time)"), std::string::npos) << field << " -> " << r.detail;
        EXPECT_FALSE(r.utc_ns) << field;
    }
}

FieldMap unixMap() {
    FieldMap m;
    m.name = "unix";
    m.time = 0;
    m.time_format = TimeFormat::UnixS;
    m.field_nT = 1;
    return m;
}

TEST(FieldMapTime, UnixSecondsIntegerAndFractional) {
    // date -u -d @1780390800 is 2026-06-02T09:00:00Z: the same instant read back by GNU date.
    const std::int64_t base = gnuDateNs("2026-06-02T09:00:00Z");
    const std::pair<const char*, std::int64_t> cases[] = {
        {"1780390800", base},
        {"1780390800.5", base + 500'000'000},
        {"1780390800.000000001", base + 1},
        {"1780390800.1234567895", base + 123'456'790},  // 10th decimal rounds (hand-computed)
        {"0", 0},
        {"7258118399.999999999", gnuDateNs("2199-12-31T23:59:59.999999999Z")},
    };
    for (const auto& [field, want] : cases) {
        const auto r = decodeFieldMap(unixMap(), std::string(field) + ",48000.5");
        ASSERT_EQ(r.reason, Reason::Ok) << field << ": " << r.detail;
        EXPECT_EQ(*r.utc_ns, want) << field;
    }
    for (const char* field : {"", "-5", "1e9", "1780390800.", ".5", " 1780390800", "12.3.4",
                              "7258118400", "178039080000", "2026-06-02T09:00:00Z", "0x10"}) {
        const auto r = decodeFieldMap(unixMap(), std::string(field) + ",48000.5");
        EXPECT_EQ(r.reason, Reason::BadField) << "'" << field << "'";
        EXPECT_NE(r.detail.find("(time)"), std::string::npos) << field << " -> " << r.detail;
    }
}

TEST(FieldMapTime, HhMmSsTakesTheDateFromGnss) {
    // The SGM time of day, made full UTC with the date of an RMC (as the engine and import do).
    const auto rmc = decodeNmea(nmeaWithChecksum(
        "GPRMC,085959.00,A,5200.0000,N,00430.0000,E,4.0,90.0,020626,,,A"));
    ASSERT_TRUE(isUsable(rmc.reason));
    InstrumentClock clock;
    clock.observe(rmc);
    const auto r = decodeFieldMap(defaultMagnetometerMap(),
                                  sealed("SGM,2,090000.125,48213.417,97,12.40,4.10"));
    ASSERT_EQ(r.reason, Reason::Ok) << r.detail;
    EXPECT_FALSE(r.utc_ns);  // a time of day alone is not full UTC
    EXPECT_EQ(*clock.toUtc(*r.tod_s), gnuDateNs("2026-06-02T09:00:00.125Z"));
}

TEST(FieldMapTime, FormatsChosenByKey) {
    const auto maps = mapsFrom(R"(
[fieldmap.a]
time = 0
time_format = "iso8601"
time_zone = "+01:00"
field_nT = 1

[fieldmap.b]
time = 0
time_format = "hhmmss"
field_nT = 1

[fieldmap.c]
time = 0
time_format = "iso8601"
field_nT = 1
)");
    ASSERT_EQ(maps.size(), 3u);
    EXPECT_EQ(maps[0].time_format, TimeFormat::Iso8601);
    EXPECT_EQ(maps[0].time_zone_s, 3600);
    EXPECT_EQ(maps[1].time_format, TimeFormat::HhMmSs);  // "hhmmss" = "hhmmss.sss"
    EXPECT_EQ(maps[2].time_zone_s, 0);                   // default: UTC
    const auto a = decodeFieldMap(maps[0], "2026-06-02T10:00:00,48000.5");
    ASSERT_EQ(a.reason, Reason::Ok) << a.detail;
    EXPECT_EQ(*a.utc_ns, gnuDateNs("2026-06-02T09:00:00Z"));
    // The same line with the wrong format chosen is a bad time field, named.
    const auto b = decodeFieldMap(maps[1], "2026-06-02T10:00:00,48000.5");
    EXPECT_EQ(b.reason, Reason::BadField);
    EXPECT_NE(b.detail.find("time"), std::string::npos) << b.detail;
}

}  // namespace
