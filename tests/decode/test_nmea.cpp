// NMEA 0183 decoder against published example sentences and against sentences built here with a
// checksum computed independently in this file. Sources are named beside each sentence; where a
// sentence is quoted from memory it says so (each such checksum was re-verified by the XOR below,
// so a wrongly remembered character would make the test fail rather than pass).
#include <gtest/gtest.h>

#include <cstdio>
#include <cstdlib>
#include <iterator>
#include <string>
#include <vector>

#include "decode/nmea.hpp"
#include "engine/line_decoder.hpp"
#include "reason_printer.hpp"

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

TEST(NmeaPublished, SirfStyleGgaAndRmc) {
    // GGA/RMC pair at 09:27:50 on 28 May 2011, 53 deg 21.6802' N, 6 deg 30.3372' W, as printed in
    // several NMEA tutorials (quoted from memory; checksums verified by XOR when writing this).
    const auto g = decodeNmea(
        "$GPGGA,092750.000,5321.6802,N,00630.3372,W,1,8,1.03,61.7,M,55.2,M,,*76");
    ASSERT_EQ(g.reason, Reason::Ok) << g.detail;
    EXPECT_NEAR(*std::get<Gga>(g.data).lon_deg, -(6 + 30.3372 / 60), 1e-12);
    EXPECT_EQ(*std::get<Gga>(g.data).satellites, 8);
    const auto r =
        decodeNmea("$GPRMC,092750.000,A,5321.6802,N,00630.3372,W,0.02,31.66,280511,,,A*43");
    ASSERT_EQ(r.reason, Reason::Ok) << r.detail;
    const auto& rmc = std::get<Rmc>(r.data);
    EXPECT_EQ(*rmc.date, (Date{2011, 5, 28}));
    EXPECT_FALSE(rmc.mag_var_deg);
    EXPECT_EQ(rmc.mode, 'A');
    EXPECT_NEAR(*rmc.sog_mps, 0.02 * kKnot, 1e-15);
}

TEST(NmeaPublished, HighPrecisionGgaWithStation) {
    // Trimble receiver documentation, GGA example (from memory): 8-decimal minutes, DGPS fix,
    // negative geoid separation, correction age 2.0 s, station 0031.
    const auto s = decodeNmea(
        "$GPGGA,172814.0,3723.46587704,N,12202.26957864,W,2,6,1.2,18.893,M,-25.669,M,2.0,0031*4F");
    ASSERT_EQ(s.reason, Reason::Ok) << s.detail;
    const auto& g = std::get<Gga>(s.data);
    EXPECT_NEAR(*g.lat_deg, 37 + 23.46587704 / 60, 1e-12);
    EXPECT_NEAR(*g.lon_deg, -(122 + 2.26957864 / 60), 1e-12);
    EXPECT_EQ(g.quality, 2);
    EXPECT_DOUBLE_EQ(*g.geoid_sep_m, -25.669);
    EXPECT_EQ(*g.dgps_station, 31);
}

TEST(NmeaPublished, RmcWithEastVariation) {
    // NMEA FAQ (Peter Bennett), RMC example, from memory: 19 Nov 1994, variation 20.3 E.
    const auto s =
        decodeNmea("$GPRMC,225446,A,4916.45,N,12311.12,W,000.5,054.7,191194,020.3,E*68");
    ASSERT_EQ(s.reason, Reason::Ok) << s.detail;
    const auto& r = std::get<Rmc>(s.data);
    EXPECT_EQ(*r.date, (Date{1994, 11, 19}));
    EXPECT_DOUBLE_EQ(*r.mag_var_deg, 20.3);
    EXPECT_NEAR(*r.lon_deg, -(123 + 11.12 / 60), 1e-12);
}

TEST(NmeaPublished, Gll) {
    // NMEA FAQ / DePriest, GLL with time and status (from memory).
    const auto s = decodeNmea("$GPGLL,4916.45,N,12311.12,W,225444,A,*1D");
    ASSERT_EQ(s.reason, Reason::Ok) << s.detail;
    const auto& g = std::get<Gll>(s.data);
    EXPECT_NEAR(*g.lat_deg, 49 + 16.45 / 60, 1e-12);
    EXPECT_DOUBLE_EQ(*g.tod_s, 22 * 3600 + 54 * 60 + 44);
    EXPECT_TRUE(g.valid);
    // The pre-2.0 layout without time and status (NMEA FAQ, from memory): position kept, but not
    // marked valid because nothing says it is.
    const auto old = decodeNmea("$GPGLL,3751.65,S,14507.36,E*77");
    ASSERT_EQ(old.reason, Reason::Ok) << old.detail;
    EXPECT_NEAR(*std::get<Gll>(old.data).lat_deg, -(37 + 51.65 / 60), 1e-12);
    EXPECT_FALSE(std::get<Gll>(old.data).valid);
}

TEST(NmeaPublished, Vtg) {
    // DePriest, VTG (from memory): 54.7 T, 34.4 M, 5.5 kn, 10.2 km/h. We take km/h.
    const auto s = decodeNmea("$GPVTG,054.7,T,034.4,M,005.5,N,010.2,K*48");
    ASSERT_EQ(s.reason, Reason::Ok) << s.detail;
    const auto& v = std::get<Vtg>(s.data);
    EXPECT_DOUBLE_EQ(*v.cog_true_deg, 54.7);
    EXPECT_DOUBLE_EQ(*v.cog_mag_deg, 34.4);
    EXPECT_NEAR(*v.sog_mps, 10.2 / 3.6, 1e-12);
    // NMEA 2.3 layout with an empty magnetic course and mode D (Trimble docs, from memory).
    const auto d = decodeNmea("$GPVTG,140.88,T,,M,8.04,N,14.89,K,D*05");
    ASSERT_EQ(d.reason, Reason::Ok) << d.detail;
    EXPECT_FALSE(std::get<Vtg>(d.data).cog_mag_deg);
    EXPECT_EQ(std::get<Vtg>(d.data).mode, 'D');
}

TEST(NmeaBuilt, VtgKnotsOnly) {
    const auto s = decodeNmea(withChecksum("IIVTG,,T,,M,4.0,N,,K"));
    ASSERT_EQ(s.reason, Reason::Ok) << s.detail;
    EXPECT_NEAR(*std::get<Vtg>(s.data).sog_mps, 4.0 * 1852.0 / 3600.0, 1e-12);
}

