// Helpers shared by the simulator tests: run a scenario in memory, split lines into fields, and an
// XOR checksum written here independently of src/decode (NMEA 0183: XOR of the bytes between '$'
// and '*'; SG strings: XOR of every byte before '*').
#pragma once

#include <cstdint>
#include <cstdio>
#include <fstream>
#include <sstream>
#include <string>
#include <vector>

#include "drivers_sim/scenario.hpp"
#include "drivers_sim/simulator.hpp"

namespace sg::sim::test {

inline std::string dataPath(const std::string& name) {
    return std::string(SG_SOURCE_DIR) + "/tests/sim/data/" + name;
}
inline std::string demoPath(const std::string& name) {
    return std::string(SG_SOURCE_DIR) + "/replay_logs/demo/" + name;
}

inline std::string readFile(const std::string& path) {
    std::ifstream f(path, std::ios::binary);
    std::stringstream ss;
    ss << f.rdbuf();
    return ss.str();
}

struct Recorded {
    std::vector<SimLine> lines;
    std::vector<MagTruth> mag;
    std::vector<NavTruth> nav;   // every tick
    std::vector<PortEvent> events;
};

inline Recorded runInMemory(const Scenario& sc, std::uint64_t seed, double duration_s = -1.0) {
    SimOptions o;
    o.seed = seed;
    if (duration_s > 0.0) o.duration_s = duration_s;
    Simulator sim(sc, o);
    Recorded r;
    while (!sim.done()) {
        const StepOutput& s = sim.step();
        r.lines.insert(r.lines.end(), s.lines.begin(), s.lines.end());
        r.mag.insert(r.mag.end(), s.mag.begin(), s.mag.end());
        r.events.insert(r.events.end(), s.events.begin(), s.events.end());
        r.nav.push_back(s.nav);
    }
    return r;
}

inline std::vector<std::string> splitFields(const std::string& s, char d = ',') {
    std::vector<std::string> out;
    std::string cur;
    for (char c : s) {
        if (c == d) {
            out.push_back(cur);
            cur.clear();
        } else {
            cur.push_back(c);
        }
    }
    out.push_back(cur);
    return out;
}

// Independent checksum: returns true when `line` ends in '*HH' and HH equals the XOR of the
// covered bytes (from after a leading '$' for NMEA, from the first byte otherwise).
inline bool checksumOk(const std::string& line) {
    const auto star = line.rfind('*');
    if (star == std::string::npos || star + 3 != line.size()) return false;
    const std::size_t from = (!line.empty() && line[0] == '$') ? 1 : 0;
    unsigned x = 0;
    for (std::size_t i = from; i < star; ++i) x ^= static_cast<unsigned char>(line[i]);
    char hex[3];
    std::snprintf(hex, sizeof hex, "%02X", x);
    return line.compare(star + 1, 2, hex) == 0;
}

// Body between the start and '*' (without '$'), split at commas.
inline std::vector<std::string> body(const std::string& line) {
    const std::size_t from = (!line.empty() && line[0] == '$') ? 1 : 0;
    const auto star = line.rfind('*');
    return splitFields(line.substr(from, star - from));
}

// Seconds since the scenario's start.
inline double elapsedS(const Scenario& sc, TimeNs t) {
    return static_cast<double>(t - sc.site.start_utc_ns) / 1e9;
}

}  // namespace sg::sim::test
