// A simulated survey: the invented site, seabed, geomagnetic field, planted targets, survey plan,
// vessel, tow, instruments and faults, read from a scenario TOML file (keys in docs/simulator.md).
// Positions are metres east/north of the projected origin, in the survey CRS grid (EPSG code).
#pragma once

#include <array>
#include <cstdint>
#include <optional>
#include <string>
#include <vector>

#include "common/received_line.hpp"

namespace sg::sim {

// A point or vector in the survey CRS grid, relative to the projected origin (metres).
struct Vec2 {
    double e = 0.0;  // east (grid)
    double n = 0.0;  // north (grid)
};
inline Vec2 operator+(Vec2 a, Vec2 b) { return {a.e + b.e, a.n + b.n}; }
inline Vec2 operator-(Vec2 a, Vec2 b) { return {a.e - b.e, a.n - b.n}; }
inline Vec2 operator*(double s, Vec2 a) { return {s * a.e, s * a.n}; }
inline double dot(Vec2 a, Vec2 b) { return a.e * b.e + a.n * b.n; }
double length(Vec2 a);
// Unit vector of a grid bearing (radians clockwise from grid north).
Vec2 bearingUnit(double bearing_rad);
// Grid bearing (radians, in [0, 2 pi)) of a vector.
double bearingOf(Vec2 v);

struct SiteSpec {
    std::string name;
    std::string vessel;
    double origin_lon_deg = 0.0;
    double origin_lat_deg = 0.0;
    int epsg = 0;         // projected CRS of the survey (UTM); 0 = UTM zone of the origin
    TimeNs start_utc_ns = 0;
};

// A straight step in the seabed: depth += drop_m / 2 * (1 + tanh(d / (width_m / 2))), d the
// distance from `point_m` along `azimuth_deg` (the direction in which the seabed deepens).
struct RampSpec {
    Vec2 point_m;
    double azimuth_deg = 0.0;
    double drop_m = 0.0;
    double width_m = 1.0;
};

// A straight channel: depth += depth_m * cos^2(pi d / width_m) for |d| < width_m / 2, d the
// distance across the channel axis through `point_m` along `azimuth_deg`.
struct ChannelSpec {
    Vec2 point_m;
    double azimuth_deg = 0.0;
    double width_m = 1.0;
    double depth_m = 0.0;
};

// Sand waves: depth += height_m / 2 * sin(2 pi d / wavelength_m), d measured across the crests
// (crests run along `crest_azimuth_deg`).
struct SandWaveSpec {
    double wavelength_m = 1.0;
    double height_m = 0.0;
    double crest_azimuth_deg = 0.0;
};

struct SeabedSpec {
    double base_depth_m = 20.0;  // depth below the sea surface at the origin (no tide modelled)
    Vec2 gradient;               // metres of extra depth per metre east / north
    std::vector<RampSpec> ramps;
    std::vector<ChannelSpec> channels;
    std::optional<SandWaveSpec> sand_waves;
};

struct GeomagSpec {
    double inclination_deg = 0.0;
    double declination_deg = 0.0;
    double intensity_nT = 50000.0;
    double diurnal_amplitude_nT = 0.0;  // half the daily range of the quiet-day variation
    double diurnal_peak_utc_h = 12.0;   // UTC hour of the daily maximum
    double heading_error_nT = 0.0;      // amplitude of the fish-heading error
    double heading_error_phase_deg = 0.0;
};

struct TargetSpec {
    std::string name;
    Vec2 position_m;
    double burial_m = 0.0;    // below the seabed
    double moment_Am2 = 0.0;  // magnitude
    // Moment direction: induced (along the ambient field) unless given.
    std::optional<double> moment_inclination_deg;
    std::optional<double> moment_declination_deg;
};

struct LineSpec {
    std::string name;
    Vec2 start_m;
    Vec2 end_m;
    // Route lines (--route GeoJSON properties) may set their own run-in and run-out (metres,
    // added before the start and past the end, as for planned lines) and forbid reversal.
    std::optional<double> run_in_m;
    std::optional<double> run_out_m;
    bool as_drawn = false;  // flown from start to end whatever the previous line's direction
};

struct PlanSpec {
    std::vector<LineSpec> lines;
    std::vector<int> order;     // indices into `lines`, in the order they are run
    std::vector<Vec2> area_m;   // polygon of the area of interest (open ring)
    double line_spacing_m = 0.0;
    double run_in_m = 50.0;
    double run_out_m = 30.0;
    double turn_radius_m = 30.0;
    std::string area_file = "plan_area.geojson";
    std::string lines_file = "plan_lines.geojson";
};

struct VesselSpec {
    double speed_mps = 2.3;           // speed through the water, nominal
    double speed_std_mps = 0.05;      // random speed variation (first-order Gauss-Markov)
    double speed_tau_s = 30.0;
    double heading_tau_s = 4.0;       // autopilot heading response
    double max_turn_rate_dps = 4.0;
    double lookahead_m = 40.0;        // line-following guidance
    double integral_dps_per_m = 0.02; // crab correction for the current (deg of heading per m*s)
    double gust_std_dps = 0.25;       // yaw disturbance (first-order Gauss-Markov)
    double gust_tau_s = 8.0;
    double swell_yaw_deg = 0.8;       // yaw from swell, amplitude
    double swell_period_s = 7.0;
    double swell_heave_m = 0.3;
    double current_set_deg = 0.0;     // direction the current flows towards (true)
    double current_drift_mps = 0.0;
    double antenna_height_m = 6.0;    // above the sea surface
    std::array<double, 2> tow_point_m{-12.0, 0.0};  // from the antenna: forward, starboard
    std::array<double, 2> sounder_m{-2.0, 0.0};     // from the antenna: forward, starboard
    double sounder_draft_m = 1.5;
};

struct TowSpec {
    double cable_out_m = 40.0;
    double tow_point_height_m = 2.0;   // above the sea surface
    double altitude_m = 4.0;           // commanded fish height above the seabed
    double fish_tau_s = 15.0;          // first-order lag of the fish depth
    double max_vertical_rate_mps = 0.5;
    double min_depth_m = 1.0;
};

struct GnssSpec {
    std::string talker = "GN";
    double rate_hz = 10.0;       // GGA, RMC, VTG
    double gst_rate_hz = 1.0;
    double zda_rate_hz = 1.0;
    int fix_quality = 4;         // GGA quality when healthy (4 = RTK fixed)
    int satellites = 16;
    double hdop = 0.7;
    double position_std_m = 0.02;
    double geoid_separation_m = 47.0;
};

struct GyroSpec {
    std::string talker = "HE";
    double rate_hz = 10.0;
    double std_deg = 0.05;
};

struct SounderSpec {
    std::string talker = "SD";
    double rate_hz = 2.0;
    double std_m = 0.05;
    double range_m = 200.0;
};

struct SensorSpec {
    double cross_m = 0.0;  // starboard positive, from the fish (tow) centre line
    double along_m = 0.0;  // forward positive
};

struct MagSpec {
    std::vector<SensorSpec> sensors;
    double rate_hz = 10.0;
    double noise_nT = 0.03;       // white sensor noise, standard deviation
    int quality = 95;             // nominal signal quality (0-99)
    bool send_altitude = true;    // SGM altitude field filled (from the fish altimeter)
    double depth_std_m = 0.05;
    double altitude_std_m = 0.05;
};

struct AltimeterSpec {
    double rate_hz = 5.0;
    double std_m = 0.05;
};

struct CableSpec {
    double rate_hz = 1.0;
    double std_m = 0.0;  // reading noise (a counter usually reads exactly)
};

enum class FaultKind {
    MagDropout,
    GnssLoss,
    DegradedFix,
    BadChecksum,
    Garbage,
    CableJump,
    AltitudeExcursion,
    NoiseBurst,
    PortClose,
};
const char* faultKindName(FaultKind k);

struct FaultSpec {
    FaultKind kind = FaultKind::MagDropout;
    double start_s = 0.0;     // from the start of the run
    double duration_s = 0.0;
    int sensor = -1;          // magnetometer sensor, -1 = all (mag_dropout, noise_burst)
    std::string channel;      // bad_checksum, garbage, port_close
    double delta_m = 0.0;     // cable_jump, altitude_excursion
    bool real = false;        // cable_jump: the winch really pays out (else a reading glitch)
    double noise_nT = 0.0;    // noise_burst: extra noise std
    double sigma_m = 0.0;     // degraded_fix: position error std
    double probability = 1.0; // bad_checksum: share of lines spoiled
    int bytes = 16;           // garbage: bytes per burst
    double per_s = 1.0;       // garbage: bursts per second
    bool no_fix = false;      // gnss_loss: send sentences without a fix instead of nothing
};

struct RandomFaultSpec {
    double per_hour = 0.0;
    double mean_duration_s = 20.0;
    std::vector<FaultKind> kinds;
};

struct Scenario {
    std::string file;  // where it was read from (for messages)
    SiteSpec site;
    SeabedSpec seabed;
    GeomagSpec geomag;
    std::vector<TargetSpec> targets;
    PlanSpec plan;
    VesselSpec vessel;
    TowSpec tow;
    GnssSpec gnss;
    GyroSpec gyro;
    SounderSpec sounder;
    MagSpec mag;
    AltimeterSpec altimeter;
    CableSpec cable;
    std::vector<FaultSpec> faults;
    RandomFaultSpec random_faults;
    std::optional<double> duration_s;  // default: until the last line's run-out ends
    // What is flown (the survey plan above stays the plan: it is what the plan GeoJSON shows).
    // A route (--route FILE.geojson) replaces the plan's lines; `run_lines` ([run] lines or
    // --lines) picks lines by name, flown in the order listed.
    std::vector<LineSpec> route_lines;
    std::string route_file;
    std::vector<std::string> run_lines;
};

// The lines actually flown, as a PlanSpec for the Route: the plan itself, or the route's lines
// (order as given, the plan's run-in/out and turn radius), narrowed to `run_lines` when set.
// Throws config::ConfigError naming an unknown or repeated line name (and the names available).
PlanSpec flightPlan(const Scenario& sc);

// Reads a scenario; throws config::ConfigError naming the file and key on any problem.
Scenario loadScenario(const std::string& path);
Scenario parseScenario(const std::string& text, const std::string& name);

// "2026-06-14T08:00:00Z" or with fractional seconds -> ns since the Unix epoch. Throws
// std::invalid_argument on a malformed time.
TimeNs parseUtc(const std::string& iso);
// ns since epoch -> "2026-06-14T08:00:00.000Z".
std::string formatUtc(TimeNs t);

}  // namespace sg::sim
