// Each fault of tests/sim/data/short.toml shows in the produced lines the way it should, in its
// window only. Windows (s from the start) are the scenario's.
#include <gtest/gtest.h>

#include <algorithm>
#include <cmath>
#include <map>

#include "sim_test_util.hpp"

namespace sg::sim::test {
namespace {

class Faults : public ::testing::Test {
protected:
    static void SetUpTestSuite() {
        s_sc = new Scenario(loadScenario(dataPath("short.toml")));
        s_rec = new Recorded(runInMemory(*s_sc, 7));
    }
    static void TearDownTestSuite() {
        delete s_rec;
        delete s_sc;
    }
    // Lines of a channel whose elapsed time lies in [t0, t1).
    static std::vector<const SimLine*> in(Channel c, double t0, double t1, bool garbage = false) {
        std::vector<const SimLine*> out;
        for (const SimLine& l : s_rec->lines) {
            const double t = elapsedS(*s_sc, l.utc_ns);
            if (l.channel == c && l.garbage == garbage && t >= t0 && t < t1) out.push_back(&l);
        }
        return out;
    }
    static std::vector<const SimLine*> sentences(const std::string& type, double t0, double t1) {
        std::vector<const SimLine*> out;
        for (const SimLine* l : in(Channel::Gnss, t0, t1)) {
            if (l->bytes.compare(3, 3, type) == 0) out.push_back(l);
        }
        return out;
    }
    static inline Scenario* s_sc = nullptr;
    static inline Recorded* s_rec = nullptr;
};

TEST_F(Faults, DegradedFixLowersQualityAndRaisesGstErrors) {
    // degraded_fix 10..20 s, sigma 3 m; healthy fix quality 4 (RTK), position_std 0.02 m.
    for (const SimLine* l : sentences("GGA", 10.0, 20.0)) EXPECT_EQ(body(l->bytes)[6], "1");
    for (const SimLine* l : sentences("GGA", 1.0, 9.9)) EXPECT_EQ(body(l->bytes)[6], "4");
    const auto bad = sentences("GST", 10.0, 20.0);
    const auto good = sentences("GST", 1.0, 9.9);
    ASSERT_GE(bad.size(), 9u);
    ASSERT_GE(good.size(), 8u);
    for (const SimLine* l : bad) EXPECT_GT(std::stod(body(l->bytes)[6]), 2.0) << l->bytes;
    for (const SimLine* l : good) EXPECT_LT(std::stod(body(l->bytes)[6]), 0.1) << l->bytes;
}

TEST_F(Faults, GnssLossSilencesTheReceiver) {
    // gnss_loss 25..35 s: no GNSS sentence at all; 10 Hz GGA on either side.
    EXPECT_TRUE(in(Channel::Gnss, 25.0, 35.0).empty());
    EXPECT_EQ(sentences("GGA", 20.0, 25.0).size(), 50u);
    EXPECT_EQ(sentences("GGA", 35.0, 40.0).size(), 50u);
    EXPECT_FALSE(in(Channel::Gyro, 25.0, 35.0).empty());  // other instruments go on
}

TEST_F(Faults, GnssLossWithoutFixSendsEmptyFixes) {
    // gnss_loss no_fix 165..170 s: GGA quality 0 with empty position, RMC status V.
    const auto gga = sentences("GGA", 165.0, 170.0);
    ASSERT_EQ(gga.size(), 50u);
    for (const SimLine* l : gga) {
        EXPECT_EQ(body(l->bytes)[6], "0");
        EXPECT_EQ(body(l->bytes)[2], "");
    }
    for (const SimLine* l : sentences("RMC", 165.0, 170.0)) EXPECT_EQ(body(l->bytes)[2], "V");
    EXPECT_TRUE(sentences("GST", 165.0, 170.0).empty());
}

TEST_F(Faults, MagDropoutRemovesOneSensor) {
    // mag_dropout sensor 1, 40..50 s; 10 Hz per sensor.
    std::map<std::string, int> inside, before;
    for (const SimLine* l : in(Channel::Mag, 40.0, 50.0)) ++inside[body(l->bytes)[1]];
    for (const SimLine* l : in(Channel::Mag, 30.0, 40.0)) ++before[body(l->bytes)[1]];
    EXPECT_EQ(inside.count("1"), 0u);
    EXPECT_EQ(inside["0"], 100);
    EXPECT_EQ(inside["2"], 100);
    EXPECT_EQ(inside["3"], 100);
    EXPECT_EQ(before["1"], 100);
}

TEST_F(Faults, BadChecksumsOnlyInTheirWindowAndChannel) {
    // bad_checksum gyro 55..65 s, probability 0.5, HDT at 10 Hz: 100 lines, about 50 spoiled
    // (binomial: 30..70 is more than 4 standard deviations wide).
    int bad_inside = 0;
    for (const SimLine* l : in(Channel::Gyro, 55.0, 65.0)) bad_inside += checksumOk(l->bytes) ? 0 : 1;
    EXPECT_GT(bad_inside, 30);
    EXPECT_LT(bad_inside, 70);
    int bad_elsewhere = 0;
    for (const SimLine& l : s_rec->lines) {
        const double t = elapsedS(*s_sc, l.utc_ns);
        const bool window = l.channel == Channel::Gyro && t >= 55.0 && t < 65.0;
        if (!l.garbage && !window && !checksumOk(l.bytes)) ++bad_elsewhere;
    }
    EXPECT_EQ(bad_elsewhere, 0);
}

TEST_F(Faults, GarbageIsNonTextOnItsChannel) {
    // garbage sounder 70..80 s, 20 bytes per burst, 2 bursts/s: ~20 bursts (Poisson).
    const auto g = in(Channel::Sounder, 70.0, 80.0, true);
    EXPECT_GT(g.size(), 8u);
    EXPECT_LT(g.size(), 40u);
    int non_text = 0;
    for (const SimLine* l : g) {
        EXPECT_EQ(l->bytes.size(), 20u);
        EXPECT_EQ(l->bytes.find('\n'), std::string::npos);
        for (unsigned char c : l->bytes) non_text += (c < 0x20 || c > 0x7E) ? 1 : 0;
    }
    EXPECT_GT(non_text, 0);
    std::size_t garbage_total = 0;
    for (const SimLine& l : s_rec->lines) garbage_total += l.garbage ? 1 : 0;
    EXPECT_EQ(garbage_total, g.size());
}

TEST_F(Faults, CableOutReadingJumps) {
    // cable_jump 85..90 s, +10 m on a reading of 25 m (no reading noise configured).
    for (const SimLine* l : in(Channel::Cable, 85.0, 90.0)) EXPECT_EQ(body(l->bytes)[2], "35.0");
    for (const SimLine* l : in(Channel::Cable, 75.0, 85.0)) EXPECT_EQ(body(l->bytes)[2], "25.0");
    for (const SimLine* l : in(Channel::Cable, 90.0, 95.0)) EXPECT_EQ(body(l->bytes)[2], "25.0");
}

// Standard deviation of the fourth difference of one sensor's field in [t0, t1).
double fourthDiffStd(const std::vector<const SimLine*>& mag, int sensor) {
    std::vector<double> f;
    for (const SimLine* l : mag) {
        const auto b = body(l->bytes);
        if (std::stoi(b[1]) == sensor) f.push_back(std::stod(b[3]));
    }
    double ss = 0.0;
    std::size_t n = 0;
    for (std::size_t i = 4; i < f.size(); ++i, ++n) {
        const double d4 = f[i] - 4 * f[i - 1] + 6 * f[i - 2] - 4 * f[i - 3] + f[i - 4];
        ss += d4 * d4;
    }
    return std::sqrt(ss / static_cast<double>(n));
}

TEST_F(Faults, NoiseBurstRaisesNoiseAndLowersQuality) {
    // noise_burst 95..105 s, all sensors, +1.0 nT; base noise 0.05 nT. White noise of std s has
    // a fourth difference of std s*sqrt(70) (binomial coefficients 1,4,6,4,1: 1+16+36+16+1).
    const double quiet = fourthDiffStd(in(Channel::Mag, 84.0, 94.0), 2);
    const double noisy = fourthDiffStd(in(Channel::Mag, 95.5, 104.5), 2);
    EXPECT_NEAR(quiet, 0.05 * std::sqrt(70.0), 0.05 * std::sqrt(70.0) * 0.4);
    EXPECT_GT(noisy, 8.0 * quiet);
    for (const SimLine* l : in(Channel::Mag, 95.0, 105.0)) EXPECT_LT(std::stoi(body(l->bytes)[4]), 60);
    for (const SimLine* l : in(Channel::Mag, 85.0, 95.0)) EXPECT_GT(std::stoi(body(l->bytes)[4]), 90);
}

TEST_F(Faults, PortCloseEmitsCloseAndReopen) {
    // port_close mag 110..115 s.
    ASSERT_EQ(s_rec->events.size(), 2u);
    EXPECT_EQ(s_rec->events[0].channel, Channel::Mag);
    EXPECT_FALSE(s_rec->events[0].open);
    EXPECT_NEAR(elapsedS(*s_sc, s_rec->events[0].utc_ns), 110.0, 0.011);
    EXPECT_TRUE(s_rec->events[1].open);
    EXPECT_NEAR(elapsedS(*s_sc, s_rec->events[1].utc_ns), 115.0, 0.011);
}

TEST_F(Faults, AltitudeExcursionRaisesTheFish) {
    // altitude_excursion 120..160 s, +5 m. Against the same run without that fault (same seed:
    // everything else identical), the altimeter reads the same before and higher during it.
    Scenario calm = *s_sc;
    calm.faults.erase(std::remove_if(calm.faults.begin(), calm.faults.end(),
                                     [](const FaultSpec& f) {
                                         return f.kind == FaultKind::AltitudeExcursion;
                                     }),
                      calm.faults.end());
    const Recorded base = runInMemory(calm, 7);
    auto sga = [&](const Recorded& r, double t0, double t1) {
        std::vector<double> v;
        for (const SimLine& l : r.lines) {
            const double t = elapsedS(*s_sc, l.utc_ns);
            if (l.channel == Channel::Altimeter && t >= t0 && t < t1) v.push_back(std::stod(body(l.bytes)[2]));
        }
        return v;
    };
    EXPECT_EQ(sga(*s_rec, 100.0, 120.0), sga(base, 100.0, 120.0));
    const auto high = sga(*s_rec, 150.0, 160.0);
    const auto low = sga(base, 150.0, 160.0);
    ASSERT_EQ(high.size(), low.size());
    ASSERT_FALSE(high.empty());
    for (std::size_t i = 0; i < high.size(); ++i) EXPECT_GT(high[i] - low[i], 3.0);
}

}  // namespace
}  // namespace sg::sim::test
