// swathguard-sim: simulated survey instruments (GNSS, gyro, echo sounder, magnetometer array,
// altimeter, cable out) driven by a scenario file, each on its own channel.
#include <cmath>
#include <cstdio>
#include <exception>
#include <filesystem>
#include <iostream>

#include <CLI/CLI.hpp>

#include "common/config_section.hpp"
#include "drivers_sim/route_file.hpp"
#include "drivers_sim/run.hpp"
#include "drivers_sim/scenario.hpp"

int main(int argc, char** argv) {
    using namespace sg::sim;
    CLI::App app{"swathguard-sim: simulated survey instruments for training, tests and demos"};
    std::string scenario_path;
    std::string out = "file";
    std::string speed = "";
    std::string start;
    std::optional<double> duration;
    std::uint64_t seed = 1;
    RunOptions opt;
    bool plan_only = false;
    std::string from, to, route;
    std::vector<std::string> lines;
    bool no_faults = false;
    std::optional<double> run_out;
    app.add_option("--scenario", scenario_path, "scenario TOML file")->required()->check(CLI::ExistingFile);
    app.add_option("--out", out, "where the lines go: one file, UDP port, TCP port or pty per instrument")
        ->check(CLI::IsMember({"file", "udp", "tcp", "pty"}));
    app.add_option("--dir", opt.dir, "directory for files, summary.json, plan GeoJSON, truth")
        ->capture_default_str();
    app.add_option("--base-port", opt.base_port,
                   "first port (gnss); gyro +1, sounder +2, mag +3, altimeter +4, cable +5")
        ->check(CLI::Range(1024, 65529))->capture_default_str();
    app.add_option("--speed", speed, "simulated seconds per wall second, or 'max' "
                                     "(default: max for files, 1 otherwise)");
    app.add_option("--duration", duration, "stop after this many simulated seconds")
        ->check(CLI::PositiveNumber);
    app.add_option("--seed", seed, "random seed (same seed + scenario = same output)")->capture_default_str();
    app.add_option("--start", start, "simulated UTC start, e.g. 2026-06-14T08:00:00Z");
    app.add_flag("--truth", opt.truth, "also write truth_mag.csv and truth_nav.csv");
    app.add_flag("--plan-only", plan_only, "only write the plan GeoJSON files into --dir");
    app.add_option("--from", from, "write only lines from this simulated time on: seconds since "
                                   "the start, or UTC (the world still runs from the start)");
    app.add_option("--to", to, "write only lines before this simulated time (seconds since the "
                               "start, or UTC), then stop");
    app.add_option("--route", route, "fly the LineString features of this GeoJSON file (e.g. "
                                     "infill.geojson) instead of the plan's lines")
        ->check(CLI::ExistingFile);
    app.add_option("--lines", lines, "fly only these lines, in this order (names, comma separated)")
        ->delimiter(',');
    app.add_option("--run-out", run_out, "straight run past each line's end (m), instead of "
                                         "[plan] run_out_m; the fish, a layback behind, needs more "
                                         "than its layback to clear the last line")
        ->check(CLI::Range(0.0, 5000.0));
    app.add_flag("--no-faults", no_faults, "leave out the scenario's faults (scheduled and random)");
    CLI11_PARSE(app, argc, argv);

    try {
        Scenario sc = loadScenario(scenario_path);
        if (!route.empty()) loadRoute(route, sc);
        if (!lines.empty()) {
            sc.run_lines = lines;
            try {
                (void)flightPlan(sc);
            } catch (const sg::config::ConfigError& e) {
                std::fprintf(stderr, "swathguard-sim: --lines: %s\n", e.what());
                return 2;
            }
        }
        if (run_out) sc.plan.run_out_m = *run_out;
        if (no_faults) {
            sc.faults.clear();
            sc.random_faults.per_hour = 0.0;
        }
        opt.output = out == "udp" ? OutputKind::Udp
                     : out == "tcp" ? OutputKind::Tcp
                     : out == "pty" ? OutputKind::Pty
                                    : OutputKind::File;
        if (speed.empty()) {
            opt.speed = opt.output == OutputKind::File ? 0.0 : 1.0;
        } else if (speed == "max") {
            opt.speed = 0.0;
        } else {
            try {
                opt.speed = std::stod(speed);
            } catch (const std::exception&) {
                opt.speed = -1.0;
            }
            if (!(opt.speed > 0.0)) {
                std::fprintf(stderr, "swathguard-sim: --speed: expected a positive number or 'max', found '%s'\n",
                             speed.c_str());
                return 2;
            }
        }
        opt.sim.seed = seed;
        opt.sim.duration_s = duration;
        if (!start.empty()) {
            try {
                opt.sim.start_utc_ns = parseUtc(start);
            } catch (const std::invalid_argument& e) {
                std::fprintf(stderr, "swathguard-sim: --start: %s\n", e.what());
                return 2;
            }
        }
        // --from / --to: seconds since the start, or a UTC time on the simulated clock.
        const sg::TimeNs start_ns = opt.sim.start_utc_ns.value_or(sc.site.start_utc_ns);
        auto windowEdge = [&](const std::string& text, const char* option) -> std::optional<double> {
            if (text.empty()) return std::nullopt;
            double v = -1.0;
            if (text.find('T') != std::string::npos) {
                try {
                    v = static_cast<double>(parseUtc(text) - start_ns) / 1e9;
                } catch (const std::invalid_argument& e) {
                    throw CLI::ValidationError(option, e.what());
                }
            } else {
                try {
                    std::size_t used = 0;
                    v = std::stod(text, &used);
                    if (used != text.size()) v = -1.0;
                } catch (const std::exception&) {
                    v = -1.0;
                }
            }
            if (!(v >= 0.0) || !std::isfinite(v))
                throw CLI::ValidationError(option, "expected seconds since the simulated start (" +
                                                       formatUtc(start_ns) +
                                                       ") or a later UTC time, found '" + text + "'");
            return v;
        };
        try {
            opt.from_s = windowEdge(from, "--from");
            opt.to_s = windowEdge(to, "--to");
        } catch (const CLI::ValidationError& e) {
            std::fprintf(stderr, "swathguard-sim: %s\n", e.what());
            return 2;
        }
        if (opt.from_s && opt.to_s && !(*opt.to_s > *opt.from_s)) {
            std::fprintf(stderr, "swathguard-sim: --to (%.3f s) must come after --from (%.3f s)\n",
                         *opt.to_s, *opt.from_s);
            return 2;
        }
        if (plan_only) {
            std::filesystem::create_directories(opt.dir);
            const Simulator sim(sc, opt.sim);
            writePlanGeoJson(sim, opt.dir);
            std::printf("swathguard-sim: wrote %s/%s and %s/%s\n", opt.dir.c_str(),
                        sc.plan.area_file.c_str(), opt.dir.c_str(), sc.plan.lines_file.c_str());
            return 0;
        }
        runSimulation(sc, opt, &std::cout);
    } catch (const sg::config::ConfigError& e) {
        std::fprintf(stderr, "swathguard-sim: %s\n", e.what());
        return 2;
    } catch (const std::invalid_argument& e) {
        // A setup that cannot run as asked (e.g. an empty window): never a quiet success.
        std::fprintf(stderr, "swathguard-sim: %s\n", e.what());
        return 2;
    } catch (const std::exception& e) {
        std::fprintf(stderr, "swathguard-sim: %s\n", e.what());
        return 1;
    }
    return 0;
}
