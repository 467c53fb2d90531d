// Target models and detectable half-widths: the mass rule (common practice), the closed-form
// half-width of an isotropic model, the dipole's left/right asymmetry derived by hand, and the
// interpolation error of the precomputed tables against the direct computation.
#include <gtest/gtest.h>

#include <algorithm>
#include <cmath>
#include <random>
#include <vector>

#include "detect/target_model.hpp"

namespace {

using namespace sg::detect;

constexpr double kDeg = kPi / 180.0;

TargetModel massRule(double mass_kg, double burial_m = 0.0) {
    TargetClass c;
    c.name = "m";
    c.model = ModelKind::MassRule;
    c.mass_kg = mass_kg;
    c.burial_m = burial_m;
    return TargetModel(c, GeomagneticField{}, kMassRuleC_nTm3_per_kg, nullptr);
}

TEST(MassRule, OneShortTonGivesOneNanoteslaAtHundredFeet) {
    // Common practice: 1 short ton (2000 lb) of steel ~ 1 nT at 100 ft.
    const TargetModel m = massRule(907.18474);
    EXPECT_NEAR(m.peakAnomaly_nT(30.48, 0.0, 0.0), 1.0, 1e-9);
    // The same rule stated as 250 lb at 50 ft (2000/100^3 = 250/50^3), common practice.
    const TargetModel q = massRule(250.0 * 0.45359237);  // 1 lb = 0.45359237 kg exactly
    EXPECT_NEAR(q.peakAnomaly_nT(50.0 * 0.3048, 0.0, 0.0), 1.0, 1e-9);
    // C in SI: 30.48^3 / 907.18474 = 28316.846592 / 907.18474 = 31.21398 nT m^3 / kg.
    EXPECT_NEAR(kMassRuleC_nTm3_per_kg, 31.21398, 1e-5);
}

TEST(HalfWidth, MassRuleIsSqrtOfRangeSquaredMinusHeightSquared) {
    // Isotropic model A = K / rho^3: detectable while rho <= R = (K/T)^(1/3), so at height h the
    // half-width is sqrt(R^2 - h^2) on both sides (geometry).
    const TargetModel m = massRule(50.0);
    const double threshold = 2.0;
    const double range = std::cbrt(kMassRuleC_nTm3_per_kg * 50.0 / threshold);
    EXPECT_NEAR(m.detectionRange_m(0.0, threshold), range, 1e-9);
    for (double h : {0.5, 2.0, 5.0, 0.9 * range}) {
        const HalfWidths w = m.halfWidths(h, 1.0, threshold);
        EXPECT_NEAR(w.port_m, std::sqrt(range * range - h * h), 1e-9);
        EXPECT_NEAR(w.starboard_m, w.port_m, 1e-12);
        // At the edge the peak equals the threshold.
        EXPECT_NEAR(m.peakAnomaly_nT(h, w.starboard_m, 0.0), threshold, 1e-9);
    }
    const HalfWidths none = m.halfWidths(range * 1.01, 0.0, threshold);
    EXPECT_EQ(none.port_m, 0.0);
    EXPECT_EQ(none.starboard_m, 0.0);
}

DetectionConfig survey(double inclination_deg, Orientation o, ModelKind kind = ModelKind::Dipole) {
    DetectionConfig cfg;
    cfg.field = {inclination_deg, 0.0, 50000.0};
    TargetClass c;
    c.name = "t";
    c.model = kind;
    c.moment_Am2 = 5.0;
    c.radius_m = 0.1;
    c.susceptibility = 1000.0;
    c.orientation = o;
    cfg.targets.push_back(c);
    return cfg;
}

TEST(HalfWidth, InducedDipoleEastboundNorthernHemisphereAsymmetry) {
    // By hand, inclination +65 (northern hemisphere): the induced moment points down and north,
    // f = (cos I, 0, sin I). The anomaly is (mu0/4pi) m (3 cos^2 theta - 1) / r^3 (Blakely 1995).
    //
    // Steep view (sensor high, near the detection range): |dT| is largest (+2 m/r^3) where r is
    // antiparallel to f, i.e. up and SOUTH of the target, 25 degrees from the vertical: the
    // positive lobe sits on the equator side of the target. An eastbound line passing a little
    // SOUTH of the target comes closer to that lobe than one passing north of it; the target then
    // lies to the LEFT (port, north) of the line. So for heading 090 port must be wider.
    //
    // Shallow view (sensor low, wide swath): seen from the side, cos theta = (d cos I - h sin I)/rho
    // for a sensor north of the target (target to starboard) and -(d cos I + h sin I)/rho south of
    // it. North of the target |cos theta| shrinks with h, so 3cos^2 - 1 stays near its negative
    // extreme; south of it |cos theta| grows and the value moves toward zero. The broad NEGATIVE
    // lobe is on the pole side: for heading 090 starboard must be wider.
    const auto models = makeModels(survey(65.0, Orientation::Induced));
    const TargetModel& m = models.front();
    const double range = std::cbrt(100.0 * 5.0 / 1.0);  // R_T for 5 A m^2 and 1 nT: 7.94 m
    const double steep_h = 0.7 * range;
    const HalfWidths east = m.halfWidths(steep_h, 90.0 * kDeg, 1.0);
    EXPECT_GT(east.port_m, 2.0 * east.starboard_m);
    const HalfWidths direct = m.halfWidthsDirect(steep_h, 90.0 * kDeg, 1.0);
    EXPECT_GT(direct.port_m, 2.0 * direct.starboard_m);
    // Westbound mirrors it.
    const HalfWidths west = m.halfWidths(steep_h, 270.0 * kDeg, 1.0);
    EXPECT_NEAR(west.starboard_m, east.port_m, 1e-9);
    EXPECT_NEAR(west.port_m, east.starboard_m, 1e-9);
    // Shallow regime.
    const HalfWidths low = m.halfWidthsDirect(0.2 * range, 90.0 * kDeg, 1.0);
    EXPECT_GT(low.starboard_m, 1.2 * low.port_m);
    // Southern hemisphere (inclination -65) is the north-south mirror image: the sides swap.
    const auto south = makeModels(survey(-65.0, Orientation::Induced));
    const HalfWidths s = south.front().halfWidths(steep_h, 90.0 * kDeg, 1.0);
    EXPECT_GT(s.starboard_m, 2.0 * s.port_m);
}

TEST(HalfWidth, InducedDipoleAtThePoleIsIsotropic) {
    // Vertical field: the geometry is symmetric about the vertical, so left = right and the
    // heading does not matter; directly below the peak is on the axis, 2 (mu0/4pi) m / h^3.
    const auto models = makeModels(survey(90.0, Orientation::Induced));
    const TargetModel& m = models.front();
    const HalfWidths a = m.halfWidths(2.5, 0.3, 1.0);
    const HalfWidths b = m.halfWidths(2.5, 2.1, 1.0);
    EXPECT_NEAR(a.port_m, a.starboard_m, 2e-3 * (a.port_m + 1e-3) + 1e-3);
    EXPECT_NEAR(a.port_m, b.port_m, 2e-3 * (a.port_m + 1e-3) + 1e-3);
    EXPECT_NEAR(m.peakAnomalyDirect_nT(2.5, 0.0, 0.0), 100.0 * 2.0 * 5.0 / (2.5 * 2.5 * 2.5),
                1e-9);
}

TEST(HalfWidth, WorstOrientationNeverBeatsInduced) {
    // The worst case minimises over all moment directions, the induced direction among them.
    for (double depr : {10.0, 45.0, 80.0, 90.0}) {
        for (double hd : {0.0, 45.0, 90.0, 200.0}) {
            const double incl = 60.0 * kDeg;
            EXPECT_LE(peakFactorDirect(Orientation::Worst, incl, depr * kDeg, hd * kDeg),
                      peakFactorDirect(Orientation::Induced, incl, depr * kDeg, hd * kDeg) + 1e-9);
        }
    }
    // On a magnetic north-south line straight over the target an east-west moment gives no
    // total-field anomaly at all (its field there is along -m, perpendicular to the ambient
    // field): the worst case is blind straight below such a line.
    EXPECT_NEAR(peakFactorDirect(Orientation::Worst, 60.0 * kDeg, 90.0 * kDeg, 0.0), 0.0, 1e-3);
}

TEST(PeakFactor, EastWestMirrorSymmetry) {
    // Mirroring east <-> west leaves a field in the magnetic meridian plane unchanged and turns a
    // target to starboard of heading psi into one to port of heading -psi, i.e. to starboard of
    // heading 180 - psi (geometry). The table build relies on this; check it on the direct values.
    for (Orientation o : {Orientation::Induced, Orientation::Worst}) {
        for (double hd : {10.0, 35.0, 80.0}) {
            for (double depr : {15.0, 50.0, 85.0}) {
                EXPECT_NEAR(peakFactorDirect(o, 0.9, depr * kDeg, hd * kDeg),
                            peakFactorDirect(o, 0.9, depr * kDeg, (180.0 - hd) * kDeg), 2e-3);
            }
        }
    }
}

TEST(HalfWidth, SphereEqualsInducedDipoleOfItsMoment) {
    auto cfg = survey(65.0, Orientation::Induced, ModelKind::Sphere);
    const auto spheres = makeModels(cfg);
    const double moment = spheres.front().moment_Am2();
    cfg.targets.front().model = ModelKind::Dipole;
    cfg.targets.front().moment_Am2 = moment;
    const auto dipoles = makeModels(cfg);
    const HalfWidths a = spheres.front().halfWidths(1.5, 0.7, 0.8);
    const HalfWidths b = dipoles.front().halfWidths(1.5, 0.7, 0.8);
    EXPECT_DOUBLE_EQ(a.port_m, b.port_m);
    EXPECT_DOUBLE_EQ(a.starboard_m, b.starboard_m);
}

TEST(HalfWidth, DeclinationRotatesTheHeading) {
    // The model depends on the heading relative to MAGNETIC north.
    auto cfg = survey(65.0, Orientation::Induced);
    const auto a = makeModels(cfg);
    cfg.field.declination_deg = 20.0;
    const auto b = makeModels(cfg);
    const HalfWidths wa = a.front().halfWidths(2.0, 70.0 * kDeg, 1.0);
    const HalfWidths wb = b.front().halfWidths(2.0, 90.0 * kDeg, 1.0);
    EXPECT_NEAR(wa.port_m, wb.port_m, 1e-9);
    EXPECT_NEAR(wa.starboard_m, wb.starboard_m, 1e-9);
}

// Table interpolation error against the direct computation, in units of the detection scale
// R_T = (K / T)^(1/3). Documented in docs/detection-model.md. Away from jumps of the half-width
// the error is a few thousandths of R_T; cells that straddle a jump take the smallest corner, so
// the table errs on the safe (narrow) side there.
TEST(PeakTable, InducedInterpolationErrorIsSmallAndSafe) {
    const PeakTable t(Orientation::Induced, 65.0 * kDeg);
    std::mt19937 rng(11);
    std::uniform_real_distribution<double> h(0.0, 1.3);
    std::uniform_real_distribution<double> psi(0.0, 2.0 * kPi);
    std::vector<double> err;
    double worst_over = 0.0;
    for (int i = 0; i < 400; ++i) {
        const double hn = h(rng);
        const double p = psi(rng);
        const bool stbd = (i % 2) == 0;
        const double e = t.normalisedHalfWidth(hn, p, stbd) - t.normalisedHalfWidthDirect(hn, p, stbd);
        err.push_back(std::fabs(e));
        worst_over = std::max(worst_over, e);
    }
    std::sort(err.begin(), err.end());
    EXPECT_LT(err[err.size() / 2], 0.005);          // median
    EXPECT_LT(err[err.size() * 95 / 100], 0.035);   // 95th percentile
    EXPECT_LT(worst_over, 0.02);                    // never wider than the truth by > 2 % R_T
    // The peak factor itself: bilinear in 1-degree depression and 5-degree heading steps.
    double g_err = 0.0;
    for (int i = 0; i < 200; ++i) {
        const double d = h(rng) / 1.3 * 0.5 * kPi;
        const double p = psi(rng);
        g_err = std::max(g_err, std::fabs(t.peakFactor(d, p, true) -
                                          peakFactorDirect(Orientation::Induced, 65.0 * kDeg, d, p)));
    }
    EXPECT_LT(g_err, 0.02);  // g is between 0 and 2
}

TEST(PeakTable, WorstInterpolationErrsOnTheSafeSide) {
    const PeakTable t(Orientation::Worst, 65.0 * kDeg);
    std::mt19937 rng(5);
    std::uniform_real_distribution<double> h(0.0, 0.6);
    std::uniform_real_distribution<double> psi(0.0, 2.0 * kPi);
    double worst_over = 0.0;
    for (int i = 0; i < 25; ++i) {
        const double hn = h(rng);
        const double p = psi(rng);
        const double e = t.normalisedHalfWidth(hn, p, i % 2 == 0) -
                         t.normalisedHalfWidthDirect(hn, p, i % 2 == 0);
        worst_over = std::max(worst_over, e);
    }
    EXPECT_LT(worst_over, 0.02);
}

TEST(Margin, PeakOverThresholdAtTrackCentre) {
    const TargetModel m = massRule(100.0);
    const double peak = kMassRuleC_nTm3_per_kg * 100.0 / 27.0;  // at 3 m
    EXPECT_NEAR(m.margin(3.0, 0.0, 0.0, 2.0), peak / 2.0, 1e-9);
    const auto d = makeModels(survey(65.0, Orientation::Induced));
    EXPECT_NEAR(d.front().peakAnomaly_nT(3.0, 1.0, 0.5) / d.front().peakAnomalyDirect_nT(3.0, 1.0, 0.5),
                1.0, 0.01);
}

}  // namespace
