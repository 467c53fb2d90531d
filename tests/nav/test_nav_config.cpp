// [vessel], [tow] and [[sensor]] parsing: values, defaults, and errors naming file and key.
#include <gtest/gtest.h>

#include <string>

#include "common/config_section.hpp"
#include "nav/nav_config.hpp"

namespace {

using sg::config::ConfigError;
using sg::config::Section;
using namespace sg::nav;

const char* kGood = R"(
[vessel]
antenna_m = [12.0, -0.5, 8.0]
tow_point_m = [-18.0, 1.0, 2.5]
heading_source = "hdt"
draft_m = 3.2
transducer_depth_m = 2.8
gnss_latency_ms = 50

[tow]
extra_layback_m = 3.0
cable_out_m = 65
mag_latency_ms = 120

[[sensor]]
index = 0
cross_m = -1.5

[[sensor]]
index = 1
cross_m = 1.5
along_m = -0.5
)";

std::string errorOf(const std::string& text) {
    try {
        auto t = sg::config::parseText(text, "vessel.toml");
        parseVesselConfig(Section(t, "vessel.toml"));
    } catch (const ConfigError& e) {
        return e.what();
    }
    return "(no error)";
}

TEST(NavConfig, ParsesVesselTowAndSensors) {
    auto t = sg::config::parseText(kGood, "vessel.toml");
    const NavConfig c = parseVesselConfig(Section(t, "vessel.toml"));
    EXPECT_DOUBLE_EQ(c.vessel.antenna_m[0], 12.0);
    EXPECT_DOUBLE_EQ(c.vessel.tow_point_m[2], 2.5);
    EXPECT_EQ(c.vessel.heading_source, HeadingSource::Hdt);
    EXPECT_DOUBLE_EQ(c.vessel.gnss_latency_ms, 50.0);
    ASSERT_TRUE(c.tow.cable_out_m.has_value());
    EXPECT_DOUBLE_EQ(*c.tow.cable_out_m, 65.0);
    EXPECT_FALSE(c.tow.sensor_depth_m.has_value());
    ASSERT_EQ(c.sensors.size(), 2u);
    EXPECT_DOUBLE_EQ(c.sensors[1].cross_m, 1.5);
    EXPECT_DOUBLE_EQ(c.sensors[1].along_m, -0.5);
}

TEST(NavConfig, DefaultsToOneSensor) {
    auto t = sg::config::parseText("", "empty.toml");
    const NavConfig c = parseVesselConfig(Section(t, "empty.toml"));
    ASSERT_EQ(c.sensors.size(), 1u);
    EXPECT_EQ(c.vessel.heading_source, HeadingSource::Auto);
}

TEST(NavConfig, ErrorsNameFileAndKey) {
    std::string typo = kGood;
    typo.replace(typo.find("draft_m"), 7, "drafts");
    EXPECT_NE(errorOf(typo).find("vessel.drafts"), std::string::npos) << errorOf(typo);
    EXPECT_NE(errorOf(typo).find("vessel.toml"), std::string::npos) << errorOf(typo);

    std::string dup = kGood;
    dup.replace(dup.find("index = 1"), 9, "index = 0");
    EXPECT_NE(errorOf(dup).find("sensor[1].index"), std::string::npos) << errorOf(dup);

    std::string pair = kGood;
    pair.replace(pair.find("[12.0, -0.5, 8.0]"), 17, "[12.0, -0.5]");
    EXPECT_NE(errorOf(pair).find("vessel.antenna_m"), std::string::npos) << errorOf(pair);

    std::string src = kGood;
    src.replace(src.find("\"hdt\""), 5, "\"gyro\"");
    EXPECT_NE(errorOf(src).find("vessel.heading_source"), std::string::npos) << errorOf(src);

    // Extrapolation past the last fix: 0 by default, at most fix_max_age_s (2 s by default).
    std::string ex = kGood;
    ex.replace(ex.find("draft_m"), 7, "extrapolation_s = 1.5\ndraft_m");
    auto t = sg::config::parseText(ex, "vessel.toml");
    EXPECT_DOUBLE_EQ(parseVesselConfig(Section(t, "vessel.toml")).vessel.extrapolation_s, 1.5);
    ex.replace(ex.find("1.5\n"), 3, "2.5");
    EXPECT_NE(errorOf(ex).find("vessel.extrapolation_s"), std::string::npos) << errorOf(ex);
    auto e = sg::config::parseText("", "empty.toml");
    EXPECT_DOUBLE_EQ(parseVesselConfig(Section(e, "empty.toml")).vessel.extrapolation_s, 0.0);
}

}  // namespace
