// Running a simulation to an output; see run.hpp.
#include "drivers_sim/run.hpp"
#include "drivers_sim/planted_field.hpp"

#include <chrono>
#include <cmath>
#include <filesystem>
#include <fstream>
#include <limits>
#include <thread>

#include <fmt/format.h>
#include <nlohmann/json.hpp>

namespace sg::sim {

const char* outputKindName(OutputKind k) {
    switch (k) {
    case OutputKind::File: return "file";
    case OutputKind::Udp: return "udp";
    case OutputKind::Tcp: return "tcp";
    case OutputKind::Pty: return "pty";
    }
    return "?";
}

namespace {

std::string lonLatPair(const Simulator& sim, Vec2 p) {
    const Vec2 a = sim.origin_m() + p;
    const nav::LonLat ll = sim.crs().inverse(a.e, a.n);
    return fmt::format("[{:.8f}, {:.8f}]", ll.lon_deg, ll.lat_deg);
}

void writeText(const std::string& path, const std::string& text) {
    std::ofstream f(path, std::ios::binary | std::ios::trunc);
    f << text;
    if (!f) throw std::runtime_error("cannot write " + path);
}

}  // namespace

std::string planAreaGeoJson(const Simulator& sim) {
    std::vector<Vec2> ring = sim.scenario().plan.area_m;
    // RFC 7946 section 3.1.6: exterior rings are counterclockwise. The grid is conformal, so
    // the orientation in metres is the orientation in lon/lat.
    double twice_area = 0.0;
    for (std::size_t i = 0; i < ring.size(); ++i) {
        const Vec2 a = ring[i];
        const Vec2 b = ring[(i + 1) % ring.size()];
        twice_area += a.e * b.n - b.e * a.n;
    }
    if (twice_area < 0.0) std::reverse(ring.begin(), ring.end());
    std::string coords;
    for (const Vec2& p : ring) coords += lonLatPair(sim, p) + ", ";
    coords += lonLatPair(sim, ring.front());  // closed ring
    const Scenario& sc = sim.scenario();
    return fmt::format(
        "{{\"type\": \"FeatureCollection\", \"features\": [\n"
        "  {{\"type\": \"Feature\", \"properties\": {{\"name\": \"{} survey area\", \"epsg\": {}}},\n"
        "   \"geometry\": {{\"type\": \"Polygon\", \"coordinates\": [[{}]]}}}}\n]}}\n",
        sc.site.name, sim.crs().epsg(), coords);
}

std::string planLinesGeoJson(const Simulator& sim) {
    std::string out = "{\"type\": \"FeatureCollection\", \"features\": [\n";
    const auto& lines = sim.scenario().plan.lines;
    for (std::size_t i = 0; i < lines.size(); ++i) {
        out += fmt::format(
            "  {{\"type\": \"Feature\", \"properties\": {{\"name\": \"{}\"}},\n"
            "   \"geometry\": {{\"type\": \"LineString\", \"coordinates\": [{}, {}]}}}}{}\n",
            lines[i].name, lonLatPair(sim, lines[i].start_m), lonLatPair(sim, lines[i].end_m),
            i + 1 < lines.size() ? "," : "");
    }
    return out + "]}\n";
}

void writePlanGeoJson(const Simulator& sim, const std::string& dir) {
    writeText(dir + "/" + sim.scenario().plan.area_file, planAreaGeoJson(sim));
    writeText(dir + "/" + sim.scenario().plan.lines_file, planLinesGeoJson(sim));
}

void RunWindowTracker::update(const StepOutput& step) {
    const double t = static_cast<double>(step.utc_ns - m_sim.start_utc_ns()) / 1e9;
    const NavTruth& n = step.nav;
    const auto& lines = m_sim.flight().lines;
    if (n.line != m_antenna_line) {
        if (m_antenna_line >= 0 && !m_runs.empty() && m_runs.back().antenna_off_s < 0.0)
            m_runs.back().antenna_off_s = t;
        if (n.line >= 0) {
            const LineSpec& l = lines[static_cast<std::size_t>(n.line)];
            LineRunWindow w;
            w.line = n.line;
            w.name = l.name;
            // The direction the route takes here, against the line as drawn.
            const Vec2 dir = m_sim.route().direction(m_sim.model().vessel().route_s_m);
            w.reversed = dot(dir, l.end_m - l.start_m) < 0.0;
            w.antenna_on_s = t;
            m_runs.push_back(w);
        }
        m_antenna_line = n.line;
    }
    // The fish trails the antenna by the tow point offset and the layback: it may still be on the
    // previous line while the antenna is on the next one.
    constexpr double kFishCorridor_m = 25.0;
    for (std::size_t k = m_runs.size() >= 2 ? m_runs.size() - 2 : 0; k < m_runs.size(); ++k) {
        LineRunWindow& w = m_runs[k];
        if (w.fish_off_s >= 0.0) continue;
        const LineSpec& l = lines[static_cast<std::size_t>(w.line)];
        const Vec2 a = w.reversed ? l.end_m : l.start_m;
        const Vec2 b = w.reversed ? l.start_m : l.end_m;
        const double len = length(b - a);
        const Vec2 u = (1.0 / len) * (b - a);
        const double along = dot(n.fish_m - a, u);
        const double across = dot(n.fish_m - a, Vec2{u.n, -u.e});
        const bool on = along >= 0.0 && along <= len && std::abs(across) <= kFishCorridor_m;
        if (w.fish_on_s < 0.0) {
            if (on) w.fish_on_s = t;
        } else if (!on) {
            w.fish_off_s = t;
        }
    }
}

std::vector<TurnWindow> RunWindowTracker::turns() const {
    std::vector<TurnWindow> out;
    for (std::size_t i = 0; i + 1 < m_runs.size(); ++i) {
        const LineRunWindow& a = m_runs[i];
        const LineRunWindow& b = m_runs[i + 1];
        if (a.antenna_off_s < 0.0 || a.fish_off_s < 0.0) continue;
        TurnWindow w;
        w.after = a.name;
        w.before = b.name;
        w.from_s = std::max(a.antenna_off_s, a.fish_off_s);
        w.to_s = b.fish_on_s >= 0.0 ? std::min(b.antenna_on_s, b.fish_on_s) : b.antenna_on_s;
        if (!(w.to_s > w.from_s)) continue;  // the fish was still on one line, the antenna on the next
        w.split_s = std::round(0.5 * (w.from_s + w.to_s));
        if (!(w.split_s > w.from_s && w.split_s < w.to_s)) w.split_s = 0.5 * (w.from_s + w.to_s);
        out.push_back(w);
    }
    return out;
}

RunResult runSimulation(const Scenario& scenario, const RunOptions& options, std::ostream* log) {
    std::filesystem::create_directories(options.dir);
    Simulator sim(scenario, options.sim);
    writePlanGeoJson(sim, options.dir);
    auto out = makeOutput(options.output, options.dir, options.base_port);
    RunResult result;
    for (int c = 0; c < kChannelCount; ++c)
        result.endpoints[static_cast<std::size_t>(c)] = out->endpoint(static_cast<Channel>(c));
    if (log != nullptr) {
        *log << fmt::format("swathguard-sim: {} / {} ({} lines{}, route {:.0f} m), seed {}\n",
                            scenario.site.name, scenario.site.vessel, sim.flight().order.size(),
                            scenario.route_file.empty() ? "" : " from " + scenario.route_file,
                            sim.route().length_m(), options.sim.seed);
        if (options.from_s || options.to_s) {
            *log << fmt::format("  window: lines from {:.2f} s to {} (simulated, since {})\n",
                                options.from_s.value_or(0.0),
                                options.to_s ? fmt::format("{:.2f} s", *options.to_s) : "the end",
                                formatUtc(sim.start_utc_ns()));
        }
        for (int c = 0; c < kChannelCount; ++c)
            *log << fmt::format("  {:<10} {}\n", channelName(static_cast<Channel>(c)),
                                result.endpoints[static_cast<std::size_t>(c)]);
        log->flush();
    }
    if (options.on_ready) options.on_ready(*out);

    std::ofstream truth_mag;
    std::ofstream truth_nav;
    if (options.truth) {
        truth_mag.open(options.dir + "/truth_mag.csv", std::ios::binary | std::ios::trunc);
        truth_nav.open(options.dir + "/truth_nav.csv", std::ios::binary | std::ios::trunc);
        truth_mag << "utc,sensor,easting_m,northing_m,depth_m,altitude_m,ambient_nT,heading_nT,"
                     "anomaly_nT,noise_nT,field_nT,sent\n";
        truth_nav << "utc,antenna_e_m,antenna_n_m,tow_e_m,tow_n_m,fish_e_m,fish_n_m,"
                     "heading_true_deg,fish_depth_m,fish_altitude_m,cable_out_m,layback_m,"
                     "cross_track_m,line\n";
        // The truth list of the planted items (simulator's own model; planted_field.hpp).
        std::ofstream items(options.dir + "/truth_items.csv", std::ios::binary | std::ios::trunc);
        items << plantedItemsCsv(plantedItems(sim));
    }

    const auto wall_start = std::chrono::steady_clock::now();
    auto wall0 = wall_start;
    const TimeNs sim0 = sim.start_utc_ns();
    result.start_utc_ns = sim0;
    const TimeNs from_ns = options.from_s ? static_cast<TimeNs>(std::llround(*options.from_s * 1e9)) : 0;
    const TimeNs to_ns = options.to_s ? static_cast<TimeNs>(std::llround(*options.to_s * 1e9))
                                      : std::numeric_limits<TimeNs>::max();
    RunWindowTracker tracker(sim);
    // Ports closed by a port_close fault before the window opens stay closed into it.
    std::array<bool, kChannelCount> closed_before{};
    bool in_window = false;
    while (!sim.done()) {
        const StepOutput& s = sim.step();
        tracker.update(s);
        const TimeNs elapsed = sim.elapsed_ns();
        if (elapsed >= to_ns) break;
        if (elapsed < from_ns) {
            for (const PortEvent& e : s.events)
                closed_before[static_cast<std::size_t>(e.channel)] = !e.open;
            continue;
        }
        if (!in_window) {
            in_window = true;
            wall0 = std::chrono::steady_clock::now();
            for (int c = 0; c < kChannelCount; ++c) {
                if (closed_before[static_cast<std::size_t>(c)])
                    out->event({static_cast<Channel>(c), s.utc_ns, false});
            }
        }
        if (options.speed > 0.0) {
            const auto due = wall0 + std::chrono::nanoseconds(static_cast<std::int64_t>(
                                         static_cast<double>(s.utc_ns - sim0 - from_ns) / options.speed));
            std::this_thread::sleep_until(due);
        }
        out->poll();
        for (const PortEvent& e : s.events) out->event(e);
        for (const SimLine& l : s.lines) out->write(l);
        if (options.truth) {
            const Vec2 o = sim.origin_m();
            for (const MagTruth& m : s.mag) {
                truth_mag << fmt::format("{},{},{:.3f},{:.3f},{:.3f},{:.3f},{:.3f},{:.4f},{:.4f},"
                                         "{:.4f},{:.4f},{}\n",
                                         formatUtc(m.utc_ns), m.sensor, m.easting_m, m.northing_m,
                                         m.depth_m, m.altitude_m, m.ambient_nT, m.heading_nT,
                                         m.anomaly_nT, m.noise_nT, m.field_nT, m.sent ? 1 : 0);
            }
            if ((s.utc_ns - sim0) % kNsPerSecond == 0) {
                const NavTruth& n = s.nav;
                truth_nav << fmt::format(
                    "{},{:.3f},{:.3f},{:.3f},{:.3f},{:.3f},{:.3f},{:.2f},{:.3f},{:.3f},{:.2f},"
                    "{:.3f},{:.3f},{}\n",
                    formatUtc(n.utc_ns), o.e + n.antenna_m.e, o.n + n.antenna_m.n,
                    o.e + n.tow_point_m.e, o.n + n.tow_point_m.n, o.e + n.fish_m.e,
                    o.n + n.fish_m.n, n.heading_true_deg, n.fish_depth_m, n.fish_altitude_m,
                    n.cable_out_m, n.layback_m, n.cross_track_m,
                    n.line >= 0 ? sim.flight().lines[static_cast<std::size_t>(n.line)].name : "");
            }
        }
    }
    out->close();
    result.counts = out->counts();
    result.simulated_s = sim.elapsed_s();
    result.end_utc_ns = sim.now_utc_ns();
    result.runs = tracker.runs();
    result.turns = tracker.turns();
    const double wall_s =
        std::chrono::duration<double>(std::chrono::steady_clock::now() - wall_start).count();

    // Summary for tests and the trainer. No wall-clock value in it: byte-identical across runs.
    nlohmann::ordered_json j;
    j["site"] = scenario.site.name;
    j["vessel"] = scenario.site.vessel;
    j["scenario"] = scenario.file;
    j["seed"] = options.sim.seed;
    j["output"] = outputKindName(options.output);
    j["epsg"] = sim.crs().epsg();
    j["start_utc"] = formatUtc(result.start_utc_ns);
    j["end_utc"] = formatUtc(result.end_utc_ns);
    j["simulated_s"] = result.simulated_s;
    j["window"] = {{"from_s", options.from_s ? nlohmann::ordered_json(*options.from_s) : nullptr},
                   {"to_s", options.to_s ? nlohmann::ordered_json(*options.to_s) : nullptr},
                   {"lines_written", in_window}};
    j["route"] = scenario.route_file.empty()
                     ? nlohmann::ordered_json(nullptr)
                     : nlohmann::ordered_json(std::filesystem::path(scenario.route_file).filename().string());
    j["lines_flown"] = nlohmann::ordered_json::array();
    for (int idx : sim.flight().order)
        j["lines_flown"].push_back(sim.flight().lines[static_cast<std::size_t>(idx)].name);
    // Run and turn windows in simulated seconds since the start (-1: not reached), for picking
    // a session split where no line is being run.
    j["runs"] = nlohmann::ordered_json::array();
    for (const LineRunWindow& w : result.runs) {
        j["runs"].push_back({{"line", w.name}, {"reversed", w.reversed},
                             {"antenna_on_s", w.antenna_on_s}, {"antenna_off_s", w.antenna_off_s},
                             {"fish_on_s", w.fish_on_s}, {"fish_off_s", w.fish_off_s}});
    }
    j["turns"] = nlohmann::ordered_json::array();
    for (const TurnWindow& w : result.turns) {
        j["turns"].push_back({{"after", w.after}, {"before", w.before}, {"from_s", w.from_s},
                              {"to_s", w.to_s}, {"split_s", w.split_s},
                              {"split_utc", formatUtc(sim0 + static_cast<TimeNs>(std::llround(w.split_s * 1e9)))}});
    }
    for (int c = 0; c < kChannelCount; ++c) {
        const auto& n = result.counts[static_cast<std::size_t>(c)];
        auto& ch = j["channels"][channelName(static_cast<Channel>(c))];
        // Files by name only, so that two runs into different directories compare equal.
        ch["endpoint"] = options.output == OutputKind::File
                             ? std::filesystem::path(result.endpoints[static_cast<std::size_t>(c)])
                                   .filename()
                                   .string()
                             : result.endpoints[static_cast<std::size_t>(c)];
        ch["produced"] = n.produced;
        ch["sent"] = n.sent;
        ch["dropped"] = n.dropped;
        ch["garbage"] = n.garbage;
        ch["bytes"] = n.bytes;
    }
    j["faults"] = nlohmann::ordered_json::array();
    for (const FaultSpec& f : sim.faults()) {
        nlohmann::ordered_json jf;
        jf["kind"] = faultKindName(f.kind);
        jf["start_s"] = f.start_s;
        jf["duration_s"] = f.duration_s;
        jf["start_utc"] = formatUtc(sim0 + static_cast<TimeNs>(std::llround(f.start_s * 1e9)));
        if (!f.channel.empty()) jf["channel"] = f.channel;
        if (f.kind == FaultKind::MagDropout || f.kind == FaultKind::NoiseBurst) jf["sensor"] = f.sensor;
        j["faults"].push_back(jf);
    }
    writeText(options.dir + "/summary.json", j.dump(2) + "\n");

    if (log != nullptr) {
        *log << fmt::format("swathguard-sim: {:.1f} s simulated in {:.2f} s wall\n",
                            result.simulated_s, wall_s);
        *log << fmt::format("  {:<10} {:>9} {:>9} {:>8} {:>8}\n", "channel", "produced", "sent",
                            "dropped", "garbage");
        for (int c = 0; c < kChannelCount; ++c) {
            const auto& n = result.counts[static_cast<std::size_t>(c)];
            *log << fmt::format("  {:<10} {:>9} {:>9} {:>8} {:>8}\n",
                                channelName(static_cast<Channel>(c)), n.produced, n.sent,
                                n.dropped, n.garbage);
        }
        for (const TurnWindow& w : result.turns) {
            *log << fmt::format("  turn {} -> {}: no line run from {:.1f} s to {:.1f} s; split at {:.0f} s ({})\n",
                                w.after, w.before, w.from_s, w.to_s, w.split_s,
                                formatUtc(sim0 + static_cast<TimeNs>(std::llround(w.split_s * 1e9))));
        }
        *log << fmt::format("  summary: {}/summary.json\n", options.dir);
    }
    if (!in_window) {
        throw std::invalid_argument(fmt::format(
            "the window from {:.2f} s{} holds no tick of the run ({:.2f} s simulated): no line written",
            options.from_s.value_or(0.0),
            options.to_s ? fmt::format(" to {:.2f} s", *options.to_s) : std::string(),
            result.simulated_s));
    }
    return result;
}

}  // namespace sg::sim
