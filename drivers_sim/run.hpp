// Running a simulation to an output: pacing against the wall clock (or as fast as possible),
// port-close events, per-channel counts, the summary JSON, the plan GeoJSON and the optional
// ground-truth CSV files. The world model itself (Simulator) has no I/O.
#pragma once

#include <array>
#include <cstdint>
#include <functional>
#include <optional>
#include <ostream>
#include <string>

#include "drivers_sim/outputs.hpp"
#include "drivers_sim/simulator.hpp"

namespace sg::sim {

struct RunOptions {
    OutputKind output = OutputKind::File;
    std::string dir = "sim_out";   // files, summary.json, plan GeoJSON, truth, pty symlinks
    int base_port = 47000;         // gnss = base, gyro +1, sounder +2, mag +3, altimeter +4, cable +5
    double speed = 0.0;            // simulated seconds per wall second; 0 = as fast as possible
    bool truth = false;            // write truth_mag.csv and truth_nav.csv
    SimOptions sim;
    // Called once the outputs are open (pty paths, TCP ports ready), e.g. to start readers.
    std::function<void(const Output&)> on_ready;
};

struct RunResult {
    std::array<ChannelCounts, kChannelCount> counts{};
    std::array<std::string, kChannelCount> endpoints;
    double simulated_s = 0.0;
    TimeNs start_utc_ns = 0;
    TimeNs end_utc_ns = 0;
};

// Runs `scenario` to the end (route finished or the duration reached). Progress and the final
// counts go to `log` (may be null). Throws std::runtime_error on I/O setup failures.
RunResult runSimulation(const Scenario& scenario, const RunOptions& options, std::ostream* log);

// GeoJSON (RFC 7946, WGS 84 lon/lat) of the plan: the area as a Polygon feature (counter-
// clockwise exterior ring) and the lines as LineString features with a "name" property.
std::string planAreaGeoJson(const Simulator& sim);
std::string planLinesGeoJson(const Simulator& sim);
// Writes both into `dir` under the scenario's file names.
void writePlanGeoJson(const Simulator& sim, const std::string& dir);

// Names the summary JSON uses for output kinds.
const char* outputKindName(OutputKind k);

}  // namespace sg::sim