TEST(NmeaPublished, HdtZdaGstGns) {
    // Trimble receiver documentation examples (from memory) for HDT, ZDA, GST and GNS.
    const auto h = decodeNmea("$GPHDT,123.456,T*32");
    ASSERT_EQ(h.reason, Reason::Ok) << h.detail;
    EXPECT_DOUBLE_EQ(std::get<Hdt>(h.data).heading_deg, 123.456);

    const auto z = decodeNmea("$GPZDA,201530.00,04,07,2002,00,00*60");
    ASSERT_EQ(z.reason, Reason::Ok) << z.detail;
    EXPECT_EQ(std::get<Zda>(z.data).date, (Date{2002, 7, 4}));
    EXPECT_DOUBLE_EQ(std::get<Zda>(z.data).tod_s, 20 * 3600 + 15 * 60 + 30);
    EXPECT_EQ(*std::get<Zda>(z.data).zone_hours, 0);
    // ZDA with a negative local zone (NMEA references, from memory).
    const auto z2 = decodeNmea("$GPZDA,160012.71,11,03,2004,-1,00*7D");
    ASSERT_EQ(z2.reason, Reason::Ok) << z2.detail;
    EXPECT_EQ(*std::get<Zda>(z2.data).zone_hours, -1);
    EXPECT_NEAR(std::get<Zda>(z2.data).tod_s, 16 * 3600 + 12.71, 1e-9);

    const auto g = decodeNmea("$GPGST,172814.0,0.006,0.023,0.020,273.6,0.023,0.020,0.031*6A");
    ASSERT_EQ(g.reason, Reason::Ok) << g.detail;
    const auto& gst = std::get<Gst>(g.data);
    EXPECT_DOUBLE_EQ(*gst.rms_m, 0.006);
    EXPECT_DOUBLE_EQ(*gst.orient_deg, 273.6);
    EXPECT_DOUBLE_EQ(*gst.sigma_alt_m, 0.031);

    const auto n = decodeNmea(
        "$GNGNS,014035.00,4332.69262,S,17235.48549,E,RR,13,0.9,25.63,11.24,,*70");
    ASSERT_EQ(n.reason, Reason::Ok) << n.detail;
    const auto& gns = std::get<Gns>(n.data);
    EXPECT_EQ(gns.mode, "RR");
    EXPECT_EQ(*gns.satellites, 13);
    EXPECT_NEAR(*gns.lat_deg, -(43 + 32.69262 / 60), 1e-12);
    EXPECT_NEAR(*gns.lon_deg, 172 + 35.48549 / 60, 1e-12);
    EXPECT_DOUBLE_EQ(*gns.geoid_sep_m, 11.24);
}

TEST(NmeaPublished, DepthBelowTransducer) {
    // DBT example found in several NMEA references (from memory; source not pinned down):
    // 7.8 ft, 2.4 m, 1.3 fathoms. The metres field wins.
    const auto s = decodeNmea("$SDDBT,7.8,f,2.4,M,1.3,F*0D");
    ASSERT_EQ(s.reason, Reason::Ok) << s.detail;
    EXPECT_EQ(s.talker, "SD");
    EXPECT_DOUBLE_EQ(std::get<Dbt>(s.data).depth_m, 2.4);
}

TEST(NmeaBuilt, DbtFeetOnlyAndDpt) {
    // 1 ft = 0.3048 m exactly (international foot, 1959).
    const auto s = decodeNmea(withChecksum("SDDBT,100.0,f,,M,,F"));
    ASSERT_EQ(s.reason, Reason::Ok) << s.detail;
    EXPECT_DOUBLE_EQ(std::get<Dbt>(s.data).depth_m, 30.48);
    const auto none = decodeNmea(withChecksum("SDDBT,,f,,M,,F"));
    EXPECT_EQ(none.reason, Reason::BadField);

    const auto p = decodeNmea(withChecksum("SDDPT,12.5,-0.8,100"));
    ASSERT_EQ(p.reason, Reason::Ok) << p.detail;
    const auto& dpt = std::get<Dpt>(p.data);
    EXPECT_DOUBLE_EQ(dpt.depth_m, 12.5);
    EXPECT_DOUBLE_EQ(*dpt.offset_m, -0.8);
    EXPECT_DOUBLE_EQ(*dpt.max_range_m, 100);
    // NMEA 2.0 DPT has no max range field.
    const auto p2 = decodeNmea(withChecksum("IIDPT,3.1,0.0"));
    ASSERT_EQ(p2.reason, Reason::Ok) << p2.detail;
    EXPECT_FALSE(std::get<Dpt>(p2.data).max_range_m);
}

TEST(NmeaTalkers, AnyTalkerIsAccepted) {
    for (const char* talker : {"GP", "GN", "GL", "GA", "GB", "GQ", "II", "IN", "HE", "HC", "SD"}) {
        const auto s = decodeNmea(withChecksum(std::string(talker) + "HDT,10.0,T"));
        ASSERT_EQ(s.reason, Reason::Ok) << talker << ": " << s.detail;
        EXPECT_EQ(s.talker, talker);
        EXPECT_EQ(s.type, "HDT");
    }
}

TEST(NmeaUnknown, OtherSentencesAreCountedNotDecoded) {
    // GSA and GSV examples, DePriest (from memory).
    const auto gsa = decodeNmea("$GPGSA,A,3,04,05,,09,12,,,24,,,,,2.5,1.3,2.1*39");
    EXPECT_EQ(gsa.reason, Reason::UnknownSentence);
    EXPECT_EQ(gsa.type, "GSA");
    const auto gsv =
        decodeNmea("$GPGSV,2,1,08,01,40,083,46,02,17,308,41,12,07,344,39,14,22,228,45*75");
    EXPECT_EQ(gsv.reason, Reason::UnknownSentence);
    const auto prop = decodeNmea(withChecksum("PGRME,15.0,M,45.0,M,25.0,M"));
    EXPECT_EQ(prop.reason, Reason::UnknownSentence);
    EXPECT_EQ(prop.talker, "P");
    EXPECT_EQ(prop.type, "GRME");
    const auto ais = decodeNmea("!AIVDM,1,1,,A,13aEOK?P00PD2wVMdLDRhgvL289?,0*26");
    EXPECT_EQ(ais.reason, Reason::UnknownSentence);
    EXPECT_TRUE(std::holds_alternative<std::monostate>(ais.data));
    // An unknown sentence still needs a good checksum.
    EXPECT_EQ(decodeNmea("$GPGSA,A,3,04,05,,09,12,,,24,,,,,2.5,1.3,2.1*38").reason,
              Reason::BadChecksum);
}

