// Vessel and towed fish dynamics in the survey grid (no I/O):
// - the vessel follows the route with a lookahead autopilot (first-order heading response, an
//   integral term against the current's crab), a gusty yaw disturbance, swell yaw, speed
//   variation and a current set;
// - the tow point (offset from the GNSS antenna in the vessel frame) leaves a path behind it; the
//   fish lies ON that path at the layback distance behind the tow point (it cuts the corner on a
//   turn, it is not straight astern);
// - the fish holds a commanded height above the seabed imperfectly (first-order lag and a rate
//   limit), so it flies high over a dip such as a channel.
#pragma once

#include <deque>

#include "drivers_sim/route.hpp"
#include "drivers_sim/scenario.hpp"
#include "drivers_sim/seabed.hpp"
#include "drivers_sim/sim_random.hpp"

namespace sg::sim {

struct VesselState {
    Vec2 antenna_m;             // GNSS antenna (metres from the origin, grid)
    double heading_rad = 0.0;   // grid heading of the hull without swell yaw
    double yaw_rad = 0.0;       // swell yaw added to the heading
    Vec2 velocity_mps;          // over ground, grid
    double route_s_m = 0.0;     // progress along the route
    double cross_track_m = 0.0; // from the route, starboard positive
    Vec2 tow_point_m;
    double heave_m = 0.0;
};

struct FishState {
    Vec2 position_m;            // grid, metres from the origin
    double heading_rad = 0.0;   // grid direction of travel along the tow path
    double depth_m = 0.0;       // below the sea surface
    double altitude_m = 0.0;    // above the seabed (true)
    double cable_out_m = 0.0;   // true cable out
    double layback_m = 0.0;     // horizontal, along the tow path
};

class VesselModel {
public:
    VesselModel(const Scenario& sc, const Route& route, const Seabed& seabed,
                double convergence_deg, std::uint64_t seed);

    // Advances by dt_s at elapsed time t_s. altitude_offset_m raises the commanded fish height
    // (altitude excursion fault), cable_delta_m changes the cable really paid out.
    void step(double t_s, double dt_s, double altitude_offset_m, double cable_delta_m);

    const VesselState& vessel() const { return m_vessel; }
    const FishState& fish() const { return m_fish; }
    bool finished() const { return m_vessel.route_s_m >= m_route.length_m() - 1.0; }
    // The tow point's travelled path, oldest first (pruned to a little more than the layback).
    const std::deque<Vec2>& towPath() const { return m_path; }

private:
    Vec2 pathPointBehind(double distance_m, double* heading_rad) const;
    void placeFish();

    const VesselSpec& m_spec;
    const TowSpec& m_tow;
    const Route& m_route;
    const Seabed& m_seabed;
    double m_convergence_rad;
    SimRandom m_rng;
    VesselState m_vessel;
    FishState m_fish;
    double m_gust_dps = 0.0;
    double m_speed_dev_mps = 0.0;
    double m_integral_m_s = 0.0;
    double m_cable_m = 0.0;
    int m_last_line = -1;          // plan line of the last run, for the crab carried over
    Vec2 m_last_dir;
    std::deque<Vec2> m_path;       // tow point positions
    std::deque<double> m_path_s;   // cumulative distance of each
};

}  // namespace sg::sim
