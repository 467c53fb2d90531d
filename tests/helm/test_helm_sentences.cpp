// The helm's NMEA 0183 sentences: hand-worked examples (checksums XORed here by hand, field
// layouts from memory of NMEA 0183 v2.3, as the builders' comments say), the 82-character limit,
// the route split, our own decoder reading them back, the [[output]] keys, and the planar
// cross-track geometry against a hand computation.
#include <gtest/gtest.h>

#include <cmath>
#include <string>

#include "common/config_section.hpp"
#include "decode/nmea.hpp"
#include "engine/helm_steering.hpp"
#include "helm/helm_config.hpp"
#include "helm/steering_sentences.hpp"
#include "nav/survey_crs.hpp"

using namespace sg;

namespace {

// The NMEA 0183 checksum by hand: XOR of every byte between '$' and '*', two upper-case hex digits.
std::string withChecksum(const std::string& body) {
    unsigned x = 0;
    for (const char c : body) x ^= static_cast<unsigned char>(c);
    const char* hex = "0123456789ABCDEF";
    return "$" + body + "*" + hex[(x >> 4) & 0xF] + hex[x & 0xF];
}

helm::SteeringFix exampleFix() {
    helm::SteeringFix f;
    f.valid = true;
    f.origin_id = "HF01A";
    f.dest_id = "HF01B";
    f.dest = {52.1852, 4.5};           // 52 deg 11.112 min N, 4 deg 30 min E
    f.xte_m = 20.0;                    // 20 m to starboard: 20 / 1852 = 0.0108 nm -> "0.011", steer L
    f.bearing_origin_dest_deg = 45.0;
    f.bearing_to_dest_deg = 44.94;     // -> "44.9"
    f.range_to_dest_m = 555.6;         // 0.3 nm -> "0.30"
    return f;
}

}  // namespace

TEST(HelmSentences, ChecksumOfAPublishedStyleBodyByHand) {
    // "GPHDT,123.4,T": the decoder's checksum helper against the hand XOR above.
    EXPECT_EQ(decode::nmeaWithChecksum("GPHDT,123.4,T"), withChecksum("GPHDT,123.4,T"));
}

TEST(HelmSentences, XteApbRmbHandWorked) {
    const helm::SentenceOptions opt;  // talker IN, 3 decimals of nautical miles
    const auto f = exampleFix();
    EXPECT_EQ(helm::buildXte(f, opt), withChecksum("INXTE,A,A,0.011,L,N,A"));
    EXPECT_EQ(helm::buildApb(f, opt), withChecksum("INAPB,A,A,0.011,L,N,V,V,45.0,T,HF01B,44.9,T,44.9,T,A"));
    EXPECT_EQ(helm::buildRmb(f, opt),
              withChecksum("INRMB,A,0.011,L,HF01A,HF01B,5211.112,N,00430.000,E,0.30,44.9,,V,A"));
    // Port of the track (negative): steer right.
    auto p = f;
    p.xte_m = -3.704;  // 0.002 nm
    EXPECT_EQ(helm::buildXte(p, opt), withChecksum("INXTE,A,A,0.002,R,N,A"));
    // Arrival: RMB field 13 and APB fields 6 and 7.
    p.arrival_circle_entered = true;
    p.perpendicular_passed = true;
    EXPECT_NE(helm::buildRmb(p, opt).find(",A,A*"), std::string::npos);
    EXPECT_NE(helm::buildApb(p, opt).find(",N,A,A,45.0,"), std::string::npos);
}

TEST(HelmSentences, VoidWhenNoLine) {
    const helm::SentenceOptions opt{"GP", 3};
    const helm::SteeringFix none;
    EXPECT_EQ(helm::buildXte(none, opt), withChecksum("GPXTE,V,V,,,N,N"));
    EXPECT_EQ(helm::buildApb(none, opt), withChecksum("GPAPB,V,V,,,,V,V,,,,,,,,N"));
    EXPECT_EQ(helm::buildRmb(none, opt), withChecksum("GPRMB,V,,,,,,,,,,,,V,N"));
}

TEST(HelmSentences, LatLonFormattingCarriesRoundedMinutes) {
    EXPECT_EQ(helm::formatLatitude(52.5), "5230.0000,N");
    EXPECT_EQ(helm::formatLongitude(-4.5), "00430.0000,W");
    EXPECT_EQ(helm::formatLatitude(-33.0 - 59.99999 / 60.0), "3400.0000,S");  // 59.99999' rounds to 60
    EXPECT_EQ(helm::formatLongitude(179.999999999), "18000.0000,E");
    EXPECT_EQ(helm::formatLatitude(1.0 + 0.5 / 60.0, 3), "0100.500,N");
}

