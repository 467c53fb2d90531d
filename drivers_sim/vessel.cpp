// Vessel and towed fish dynamics; see vessel.hpp.
#include "drivers_sim/vessel.hpp"

#include <algorithm>
#include <cmath>

namespace sg::sim {

namespace {

constexpr double kDeg = M_PI / 180.0;

double wrapPi(double a) {
    a = std::fmod(a + M_PI, 2.0 * M_PI);
    if (a < 0.0) a += 2.0 * M_PI;
    return a - M_PI;
}

// Vessel-frame offset (forward, starboard) to grid, for a grid heading.
Vec2 offsetToGrid(const std::array<double, 2>& fwd_stbd, double heading_rad) {
    const Vec2 f = bearingUnit(heading_rad);
    const Vec2 s{f.n, -f.e};
    return fwd_stbd[0] * f + fwd_stbd[1] * s;
}

// One step of a first-order Gauss-Markov process with stationary std `sigma` and time constant
// `tau` (exact discretisation).
double gaussMarkov(double x, double sigma, double tau, double dt, SimRandom& rng) {
    const double a = std::exp(-dt / tau);
    return a * x + sigma * std::sqrt(1.0 - a * a) * rng.normal();
}

}  // namespace

VesselModel::VesselModel(const Scenario& sc, const Route& route, const Seabed& seabed,
                         double convergence_deg, std::uint64_t seed)
    : m_spec(sc.vessel), m_tow(sc.tow), m_route(route), m_seabed(seabed),
      m_convergence_rad(convergence_deg * kDeg), m_rng(seed, 101), m_cable_m(sc.tow.cable_out_m) {
    const Vec2 dir = route.direction(0.0);
    m_vessel.heading_rad = bearingOf(dir);
    m_vessel.antenna_m = route.at(0.0);
    m_vessel.tow_point_m = m_vessel.antenna_m + offsetToGrid(m_spec.tow_point_m, m_vessel.heading_rad);
    m_vessel.velocity_mps = m_spec.speed_mps * dir;
    // As if the vessel had been running straight in for a while: a path astern of the tow point.
    const double back = m_cable_m + 20.0;
    for (double d = back; d > 0.0; d -= 2.0) {
        m_path.push_back(m_vessel.tow_point_m - d * dir);
        m_path_s.push_back(back - d);
    }
    m_path.push_back(m_vessel.tow_point_m);
    m_path_s.push_back(back);
    m_fish.cable_out_m = m_cable_m;
    m_fish.depth_m = std::max(m_tow.min_depth_m, seabed.depth_m(m_path.front()) - m_tow.altitude_m);
    placeFish();
}

void VesselModel::step(double t_s, double dt_s, double altitude_offset_m, double cable_delta_m) {
    VesselState& v = m_vessel;
    // Guidance: steer for a point `lookahead` ahead on the route, corrected by the integral of
    // the cross-track error (which builds the crab angle a cross current needs).
    const double s = m_route.project(v.antenna_m, v.route_s_m - 5.0, v.route_s_m + 3.0 * m_spec.lookahead_m);
    v.route_s_m = std::max(v.route_s_m, s);
    const Vec2 on_route = m_route.at(v.route_s_m);
    const Vec2 dir = m_route.direction(v.route_s_m);
    const Vec2 stbd{dir.n, -dir.e};
    v.cross_track_m = dot(v.antenna_m - on_route, stbd);
    const int ahead_line = m_route.lineAt(v.route_s_m + m_spec.lookahead_m);
    const bool on_line = m_route.lineAt(v.route_s_m) >= 0 || ahead_line >= 0;
    if (ahead_line >= 0 && ahead_line != m_last_line) {
        // A new line run the other way: the crab the current needs has the opposite sign
        // relative to the route, so start from the mirrored value (as a helmsman would).
        if (m_last_line >= 0 && dot(m_route.direction(v.route_s_m + m_spec.lookahead_m), m_last_dir) < 0.0)
            m_integral_m_s = -m_integral_m_s;
        m_last_line = ahead_line;
        m_last_dir = m_route.direction(v.route_s_m + m_spec.lookahead_m);
    }
    if (on_line) {
        m_integral_m_s = std::clamp(m_integral_m_s + v.cross_track_m * dt_s, -1000.0, 1000.0);
    }
    const Vec2 target = m_route.at(v.route_s_m + m_spec.lookahead_m);
    const double course_cmd = bearingOf(target - v.antenna_m);
    const double crab = std::clamp(m_spec.integral_dps_per_m * m_integral_m_s, -25.0, 25.0) * kDeg;
    const double heading_cmd = course_cmd - crab;

    m_gust_dps = gaussMarkov(m_gust_dps, m_spec.gust_std_dps, m_spec.gust_tau_s, dt_s, m_rng);
    const double max_rate = m_spec.max_turn_rate_dps * kDeg;
    const double rate = std::clamp(wrapPi(heading_cmd - v.heading_rad) / m_spec.heading_tau_s,
                                   -max_rate, max_rate) + m_gust_dps * kDeg;
    v.heading_rad = std::fmod(v.heading_rad + rate * dt_s + 2.0 * M_PI, 2.0 * M_PI);
    const double phase = 2.0 * M_PI * t_s / m_spec.swell_period_s;
    v.yaw_rad = m_spec.swell_yaw_deg * kDeg * std::sin(phase);
    v.heave_m = m_spec.swell_heave_m * std::sin(phase + 1.0);

    m_speed_dev_mps = gaussMarkov(m_speed_dev_mps, m_spec.speed_std_mps, m_spec.speed_tau_s, dt_s, m_rng);
    const double speed = std::max(0.2, m_spec.speed_mps + m_speed_dev_mps);
    // The current's set is a true direction; the grid bearing is true minus convergence.
    const Vec2 current = m_spec.current_drift_mps *
                         bearingUnit(m_spec.current_set_deg * kDeg - m_convergence_rad);
    v.velocity_mps = speed * bearingUnit(v.heading_rad) + current;
    v.antenna_m = v.antenna_m + dt_s * v.velocity_mps;
    v.tow_point_m = v.antenna_m + offsetToGrid(m_spec.tow_point_m, v.heading_rad + v.yaw_rad);

    const double moved = length(v.tow_point_m - m_path.back());
    if (moved > 0.05) {
        m_path_s.push_back(m_path_s.back() + moved);
        m_path.push_back(v.tow_point_m);
    }

    // Fish height: first-order lag towards the commanded height over the seabed below it.
    m_cable_m = m_tow.cable_out_m + cable_delta_m;
    const double floor_m = m_seabed.depth_m(m_fish.position_m);
    const double want = std::clamp(floor_m - (m_tow.altitude_m + altitude_offset_m),
                                   m_tow.min_depth_m, std::max(m_tow.min_depth_m, floor_m - 0.3));
    const double max_dz = m_tow.max_vertical_rate_mps;
    const double dz = std::clamp((want - m_fish.depth_m) / m_tow.fish_tau_s, -max_dz, max_dz);
    m_fish.depth_m += dz * dt_s;
    m_fish.cable_out_m = m_cable_m;
    placeFish();

    // Keep only the part of the path the fish can still be on.
    while (m_path.size() > 3 && m_path_s.back() - m_path_s[1] > m_fish.layback_m + 20.0) {
        m_path.pop_front();
        m_path_s.pop_front();
    }
}

Vec2 VesselModel::pathPointBehind(double distance_m, double* heading_rad) const {
    const double s = m_path_s.back() - distance_m;
    // Find the segment [i, i+1] holding s (the path is short: linear search from the end).
    std::size_t i = m_path.size() - 1;
    while (i > 0 && m_path_s[i - 1] > s) --i;
    if (i == 0) {
        // Before the recorded path: extend its first segment backwards.
        const Vec2 d = m_path[1] - m_path[0];
        const Vec2 u = (1.0 / length(d)) * d;
        *heading_rad = bearingOf(u);
        return m_path[0] - (m_path_s[0] - s) * u;
    }
    const Vec2 a = m_path[i - 1];
    const Vec2 b = m_path[i];
    const double t = (s - m_path_s[i - 1]) / (m_path_s[i] - m_path_s[i - 1]);
    *heading_rad = bearingOf(b - a);
    return a + t * (b - a);
}

void VesselModel::placeFish() {
    // Layback: horizontal distance from a straight cable (no catenary) of the cable out and the
    // vertical drop from the tow point to the fish.
    const double drop = m_fish.depth_m + m_tow.tow_point_height_m;
    m_fish.layback_m = std::sqrt(std::max(0.0, m_cable_m * m_cable_m - drop * drop));
    m_fish.position_m = pathPointBehind(m_fish.layback_m, &m_fish.heading_rad);
    m_fish.altitude_m = m_seabed.depth_m(m_fish.position_m) - m_fish.depth_m;
}

}  // namespace sg::sim