TEST(NmeaChecksum, MalformedChecksumField) {
    const std::string good = withChecksum("GPHDT,10.0,T");
    const std::string body = good.substr(0, good.size() - 2);  // ends with '*'
    EXPECT_EQ(decodeNmea(body).reason, Reason::BadChecksum);           // '*' alone
    EXPECT_EQ(decodeNmea(body + "4").reason, Reason::BadChecksum);     // one digit
    EXPECT_EQ(decodeNmea(body + "G1").reason, Reason::BadChecksum);    // not hex
    EXPECT_EQ(decodeNmea(good + "0").reason, Reason::BadChecksum);     // three digits
    EXPECT_EQ(decodeNmea(good + " ").reason, Reason::BadChecksum);     // trailing space
}

TEST(NmeaChecksum, LowerCaseHexAndTrailingTerminatorAccepted) {
    std::string line = "$GPRMC,123519,A,4807.038,N,01131.000,E,022.4,084.4,230394,003.1,W*6a";
    EXPECT_EQ(decodeNmea(line).reason, Reason::Ok);
    EXPECT_EQ(decodeNmea("$GPHDT,123.456,T*32\r\n").reason, Reason::Ok);
}

TEST(NmeaChecksum, EverySingleBitFlipIsCaught) {
    // A single-bit error changes the XOR, so every flip inside the body must be caught (a flip
    // that creates a '*' or ',' may end in another reason, but never in Ok).
    const std::string good = withChecksum("GPGGA,123519,4807.038,N,01131.000,E,1,08,0.9,545.4,M,46.9,M,,");
    const std::size_t star = good.find('*');
    for (std::size_t i = 1; i < star; ++i) {
        for (int bit = 0; bit < 7; ++bit) {
            std::string bad = good;
            bad[i] = static_cast<char>(bad[i] ^ (1 << bit));
            EXPECT_FALSE(isUsable(decodeNmea(bad).reason)) << bad;
        }
    }
}

TEST(NmeaReasons, NotNmea) {
    EXPECT_EQ(decodeNmea("GPGGA,123519,4807.038,N").reason, Reason::NotNmea);
    EXPECT_EQ(decodeNmea("SGM,2,004512.300,48213.417,97,12.40,4.10*4F").reason, Reason::NotNmea);
    EXPECT_EQ(decodeNmea(" $GPHDT,10.0,T").reason, Reason::NotNmea);
}

TEST(NmeaReasons, Truncated) {
    // A GGA cut after the longitude but with a valid checksum of what remains.
    const auto s = decodeNmea(withChecksum("GPGGA,123519,4807.038,N,01131.000,E"));
    EXPECT_EQ(s.reason, Reason::Truncated);
    EXPECT_NE(s.detail.find("GGA needs 14"), std::string::npos) << s.detail;
    EXPECT_EQ(decodeNmea(withChecksum("GPRMC")).reason, Reason::Truncated);
    EXPECT_EQ(decodeNmea(withChecksum("HEHDT")).reason, Reason::Truncated);
    // Cut in transit: the checksum is lost with the end, so the line arrives without one.
    EXPECT_EQ(decodeNmea("$GPRMC,123519,A,4807.038,N").reason, Reason::Truncated);
}

struct BadFieldCase {
    const char* body;
    const char* field;  // expected in detail
};

class NmeaBadField : public ::testing::TestWithParam<BadFieldCase> {};

TEST_P(NmeaBadField, IsRejectedNamingTheField) {
    const auto s = decodeNmea(withChecksum(GetParam().body));
    EXPECT_EQ(s.reason, Reason::BadField) << GetParam().body;
    EXPECT_NE(s.detail.find(GetParam().field), std::string::npos) << s.detail;
    EXPECT_TRUE(std::holds_alternative<std::monostate>(s.data));
}

