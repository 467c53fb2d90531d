// [geomagnetic], [detection] and [[target]] parsing: values, defaults, and errors that name the
// file and the key.
#include <gtest/gtest.h>

#include <functional>
#include <string>

#include "common/config_section.hpp"
#include "detect/target_model.hpp"

namespace {

using sg::config::ConfigError;
using sg::config::Section;
using namespace sg::detect;

const char* kGood = R"(
[geomagnetic]
inclination_deg = 66.5
declination_deg = 1.2
intensity_nT = 50200

[detection]
k = 4
min_anomaly_nT = 1.5
noise_window = 300

[[target]]
name = "500 lb bomb"
model = "mass_rule"
mass_kg = 227
burial_m = 1.0

[[target]]
name = "anchor"
model = "dipole"
moment_Am2 = 20
orientation = "induced"

[[target]]
name = "shell"
model = "sphere"
radius_m = 0.08
susceptibility = 1000
burial_m = 0.5
)";

std::string errorOf(const std::string& text) {
    try {
        auto t = sg::config::parseText(text, "survey.toml");
        parseDetectionConfig(Section(t, "survey.toml"));
    } catch (const ConfigError& e) {
        return e.what();
    }
    return "(no error)";
}

TEST(DetectionConfig, ParsesAllSections) {
    auto t = sg::config::parseText(kGood, "survey.toml");
    const DetectionConfig cfg = parseDetectionConfig(Section(t, "survey.toml"));
    EXPECT_DOUBLE_EQ(cfg.field.inclination_deg, 66.5);
    EXPECT_DOUBLE_EQ(cfg.field.declination_deg, 1.2);
    EXPECT_DOUBLE_EQ(cfg.detection.k, 4.0);
    EXPECT_EQ(cfg.detection.noise_window, 300);
    EXPECT_DOUBLE_EQ(cfg.detection.mass_rule_C, kMassRuleC_nTm3_per_kg);  // default
    ASSERT_EQ(cfg.targets.size(), 3u);
    EXPECT_EQ(cfg.targets[0].model, ModelKind::MassRule);
    EXPECT_DOUBLE_EQ(cfg.targets[0].mass_kg, 227.0);
    EXPECT_EQ(cfg.targets[1].orientation, Orientation::Induced);
    EXPECT_EQ(cfg.targets[2].model, ModelKind::Sphere);
    EXPECT_EQ(cfg.targets[2].orientation, Orientation::InducedRemanent);  // the default
    EXPECT_DOUBLE_EQ(cfg.targets[2].remanence_ratio, kDefaultRemanenceRatio);
    EXPECT_DOUBLE_EQ(cfg.targets[2].burial_m, 0.5);
}

TEST(DetectionConfig, ErrorsNameFileAndKey) {
    std::string bad = kGood;
    bad.replace(bad.find("noise_window"), 12, "noise_windw");
    EXPECT_NE(errorOf(bad).find("survey.toml"), std::string::npos) << errorOf(bad);
    EXPECT_NE(errorOf(bad).find("noise_windw"), std::string::npos) << errorOf(bad);

    std::string wrong_key = kGood;
    wrong_key.replace(wrong_key.find("moment_Am2 = 20"), 15, "mass_kg = 20");
    EXPECT_NE(errorOf(wrong_key).find("target[1].mass_kg"), std::string::npos)
        << errorOf(wrong_key);

    std::string bad_model = kGood;
    bad_model.replace(bad_model.find("\"sphere\""), 8, "\"cube\"");
    EXPECT_NE(errorOf(bad_model).find("target[2].model"), std::string::npos) << errorOf(bad_model);

    std::string incl = kGood;
    incl.replace(incl.find("66.5"), 4, "96.5");
    EXPECT_NE(errorOf(incl).find("geomagnetic.inclination_deg"), std::string::npos)
        << errorOf(incl);

    EXPECT_NE(errorOf("[geomagnetic]\ninclination_deg = 60\nintensity_nT = 50000\n").find("target"),
              std::string::npos);
    // The dipole needs the ambient field: without [geomagnetic] the error names it and the target.
    const auto no_field = errorOf("[[target]]\nname = \"a\"\nmodel = \"dipole\"\nmoment_Am2 = 1\n");
    EXPECT_NE(no_field.find("geomagnetic"), std::string::npos) << no_field;
    EXPECT_NE(no_field.find("'a'"), std::string::npos) << no_field;
}

// The mass rule is a scalar rule of thumb (common practice): a survey using only it needs no
// [geomagnetic] table, and none is demanded.
TEST(DetectionConfig, MassRuleOnlyNeedsNoGeomagneticTable) {
    EXPECT_EQ(errorOf("[[target]]\nname = \"a\"\nmodel = \"mass_rule\"\nmass_kg = 1\n"), "(no error)");
}

}  // namespace
