// The magnetometer values the simulator writes (decoded from its own SGM lines) equal the main
// field plus the point-dipole total-field anomaly of each planted target at the sensor position
// it logs, within the configured noise. The formula and the UTM geometry are computed HERE,
// independently of the simulator and of src/detect:
//   total-field anomaly of a dipole m at displacement r (target -> sensor), ambient unit f:
//   dT = (mu0/4pi) * (3 (m.r^)(f.r^) - m.f) / r^3           (Blakely 1995, ch. 4 and 8)
// with mu0/4pi = 1e-7 T m/A = 100 nT m/A, f = (cos I cos D, cos I sin D, sin I) in north-east-
// down. Origin easting/northing and grid convergence come from GeographicLib (not PROJ, which the
// simulator uses).
#include <gtest/gtest.h>

#include <cmath>
#include <map>

#include <GeographicLib/UTMUPS.hpp>

#include "sim_test_util.hpp"

namespace sg::sim::test {
namespace {

struct V3 {
    double n, e, d;
};
double dot3(V3 a, V3 b) { return a.n * b.n + a.e * b.e + a.d * b.d; }
V3 unitFromIncDec(double inc_deg, double dec_deg) {
    const double i = inc_deg * M_PI / 180.0;
    const double d = dec_deg * M_PI / 180.0;
    return {std::cos(i) * std::cos(d), std::cos(i) * std::sin(d), std::sin(i)};
}
// Blakely (1995): total-field anomaly in nT; moment in A m^2, r in metres.
double dipoleAnomaly(double moment, V3 m_unit, V3 r, V3 f) {
    const double rl = std::sqrt(dot3(r, r));
    const V3 ru{r.n / rl, r.e / rl, r.d / rl};
    return 100.0 * moment * (3.0 * dot3(m_unit, ru) * dot3(f, ru) - dot3(m_unit, f)) /
           (rl * rl * rl);
}

TEST(Anomaly, SgmValuesMatchTheDipoleFormulaAtTheLoggedPositions) {
    const Scenario sc = loadScenario(dataPath("target.toml"));
    const Recorded rec = runInMemory(sc, 3);

    // Independent geometry: UTM zone 31 forced (the scenario's EPSG 32631).
    int zone = 0;
    bool northp = false;
    double e0 = 0, n0 = 0, gamma = 0, k = 0;
    GeographicLib::UTMUPS::Forward(sc.site.origin_lat_deg, sc.site.origin_lon_deg, zone, northp,
                                   e0, n0, gamma, k, 31);
    ASSERT_GT(gamma, 1.5);  // the site is chosen so the convergence matters
    const double g = gamma * M_PI / 180.0;
    const V3 f = unitFromIncDec(sc.geomag.inclination_deg, sc.geomag.declination_deg);

    std::map<std::pair<TimeNs, int>, const MagTruth*> truth;
    for (const MagTruth& t : rec.mag) truth[{t.utc_ns, t.sensor}] = &t;

    const double sigma = sc.mag.noise_nT;
    double sum_r = 0.0, sum_r2 = 0.0, max_anomaly = 0.0, max_res = 0.0;
    std::size_t n = 0;
    for (const SimLine& l : rec.lines) {
        if (l.channel != Channel::Mag) continue;
        const auto b = body(l.bytes);
        ASSERT_EQ(b.size(), 7u) << l.bytes;
        const int sensor = std::stoi(b[1]);
        const double field = std::stod(b[3]);
        const double depth = std::stod(b[5]);
        const MagTruth* t = truth.at({l.utc_ns, sensor});
        EXPECT_NEAR(depth, t->depth_m, 0.006);  // depth_std_m = 0: only the 2-decimal rounding
        double expected = sc.geomag.intensity_nT;
        for (const TargetSpec& tg : sc.targets) {
            // Grid displacement -> true north/east: rotate by the convergence (grid north lies
            // gamma clockwise of true north).
            const double de = t->easting_m - (e0 + tg.position_m.e);
            const double dn = t->northing_m - (n0 + tg.position_m.n);
            const V3 r{dn * std::cos(g) - de * std::sin(g), de * std::cos(g) + dn * std::sin(g),
                       t->depth_m - (sc.seabed.base_depth_m + tg.burial_m)};
            const V3 mu = tg.moment_inclination_deg
                              ? unitFromIncDec(*tg.moment_inclination_deg, *tg.moment_declination_deg)
                              : f;
            expected += dipoleAnomaly(tg.moment_Am2, mu, r, f);
        }
        max_anomaly = std::max(max_anomaly, std::abs(expected - sc.geomag.intensity_nT));
        const double res = field - expected;
        max_res = std::max(max_res, std::abs(res));
        sum_r += res;
        sum_r2 += res * res;
        ++n;
    }
    ASSERT_GT(n, 3000u);
    // The test has teeth only if the anomalies are far above the noise.
    EXPECT_GT(max_anomaly, 200.0 * sigma);
    const double mean = sum_r / static_cast<double>(n);
    const double std_dev = std::sqrt(sum_r2 / static_cast<double>(n) - mean * mean);
    EXPECT_NEAR(mean, 0.0, 5.0 * sigma / std::sqrt(static_cast<double>(n)) + 0.001);
    EXPECT_NEAR(std_dev, sigma, 0.1 * sigma);  // 3 decimals of rounding add 0.0003 nT rms
    EXPECT_LT(max_res, 5.5 * sigma);
}

}  // namespace
}  // namespace sg::sim::test