INSTANTIATE_TEST_SUITE_P(
    Cases, NmeaBadField,
    ::testing::Values(
        BadFieldCase{"GPGGA,123519,4860.000,N,01131.000,E,1,08,0.9,545.4,M,46.9,M,,", "minutes >= 60"},
        BadFieldCase{"GPGGA,123519,9100.000,N,01131.000,E,1,08,0.9,545.4,M,46.9,M,,", "latitude > 90"},
        BadFieldCase{"GPGGA,123519,4807.038,N,18100.000,E,1,08,0.9,545.4,M,46.9,M,,", "longitude > 180"},
        BadFieldCase{"GPGGA,123519,4807.038,X,01131.000,E,1,08,0.9,545.4,M,46.9,M,,", "hemisphere"},
        BadFieldCase{"GPGGA,123519,4807.038,N,01131.000,N,1,08,0.9,545.4,M,46.9,M,,", "hemisphere"},
        BadFieldCase{"GPGGA,123519,4807.038,N,01131.000,E,9,08,0.9,545.4,M,46.9,M,,", "fix quality"},
        BadFieldCase{"GPGGA,123519,4807.038,N,01131.000,E,,08,0.9,545.4,M,46.9,M,,", "fix quality"},
        BadFieldCase{"GPGGA,243519,4807.038,N,01131.000,E,1,08,0.9,545.4,M,46.9,M,,", "hours > 23"},
        BadFieldCase{"GPGGA,126019,4807.038,N,01131.000,E,1,08,0.9,545.4,M,46.9,M,,", "minutes > 59"},
        BadFieldCase{"GPGGA,12:35:19,4807.038,N,01131.000,E,1,08,0.9,545.4,M,46.9,M,,", "time"},
        BadFieldCase{"GPGGA,123519,48O7.038,N,01131.000,E,1,08,0.9,545.4,M,46.9,M,,", "latitude"},
        BadFieldCase{"GPGGA,123519,-4807.038,N,01131.000,E,1,08,0.9,545.4,M,46.9,M,,", "latitude"},
        BadFieldCase{"GPGGA,123519,,,,,1,08,0.9,545.4,M,46.9,M,,", "empty with a fix"},
        BadFieldCase{"GPRMC,123519,X,4807.038,N,01131.000,E,022.4,084.4,230394,003.1,W", "status"},
        BadFieldCase{"GPRMC,123519,A,4807.038,N,01131.000,E,022.4,084.4,310294,003.1,W", "date"},
        BadFieldCase{"GPRMC,123519,A,4807.038,N,01131.000,E,022.4,084.4,23031994,003.1,W", "date"},
        BadFieldCase{"GPRMC,123519,A,4807.038,N,01131.000,E,-22.4,084.4,230394,003.1,W", "speed"},
        BadFieldCase{"GPRMC,123519,A,4807.038,N,01131.000,E,1e3,084.4,230394,003.1,W", "speed"},
        BadFieldCase{"GPVTG,054.7,T,034.4,M,005.5,N,010.2,X", "km/h unit"},
        BadFieldCase{"GPHDT,,T", "heading"},
        BadFieldCase{"GPHDT,400.0,T", "heading"},
        BadFieldCase{"GPHDT,nan,T", "heading"},
        BadFieldCase{"GPHDT,10.0,M", "heading unit"},
        BadFieldCase{"GPZDA,201530.00,30,02,2002,00,00", "date"},
        BadFieldCase{"GPZDA,201530.00,04,07,02,00,00", "date"},
        BadFieldCase{"GPZDA,,04,07,2002,00,00", "time"},
        BadFieldCase{"GNGNS,014035.00,4332.69262,S,17235.48549,E,XX,13,0.9,25.63,11.24,,", "mode"},
        BadFieldCase{"GPGLL,4916.45,N,12311.12,W,225444,B,", "status"},
        BadFieldCase{"SDDPT,-1.0,0.5", "depth"},
        // Fields the core uses stay strict (coverage would be built on them).
        BadFieldCase{"GPRMC,123519,A,4807.038,N,01131.000,E,abc,084.4,230394,003.1,W", "speed"},
        BadFieldCase{"GPVTG,054.7,T,034.4,M,5.5.5,N,,K", "speed knots"},
        BadFieldCase{"GPGST,172814.0,0.006,0.023,0.020,273.6,-0.023,0.020,0.031", "sigma latitude"},
        BadFieldCase{"GNGNS,014035.00,4332.69262,S,17235.48549,E,,13,0.9,25.63,11.24,,", "mode"},
        BadFieldCase{"GPGLL,4916.45,N,12311.12,W,225444,,", "status"},
        BadFieldCase{"SDDBT,7.8,f,x,M,1.3,F", "depth metres"},
        BadFieldCase{"SDDBT,7.8,q,2.4,M,1.3,F", "feet unit"}));

TEST(NmeaReasons, BinaryBytes) {
    std::string line = "$GPHDT,10.0,T*";
    line[7] = '\0';
    EXPECT_EQ(decodeNmea(line).reason, Reason::BinaryBytes);
    EXPECT_EQ(decodeNmea(std::string("$GPHDT,1\xff.0,T")).reason, Reason::BinaryBytes);
    EXPECT_EQ(decodeNmea(std::string("\0\0\0", 3)).reason, Reason::BinaryBytes);
    const auto s = decodeNmea(std::string("$GPHDT,\x01", 8));
    EXPECT_EQ(s.reason, Reason::BinaryBytes);
    EXPECT_NE(s.detail.find("offset 7"), std::string::npos) << s.detail;
    // The byte value is printed in hex, so it cannot be read as a position or a measurement.
    EXPECT_EQ(s.detail, "byte 0x01 at offset 7");
    EXPECT_EQ(decodeNmea(std::string("$GPHDT,1\xff.0,T")).detail, "byte 0xFF at offset 8");
    EXPECT_EQ(decodeNmea(std::string("ab\x1b", 3)).detail, "byte 0x1B at offset 2");
}

TEST(NmeaReasons, TooLong) {
    const std::string huge = "$GPGGA," + std::string(10 * 1024, '1');
    const auto s = decodeNmea(huge);
    EXPECT_EQ(s.reason, Reason::TooLong);
    // Within the byte limit but with more fields than any sentence has.
    EXPECT_EQ(decodeNmea(withChecksum("GPGSV" + std::string(60, ','))).reason, Reason::TooLong);
    // Just at the limit is still decoded (an unknown type here).
    std::string at_limit = withChecksum("GPXXX," + std::string(kMaxNmeaBytes - 10, 'A'));
    ASSERT_EQ(at_limit.size(), kMaxNmeaBytes);
    EXPECT_EQ(decodeNmea(at_limit).reason, Reason::UnknownSentence);
}

TEST(NmeaReasons, EmptyLine) {
    EXPECT_EQ(decodeNmea("").reason, Reason::EmptyLine);
    EXPECT_EQ(decodeNmea("   ").reason, Reason::EmptyLine);
    EXPECT_EQ(decodeNmea("\r\n").reason, Reason::EmptyLine);
}

TEST(NmeaReasons, BadStart) {
    EXPECT_EQ(decodeNmea(withChecksum("gpgga,1")).reason, Reason::BadStart);
    EXPECT_EQ(decodeNmea(withChecksum("GPGG,1,2")).reason, Reason::BadStart);
    EXPECT_EQ(decodeNmea(withChecksum(",1,2")).reason, Reason::BadStart);
    EXPECT_EQ(decodeNmea(withChecksum("GP-GA,1,2")).reason, Reason::BadStart);
    EXPECT_EQ(decodeNmea("$").reason, Reason::BadStart);
}

TEST(NmeaReasons, NamesAreStableSnakeCase) {
    // These strings are stored in logs: changing one breaks every log already written.
    const std::pair<Reason, const char*> expected[] = {
        {Reason::Ok, "ok"},
        {Reason::NoChecksum, "no_checksum"},
        {Reason::BadChecksum, "bad_checksum"},
        {Reason::NotNmea, "not_nmea"},
        {Reason::Truncated, "truncated"},
        {Reason::BadField, "bad_field"},
        {Reason::UnknownSentence, "unknown_sentence"},
        {Reason::BinaryBytes, "binary_bytes"},
        {Reason::TooLong, "too_long"},
        {Reason::EmptyLine, "empty_line"},
        {Reason::BadStart, "bad_start"},
        {Reason::FieldIgnored, "field_ignored"},
        {Reason::MissingChecksum, "missing_checksum"},
    };
    static_assert(std::size(expected) == kReasonCount);
    for (const auto& [r, name] : expected) EXPECT_EQ(reasonName(r), name);
}

