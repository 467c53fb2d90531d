// The simulated survey (no I/O): each step() advances simulated time by one tick and returns the
// instrument lines produced in it, each with its simulated UTC time and its channel, plus the
// ground truth (vessel, fish, each magnetometer sensor's position and anomaly) for tests and
// training. Same scenario + same seed -> the same lines, byte for byte.
#pragma once

#include <array>
#include <cstdint>
#include <memory>
#include <optional>
#include <string>
#include <vector>

#include "drivers_sim/route.hpp"
#include "drivers_sim/scenario.hpp"
#include "drivers_sim/seabed.hpp"
#include "drivers_sim/sim_random.hpp"
#include "drivers_sim/vessel.hpp"
#include "nav/survey_crs.hpp"

namespace sg::sim {

// One channel per instrument, as on a vessel (one serial line or port each).
enum class Channel : int { Gnss = 0, Gyro, Sounder, Mag, Altimeter, Cable };
inline constexpr int kChannelCount = 6;
const char* channelName(Channel c);  // "gnss", "gyro", "sounder", "mag", "altimeter", "cable"
std::optional<Channel> channelFromName(const std::string& name);

struct SimLine {
    Channel channel = Channel::Gnss;
    TimeNs utc_ns = 0;
    std::string bytes;      // the line without terminator (outputs add CR LF)
    bool garbage = false;   // a garbage-bytes fault burst, not an instrument line
};

// A port that closes (open = false) or reopens (port_close fault); outputs act on it.
struct PortEvent {
    Channel channel = Channel::Gnss;
    TimeNs utc_ns = 0;
    bool open = false;
};

struct MagTruth {
    TimeNs utc_ns = 0;
    int sensor = 0;
    double easting_m = 0.0;    // absolute, survey CRS
    double northing_m = 0.0;
    double depth_m = 0.0;      // true sensor depth below the surface
    double altitude_m = 0.0;   // true height above the seabed below the sensor
    double ambient_nT = 0.0;   // main field + diurnal
    double heading_nT = 0.0;   // heading error term
    double anomaly_nT = 0.0;   // sum of the targets' dipole anomalies (simulator's own dipole code)
    double noise_nT = 0.0;     // noise added
    double field_nT = 0.0;     // value before formatting
    bool sent = false;         // false while a dropout hides it
};

struct NavTruth {
    TimeNs utc_ns = 0;
    Vec2 antenna_m;            // relative to the origin, grid
    Vec2 tow_point_m;
    Vec2 fish_m;
    double heading_true_deg = 0.0;
    double fish_depth_m = 0.0;
    double fish_altitude_m = 0.0;
    double cable_out_m = 0.0;
    double layback_m = 0.0;
    double cross_track_m = 0.0;
    int line = -1;             // line being run (index into Simulator::flight().lines), -1 off line
};

struct StepOutput {
    TimeNs utc_ns = 0;
    std::vector<SimLine> lines;
    std::vector<PortEvent> events;
    std::vector<MagTruth> mag;
    NavTruth nav;
};

struct SimOptions {
    std::uint64_t seed = 1;
    std::optional<TimeNs> start_utc_ns;  // overrides the scenario's start
    std::optional<double> duration_s;    // overrides the scenario's / the route's end
};

inline constexpr TimeNs kTickNs = 10'000'000;  // 100 Hz simulation step

class Simulator {
public:
    Simulator(Scenario scenario, SimOptions options);
    ~Simulator();
    Simulator(const Simulator&) = delete;
    Simulator& operator=(const Simulator&) = delete;

    bool done() const;
    // Advances one tick (kTickNs) and returns what happened in it (valid until the next call).
    const StepOutput& step();

    TimeNs now_utc_ns() const { return m_start_ns + m_tick * kTickNs; }
    TimeNs start_utc_ns() const { return m_start_ns; }
    // Exact for whole ticks: integer nanoseconds divided once.
    double elapsed_s() const { return static_cast<double>(m_tick * kTickNs) / 1e9; }
    // Simulated time since the start, in whole ticks (ns).
    TimeNs elapsed_ns() const { return m_tick * kTickNs; }
    const Scenario& scenario() const { return m_sc; }
    // The lines flown (the plan, a route, or a selection of either: see flightPlan()). NavTruth
    // line indices point into flight().lines.
    const PlanSpec& flight() const { return m_flight; }
    const Route& route() const { return *m_route; }
    const Seabed& seabed() const { return m_seabed; }
    const VesselModel& model() const { return *m_model; }
    const nav::SurveyCrs& crs() const { return m_crs; }
    // Projected origin (survey CRS metres) and grid convergence at the origin (degrees).
    Vec2 origin_m() const { return m_origin; }
    double convergence_deg() const { return m_convergence_deg; }
    // Faults scheduled so far (the scenario's plus the random ones drawn up to now).
    const std::vector<FaultSpec>& faults() const { return m_faults; }
    // Ambient field unit vector (north, east, down) and the total-field anomaly of all targets
    // at a point given relative to the origin (grid metres) and depth (metres, down positive).
    double targetsAnomaly_nT(Vec2 p_m, double depth_m) const;

private:
    struct Schedule {
        TimeNs period_ns = 0;
        TimeNs next_ns = 0;
        bool due(TimeNs t) {
            if (t < next_ns) return false;
            while (next_ns <= t) next_ns += period_ns;
            return true;
        }
    };
    bool active(FaultKind k, double t_s, const FaultSpec** which = nullptr) const;
    bool activeOn(FaultKind k, Channel c, double t_s, const FaultSpec** which = nullptr) const;
    void emit(Channel c, TimeNs t, std::string text);
    void emitGnss(TimeNs t, double t_s, bool gga, bool gst, bool zda);
    void emitMag(TimeNs t, double t_s);
    void drawRandomFaults(double t_s);

    Scenario m_sc;
    SimOptions m_opt;
    PlanSpec m_flight;
    nav::SurveyCrs m_crs;
    Vec2 m_origin;
    double m_convergence_deg = 0.0;
    Seabed m_seabed;
    std::unique_ptr<Route> m_route;
    std::unique_ptr<VesselModel> m_model;
    TimeNs m_start_ns = 0;
    std::int64_t m_tick = 0;
    std::optional<double> m_end_s;
    std::vector<FaultSpec> m_faults;
    std::vector<int> m_fault_state;  // per fault: 0 not started, 1 running, 2 over
    StepOutput m_out;
    SimRandom m_rng_gnss, m_rng_gyro, m_rng_sounder, m_rng_mag, m_rng_alt, m_rng_faults,
        m_rng_random;
    Schedule m_gga, m_gst, m_zda, m_hdt, m_dpt, m_mag, m_sga, m_sgc;
    Vec2 m_gnss_err_m;          // slowly wandering position error
    bool m_was_degraded = false;
    double m_diurnal_phase = 0.0;
};

}  // namespace sg::sim
