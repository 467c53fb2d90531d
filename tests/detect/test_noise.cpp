// Fourth-difference noise: the sqrt(70) factor, recovery of a known white-noise level, and the
// exact cancellation of polynomial trends up to cubic.
#include <gtest/gtest.h>

#include <cmath>
#include <random>

#include "detect/fourth_difference_noise.hpp"

namespace {

using sg::detect::detectionThreshold_nT;
using sg::detect::FourthDifferenceNoise;

TEST(FourthDifferenceNoise, RecoversWhiteNoiseStd) {
    // var(sum w_i x_i) = sum w_i^2 var(x) for independent x (elementary probability);
    // weights 1,-4,6,-4,1 give 70 s^2. Estimated s within a few percent over 20000 differences
    // (relative standard error of an rms over n ~ 1/sqrt(2n) inflated by the correlation of
    // neighbouring differences: well under 2 % here).
    for (double sigma : {0.01, 0.05, 2.0}) {
        std::mt19937 rng(42);
        std::normal_distribution<double> noise(0.0, sigma);
        FourthDifferenceNoise n(20000);
        for (int i = 0; i < 20004; ++i) n.add(48000.0 + noise(rng));
        ASSERT_TRUE(n.ready());
        EXPECT_NEAR(n.sigma_nT() / sigma, 1.0, 0.03) << sigma;
        EXPECT_NEAR(n.rmsFourthDifference_nT() / (sigma * std::sqrt(70.0)), 1.0, 0.03);
    }
}

TEST(FourthDifferenceNoise, SlidingWindowForgetsOldNoise) {
    std::mt19937 rng(1);
    std::normal_distribution<double> loud(0.0, 1.0);
    std::normal_distribution<double> quiet(0.0, 0.02);
    FourthDifferenceNoise n(2000);
    for (int i = 0; i < 5000; ++i) n.add(loud(rng));
    EXPECT_NEAR(n.sigma_nT(), 1.0, 0.08);
    for (int i = 0; i < 2010; ++i) n.add(quiet(rng));  // more than a window later
    EXPECT_NEAR(n.sigma_nT(), 0.02, 0.002);
}

TEST(FourthDifferenceNoise, PolynomialTrendsUpToCubicCancel) {
    // The fourth difference of a polynomial of degree <= 3 is exactly zero; of t^4 it is 4! = 24.
    FourthDifferenceNoise cubic(50);
    FourthDifferenceNoise quartic(50);
    for (int i = 0; i < 60; ++i) {
        const double t = 0.1 * i;
        cubic.add(50000.0 + 3.0 * t - 0.7 * t * t + 0.05 * t * t * t);
        quartic.add(t * t * t * t);  // step 0.1: fourth difference 24 * 0.1^4
    }
    EXPECT_NEAR(cubic.rmsFourthDifference_nT(), 0.0, 1e-8);
    EXPECT_NEAR(quartic.rmsFourthDifference_nT(), 24.0 * 1e-4, 1e-9);
}

TEST(FourthDifferenceNoise, NeedsFiveSamplesAndResets) {
    FourthDifferenceNoise n(10);
    for (double x : {1.0, 5.0, -3.0, 8.0}) n.add(x);
    EXPECT_EQ(n.differences(), 0);
    EXPECT_EQ(n.sigma_nT(), 0.0);
    n.add(2.0);  // d4 = 2 - 4*8 + 6*(-3) - 4*5 + 1 = -67
    EXPECT_EQ(n.differences(), 1);
    EXPECT_NEAR(n.rmsFourthDifference_nT(), 67.0, 1e-12);
    n.reset();
    EXPECT_EQ(n.differences(), 0);
    EXPECT_FALSE(n.ready());
}

TEST(Threshold, LargerOfFloorAndKTimesNoise) {
    EXPECT_DOUBLE_EQ(detectionThreshold_nT(1.0, 3.0, 0.1), 1.0);
    EXPECT_DOUBLE_EQ(detectionThreshold_nT(1.0, 3.0, 0.5), 1.5);
}

}  // namespace
