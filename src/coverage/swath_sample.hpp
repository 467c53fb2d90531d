// The one input of the coverage module: a swath sample, one per sensor per magnetometer sample.
// The navigation and detection modules fill it; coverage only paints it. Plain data on purpose.
#pragma once

#include <cstdint>

namespace sg::coverage {

struct SwathSample {
    std::int64_t t_ns = 0;      // sample time, UTC nanoseconds
    double e_m = 0.0;           // sensor easting in the survey CRS (m)
    double n_m = 0.0;           // sensor northing in the survey CRS (m)
    double dir_e = 0.0;         // unit vector of travel, east component
    double dir_n = 1.0;         // unit vector of travel, north component
    double left_m = 0.0;        // detectable half-width to port (m, >= 0)
    double right_m = 0.0;       // detectable half-width to starboard (m, >= 0)
    float centre_margin = 0.0F; // peak anomaly / threshold at the track centre; >= 1 when detectable
    bool valid = false;         // false: dropout, stale position, missing altitude, noise above limit
    int sensor = 0;             // sensor index in the array (>= 0)
    int run = -1;               // line run id from LineTracker, -1 when not on a planned line
};

}  // namespace sg::coverage