TEST(HelmSentences, LongestValuesStayWithin82Characters) {
    helm::SteeringFix f = exampleFix();
    f.origin_id = helm::lineEndId("VERYLONGNAME", false);
    f.dest_id = helm::lineEndId("VERYLONGNAME", true);
    EXPECT_EQ(f.origin_id, "VEAMEA");  // first 2 + last 3 letters/digits
    EXPECT_EQ(helm::lineEndId("INF-01", true), "INF01B");
    EXPECT_EQ(helm::lineEndId("HF01", false), "HF01A");
    f.xte_m = 1e9;
    f.range_to_dest_m = 1e12;
    f.closing_mps = -1e3;
    f.dest = {-89.9999, -179.9999};
    f.bearing_origin_dest_deg = 359.99;
    f.bearing_to_dest_deg = 359.94;
    for (int dec = 2; dec <= 4; ++dec) {
        const helm::SentenceOptions opt{"IN", dec};
        for (const char* t : {"XTE", "APB", "RMB"}) {
            const auto s = helm::buildSteering(t, f, opt);
            EXPECT_LE(s.size() + 2, helm::kMaxSentenceChars) << s;  // + CR LF
            EXPECT_EQ(decode::decodeRouteNmea(s).reason, decode::Reason::Ok) << s;
        }
    }
    // 359.99 prints 0.0 (not 360.0); reserved characters never reach a field.
    EXPECT_NE(helm::buildApb(f, {}).find(",0.0,T,"), std::string::npos);
    EXPECT_EQ(helm::waypointId("a,b*c$"), "a_b_c_");
}

TEST(HelmSentences, OwnDecoderReadsTheSteeringSentences) {
    const helm::SentenceOptions opt;
    auto f = exampleFix();
    f.closing_mps = 2.0 * helm::kMpsPerKnot;
    const auto rmb = decode::decodeRouteNmea(helm::buildRmb(f, opt));
    ASSERT_EQ(rmb.reason, decode::Reason::Ok) << rmb.detail;
    const auto& r = std::get<decode::Rmb>(rmb.data);
    EXPECT_TRUE(r.valid);
    EXPECT_NEAR(*r.xte_nm, 0.011, 1e-12);
    EXPECT_EQ(r.steer, 'L');
    EXPECT_EQ(r.origin_id, "HF01A");
    EXPECT_EQ(r.dest_id, "HF01B");
    EXPECT_NEAR(*r.dest_lat_deg, 52.1852, 0.001 / 60.0);  // 3 decimals of minutes
    EXPECT_NEAR(*r.dest_lon_deg, 4.5, 0.001 / 60.0);
    EXPECT_NEAR(*r.closing_kn, 2.0, 1e-9);
    const auto apb = decode::decodeRouteNmea(helm::buildApb(f, opt));
    ASSERT_EQ(apb.reason, decode::Reason::Ok) << apb.detail;
    EXPECT_EQ(std::get<decode::Apb>(apb.data).dest_id, "HF01B");
    EXPECT_EQ(std::get<decode::Apb>(apb.data).bearing_origin_dest_ref, 'T');
    // A changed byte fails the checksum; a GGA is not a route sentence.
    auto bad = helm::buildXte(f, opt);
    bad[10] = '1';
    EXPECT_EQ(decode::decodeRouteNmea(bad).reason, decode::Reason::BadChecksum);
    EXPECT_EQ(decode::decodeRouteNmea("$GPGGA,123519,4807.038,N,01131.000,E,1,08,0.9,545.4,M,46.9,M,,*47").reason,
              decode::Reason::UnknownSentence);
    EXPECT_EQ(decode::decodeRouteNmea(withChecksum("INXTE,A,A,x,L,N,A")).reason, decode::Reason::BadField);
}

TEST(HelmSentences, RouteSplitsIntoRteSentencesWithinTheLimit) {
    std::vector<helm::Waypoint> w;
    for (int i = 0; i < 20; ++i)
        w.push_back({helm::lineEndId("IF-" + std::to_string(10 + i / 2), i % 2 == 1), {52.0 + i * 1e-3, 4.5}});
    const auto s = helm::buildRoute("INFILL", w, {});
    std::vector<std::string> ids;
    int rte = 0, total = 0;
    for (std::size_t k = 0; k < s.size(); ++k) {
        EXPECT_LE(s[k].size() + 2, helm::kMaxSentenceChars) << s[k];
        const auto d = decode::decodeRouteNmea(s[k]);
        ASSERT_EQ(d.reason, decode::Reason::Ok) << s[k] << " " << d.detail;
        if (k < w.size()) {
            const auto& p = std::get<decode::Wpl>(d.data);  // waypoints first
            EXPECT_EQ(p.id, w[k].id);
            EXPECT_NEAR(p.lat_deg, w[k].pos.lat_deg, 1e-4 / 60.0);
        } else {
            const auto& r = std::get<decode::Rte>(d.data);
            EXPECT_EQ(r.number, ++rte);
            total = r.total;
            EXPECT_EQ(r.route_id, "INFILL");
            EXPECT_EQ(r.mode, 'c');
            ids.insert(ids.end(), r.waypoints.begin(), r.waypoints.end());
        }
    }
    EXPECT_GT(rte, 1);  // 20 identifiers do not fit one sentence
    EXPECT_EQ(total, rte);
    ASSERT_EQ(ids.size(), w.size());
    for (std::size_t i = 0; i < w.size(); ++i) EXPECT_EQ(ids[i], w[i].id);
}

