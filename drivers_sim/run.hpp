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
#include <vector>

#include "drivers_sim/outputs.hpp"
#include "drivers_sim/simulator.hpp"

namespace sg::sim {

struct RunOptions {
    OutputKind output = OutputKind::File;
    std::string dir = "sim_out";   // files, summary.json, plan GeoJSON, truth, pty symlinks
    int base_port = 47000;         // gnss = base, gyro +1, sounder +2, mag +3, altimeter +4, cable +5
    double speed = 0.0;            // simulated seconds per wall second; 0 = as fast as possible
    bool truth = false;            // write truth_mag.csv, truth_nav.csv and truth_items.csv
    // Acquisition window (simulated seconds since the start): the world runs from the start as
    // always, but only lines (and truth rows) with from_s <= t < to_s are written; the run ends
    // at to_s. Windows [0, T) and [T, end) together give exactly the lines of the whole run.
    std::optional<double> from_s;
    std::optional<double> to_s;
    SimOptions sim;
    // Called once the outputs are open (pty paths, TCP ports ready), e.g. to start readers.
    std::function<void(const Output&)> on_ready;
};

// When a flown line was run (simulated seconds since the start): the antenna between the
// line's ends (its route segment), and the fish (the towed array) within the line's length and
// 25 m of its axis. Negative: not reached (yet) in this run.
struct LineRunWindow {
    int line = -1;             // index into Simulator::flight().lines
    std::string name;
    bool reversed = false;     // flown from its end to its start
    double antenna_on_s = -1.0, antenna_off_s = -1.0;
    double fish_on_s = -1.0, fish_off_s = -1.0;
};

// Between two runs: from the moment neither antenna nor fish is on the earlier line to the moment
// the first of them reaches the next one. A session split at split_s cuts no line run.
struct TurnWindow {
    std::string after, before;  // line names
    double from_s = 0.0, to_s = 0.0;
    double split_s = 0.0;       // a whole second near the middle of the window
};

// Follows a simulation tick by tick (from the nav truth) and records the run windows.
class RunWindowTracker {
public:
    explicit RunWindowTracker(const Simulator& sim) : m_sim(sim) {}
    void update(const StepOutput& step);
    const std::vector<LineRunWindow>& runs() const { return m_runs; }
    std::vector<TurnWindow> turns() const;

private:
    const Simulator& m_sim;
    std::vector<LineRunWindow> m_runs;
    int m_antenna_line = -1;
};

struct RunResult {
    std::array<ChannelCounts, kChannelCount> counts{};
    std::array<std::string, kChannelCount> endpoints;
    double simulated_s = 0.0;
    TimeNs start_utc_ns = 0;
    TimeNs end_utc_ns = 0;
    std::vector<LineRunWindow> runs;
    std::vector<TurnWindow> turns;
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