TEST(NmeaHelpers, NmeaWithChecksumMatchesIndependentXor) {
    EXPECT_EQ(nmeaWithChecksum("GPHDT,123.456,T"), "$GPHDT,123.456,T*32");  // Trimble, from memory
    EXPECT_EQ(nmeaWithChecksum("GNGGA,1,2,3"), withChecksum("GNGGA,1,2,3"));
    EXPECT_EQ(xorChecksum(""), 0);
}

TEST(NmeaNumbers, DecimalParsingIsCorrectlyRounded) {
    // Values whose nearest double differs from naive digit-by-digit accumulation; the decoder
    // must agree with the C library's strtod (correctly rounded on glibc).
    for (const char* v : {"0.1", "0.3", "123.456", "4807.038", "99999.99999999", "0.000000001",
                          "99999.123456789012345678", "1.0000000000000002220446"}) {
        const auto s = decodeNmea(withChecksum(std::string("GPGST,000000,") + v + ",,,,,,"));
        ASSERT_EQ(s.reason, Reason::Ok) << v << " " << s.detail;
        EXPECT_EQ(*std::get<Gst>(s.data).rms_m, std::strtod(v, nullptr)) << v;
    }
}

// A field the core does not use, when malformed, is null and flagged; the rest of the sentence is
// used (issue #14: 68 valid, checksummed RMC sentences of real receivers were lost that way).
struct IgnoredFieldCase {
    const char* body;
    const char* field;  // expected in detail
};

class NmeaIgnoredField : public ::testing::TestWithParam<IgnoredFieldCase> {};

TEST_P(NmeaIgnoredField, IsNullAndTheSentenceIsKept) {
    const auto s = decodeNmea(withChecksum(GetParam().body));
    EXPECT_EQ(s.reason, Reason::FieldIgnored) << GetParam().body << ": " << s.detail;
    EXPECT_TRUE(isUsable(s.reason));
    EXPECT_TRUE(s.checksum_ok);
    EXPECT_NE(s.detail.find(GetParam().field), std::string::npos) << s.detail;
    EXPECT_NE(s.detail.find("set to null"), std::string::npos) << s.detail;
    EXPECT_FALSE(std::holds_alternative<std::monostate>(s.data));
}

INSTANTIATE_TEST_SUITE_P(
    Cases, NmeaIgnoredField,
    ::testing::Values(
        IgnoredFieldCase{"GPGGA,123519,4807.038,N,01131.000,E,1,08,0.9,545.4,F,46.9,M,,", "(altitude unit)"},
        IgnoredFieldCase{"GPGGA,123519,4807.038,N,01131.000,E,1,xx,0.9,545.4,M,46.9,M,,", "(satellites)"},
        IgnoredFieldCase{"GPGGA,123519,4807.038,N,01131.000,E,1,08,-1,545.4,M,46.9,M,,", "(hdop)"},
        IgnoredFieldCase{"GPGGA,123519,4807.038,N,01131.000,E,2,08,0.9,545.4,M,46.9,M,1.5.,2000", "(dgps age)"},
        IgnoredFieldCase{"GPGGA,123519,4807.038,N,01131.000,E,2,08,0.9,545.4,M,46.9,M,1.5,2000", "(dgps station)"},
        IgnoredFieldCase{"GPRMC,123519,A,4807.038,N,01131.000,E,022.4,361.0,230394,003.1,W", "(course)"},
        IgnoredFieldCase{"GPRMC,123519,A,4807.038,N,01131.000,E,022.4,084.4,230394,003.1,", "(variation direction)"},
        IgnoredFieldCase{"GPRMC,123519,A,4807.038,N,01131.000,E,022.4,084.4,230394,003.1,X,A", "(variation direction)"},
        IgnoredFieldCase{"GPRMC,123519,A,4807.038,N,01131.000,E,022.4,084.4,230394,003.1,W,Q", "(mode)"},
        IgnoredFieldCase{"GPVTG,400.0,T,034.4,M,005.5,N,010.2,K", "(course true)"},
        IgnoredFieldCase{"GPVTG,054.7,X,034.4,M,005.5,N,010.2,K", "(course true unit)"},
        IgnoredFieldCase{"GPVTG,054.7,T,034.4,M,005.5,N,010.2,K,Z", "(mode)"},
        IgnoredFieldCase{"GPZDA,201530.00,04,07,2002,14,00", "(zone hours)"},
        IgnoredFieldCase{"GPZDA,201530.00,04,07,2002,00,75", "(zone minutes)"},
        IgnoredFieldCase{"GPGST,172814.0,-0.006,0.023,0.020,273.6,0.023,0.020,0.031", "(rms)"},
        IgnoredFieldCase{"GPGST,172814.0,0.006,0.023,0.020,373.6,0.023,0.020,0.031", "(orientation)"},
        IgnoredFieldCase{"GNGNS,014035.00,4332.69262,S,17235.48549,E,RR,13,0.9,25.63,11.24,,,X", "(navigational status)"},
        IgnoredFieldCase{"GNGNS,014035.00,4332.69262,S,17235.48549,E,RR,13,0.9,2x,11.24,,", "(altitude)"},
        IgnoredFieldCase{"GPGLL,4916.45,N,12311.12,W,225444,A,Q", "(mode)"},
        IgnoredFieldCase{"SDDPT,12.5,0.5,-100", "(max range)"}));

TEST(NmeaIgnored, RmcVariationUnknownKeepsTheDateAndPosition) {
    // Real receivers send 999.9 for "variation unknown". Built here; values invented.
    const auto s = decodeNmea(
        withChecksum("GPRMC,081836.00,A,3751.6500,S,14507.3600,E,000.0,360.0,130998,999.9,E"));
    ASSERT_EQ(s.reason, Reason::FieldIgnored) << s.detail;
    EXPECT_EQ(s.detail,
              "field 10 (magnetic variation) '999.9': out of range, set to null");
    const auto& r = std::get<Rmc>(s.data);
    EXPECT_FALSE(r.mag_var_deg);
    ASSERT_TRUE(r.date);
    EXPECT_EQ(*r.date, (Date{1998, 9, 13}));
    EXPECT_TRUE(r.valid);
    EXPECT_NEAR(*r.lat_deg, -(37 + 51.65 * kMinute), 1e-12);
    EXPECT_NEAR(*r.lon_deg, 145 + 7.36 * kMinute, 1e-12);
    EXPECT_DOUBLE_EQ(*r.cog_deg, 360.0);
}