TEST(HelmSteering, RouteWaypointIdentifiersAreUnique) {
    nav::SurveyCrs crs(32631);
    const coverage::Point a{602972.982, 5762100.490}, b{603972.982, 5762100.490};
    // Two names that shorten alike: every waypoint numbered instead.
    const auto w = engine::routeWaypoints({{"LINE-X-001", a, b}, {"LIXX-001", b, a}}, crs);
    ASSERT_EQ(w.size(), 4u);
    EXPECT_EQ(w[0].id, "W01A");
    EXPECT_EQ(w[3].id, "W02B");
    const auto v = engine::routeWaypoints({{"INF-01", a, b}, {"INF-02", b, a}}, crs);
    EXPECT_EQ(v[2].id, "INF02A");
    EXPECT_NEAR(v[0].pos.lat_deg, 52.0, 1e-7);  // BUILD-NOTES reference point
    EXPECT_NEAR(v[0].pos.lon_deg, 4.5, 1e-7);
}

TEST(HelmSteering, PlanarCrossTrackAndArrivalAgainstHandComputation) {
    // UTM 31N around lat 52, lon 4.5 (E 602972.982, N 5762100.490 by PROJ/GeographicLib/GeoConvert,
    // BUILD-NOTES). Leg 1000 m north-east at 45 degrees of grid; the position 10 m along the
    // right-hand normal and 300 m along: xte = +10 m (starboard), not arrived.
    nav::SurveyCrs crs(32631);
    const coverage::Point o{602972.982, 5762100.490};
    const double u = std::sqrt(0.5);
    const coverage::Point d{o.e_m + 1000 * u, o.n_m + 1000 * u};
    coverage::Point p{o.e_m + 300 * u + 10 * u, o.n_m + 300 * u - 10 * u};  // normal (un, -ue)
    auto f = engine::steeringFixFor({o, d, p}, crs, 50.0);
    ASSERT_TRUE(f.valid);
    EXPECT_NEAR(f.xte_m, 10.0, 1e-6);
    EXPECT_FALSE(f.arrival_circle_entered);
    EXPECT_FALSE(f.perpendicular_passed);
    // Range: the geodesic differs from the 700 m grid distance by the UTM scale factor (about
    // 0.9996 near the central meridian, lon 3): within 0.1 %.
    EXPECT_NEAR(f.range_to_dest_m, std::hypot(700.0, 10.0), 1.0);
    // True bearing = grid bearing + convergence (lon 4.5 east of the central meridian: positive,
    // sin(52 deg) * 1.5 deg = 1.18 deg, Snyder 1987 eq. 8-19 first term).
    EXPECT_NEAR(f.bearing_origin_dest_deg, 45.0 + std::sin(52.0 * M_PI / 180.0) * 1.5, 0.05);
    // Past the end, within 50 m: both flags.
    p = {d.e_m + 20 * u, d.n_m + 20 * u};
    f = engine::steeringFixFor({o, d, p}, crs, 50.0);
    EXPECT_TRUE(f.arrival_circle_entered);
    EXPECT_TRUE(f.perpendicular_passed);
    // Port side: negative.
    p = {o.e_m - 5 * u, o.n_m + 5 * u};
    EXPECT_NEAR(engine::steeringFixFor({o, d, p}, crs, 50.0).xte_m, -5.0, 1e-6);
}

TEST(HelmConfig, KeysParsedAndTyposRejectedNamingKeyAndFile) {
    auto parse = [](const std::string& text) {
        const auto t = config::parseText(text, "helm.toml");
        return helm::parseOutputs(config::Section(t, "helm.toml"));
    };
    const auto o = parse("[[output]]\nname='bridge'\nkind='steering'\ntransport='udp'\nhost='127.0.0.1'\nport=10110\n"
                         "sentences=['XTE','RMB']\ntalker='GP'\n");
    ASSERT_EQ(o.size(), 1u);
    EXPECT_EQ(o[0].port, 10110);
    EXPECT_EQ(o[0].rate_hz, 1.0);
    EXPECT_EQ(o[0].sentences, (std::vector<std::string>{"XTE", "RMB"}));
    EXPECT_EQ(o[0].sentence.talker, "GP");
    auto failsWith = [&](const std::string& text, const std::string& key) {
        try {
            parse(text);
            ADD_FAILURE() << "accepted: " << text;
        } catch (const config::ConfigError& e) {
            const std::string m = e.what();
            EXPECT_NE(m.find("helm.toml"), std::string::npos) << m;
            EXPECT_NE(m.find(key), std::string::npos) << m;
        }
    };
    const std::string base = "[[output]]\nkind='steering'\ntransport='udp'\nhost='h'\nport=1\n";
    failsWith(base + "rate=1\n", "rate");                         // typo of rate_hz
    failsWith(base + "sentences=['XTE','GGA']\n", "sentences");
    failsWith(base + "talker='P1'\n", "talker");
    failsWith(base + "rate_hz=50\n", "rate_hz");
    failsWith("[[output]]\nkind='steering'\ntransport='serial'\nport=3\ndevice='/dev/x'\n", "port");
    failsWith("[[output]]\nkind='steering'\ntransport='udp'\nhost='h'\n", "port");
}
