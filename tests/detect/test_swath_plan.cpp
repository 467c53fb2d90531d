// Array swath union and line planning, checked against the closed form of the isotropic mass
// rule (half-width sqrt(R^2 - h^2), geometry).
#include <gtest/gtest.h>

#include <cmath>
#include <vector>

#include "detect/swath_plan.hpp"

namespace {

using namespace sg::detect;

TEST(ArraySwath, UnionMergesOverlapsAndReportsHoles) {
    const std::vector<SensorSwath> pair{{-1.5, {2.0, 2.0}}, {1.5, {2.0, 2.5}}};
    const ArraySwath a = arraySwath(pair);
    EXPECT_TRUE(a.contiguous);
    EXPECT_DOUBLE_EQ(a.port_m, 3.5);
    EXPECT_DOUBLE_EQ(a.starboard_m, 4.0);
    const std::vector<SensorSwath> wide{{-5.0, {1.0, 1.0}}, {5.0, {1.0, 1.0}}};
    const ArraySwath b = arraySwath(wide);
    EXPECT_FALSE(b.contiguous);
    EXPECT_EQ(unionOfSwaths(wide).size(), 2u);
    const std::vector<SensorSwath> blind{{0.0, {0.0, 0.0}}};
    EXPECT_FALSE(arraySwath(blind).contiguous);
}

TargetModel massRule(double mass_kg, double burial_m) {
    TargetClass c;
    c.name = "m";
    c.mass_kg = mass_kg;
    c.burial_m = burial_m;
    return TargetModel(c, GeomagneticField{}, kMassRuleC_nTm3_per_kg, nullptr);
}

TEST(Plan, MassRuleSingleSensorMatchesClosedForm) {
    const TargetModel m = massRule(200.0, 1.0);
    const double t = 2.0;
    const double r = std::cbrt(kMassRuleC_nTm3_per_kg * 200.0 / t);
    const std::vector<double> one{0.0};
    const ClassPlan p = planClass(m, one, 3.0, 0.5, t, 8.0);
    EXPECT_NEAR(p.detection_range_m, r, 1e-9);
    EXPECT_NEAR(p.max_altitude_m, r - 1.0, 1e-9);
    const double w = std::sqrt(r * r - 16.0);  // vertical 3 + 1 m
    EXPECT_NEAR(p.swath.port_m, w, 1e-9);
    EXPECT_NEAR(p.spacing_needed_m, 2.0 * w, 1e-9);
    // Lines 8 m apart overlap while 2 sqrt(R^2 - h^2) >= 8, i.e. h <= sqrt(R^2 - 16).
    ASSERT_TRUE(p.max_altitude_for_spacing_m.has_value());
    EXPECT_NEAR(*p.max_altitude_for_spacing_m, std::sqrt(r * r - 16.0) - 1.0, 1e-6);
    EXPECT_NEAR(p.centre_margin, kMassRuleC_nTm3_per_kg * 200.0 / 64.0 / t, 1e-9);
    // Too wide a spacing never overlaps.
    EXPECT_FALSE(planClass(m, one, 3.0, 0.5, t, 4.0 * r).max_altitude_for_spacing_m.has_value());
}

TEST(Plan, TransversePairWidensTheSwath) {
    const TargetModel m = massRule(200.0, 0.0);
    const double t = 2.0;
    const double r = std::cbrt(kMassRuleC_nTm3_per_kg * 200.0 / t);
    const std::vector<double> pair{-1.0, 1.0};
    const ClassPlan p = planClass(m, pair, 4.0, 0.0, t, 8.0);
    const double w = std::sqrt(r * r - 16.0);
    ASSERT_GT(w, 1.0);  // the two swaths touch
    EXPECT_NEAR(p.swath.port_m, 1.0 + w, 1e-9);
    EXPECT_NEAR(p.spacing_needed_m, 2.0 + 2.0 * w, 1e-9);
}

}  // namespace