TEST(NmeaIgnored, RmcModeLetterInTheVariationDirectionsPlace) {
    // Older/odd layout: 11 fields, the E/W letter missing and the mode letter in its place.
    const auto s = decodeNmea(
        withChecksum("GPRMC,123519,A,4807.038,N,01131.000,E,022.4,084.4,230394,003.1,A"));
    ASSERT_EQ(s.reason, Reason::FieldIgnored) << s.detail;
    EXPECT_NE(s.detail.find("field 11 (variation direction) 'A': missing, mode letter in its place"),
              std::string::npos)
        << s.detail;
    const auto& r = std::get<Rmc>(s.data);
    EXPECT_FALSE(r.mag_var_deg);
    EXPECT_EQ(r.mode, 'A');
    EXPECT_EQ(*r.date, (Date{1994, 3, 23}));
    // With an empty variation the same layout is just as usable.
    const auto e = decodeNmea(
        withChecksum("GPRMC,123519,A,4807.038,N,01131.000,E,022.4,084.4,230394,,D"));
    ASSERT_EQ(e.reason, Reason::FieldIgnored) << e.detail;
    EXPECT_EQ(std::get<Rmc>(e.data).mode, 'D');
    // 'E' there is read as east (a mode 'E' cannot be told from it): a plain, correct sentence.
    const auto east = decodeNmea(
        withChecksum("GPRMC,123519,A,4807.038,N,01131.000,E,022.4,084.4,230394,003.1,E"));
    ASSERT_EQ(east.reason, Reason::Ok) << east.detail;
    EXPECT_DOUBLE_EQ(*std::get<Rmc>(east.data).mag_var_deg, 3.1);
}

TEST(NmeaIgnored, SeveralFieldsAreAllNamedAndTheUsedOnesKept) {
    const auto s = decodeNmea(
        withChecksum("GPGGA,123519,4807.038,N,01131.000,E,4,1x,-0.9,545.4,F,46.9,M,,"));
    ASSERT_EQ(s.reason, Reason::FieldIgnored) << s.detail;
    EXPECT_EQ(s.detail,
              "field 7 (satellites) '1x': not an integer in range, set to null; "
              "field 8 (hdop) '-0.9': out of range, set to null; "
              "field 10 (altitude unit) 'F': unexpected unit letter, set to null");
    const auto& g = std::get<Gga>(s.data);
    EXPECT_FALSE(g.satellites);
    EXPECT_FALSE(g.hdop);
    EXPECT_FALSE(g.alt_m);  // its unit is wrong, so the value is not trusted either
    EXPECT_DOUBLE_EQ(*g.geoid_sep_m, 46.9);
    EXPECT_EQ(g.quality, 4);
    EXPECT_NEAR(*g.lat_deg, 48.1173, 1e-12);

    const auto z = decodeNmea(withChecksum("GPZDA,201530.00,04,07,2002,-14,61"));
    ASSERT_EQ(z.reason, Reason::FieldIgnored) << z.detail;
    EXPECT_EQ(std::get<Zda>(z.data).date, (Date{2002, 7, 4}));
    EXPECT_FALSE(std::get<Zda>(z.data).zone_hours);
    EXPECT_FALSE(std::get<Zda>(z.data).zone_minutes);

    const auto g2 = decodeNmea(withChecksum("GPGST,172814.0,x,x,x,x,0.023,0.020,x"));
    ASSERT_EQ(g2.reason, Reason::FieldIgnored) << g2.detail;
    EXPECT_DOUBLE_EQ(*std::get<Gst>(g2.data).sigma_lat_m, 0.023);
    EXPECT_DOUBLE_EQ(*std::get<Gst>(g2.data).sigma_lon_m, 0.020);

    // More ignored fields than the detail names: the rest are counted.
    const auto n = decodeNmea(
        withChecksum("GNGNS,014035.00,4332.69262,S,17235.48549,E,RR,x,x,x,x,x,x,x"));
    ASSERT_EQ(n.reason, Reason::FieldIgnored) << n.detail;
    EXPECT_NE(n.detail.find("; and 1 more"), std::string::npos) << n.detail;
    EXPECT_NEAR(*std::get<Gns>(n.data).lat_deg, -(43 + 32.69262 * kMinute), 1e-12);
}

TEST(NmeaIgnored, WithoutChecksumTheSentenceStaysNoChecksumAndNamesTheField) {
    const auto s =
        decodeNmea("$GPRMC,123519,A,4807.038,N,01131.000,E,022.4,084.4,230394,999.9,E");
    EXPECT_EQ(s.reason, Reason::NoChecksum);
    EXPECT_FALSE(s.checksum_ok);
    EXPECT_NE(s.detail.find("(magnetic variation) '999.9'"), std::string::npos) << s.detail;
    EXPECT_FALSE(std::get<Rmc>(s.data).mag_var_deg);
}

TEST(NmeaIgnored, AUsedFieldStillFailsEvenNextToAnIgnoredOne) {
    const auto s = decodeNmea(
        withChecksum("GPRMC,123519,A,4807.038,N,01131.000,E,022.4,084.4,320394,999.9,E"));
    EXPECT_EQ(s.reason, Reason::BadField);
    EXPECT_NE(s.detail.find("field 9 (date)"), std::string::npos) << s.detail;
    EXPECT_TRUE(std::holds_alternative<std::monostate>(s.data));
}

