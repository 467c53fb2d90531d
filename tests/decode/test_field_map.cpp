// Field-map decoder: the team's default layouts (SGM, SGA, SGC), maps read from TOML, and every
// way a line can be bad. Checksums of built lines are computed independently in this file.
#include <gtest/gtest.h>

#include <cstdio>
#include <string>

#include "common/config_section.hpp"
#include "decode/field_map.hpp"
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
        ConfigErrorCase{"[fieldmap.m]\ntime = 0\n", "fieldmap.m.field_nT"}));

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

}  // namespace
