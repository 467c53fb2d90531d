// Sensor positioning: tow-point offsets, straight-cable layback (Pythagoras), placement along the
// travelled path (a circle: the fish stays on the circle, it does not cut to the tangent), array
// offsets, interpolation and latency, altitude sources, and flags for missing or stale inputs.
#include <gtest/gtest.h>

#include <cmath>
#include <vector>

#include "nav/positioner.hpp"

namespace {

using namespace sg::nav;

constexpr double kPi = 3.14159265358979323846;
constexpr std::int64_t kS = 1'000'000'000;

NavConfig basic() {
    NavConfig c;
    c.tow.cable_out_m = std::nullopt;
    c.sensors = {SensorOffset{0, 0.0, 0.0}};
    return c;
}

// Feeds a straight northbound track at `speed` m/s, fixes at 10 Hz, from t = 0 to `seconds`.
void northbound(Positioner& p, double speed, double seconds, double e0 = 500000.0,
                double n0 = 6000000.0) {
    for (int i = 0; i <= static_cast<int>(seconds * 10); ++i) {
        const std::int64_t t = i * kS / 10;
        p.addFixProjected(t, e0, n0 + speed * 0.1 * i, 4, 0.0);
    }
}

TEST(Layback, StraightCablePythagoras) {
    // Straight-cable approximation (common practice): horizontal = sqrt(cable^2 - drop^2);
    // a 3-4-5 triangle: cable 50 m, depth 30 m -> 40 m behind the tow point.
    NavConfig c = basic();
    Positioner p(c, nullptr);
    for (int i = 0; i <= 60; ++i) {
        p.addCableOut(i * kS, 50.0);
        p.addSensorDepth(i * kS, 30.0);
    }
    northbound(p, 2.0, 60.0);
    const SensorPose pose = p.poseAt(50 * kS, 0);
    EXPECT_TRUE(pose.positionOk()) << pose.flags;
    EXPECT_FALSE(pose.altitudeOk());  // no altimeter, no sounder
    EXPECT_NEAR(pose.layback_m, 40.0, 1e-9);
    EXPECT_NEAR(pose.easting_m, 500000.0, 1e-6);
    EXPECT_NEAR(pose.northing_m, 6000000.0 + 100.0 - 40.0, 1e-6);
    EXPECT_NEAR(pose.heading_grid_rad, 0.0, 1e-9);

    // Tow point 2 m above the water adds to the drop; fixed extra layback adds to the result.
    c.vessel.tow_point_m = {0.0, 0.0, 2.0};
    c.tow.extra_layback_m = 5.0;
    Positioner q(c, nullptr);
    for (int i = 0; i <= 60; ++i) {
        q.addCableOut(i * kS, 50.0);
        q.addSensorDepth(i * kS, 28.0);
    }
    northbound(q, 2.0, 60.0);
    EXPECT_NEAR(q.poseAt(50 * kS, 0).layback_m, 45.0, 1e-9);
}

TEST(Layback, FishFollowsTheCircleNotTheTangent) {
    // The tow point runs on a circle of radius 100 m at 2 m/s (fixes every 0.25 s = 0.5 m).
    // The fish, 40 m behind along the path, must sit on the circle at arc length 40 m behind the
    // tow point; the straight-astern (tangent) point would be sqrt(100^2 + 40^2) - 100 = 7.7 m
    // outside the circle (geometry).
    NavConfig c = basic();
    c.tow.cable_out_m = 50.0;
    c.tow.sensor_depth_m = 30.0;
    Positioner p(c, nullptr);
    const double radius = 100.0;
    const double speed = 2.0;
    const double cx = 400000.0;
    const double cy = 5000000.0;
    auto onCircle = [&](double t) {  // counter-clockwise from east
        const double a = speed * t / radius;
        return std::pair{cx + radius * std::cos(a), cy + radius * std::sin(a)};
    };
    for (int i = 0; i <= 400; ++i) {
        const double t = 0.25 * i;
        auto [e, n] = onCircle(t);
        p.addFixProjected(static_cast<std::int64_t>(t * 1e9), e, n, 4, 0.0);
    }
    const double t_query = 80.0;
    const SensorPose pose = p.poseAt(static_cast<std::int64_t>(t_query * 1e9), 0);
    ASSERT_TRUE(pose.positionOk()) << pose.flags;
    EXPECT_NEAR(pose.layback_m, 40.0, 1e-9);
    auto [fe, fn] = onCircle(t_query - 40.0 / speed);
    // Chords of 0.5 m on a 100 m circle sag by 0.5^2 / (8 * 100) = 0.3 mm.
    EXPECT_NEAR(pose.easting_m, fe, 0.01);
    EXPECT_NEAR(pose.northing_m, fn, 0.01);
    EXPECT_NEAR(std::hypot(pose.easting_m - cx, pose.northing_m - cy), radius, 0.01);
    // Path direction at the fish: tangent of the circle there (counter-clockwise motion).
    const double a = speed * (t_query - 20.0) / radius;
    const double expected = std::atan2(-std::sin(a), std::cos(a));  // bearing of (-sin a, cos a)
    double diff = pose.heading_grid_rad - expected;
    diff = std::remainder(diff, 2.0 * kPi);
    EXPECT_NEAR(diff, 0.0, 1e-3);
}

TEST(Offsets, AntennaToTowPointRotatedByHeading) {
    // Heading east (HDT 090): forward = +E, starboard = -N. Antenna at [10, 0, 5], tow point at
    // [-20, 2, 1]: tow point = antenna + 30 m astern (west) + 2 m to starboard (south).
    NavConfig c = basic();
    c.vessel.antenna_m = {10.0, 0.0, 5.0};
    c.vessel.tow_point_m = {-20.0, 2.0, 1.0};
    c.tow.cable_out_m = 1.0;  // drop = depth 0 + 1 m height: zero layback
    c.tow.sensor_depth_m = 0.0;
    Positioner p(c, nullptr);
    for (int i = 0; i <= 50; ++i) {
        p.addHeading(i * kS / 10, 90.0);
        p.addFixProjected(i * kS / 10, 300000.0 + 0.3 * i, 4000000.0, 4, 0.0);
    }
    const SensorPose pose = p.poseAt(5 * kS, 0);
    EXPECT_TRUE(pose.positionOk()) << pose.flags;
    EXPECT_NEAR(pose.easting_m, 300000.0 + 15.0 - 30.0, 1e-6);
    EXPECT_NEAR(pose.northing_m, 4000000.0 - 2.0, 1e-6);
}

TEST(Offsets, TrueHeadingConvertedToGridWithConvergence) {
    // Far east of the central meridian the grid is rotated by the convergence gamma:
    // grid bearing = true bearing - gamma. A vessel heading true north with the tow point 30 m
    // astern puts the tow point at grid bearing 180 - gamma from the antenna.
    const SurveyCrs crs(32631);  // UTM 31N, central meridian 3 E
    NavConfig c = basic();
    c.vessel.tow_point_m = {-30.0, 0.0, 0.0};
    c.tow.cable_out_m = 0.0;
    c.tow.sensor_depth_m = 0.0;
    Positioner p(c, &crs);
    const double lon = 5.9;
    const double lat = 55.0;
    p.addHeading(0, 0.0);
    p.addFix(0, lon, lat, 1);
    p.addHeading(kS, 0.0);
    p.addFix(kS, lon, lat + 1e-6, 1);
    const SensorPose pose = p.poseAt(kS, 0);
    const EastNorth ant = crs.forward(lon, lat + 1e-6);
    const double gamma = crs.convergence_deg(lon, lat) * kPi / 180.0;
    const double bearing = std::atan2(pose.easting_m - ant.easting_m, pose.northing_m - ant.northing_m);
    EXPECT_NEAR(std::remainder(bearing - (kPi - gamma), 2 * kPi), 0.0, 1e-4);
    EXPECT_GT(gamma, 0.03);  // the case is not trivial (about 2.4 degrees here)
}

TEST(Offsets, CourseMadeGoodWhenNoHeadingAndFlagsWhenTooSlow) {
    NavConfig c = basic();
    c.vessel.tow_point_m = {-10.0, 0.0, 0.0};
    c.tow.cable_out_m = 0.0;
    c.tow.sensor_depth_m = 0.0;
    c.vessel.cmg_min_speed_mps = 0.5;
    Positioner fast(c, nullptr);
    for (int i = 0; i <= 100; ++i) fast.addFixProjected(i * kS / 10, 1000.0 + 0.3 * i, 0.0, 1, 0.0);
    const SensorPose a = fast.poseAt(10 * kS, 0);
    EXPECT_TRUE(a.positionOk()) << a.flags;
    EXPECT_TRUE(a.flags & kHeadingFromCmg);
    EXPECT_NEAR(a.easting_m, 1000.0 + 30.0 - 10.0, 1e-6);  // 10 m astern of an eastbound antenna
    Positioner slow(c, nullptr);
    for (int i = 0; i <= 100; ++i) slow.addFixProjected(i * kS / 10, 0.01 * i, 0.0, 1, 0.0);
    const SensorPose b = slow.poseAt(10 * kS, 0);
    EXPECT_TRUE(b.flags & kNoHeading);
    EXPECT_FALSE(b.positionOk());
    // With HDT only, course made good is not used.
    c.vessel.heading_source = HeadingSource::Hdt;
    Positioner hdt_only(c, nullptr);
    for (int i = 0; i <= 100; ++i) {
        hdt_only.addFixProjected(i * kS / 10, 1000.0 + 0.3 * i, 0.0, 1, 0.0);
    }
    EXPECT_TRUE(hdt_only.poseAt(10 * kS, 0).flags & kNoHeading);
}

TEST(Array, SensorsOffsetAcrossAndAlongThePath) {
    NavConfig c = basic();
    c.tow.cable_out_m = 50.0;
    c.tow.sensor_depth_m = 30.0;
    c.sensors = {{0, -1.5, 0.0}, {1, 1.5, 0.0}, {2, 0.0, -2.0}};
    Positioner p(c, nullptr);
    northbound(p, 2.0, 60.0);
    std::vector<SensorPose> poses;
    p.posesAt(50 * kS, poses);
    ASSERT_EQ(poses.size(), 3u);
    const double n_fish = 6000000.0 + 100.0 - 40.0;
    EXPECT_NEAR(poses[0].easting_m, 500000.0 - 1.5, 1e-6);  // port of a northbound line = west
    EXPECT_NEAR(poses[1].easting_m, 500000.0 + 1.5, 1e-6);
    EXPECT_NEAR(poses[0].northing_m, n_fish, 1e-6);
    EXPECT_NEAR(poses[2].northing_m, n_fish - 2.0, 1e-6);
    const SensorPose one = p.poseAt(50 * kS, 1);
    EXPECT_NEAR(one.easting_m, poses[1].easting_m, 1e-9);
    EXPECT_TRUE(p.poseAt(50 * kS, 7).flags & kUnknownSensor);
}

TEST(Interpolation, BetweenFixesAndWithLatency) {
    NavConfig c = basic();
    c.tow.cable_out_m = 0.0;
    c.tow.sensor_depth_m = 0.0;
    Positioner p(c, nullptr);
    northbound(p, 2.0, 10.0);
    // Half-way between the fixes at 5.0 and 5.1 s.
    EXPECT_NEAR(p.poseAt(5 * kS + kS / 20, 0).northing_m, 6000000.0 + 10.1, 1e-6);
    // A magnetometer whose stamps are 200 ms late is placed where the fish was 200 ms earlier.
    c.tow.mag_latency_ms = 200.0;
    Positioner q(c, nullptr);
    northbound(q, 2.0, 10.0);
    EXPECT_NEAR(q.poseAt(5 * kS, 0).northing_m, 6000000.0 + 9.6, 1e-6);
    // GNSS latency moves the fixes earlier in time.
    c.tow.mag_latency_ms = 0.0;
    c.vessel.gnss_latency_ms = 100.0;
    Positioner r(c, nullptr);
    northbound(r, 2.0, 10.0);
    EXPECT_NEAR(r.poseAt(5 * kS, 0).northing_m, 6000000.0 + 10.2, 1e-6);
}

// Issue #14: by default no position past the last fix (held there, so no coverage beyond it);
// [vessel] extrapolation_s carries the tow point on along the last segment for that long at most.
TEST(Extrapolation, HeldAtTheLastFixUnlessConfigured) {
    NavConfig c = basic();
    c.tow.cable_out_m = 0.0;  // fish at the tow point (no layback), to read the tow point directly
    c.tow.sensor_depth_m = 0.0;
    EXPECT_DOUBLE_EQ(c.vessel.extrapolation_s, 0.0);  // the default
    Positioner p(c, nullptr);
    northbound(p, 2.0, 10.0);  // last fix at t = 10 s, N 6000020
    const SensorPose held = p.poseAt(11 * kS, 0);
    EXPECT_TRUE(held.flags & kExtrapolated);
    EXPECT_TRUE(held.positionOk());
    EXPECT_DOUBLE_EQ(held.northing_m, 6000020.0);
    EXPECT_TRUE(p.poseAt(12 * kS + 1, 0).flags & kStaleFix);  // past fix_max_age_s (2 s)

    c.vessel.extrapolation_s = 0.5;
    Positioner q(c, nullptr);
    northbound(q, 2.0, 10.0);
    // 0.3 s past the last fix at 2 m/s: 0.6 m on; 1.5 s past: only 0.5 s of it (1.0 m).
    EXPECT_NEAR(q.poseAt(10 * kS + 300'000'000LL, 0).northing_m, 6000020.6, 1e-6);
    EXPECT_NEAR(q.poseAt(11 * kS + 500'000'000LL, 0).northing_m, 6000021.0, 1e-6);
    // Between fixes nothing changes: interpolated as before.
    EXPECT_NEAR(q.poseAt(5 * kS + 50'000'000LL, 0).northing_m, 6000010.1, 1e-6);
}

TEST(Flags, MissingAndStaleInputsAreFlaggedNotZeroed) {
    NavConfig c = basic();
    Positioner p(c, nullptr);
    const SensorPose none = p.poseAt(0, 0);
    EXPECT_TRUE(none.flags & kNoFix);
    EXPECT_TRUE(std::isnan(none.easting_m));
    EXPECT_TRUE(std::isnan(none.altitude_m));

    northbound(p, 2.0, 10.0);
    const SensorPose a = p.poseAt(5 * kS, 0);
    EXPECT_TRUE(a.flags & kNoCableOut);
    EXPECT_TRUE(a.flags & kNoSensorDepth);
    EXPECT_TRUE(a.flags & kNoAltitude);
    EXPECT_TRUE(std::isnan(a.altitude_m));
    EXPECT_EQ(a.altitude_source, AltitudeSource::None);
    EXPECT_FALSE(a.ok());

    // Past the last fix: flagged kExtrapolated (a note) within fix_max_age_s, stale after it.
    const SensorPose b = p.poseAt(11 * kS, 0);
    EXPECT_TRUE(b.flags & kExtrapolated);
    EXPECT_FALSE(b.flags & kStaleFix);
    const SensorPose s = p.poseAt(13 * kS, 0);
    EXPECT_TRUE(s.flags & kStaleFix);

    // Fixed cable out from the configuration is a note, not a problem.
    c.tow.cable_out_m = 20.0;
    c.tow.sensor_depth_m = 5.0;
    Positioner q(c, nullptr);
    northbound(q, 2.0, 30.0);
    q.addAltitude(20 * kS, 4.0);
    const SensorPose f = q.poseAt(20 * kS, 0);
    EXPECT_TRUE(f.ok()) << f.flags;
    EXPECT_TRUE(f.flags & kFixedCableOut);
    EXPECT_TRUE(f.flags & kFixedSensorDepth);

    // Cable shorter than the drop is inconsistent.
    Positioner r(basic(), nullptr);
    r.addCableOut(0, 10.0);
    r.addSensorDepth(0, 20.0);
    northbound(r, 2.0, 1.0);
    EXPECT_TRUE(r.poseAt(kS / 2, 0).flags & kCableShorterThanDrop);

    // Invalid fixes (quality 0) and fixes going back in time are rejected and counted.
    Positioner z(basic(), nullptr);
    z.addFixProjected(kS, 0.0, 0.0, 0, 0.0);
    z.addFixProjected(2 * kS, 0.0, 0.0, 1, 0.0);
    z.addFixProjected(kS, 0.0, 0.0, 1, 0.0);
    EXPECT_EQ(z.rejectedFixes(), 2);
    EXPECT_EQ(z.pathPoints(), 1u);
}

TEST(Layback, ShortHistoryIsExtendedAndFlagged) {
    NavConfig c = basic();
    c.tow.cable_out_m = 100.0;
    c.tow.sensor_depth_m = 0.0;
    Positioner p(c, nullptr);
    northbound(p, 2.0, 10.0);  // only 20 m travelled, layback 100 m
    const SensorPose pose = p.poseAt(10 * kS, 0);
    EXPECT_TRUE(pose.flags & kLaybackBeyondHistory);
    EXPECT_NEAR(pose.northing_m, 6000000.0 + 20.0 - 100.0, 1e-6);  // straight back
}

TEST(History, IsBounded) {
    NavConfig c = basic();
    c.tow.history_length_m = 300.0;
    Positioner p(c, nullptr);
    northbound(p, 5.0, 2000.0);  // 10 km
    EXPECT_LT(p.pathPoints(), 700u);  // 300 m at 0.5 m per fix, plus slack
}

TEST(Altitude, AltimeterElseWaterDepthMinusSensorDepth) {
    NavConfig c = basic();
    c.tow.cable_out_m = 50.0;
    Positioner p(c, nullptr);
    northbound(p, 2.0, 60.0);
    for (int i = 0; i <= 60; ++i) {
        p.addSensorDepth(i * kS, 30.0);
        // The seabed deepens by 0.1 m per second of the vessel's passage.
        p.addWaterDepth(i * kS, 50.0 + 0.1 * i);
    }
    const SensorPose a = p.poseAt(50 * kS, 0);
    EXPECT_EQ(a.altitude_source, AltitudeSource::WaterDepthMinusSensorDepth);
    // The fish is 40 m behind, where the vessel was 20 s earlier (t = 30 s): depth 53 m there.
    EXPECT_NEAR(a.altitude_m, 53.0 - 30.0, 1e-6);
    p.addAltitude(50 * kS, 7.5);
    const SensorPose b = p.poseAt(50 * kS, 0);
    EXPECT_EQ(b.altitude_source, AltitudeSource::Altimeter);
    EXPECT_NEAR(b.altitude_m, 7.5, 1e-9);
}

TEST(Altitude, SounderOffsetsAndDraft) {
    // NMEA 0183 DPT offset (from the standard's field description, from memory): positive =
    // distance from the transducer to the waterline, negative = from the transducer to the keel.
    VesselConfig v;
    v.draft_m = 3.0;
    v.transducer_depth_m = 2.0;
    EXPECT_NEAR(waterDepthBelowSurface_m(40.0, 1.5, v), 41.5, 1e-12);
    EXPECT_NEAR(waterDepthBelowSurface_m(40.0, -0.5, v), 42.5, 1e-12);  // below keel + draft
    EXPECT_NEAR(waterDepthBelowSurface_m(40.0, std::nullopt, v), 42.0, 1e-12);  // DBT
}

TEST(TimedSeries, InterpolatesAndRespectsAge) {
    TimedSeries s(100 * kS);
    s.add(0, 10.0);
    s.add(2 * kS, 20.0);
    EXPECT_NEAR(*s.at(kS, kS * 3 / 2), 15.0, 1e-12);
    EXPECT_FALSE(s.at(10 * kS, kS).has_value());
    EXPECT_NEAR(*s.at(3 * kS, 2 * kS), 20.0, 1e-12);  // nearest within its age
    EXPECT_FALSE(s.add(kS, 5.0));                     // back in time: rejected
    EXPECT_EQ(s.rejected(), 1);
}

}  // namespace