// A source that has sent checksums gets every later sentence without one rejected.
TEST(NmeaStream, CorruptedStarAfterChecksummedSentencesIsRejected) {
    const std::string good =
        withChecksum("GPRMC,123519,A,4807.038,N,01131.000,E,022.4,084.4,230394,003.1,W,A");
    ASSERT_EQ(good.substr(good.size() - 3), "*07");  // XOR by hand (python3), pinned here
    // The '*' corrupted in transit: its two hex digits now read as data of the last field.
    std::string to_comma = good, to_plus = good, lost = good;
    to_comma[good.size() - 3] = ',';
    to_plus[good.size() - 3] = '+';
    lost.erase(good.size() - 3, 1);
    // Without the per-source rule these would be accepted (marked no_checksum): the damage is
    // invisible. That is the defect this rule closes.
    EXPECT_EQ(decodeNmea(to_comma).reason, Reason::NoChecksum);

    NmeaStreamDecoder src;
    EXPECT_FALSE(src.checksummed());
    EXPECT_EQ(src.decode(good).reason, Reason::Ok);
    EXPECT_TRUE(src.checksummed());
    for (const auto& bad : {to_comma, to_plus, lost}) {
        const auto s = src.decode(bad);
        EXPECT_EQ(s.reason, Reason::MissingChecksum) << bad;
        EXPECT_FALSE(isUsable(s.reason));
        EXPECT_TRUE(std::holds_alternative<std::monostate>(s.data));
        EXPECT_NE(s.detail.find("has sent checksums"), std::string::npos) << s.detail;
    }
    // Unknown and proprietary sentences without a checksum are rejected too; checksummed ones
    // still pass.
    EXPECT_EQ(src.decode("$GPGSV,1,1,00").reason, Reason::MissingChecksum);
    EXPECT_EQ(src.decode(withChecksum("GPGSV,1,1,00")).reason, Reason::UnknownSentence);
    EXPECT_EQ(src.decode(withChecksum("HEHDT,10.0,T")).reason, Reason::Ok);
    // Framing faults keep their own reasons.
    EXPECT_EQ(src.decode("").reason, Reason::EmptyLine);
    EXPECT_EQ(src.decode("SGA,1,2").reason, Reason::NotNmea);
}

TEST(NmeaStream, SourceWithoutChecksumsIsAcceptedAndABadChecksumDoesNotArmTheRule) {
    NmeaStreamDecoder src;
    EXPECT_EQ(src.decode("$HEHDT,10.0,T").reason, Reason::NoChecksum);
    EXPECT_EQ(src.decode("$HEHDT,10.0,T*00").reason, Reason::BadChecksum);
    EXPECT_FALSE(src.checksummed());  // a wrong checksum proves nothing about the source
    EXPECT_EQ(src.decode("$HEHDT,11.0,T").reason, Reason::NoChecksum);
    // An unknown sentence with a correct checksum arms it.
    EXPECT_EQ(src.decode(withChecksum("PGRME,15.0,M,45.0,M,25.0,M")).reason,
              Reason::UnknownSentence);
    EXPECT_TRUE(src.checksummed());
    EXPECT_EQ(src.decode("$HEHDT,12.0,T").reason, Reason::MissingChecksum);
    // Two sources are independent.
    NmeaStreamDecoder other;
    EXPECT_EQ(other.decode("$HEHDT,12.0,T").reason, Reason::NoChecksum);
    // The stateless decoder can be asked for the rule directly.
    EXPECT_EQ(decodeNmea("$HEHDT,12.0,T", true).reason, Reason::MissingChecksum);
    EXPECT_EQ(decodeNmea(withChecksum("HEHDT,12.0,T"), true).reason, Reason::Ok);
}

TEST(NmeaStream, LineDecoderKeepsTheRulePerInputAndLogsTheReasons) {
    // What record, import and replay use: the raw log's status and reason, the counters by reason.
    sg::config::InputConfig gnss, gyro;
    gnss.name = "gnss";
    gyro.name = "gyro";
    std::int64_t next_id = 1;
    sg::engine::LineDecoder dec({gnss, gyro}, {}, [&] { return next_id++; });
    const std::string rmc =
        withChecksum("GPRMC,123519,A,4807.038,N,01131.000,E,022.4,084.4,230394,999.9,E");
    std::string corrupt = withChecksum("GPGGA,123519,4807.038,N,01131.000,E,1,08,0.9,545.4,M,46.9,M,,");
    corrupt[corrupt.size() - 3] = ',';
    auto feed = [&](const char* source, const std::string& bytes) {
        sg::ReceivedLine l;
        l.source = source;
        l.bytes = bytes;
        dec.onLine(l);
    };
    feed("gnss", rmc);
    feed("gyro", "$HEHDT,10.0,T");  // this source never sends checksums: accepted
    feed("gnss", corrupt);
    feed("gyro", "$HEHDT,11.0,T");
    const auto batch = dec.takeBatch();
    ASSERT_EQ(batch.raw.size(), 4u);
    EXPECT_EQ(batch.raw[0].status, sg::log::DecodeStatus::Ok);
    EXPECT_EQ(batch.raw[0].reason.rfind("field_ignored: field 10 (magnetic variation) '999.9'", 0), 0u)
        << batch.raw[0].reason;
    EXPECT_EQ(batch.raw[1].status, sg::log::DecodeStatus::Ok);
    EXPECT_EQ(batch.raw[2].status, sg::log::DecodeStatus::Rejected);
    EXPECT_EQ(batch.raw[2].reason.rfind("missing_checksum", 0), 0u) << batch.raw[2].reason;
    EXPECT_EQ(batch.raw[3].status, sg::log::DecodeStatus::Ok);
    ASSERT_EQ(batch.fixes.size(), 1u);  // the RMC's position is logged, the corrupted GGA is not
    const auto& c = dec.counters().at("gnss");
    EXPECT_EQ(c.by_reason.at("field_ignored"), 1u);
    EXPECT_EQ(c.by_reason.at("missing_checksum"), 1u);
    EXPECT_EQ(c.ok, 1u);
    EXPECT_EQ(c.rejected, 1u);
    EXPECT_EQ(dec.counters().at("gyro").by_reason.at("no_checksum"), 2u);
}

