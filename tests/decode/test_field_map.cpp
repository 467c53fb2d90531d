// Field-map decoder: the team's default layouts (SGM, SGA, SGC), maps read from TOML, and every
// way a line can be bad. Checksums of built lines are computed independently in this file.
#include <gtest/gtest.h>

#include <cstdio>
#include <string>

#include "common/config_section.hpp"
#include "decode/field_map.hpp"

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

}  // namespace
