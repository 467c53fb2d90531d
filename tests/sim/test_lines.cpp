// Every line the simulator writes: checksum (XOR computed here, independently), talker IDs and
// sentence types, acceptance by the core's decoders, and the GGA position against the logged
// antenna position (projected here with GeographicLib, independently of the simulator's PROJ).
#include <gtest/gtest.h>

#include <cmath>
#include <set>

#include <GeographicLib/UTMUPS.hpp>

#include "decode/field_map.hpp"
#include "decode/nmea.hpp"
#include "sim_test_util.hpp"

namespace sg::sim::test {
namespace {

TEST(Lines, ChecksumsVerifyAndTalkersAreRealistic) {
    const Scenario sc = loadScenario(dataPath("short.toml"));
    Scenario clean = sc;
    clean.faults.clear();
    const Recorded rec = runInMemory(clean, 11);
    const auto maps = decode::defaultFieldMaps();
    std::set<std::string> gnss_types;
    std::size_t n = 0;
    for (const SimLine& l : rec.lines) {
        ASSERT_FALSE(l.garbage);
        ++n;
        EXPECT_TRUE(checksumOk(l.bytes)) << l.bytes;
        switch (l.channel) {
        case Channel::Gnss:
            ASSERT_EQ(l.bytes.substr(0, 3), "$GN") << l.bytes;
            gnss_types.insert(l.bytes.substr(3, 3));
            break;
        case Channel::Gyro: EXPECT_EQ(l.bytes.substr(0, 6), "$HEHDT") << l.bytes; break;
        case Channel::Sounder: EXPECT_EQ(l.bytes.substr(0, 6), "$SDDPT") << l.bytes; break;
        case Channel::Mag: EXPECT_EQ(l.bytes.substr(0, 4), "SGM,") << l.bytes; break;
        case Channel::Altimeter: EXPECT_EQ(l.bytes.substr(0, 4), "SGA,") << l.bytes; break;
        case Channel::Cable: EXPECT_EQ(l.bytes.substr(0, 4), "SGC,") << l.bytes; break;
        }
        // The core must accept what the simulator sends.
        if (l.bytes[0] == '$') {
            const auto s = decode::decodeNmea(l.bytes);
            EXPECT_EQ(s.reason, decode::Reason::Ok) << l.bytes << " " << s.detail;
        } else {
            const auto m = decode::decodeWithMaps(maps, l.bytes);
            EXPECT_EQ(m.record.reason, decode::Reason::Ok) << l.bytes << " " << m.record.detail;
        }
    }
    EXPECT_GT(n, 20000u);
    EXPECT_EQ(gnss_types, (std::set<std::string>{"GGA", "GST", "RMC", "VTG", "ZDA"}));
}

TEST(Lines, SgmLayoutIsTheTeamsDefault) {
    // SGM,<sensor 0-7>,<hhmmss.sss>,<nT .3>,<quality 0-99>,<depth .2>,<altitude .2|empty>*XX
    const Scenario sc = loadScenario(dataPath("short.toml"));
    const Recorded rec = runInMemory(sc, 2, 3.0);
    int seen = 0;
    for (const SimLine& l : rec.lines) {
        if (l.channel != Channel::Mag) continue;
        const auto b = body(l.bytes);
        ASSERT_EQ(b.size(), 7u);
        EXPECT_EQ(b[2].size(), 10u);                  // hhmmss.sss
        EXPECT_EQ(b[3].size() - b[3].find('.'), 4u);  // three decimals
        EXPECT_EQ(b[5].size() - b[5].find('.'), 3u);
        EXPECT_EQ(b[6].size() - b[6].find('.'), 3u);
        ++seen;
    }
    EXPECT_EQ(seen, 3 * 10 * 4);  // 3 s, 10 Hz, 4 sensors
}

TEST(Lines, GgaPositionIsTheLoggedAntennaPosition) {
    const Scenario sc = loadScenario(dataPath("short.toml"));
    Scenario clean = sc;
    clean.faults.clear();
    SimOptions o;
    o.seed = 4;
    o.duration_s = 30.0;
    Simulator sim(clean, o);
    int zone = 0;
    bool northp = false;
    double e0 = 0, n0 = 0, gamma = 0, k = 0;
    GeographicLib::UTMUPS::Forward(sc.site.origin_lat_deg, sc.site.origin_lon_deg, zone, northp,
                                   e0, n0, gamma, k, 31);
    // BUILD-NOTES reference: PROJ and GeographicLib agree to the millimetre at this latitude.
    EXPECT_NEAR(sim.origin_m().e, e0, 0.001);
    EXPECT_NEAR(sim.origin_m().n, n0, 0.001);
    int checked = 0;
    while (!sim.done()) {
        const StepOutput& s = sim.step();
        for (const SimLine& l : s.lines) {
            if (l.bytes.compare(3, 3, "GGA") != 0) continue;
            const auto d = decode::decodeNmea(l.bytes);
            const auto& gga = std::get<decode::Gga>(d.data);
            double e = 0, n = 0;
            GeographicLib::UTMUPS::Forward(*gga.lat_deg, *gga.lon_deg, zone, northp, e, n, gamma, k, 31);
            // position_std 0.02 m (Gauss-Markov), 1e-7 minute of latitude = 0.2 mm.
            EXPECT_NEAR(e, e0 + s.nav.antenna_m.e, 0.12);
            EXPECT_NEAR(n, n0 + s.nav.antenna_m.n, 0.12);
            ++checked;
        }
    }
    EXPECT_EQ(checked, 300);
}

}  // namespace
}  // namespace sg::sim::test