namespace {

TEST(Offsets, StoppedVesselWithoutHeadingCannotOrientTheArray) {
    sg::nav::NavConfig c;
    c.tow.cable_out_m = 0.0;
    c.tow.sensor_depth_m = 0.0;
    c.sensors = {{0, 2.0, 0.0}};
    sg::nav::Positioner p(c, nullptr);
    for (int i = 0; i <= 20; ++i) p.addFixProjected(i * kS / 10, 100.0, 200.0, 1, 0.0);
    EXPECT_TRUE(p.poseAt(kS, 0).flags & sg::nav::kNoHeading);
    // With a heading the stopped vessel's array is oriented by it: heading east, starboard south.
    sg::nav::Positioner q(c, nullptr);
    for (int i = 0; i <= 20; ++i) {
        q.addHeading(i * kS / 10, 90.0);
        q.addFixProjected(i * kS / 10, 100.0, 200.0, 1, 0.0);
    }
    const auto pose = q.poseAt(kS, 0);
    EXPECT_TRUE(pose.positionOk()) << pose.flags;
    EXPECT_NEAR(pose.northing_m, 198.0, 1e-9);
}

// The search of the travelled path starts from the previous answer (a speed-up for replay). The
// pose must not depend on it: the same queries in time order, in reverse order, in a scattered
// order and each on a fresh Positioner (no previous answer) give bit-identical poses. The track
// has a stop (points of equal path length) and a turn; sensors ahead of and behind the fish
// reference query other lengths. Sensors without a cross offset sit on the path itself: they are
// also checked against a plain linear scan of the fed points (a wrong segment shows on the turn).
TEST(Placement, PoseDoesNotDependOnQueryOrder) {
    NavConfig c = basic();
    c.tow.cable_out_m = 40.0;
    c.tow.sensor_depth_m = 10.0;
    c.sensors = {SensorOffset{0, -1.5, 0.0}, SensorOffset{1, 1.5, 0.0}, SensorOffset{2, 0.0, 3.0},
                 SensorOffset{3, 0.0, -6.0}, SensorOffset{4, 0.0, 0.0}};
    struct Fed {
        std::int64_t t;
        double e, n, s;  // s: travelled length
    };
    std::vector<Fed> fed;
    auto feed = [&fed](Positioner& p) {
        fed.clear();
        double e = 500000.0, n = 6000000.0, heading = 0.0;
        for (int i = 0; i <= 3000; ++i) {  // 300 s at 10 Hz
            const double t_s = i * 0.1;
            const bool stopped = t_s >= 100.0 && t_s < 130.0;
            if (t_s >= 180.0 && t_s < 240.0) heading += 0.1 * (kPi / 60.0);  // a 180 degree turn
            if (!stopped) {
                e += 0.25 * std::sin(heading);
                n += 0.25 * std::cos(heading);
            }
            p.addFixProjected(i * kS / 10, e, n, 4, 0.0);
            const double s_m = fed.empty() ? 0.0 : fed.back().s + std::hypot(e - fed.back().e, n - fed.back().n);
            fed.push_back({i * kS / 10, e, n, s_m});
        }
    };
    // Reference: the point at travelled length s by a linear scan (first point at or beyond s).
    auto onPath = [&fed](double s_m) {
        std::size_t i = 1;
        while (i + 1 < fed.size() && fed[i].s < s_m) ++i;
        const double w = (s_m - fed[i - 1].s) / (fed[i].s - fed[i - 1].s);
        return std::pair{fed[i - 1].e + w * (fed[i].e - fed[i - 1].e), fed[i - 1].n + w * (fed[i].n - fed[i - 1].n)};
    };
    auto lengthAt = [&fed](std::int64_t t) {  // tow point (= antenna here) length at time t
        std::size_t i = 1;
        while (i + 1 < fed.size() && fed[i].t <= t) ++i;
        const double w = static_cast<double>(t - fed[i - 1].t) / static_cast<double>(fed[i].t - fed[i - 1].t);
        return fed[i - 1].s + w * (fed[i].s - fed[i - 1].s);
    };
    std::vector<std::int64_t> times;
    for (std::int64_t t = 20 * kS; t < 300 * kS; t += 37 * kS / 100) times.push_back(t);
    auto posesIn = [&](const std::vector<std::size_t>& order) {
        Positioner p(c, nullptr);
        feed(p);
        std::vector<std::vector<SensorPose>> out(times.size());
        for (std::size_t k : order) p.posesAt(times[k], out[k]);
        return out;
    };
    std::vector<std::size_t> forward(times.size()), backward, scattered;
    for (std::size_t k = 0; k < times.size(); ++k) forward[k] = k;
    backward.assign(forward.rbegin(), forward.rend());
    for (std::size_t k = 0; k < times.size(); ++k) scattered.push_back((k * 389) % times.size());
    const auto a = posesIn(forward);
    const auto b = posesIn(backward);
    const auto d = posesIn(scattered);
    auto same = [](double x, double y) { return (std::isnan(x) && std::isnan(y)) || x == y; };
    Positioner fresh_feed(c, nullptr);
    feed(fresh_feed);
    int checked = 0;
    for (std::size_t k = 0; k < times.size(); ++k) {
        std::vector<SensorPose> fresh;
        Positioner f(fresh_feed);  // a copy: same path, but the search hints of a fresh start
        f.posesAt(times[k], fresh);
        const std::vector<SensorPose>* others[] = {&b[k], &d[k], &fresh};
        for (const auto* other : others) {
            for (std::size_t i = 0; i < c.sensors.size(); ++i) {
                const SensorPose& x = a[k][i];
                const SensorPose& y = (*other)[i];
                ASSERT_TRUE(same(x.easting_m, y.easting_m) && same(x.northing_m, y.northing_m) &&
                            same(x.heading_grid_rad, y.heading_grid_rad) && x.flags == y.flags)
                    << "time " << times[k] << " sensor " << i;
                ++checked;
            }
        }
    }
    EXPECT_EQ(checked, static_cast<int>(3 * c.sensors.size() * times.size()));
    int on_turn = 0;
    for (std::size_t k = 0; k < times.size(); ++k) {
        const double s_fish = lengthAt(times[k]) - d[k][4].layback_m;
        if (s_fish <= fed.front().s + 1.0) continue;  // before the kept history: extrapolated
        for (const auto& [i, along] : {std::pair{4, 0.0}, std::pair{2, 3.0}, std::pair{3, -6.0}}) {
            const auto [e, n] = onPath(s_fish + along);
            EXPECT_NEAR(d[k][static_cast<std::size_t>(i)].easting_m, e, 1e-6) << "time " << times[k];
            EXPECT_NEAR(d[k][static_cast<std::size_t>(i)].northing_m, n, 1e-6) << "time " << times[k];
        }
        if (times[k] > 200 * kS && times[k] < 240 * kS) ++on_turn;
    }
    EXPECT_GT(on_turn, 50);
    // The stop and the turn are inside the queried stretch (the fish passes both).
    EXPECT_GT(times.size(), 700u);
}

}  // namespace
