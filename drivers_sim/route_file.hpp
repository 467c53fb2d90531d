// A route to fly instead of the scenario's plan lines: the LineString features of a GeoJSON
// FeatureCollection (RFC 7946, WGS 84 longitude/latitude), e.g. the infill lines that
// `swathguard gaps --export` writes. Read into the scenario's grid (metres from its origin, in its
// survey CRS), in the order of the features.
#pragma once

#include <string>
#include <vector>

#include "drivers_sim/scenario.hpp"

namespace sg::sim {

// Farthest a route point may lie from the scenario's origin: a route of another site (or in
// another CRS) is refused rather than flown for hours off the site.
inline constexpr double kMaxRouteDistance_m = 50'000.0;

// Parses `text` (the file `name`, for messages). Each feature must be a LineString of 2 or more
// positions lying on one straight line (within 0.5 m); its properties may give "name" (default
// R01, R02, ...), "run_in_m" and "run_out_m" (0..5000 m; default: the scenario's [plan] values)
// and "direction": "either" (default: flown back and forth like planned lines) or "as_drawn"
// (always from the first position to the last). Throws config::ConfigError naming the file, the
// feature and the problem.
std::vector<LineSpec> parseRouteGeoJson(const std::string& text, const std::string& name,
                                        const Scenario& sc);
// Reads the file and sets sc.route_lines and sc.route_file.
void loadRoute(const std::string& path, Scenario& sc);

}  // namespace sg::sim