// Common practice on survey vessels: a hardware NMEA multiplexer merges, onto one serial port, a
// GNSS that sends checksums (talker GP) and a gyro that never does (talker HE, $HEHDT). The
// checksum itself is NMEA 0183's: '*' + two hex digits, the XOR of the bytes between '$' and '*'
// (withChecksum above, written without the library).
TEST(NmeaStream, ChecksumOptionalTalkerOnAMultiplexedPort) {
    const std::string gga =
        withChecksum("GPGGA,123519,4807.038,N,01131.000,E,1,08,0.9,545.4,M,46.9,M,,");
    const std::string rmc =
        withChecksum("GPRMC,123519,A,4807.038,N,01131.000,E,022.4,084.4,230394,003.1,W,A");
    const std::string gyro = "$HEHDT,271.4,T";  // the gyro as it arrives: no '*hh'
    // The GNSS's '*' corrupted in transit (its checksum digits now read as data) or lost.
    std::string gga_star_hit = gga, gga_star_lost = gga;
    gga_star_hit[gga.size() - 3] = ',';
    gga_star_lost.erase(gga.size() - 3, 1);
    // A gyro sentence with a wrong checksum: the correct one with its last hex digit changed.
    std::string gyro_bad = withChecksum("HEHDT,271.4,T");
    gyro_bad.back() = gyro_bad.back() == '0' ? '1' : '0';

    // Default (no exemption): once the GNSS has sent a checksum, every gyro line is rejected.
    NmeaStreamDecoder strict;
    EXPECT_EQ(strict.decode(gyro).reason, Reason::NoChecksum);  // rule not armed yet
    EXPECT_EQ(strict.decode(gga).reason, Reason::Ok);
    for (int k = 0; k < 3; ++k) EXPECT_EQ(strict.decode(gyro).reason, Reason::MissingChecksum);
    EXPECT_EQ(strict.decode(rmc).reason, Reason::Ok);
    EXPECT_EQ(strict.decode(gyro).reason, Reason::MissingChecksum);

    // checksum_optional_talkers = ["HE"]: the gyro's lines decode as they did before the rule
    // armed (same reason, detail and value), the GNSS keeps the rule.
    NmeaStreamDecoder mux(std::vector<std::string>{"HE"});
    const NmeaSentence before = decodeNmea(gyro);
    EXPECT_EQ(mux.decode(gga).reason, Reason::Ok);
    EXPECT_TRUE(mux.checksummed());
    for (int k = 0; k < 3; ++k) {
        const auto h = mux.decode(gyro);
        ASSERT_EQ(h.reason, Reason::NoChecksum) << h.detail;
        EXPECT_EQ(h.detail, before.detail);
        EXPECT_EQ(h.talker, "HE");
        EXPECT_DOUBLE_EQ(std::get<Hdt>(h.data).heading_deg, 271.4);
    }
    EXPECT_EQ(mux.decode(rmc).reason, Reason::Ok);
    for (const auto& bad : {gga_star_hit, gga_star_lost}) {
        const auto g = mux.decode(bad);
        EXPECT_EQ(g.reason, Reason::MissingChecksum) << bad;
        EXPECT_TRUE(std::holds_alternative<std::monostate>(g.data));
    }
    // A checksum the gyro does send is verified: wrong is bad_checksum, right is ok.
    const auto wrong = mux.decode(gyro_bad);
    EXPECT_EQ(wrong.reason, Reason::BadChecksum) << gyro_bad;
    EXPECT_TRUE(std::holds_alternative<std::monostate>(wrong.data));
    const auto right = mux.decode(withChecksum("HEHDT,271.5,T"));
    ASSERT_EQ(right.reason, Reason::Ok);
    EXPECT_DOUBLE_EQ(std::get<Hdt>(right.data).heading_deg, 271.5);
    // Only the listed talker: a magnetic compass (HC) on the same port keeps the rule, and so
    // does a proprietary sentence, which has no two-character talker.
    EXPECT_EQ(mux.decode("$HCHDT,270.9,T").reason, Reason::MissingChecksum);
    EXPECT_EQ(mux.decode("$PHEXX,1").reason, Reason::MissingChecksum);
    // The exemption does not disarm the rule for anyone else.
    EXPECT_TRUE(mux.checksummed());
    // The risk it takes (docs/formats.md): a GNSS sentence that loses its '*' AND has its talker
    // id damaged into the listed one passes unchecked, its checksum digits read as the last field
    // (GGA's reference station id). Pinned, so the documented risk is the real behaviour.
    ASSERT_EQ(gga.substr(gga.size() - 3), "*47");  // the published example's checksum (above)
    std::string risk = gga_star_lost;
    risk.replace(1, 2, "HE");
    const auto r = mux.decode(risk);
    ASSERT_EQ(r.reason, Reason::NoChecksum) << risk;
    EXPECT_EQ(std::get<Gga>(r.data).dgps_station, 47);
    // The stateless decoder takes the same list.
    const std::vector<std::string> he{"HE"};
    EXPECT_EQ(decodeNmea(gyro, true, he).reason, Reason::NoChecksum);
    EXPECT_EQ(decodeNmea(gga_star_hit, true, he).reason, Reason::MissingChecksum);
}

TEST(NmeaStream, LineDecoderTakesEachInputsChecksumOptionalTalkers) {
    // The same multiplexed lines on two inputs, one with the key: record, import and replay all
    // decode through LineDecoder, so the key of each input must reach its own decoder.
    sg::config::InputConfig plain, mux;
    plain.name = "plain";
    mux.name = "mux";
    mux.checksum_optional_talkers = {"HE"};
    std::int64_t next_id = 1;
    sg::engine::LineDecoder dec({plain, mux}, {}, [&] { return next_id++; });
    const std::string gga =
        withChecksum("GPGGA,123519,4807.038,N,01131.000,E,1,08,0.9,545.4,M,46.9,M,,");
    for (const char* source : {"plain", "mux"}) {
        for (const std::string& bytes : {gga, std::string("$HEHDT,12.5,T"), gga,
                                         std::string("$HEHDT,12.6,T")}) {
            sg::ReceivedLine l;
            l.source = source;
            l.bytes = bytes;
            dec.onLine(l);
        }
    }
    const auto batch = dec.takeBatch();
    ASSERT_EQ(batch.raw.size(), 8u);
    EXPECT_EQ(batch.raw[1].reason.rfind("missing_checksum", 0), 0u) << batch.raw[1].reason;
    EXPECT_EQ(batch.raw[3].reason.rfind("missing_checksum", 0), 0u) << batch.raw[3].reason;
    EXPECT_EQ(batch.raw[5].status, sg::log::DecodeStatus::Ok);
    EXPECT_EQ(batch.raw[5].reason, "no_checksum");
    EXPECT_EQ(batch.raw[7].status, sg::log::DecodeStatus::Ok);
    ASSERT_EQ(batch.headings.size(), 2u);  // only the exempt input's gyro lines
    EXPECT_EQ(batch.headings[0].source, "mux");
    EXPECT_DOUBLE_EQ(*batch.headings[0].heading_deg, 12.5);
    EXPECT_DOUBLE_EQ(*batch.headings[1].heading_deg, 12.6);
    EXPECT_EQ(dec.counters().at("plain").by_reason.at("missing_checksum"), 2u);
    EXPECT_EQ(dec.counters().at("mux").by_reason.at("no_checksum"), 2u);
    EXPECT_EQ(dec.counters().at("mux").by_reason.count("missing_checksum"), 0u);
}

}  // namespace
