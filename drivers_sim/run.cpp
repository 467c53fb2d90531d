// Running a simulation to an output; see run.hpp.
#include "drivers_sim/run.hpp"

#include <chrono>
#include <cmath>
#include <filesystem>
#include <fstream>
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

RunResult runSimulation(const Scenario& scenario, const RunOptions& options, std::ostream* log) {
    std::filesystem::create_directories(options.dir);
    Simulator sim(scenario, options.sim);
    writePlanGeoJson(sim, options.dir);
    auto out = makeOutput(options.output, options.dir, options.base_port);
    RunResult result;
    for (int c = 0; c < kChannelCount; ++c)
        result.endpoints[static_cast<std::size_t>(c)] = out->endpoint(static_cast<Channel>(c));
    if (log != nullptr) {
        *log << fmt::format("swathguard-sim: {} / {} ({} lines, route {:.0f} m), seed {}\n",
                            scenario.site.name, scenario.site.vessel, scenario.plan.lines.size(),
                            sim.route().length_m(), options.sim.seed);
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
    }

    const auto wall0 = std::chrono::steady_clock::now();
    const TimeNs sim0 = sim.start_utc_ns();
    result.start_utc_ns = sim0;
    while (!sim.done()) {
        const StepOutput& s = sim.step();
        if (options.speed > 0.0) {
            const auto due = wall0 + std::chrono::nanoseconds(static_cast<std::int64_t>(
                                         static_cast<double>(s.utc_ns - sim0) / options.speed));
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
                    n.line >= 0 ? scenario.plan.lines[static_cast<std::size_t>(n.line)].name : "");
            }
        }
    }
    out->close();
    result.counts = out->counts();
    result.simulated_s = sim.elapsed_s();
    result.end_utc_ns = sim.now_utc_ns();
    const double wall_s =
        std::chrono::duration<double>(std::chrono::steady_clock::now() - wall0).count();

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
        *log << fmt::format("  summary: {}/summary.json\n", options.dir);
    }
    return result;
}

}  // namespace sg::sim
