// Array swath (the union of the sensors' detectable swaths) and the planning aid: line spacing and
// maximum sensor altitude that keep adjacent lines' swaths overlapping.
#pragma once

#include <optional>
#include <span>
#include <string>
#include <vector>

#include "detect/target_model.hpp"

namespace sg::detect {

// A cross-track interval (m) relative to the array reference, starboard positive.
struct SwathInterval {
    double from_m = 0.0;
    double to_m = 0.0;
};

// One sensor's swath: its cross-track offset (starboard positive) and its half-widths.
struct SensorSwath {
    double cross_m = 0.0;
    HalfWidths half_widths;
};

// Union of the sensors' swaths [cross - port, cross + starboard], merged and sorted. Sensors with
// no swath (both half-widths 0) add nothing.
std::vector<SwathInterval> unionOfSwaths(std::span<const SensorSwath> sensors);

struct ArraySwath {
    double port_m = 0.0;       // outer port edge, distance to port of the reference (may be < 0)
    double starboard_m = 0.0;  // outer starboard edge
    bool contiguous = false;   // false when the union has holes (or is empty)
};
ArraySwath arraySwath(std::span<const SensorSwath> sensors);

struct ClassPlan {
    std::string name;
    double threshold_nT = 0.0;
    double detection_range_m = 0.0;  // largest sensor-to-target vertical distance (this heading)
    double max_altitude_m = 0.0;     // detection range - burial (<= 0: never detectable)
    ArraySwath swath;                // array swath at the planned altitude and heading
    double centre_margin = 0.0;      // peak / threshold for a target on the reference line
    // Largest spacing with no gap between adjacent lines at the planned altitude, whichever way
    // the next line is run: min(P + S, S + S', P + P') with ' the reciprocal heading. 0 when the
    // array swath has holes.
    double spacing_needed_m = 0.0;
    // Highest altitude up to which (from kMinPlanAltitude_m) the swaths still overlap at the
    // given spacing; empty when they do not even at the lowest altitude.
    std::optional<double> max_altitude_for_spacing_m;
};

inline constexpr double kMinPlanAltitude_m = 0.5;

// How half-widths, ranges and margins are computed: from the model's interpolation tables (the
// live path) or by the direct solve (root finding on the anomaly, no table; `swath`).
enum class Evaluation { Table, Direct };

// sensor_cross_m: cross-track offsets of the array's sensors (starboard positive).
// altitude_m: sensor above the seabed (> 0); heading_true_rad: line heading; threshold_nT > 0;
// spacing_m: planned line spacing (> 0).
ClassPlan planClass(const TargetModel& model, std::span<const double> sensor_cross_m,
                    double altitude_m, double heading_true_rad, double threshold_nT,
                    double spacing_m, Evaluation eval = Evaluation::Table);

// Array swath of one class at a sensor altitude (all sensors at the same altitude).
ArraySwath arraySwathAt(const TargetModel& model, std::span<const double> sensor_cross_m,
                        double altitude_m, double heading_true_rad, double threshold_nT,
                        Evaluation eval = Evaluation::Table);

}  // namespace sg::detect
