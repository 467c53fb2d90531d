// Navigation configuration: vessel offsets and heading source ([vessel]), tow geometry ([tow]) and
// the sensors of the towed array ([[sensor]]). Parsed with config::Section: unknown keys and bad
// values are errors naming the file and the key.
#pragma once

#include <array>
#include <optional>
#include <string>
#include <vector>

namespace sg::config {
class Section;
}

namespace sg::nav {

enum class HeadingSource {
    Auto,  // HDT when fresh, else course made good from the track
    Hdt,   // HDT only (no heading is flagged)
    Cmg,   // course made good only
};

// Offsets in the vessel frame: forward, starboard, up (m) from the vessel reference point, which
// is taken at the waterline (so "up" of the tow point is its height above the water).
struct VesselConfig {
    std::string name;  // free text: tells the vessels of a site apart in its reports
    std::array<double, 3> antenna_m{0.0, 0.0, 0.0};
    std::array<double, 3> tow_point_m{0.0, 0.0, 0.0};
    HeadingSource heading_source = HeadingSource::Auto;
    double heading_max_age_s = 1.0;   // HDT older than this is not used
    double cmg_min_speed_mps = 0.5;   // slower than this, course made good is not trusted
    double cmg_window_s = 5.0;        // baseline of the course-made-good estimate
    double fix_max_age_s = 2.0;       // a position further than this from a fix is stale
    double extrapolation_s = 0.0;     // how long past the last fix the tow point is carried on
                                      // along the last direction (s, 0..fix_max_age_s); 0: it is
                                      // held at the last fix, so nothing is placed beyond it
    double draft_m = 0.0;             // keel below the waterline (for DPT with a keel offset)
    double transducer_depth_m = 0.0;  // echo-sounder transducer below the waterline
    double sounder_max_age_s = 5.0;
    double gnss_latency_ms = 0.0;     // fixed latencies: the instrument's time stamps are late by
    double heading_latency_ms = 0.0;  // this much; they are subtracted on input
    double sounder_latency_ms = 0.0;
};

struct TowConfig {
    double extra_layback_m = 0.0;               // fixed extra layback added to the cable geometry
    std::optional<double> cable_out_m;          // fixed cable out when there is no counter
    std::optional<double> sensor_depth_m;       // fixed sensor depth when the fish reports none
    // The sensor rides at the GNSS antenna (a vehicle, aircraft or pole mount, or a sensor on the
    // hull): no tow, no layback, no cable out needed; sensor depth 0 unless given. It must be said
    // explicitly: without it a missing cable out or sensor depth is a setup error.
    bool sensor_at_antenna = false;
    double cable_max_age_s = 30.0;
    double depth_max_age_s = 5.0;
    double altitude_max_age_s = 2.0;
    double path_direction_baseline_m = 4.0;     // chord for the local direction of the path
    double history_length_m = 2000.0;           // travelled path kept behind the tow point
    double mag_latency_ms = 0.0;
    double altimeter_latency_ms = 0.0;
    double cable_latency_ms = 0.0;
    double depth_latency_ms = 0.0;
};

// One sensor of the array: its offsets from the tow (reference) point of the fish, relative to
// the local direction of the travelled path. cross_m positive to starboard, along_m positive
// forward.
struct SensorOffset {
    int index = 0;
    double cross_m = 0.0;
    double along_m = 0.0;
};

struct NavConfig {
    VesselConfig vessel;
    TowConfig tow;
    std::vector<SensorOffset> sensors;  // never empty: one sensor at 0, 0 by default
};

// Parses [vessel], [tow] and [[sensor]] from the root table (all optional; defaults above).
NavConfig parseVesselConfig(const config::Section& root);

}  // namespace sg::nav
