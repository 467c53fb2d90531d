// NMEA 0183 decoder against published example sentences and against sentences built here with a
// checksum computed independently in this file. Sources are named beside each sentence; where a
// sentence is quoted from memory it says so (each such checksum was re-verified by the XOR below,
// so a wrongly remembered character would make the test fail rather than pass).
#include <gtest/gtest.h>

#include <cstdio>
#include <string>

#include "decode/nmea.hpp"

namespace {

using namespace sg::decode;

// Independent checksum: XOR of the characters between '$' and '*' (NMEA 0183, section 5.2.1),
// written here without using the library.
std::string withChecksum(const std::string& body) {
    unsigned x = 0;
    for (unsigned char c : body) x ^= c;
    char hex[3];
    std::snprintf(hex, sizeof hex, "%02X", x & 0xFFu);
    return "$" + body + "*" + hex;
}

constexpr double kMinute = 1.0 / 60.0;
constexpr double kKnot = 1852.0 / 3600.0;  // m/s, definition of the knot

TEST(NmeaPublished, GgaClassicExample) {
    // Widely published GGA example (Dale DePriest's NMEA data page and many receiver manuals),
    // quoted from memory: 12:35:19 UTC, 48 deg 07.038' N, 11 deg 31.000' E, GPS fix, 8 sats.
    const auto s = decodeNmea("$GPGGA,123519,4807.038,N,01131.000,E,1,08,0.9,545.4,M,46.9,M,,*47");
    ASSERT_EQ(s.reason, Reason::Ok) << s.detail;
    EXPECT_EQ(s.talker, "GP");
    EXPECT_EQ(s.type, "GGA");
    const auto& g = std::get<Gga>(s.data);
    EXPECT_DOUBLE_EQ(*g.tod_s, 12 * 3600 + 35 * 60 + 19);
    EXPECT_NEAR(*g.lat_deg, 48 + 7.038 * kMinute, 1e-12);
    EXPECT_NEAR(*g.lon_deg, 11 + 31.0 * kMinute, 1e-12);
    EXPECT_EQ(g.quality, 1);
    EXPECT_EQ(*g.satellites, 8);
    EXPECT_DOUBLE_EQ(*g.hdop, 0.9);
    EXPECT_DOUBLE_EQ(*g.alt_m, 545.4);
    EXPECT_DOUBLE_EQ(*g.geoid_sep_m, 46.9);
    EXPECT_FALSE(g.dgps_age_s);
    EXPECT_FALSE(g.dgps_station);
}

TEST(NmeaPublished, RmcClassicExample) {
    // Same source as above, from memory: 23 March 1994, 22.4 knots, course 84.4, variation 3.1 W.
    const auto s =
        decodeNmea("$GPRMC,123519,A,4807.038,N,01131.000,E,022.4,084.4,230394,003.1,W*6A");
    ASSERT_EQ(s.reason, Reason::Ok) << s.detail;
    const auto& r = std::get<Rmc>(s.data);
    EXPECT_TRUE(r.valid);
    EXPECT_DOUBLE_EQ(*r.tod_s, 45319.0);
    EXPECT_NEAR(*r.lat_deg, 48.1173, 1e-12);
    EXPECT_NEAR(*r.lon_deg, 11.516666666666667, 1e-12);
    EXPECT_NEAR(*r.sog_mps, 22.4 * kKnot, 1e-12);
    EXPECT_DOUBLE_EQ(*r.cog_deg, 84.4);
    ASSERT_TRUE(r.date);
    EXPECT_EQ(*r.date, (Date{1994, 3, 23}));
    EXPECT_DOUBLE_EQ(*r.mag_var_deg, -3.1);
}

TEST(NmeaBuilt, GgaSouthWestWithDgps) {
    const std::string line = withChecksum(
        "GNGGA,235959.95,3356.1234,S,15112.5000,W,2,12,0.7,-3.20,M,21.5,M,3.4,0123");
    const auto s = decodeNmea(line);
    ASSERT_EQ(s.reason, Reason::Ok) << s.detail;
    EXPECT_EQ(s.talker, "GN");
    const auto& g = std::get<Gga>(s.data);
    EXPECT_NEAR(*g.tod_s, 86399.95, 1e-9);
    EXPECT_NEAR(*g.lat_deg, -(33 + 56.1234 / 60), 1e-12);
    EXPECT_NEAR(*g.lon_deg, -(151 + 12.5 / 60), 1e-12);
    EXPECT_EQ(g.quality, 2);
    EXPECT_DOUBLE_EQ(*g.alt_m, -3.2);
    EXPECT_DOUBLE_EQ(*g.dgps_age_s, 3.4);
    EXPECT_EQ(*g.dgps_station, 123);
}

TEST(NmeaBuilt, GgaWithoutFixHasEmptyPosition) {
    const auto s = decodeNmea(withChecksum("GPGGA,000001.00,,,,,0,00,99.99,,,,,,"));
    ASSERT_EQ(s.reason, Reason::Ok) << s.detail;
    const auto& g = std::get<Gga>(s.data);
    EXPECT_EQ(g.quality, 0);
    EXPECT_FALSE(g.lat_deg);
    EXPECT_FALSE(g.lon_deg);
    EXPECT_FALSE(g.alt_m);
}

TEST(NmeaBuilt, RmcVoidWithEmptyFields) {
    const auto s = decodeNmea(withChecksum("GPRMC,010203.00,V,,,,,,,311226,,,N"));
    ASSERT_EQ(s.reason, Reason::Ok) << s.detail;
    const auto& r = std::get<Rmc>(s.data);
    EXPECT_FALSE(r.valid);
    EXPECT_FALSE(r.lat_deg);
    EXPECT_FALSE(r.sog_mps);
    EXPECT_EQ(*r.date, (Date{2026, 12, 31}));
    EXPECT_EQ(r.mode, 'N');
}

TEST(NmeaChecksum, NoChecksumIsAcceptedButMarked) {
    const auto s = decodeNmea("$GPGGA,123519,4807.038,N,01131.000,E,1,08,0.9,545.4,M,46.9,M,,");
    EXPECT_EQ(s.reason, Reason::NoChecksum);
    EXPECT_TRUE(std::holds_alternative<Gga>(s.data));
}

TEST(NmeaChecksum, WrongChecksumIsRejected) {
    // The published GGA with its checksum changed from 47 to 46.
    const auto s = decodeNmea("$GPGGA,123519,4807.038,N,01131.000,E,1,08,0.9,545.4,M,46.9,M,,*46");
    EXPECT_EQ(s.reason, Reason::BadChecksum);
    EXPECT_NE(s.detail.find("47"), std::string::npos) << s.detail;
    EXPECT_TRUE(std::holds_alternative<std::monostate>(s.data));
}

}  // namespace
