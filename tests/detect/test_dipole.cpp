// Dipole field and total-field anomaly (dipole.hpp) against the closed forms of Blakely (1995),
// Potential Theory in Gravity and Magnetic Applications, and against a numerical gradient of the
// dipole's scalar potential (an independent route to the same field).
#include <gtest/gtest.h>

#include <cmath>
#include <random>

#include "detect/dipole.hpp"

namespace {

using namespace sg::detect;

TEST(Dipole, OnAxisFieldIsTwiceMuOver4PiMOverR3) {
    // Blakely (1995): on the dipole axis B = (mu0/4pi) 2 m / r^3 along m.
    const double m = 250.0;  // A m^2
    const double r = 7.0;    // m
    const Vec3 b = dipoleField_nT({0, 0, m}, {0, 0, r});
    EXPECT_NEAR(b.z, 2.0 * 1e-7 * m / (r * r * r) * 1e9, 1e-12);
    EXPECT_NEAR(b.x, 0.0, 1e-12);
    EXPECT_NEAR(b.y, 0.0, 1e-12);
    // Behind the dipole too (the axis field does not depend on the sign of r).
    EXPECT_NEAR(dipoleField_nT({0, 0, m}, {0, 0, -r}).z, 2.0 * 1e-7 * m / (r * r * r) * 1e9, 1e-12);
}

TEST(Dipole, EquatorialFieldIsHalfAndOpposite) {
    // Blakely (1995): in the equatorial plane B = -(mu0/4pi) m / r^3.
    const double m = 250.0;
    const double r = 7.0;
    const Vec3 b = dipoleField_nT({0, 0, m}, {r, 0, 0});
    EXPECT_NEAR(b.z, -1e-7 * m / (r * r * r) * 1e9, 1e-12);
    EXPECT_NEAR(b.x, 0.0, 1e-12);
}

TEST(Dipole, FieldIsMinusGradientOfScalarPotential) {
    // B = -mu0 grad(V), V = (1/4pi) m.r / r^3 (Blakely 1995, ch. 4). Central differences.
    std::mt19937 rng(7);
    std::uniform_real_distribution<double> u(-10.0, 10.0);
    for (int i = 0; i < 20; ++i) {
        const Vec3 m{u(rng) * 10, u(rng) * 10, u(rng) * 10};
        Vec3 r{u(rng), u(rng), u(rng)};
        if (norm(r) < 1.0) r = 3.0 * r;
        auto potential = [&](Vec3 p) {  // mu0 V in T m, times 1e9 for nT m
            const double d = norm(p);
            return kMu0Over4Pi * dot(m, p) / (d * d * d) * 1e9;
        };
        const double h = 1e-5;
        const Vec3 grad{(potential(r + Vec3{h, 0, 0}) - potential(r - Vec3{h, 0, 0})) / (2 * h),
                        (potential(r + Vec3{0, h, 0}) - potential(r - Vec3{0, h, 0})) / (2 * h),
                        (potential(r + Vec3{0, 0, h}) - potential(r - Vec3{0, 0, h})) / (2 * h)};
        const Vec3 b = dipoleField_nT(m, r);
        const double scale = norm(b) + 1e-9;
        EXPECT_NEAR(b.x, -grad.x, 1e-6 * scale);
        EXPECT_NEAR(b.y, -grad.y, 1e-6 * scale);
        EXPECT_NEAR(b.z, -grad.z, 1e-6 * scale);
    }
}

TEST(Dipole, AmbientUnitVectorConvention) {
    // North-east-down: inclination 90 points straight down; declination 90 points east.
    const Vec3 down = ambientFieldUnitDeg(90.0, 0.0);
    EXPECT_NEAR(down.z, 1.0, 1e-15);
    const Vec3 east = ambientFieldUnitDeg(0.0, 90.0);
    EXPECT_NEAR(east.y, 1.0, 1e-15);
    const Vec3 f = ambientFieldUnitDeg(65.0, -3.0);
    EXPECT_NEAR(norm(f), 1.0, 1e-15);
    EXPECT_NEAR(std::asin(f.z) * 180 / kPi, 65.0, 1e-12);
}

TEST(Dipole, InducedAtMagneticPoleDirectlyBelow) {
    // At the pole (I = 90) the induced moment is vertical; the sensor straight above the target
    // is on the dipole axis, so dT = |B| = (mu0/4pi) 2 m / h^3 (Blakely 1995).
    const Vec3 f = ambientFieldUnitDeg(90.0, 0.0);
    const double m = 40.0;
    const double h = 5.0;
    const Vec3 r{0, 0, -h};  // from the target up to the sensor
    EXPECT_NEAR(inducedTotalFieldAnomaly_nT(m, r, f), 100.0 * 2.0 * m / (h * h * h), 1e-12);
}

TEST(Dipole, InducedMatchesThreeCosSquaredForm) {
    // dT = (mu0/4pi) m (3 cos^2 theta - 1) / r^3, theta between the field and r (Blakely 1995).
    std::mt19937 rng(3);
    std::uniform_real_distribution<double> u(-20.0, 20.0);
    const Vec3 f = ambientFieldUnitDeg(62.0, -4.0);
    for (int i = 0; i < 50; ++i) {
        const Vec3 r{u(rng), u(rng), u(rng)};
        const double d = norm(r);
        const double c = dot(f, r) / d;
        EXPECT_NEAR(inducedTotalFieldAnomaly_nT(12.0, r, f),
                    100.0 * 12.0 * (3 * c * c - 1) / (d * d * d), 1e-9);
    }
}

TEST(Dipole, SymmetryAtMagneticEquator) {
    // At inclination 0 the induced moment is horizontal (north): the anomaly is symmetric under
    // north-south and east-west mirroring, and directly above the target it is a low of
    // -(mu0/4pi) m / h^3 (the sensor lies in the dipole's equatorial plane).
    const Vec3 f = ambientFieldUnitDeg(0.0, 0.0);
    const double m = 30.0;
    for (double x : {1.0, 3.5, 8.0}) {
        for (double y : {0.0, 2.0, 6.0}) {
            const double a = inducedTotalFieldAnomaly_nT(m, {x, y, -4.0}, f);
            EXPECT_NEAR(a, inducedTotalFieldAnomaly_nT(m, {-x, y, -4.0}, f), 1e-12);
            EXPECT_NEAR(a, inducedTotalFieldAnomaly_nT(m, {x, -y, -4.0}, f), 1e-12);
        }
    }
    EXPECT_NEAR(inducedTotalFieldAnomaly_nT(m, {0, 0, -4.0}, f), -100.0 * m / 64.0, 1e-12);
}

TEST(Sphere, DemagnetisationFactorIsOneThird) {
    // M = chi / (1 + N chi) H0 with N = 1/3 for a sphere (standard magnetostatics).
    const double a = 0.2;
    const double b0 = 50000.0;
    const double h0 = b0 * 1e-9 / kMu0;
    const double vol = 4.0 / 3.0 * kPi * a * a * a;
    for (double chi : {1e-3, 0.5, 3.0, 100.0}) {
        EXPECT_NEAR(sphereInducedMoment_Am2(a, chi, b0), chi / (1.0 + chi / 3.0) * h0 * vol,
                    1e-12 * h0 * vol);
    }
    // Small susceptibility: M ~= chi H0 (demagnetisation negligible).
    EXPECT_NEAR(sphereInducedMoment_Am2(a, 1e-4, b0) / (1e-4 * h0 * vol), 1.0, 1e-4);
}

TEST(Sphere, HighSusceptibilityTendsToFourPiA3H0) {
    // chi -> infinity: M -> 3 H0, moment -> 4 pi a^3 H0 (H0 = B0 / mu0).
    const double a = 0.15;
    const double b0 = 48000.0;
    const double h0 = b0 * 1e-9 / (4e-7 * kPi);
    EXPECT_NEAR(sphereInducedMoment_Am2(a, 1e9, b0) / (4 * kPi * a * a * a * h0), 1.0, 1e-8);
    EXPECT_LT(sphereInducedMoment_Am2(a, 100.0, b0), 4 * kPi * a * a * a * h0);
}

}  // namespace
