// `swathguard demo`: the whole product in one process, for a quick look. The simulator
// (drivers_sim) flies the invented demo survey; every line it produces goes through the same
// framing and Pipeline as live acquisition, into a survey log; at the end the coverage summary,
// the gap list and the infill exports are written and their paths printed.
#include <chrono>
#include <cmath>
#include <cstdio>
#include <filesystem>
#include <fstream>
#include <map>
#include <thread>

#include <fmt/format.h>

#include "app/commands.hpp"
#include "app/engine_status.hpp"
#include "app/screen_session.hpp"
#include "app/site_open.hpp"
#include "drivers_sim/pipeline_feed.hpp"
#include "drivers_sim/planted_field.hpp"
#include "drivers_sim/route_file.hpp"
#include "site/session_summary.hpp"
#include "site/site_config.hpp"
#include "app/setup_gate.hpp"
#include "common/line_framer.hpp"
#include "drivers_sim/simulator.hpp"
#include "engine/pipeline.hpp"
#include "engine/snapshot_builder.hpp"
#include "engine/survey_summary.hpp"
#include "io/helm_output.hpp"
#include "io/log_writer.hpp"

namespace sg::app {

namespace {

constexpr const char* kDefaultScenario = "replay_logs/demo/scenario.toml";
constexpr const char* kDefaultConfig = "replay_logs/demo/survey.toml";

// The demo files from any working folder: a path that exists as given is used; the default
// paths are also looked up beside the executable (an installed share/swathguard/demo, or the
// source tree above a build folder) and in the source tree the executable was built from.
std::string findDemoFile(const std::string& given, const char* default_path) {
    namespace fs = std::filesystem;
    if (given != default_path || fs::exists(given)) return given;
    const auto name = fs::path(given).filename();
    std::vector<fs::path> candidates;
    std::error_code ec;
    const auto exe = fs::read_symlink("/proc/self/exe", ec);
    if (!ec) {
        const auto dir = exe.parent_path();
        candidates.push_back(dir / "../share/swathguard/demo" / name);
        candidates.push_back(dir / "../replay_logs/demo" / name);
        candidates.push_back(dir / "../../replay_logs/demo" / name);
    }
#ifdef SG_SOURCE_DIR
    candidates.push_back(fs::path(SG_SOURCE_DIR) / "replay_logs/demo" / name);
#endif
    for (const auto& c : candidates)
        if (fs::exists(c)) return fs::weakly_canonical(c).string();
    std::string tried;
    for (const auto& c : candidates) tried += "\n  " + c.lexically_normal().string();
    throw std::runtime_error(fmt::format("demo: cannot find {} (not in the working folder; tried:{}); pass "
                                         "--scenario and --config",
                                         given, tried));
}

struct DemoOptions {
    std::string scenario = kDefaultScenario;
    std::string config = kDefaultConfig;
    std::string out_dir = "out/demo";
    std::uint64_t seed = 1;
    double duration_s = 0.0;
    std::string speed = "max";
    ScreenArgs screen;
    // A site session of the simulated survey (docs/site.md): the log goes to SITE/logs, the
    // earlier logs are joined first; the simulator's window, lines, route and start choose what
    // this session flies (docs/simulator.md, "Sessions").
    std::string site;
    std::optional<double> from_s, to_s;
    std::vector<std::string> lines;
    std::string route;
    std::optional<double> run_out_m;
    bool no_faults = false;
    std::string start;
    bool truth = false;  // --truth: truth_items.csv and truth_peaks.csv beside the log
};

// What the simulator planted and how strongly the sensors saw it (`demo --truth`), for checking
// the picks against a world the detector did not compute (bench/bench_replay_day.sh). Per item:
// the largest |true anomaly| (the simulator's own dipole code, no noise) of any sample within
// kNearM horizontally, its ratio to the live threshold the engine had for that sensor then, and
// the longest run of consecutive samples of one sensor within kNearM whose |true anomaly| reaches
// that threshold (the picker needs [picks] min_samples of them).
class TruthPeaks {
public:
    static constexpr double kNearM = 6.0;
    explicit TruthPeaks(std::vector<sim::PlantedItem> items) : m_items(std::move(items)), m_seen(m_items.size()) {}
    void add(const sim::MagTruth& m, double threshold_nT) {
        for (std::size_t i = 0; i < m_items.size(); ++i) {
            Seen& s = m_seen[i];
            const auto key = static_cast<std::size_t>(std::max(0, m.sensor));
            if (s.run.size() <= key) s.run.resize(key + 1, 0);
            const bool near = std::hypot(m.easting_m - m_items[i].easting_m, m.northing_m - m_items[i].northing_m) <= kNearM;
            if (!near || !m.sent) {
                s.run[key] = 0;
                continue;
            }
            const double a = std::abs(m.anomaly_nT);
            s.peak_nT = std::max(s.peak_nT, a);
            if (threshold_nT > 0.0) s.best_ratio = std::max(s.best_ratio, a / threshold_nT);
            s.run[key] = threshold_nT > 0.0 && a >= threshold_nT ? s.run[key] + 1 : 0;
            s.longest = std::max(s.longest, s.run[key]);
        }
    }
    std::string csv() const {
        std::string out = "name,easting_m,northing_m,burial_m,moment_Am2,true_peak_nT,peak_over_threshold,"
                          "samples_over_threshold\n";
        for (std::size_t i = 0; i < m_items.size(); ++i)
            out += fmt::format("\"{}\",{:.3f},{:.3f},{:.3f},{:.4g},{:.3f},{:.3f},{}\n", m_items[i].name,
                               m_items[i].easting_m, m_items[i].northing_m, m_items[i].burial_m,
                               m_items[i].moment_Am2, m_seen[i].peak_nT, m_seen[i].best_ratio, m_seen[i].longest);
        return out;
    }
    const std::vector<sim::PlantedItem>& items() const { return m_items; }

private:
    struct Seen {
        double peak_nT = 0.0, best_ratio = 0.0;
        int longest = 0;
        std::vector<int> run;  // per sensor: consecutive samples over the threshold now
    };
    std::vector<sim::PlantedItem> m_items;
    std::vector<Seen> m_seen;
};

void writeText(const std::string& path, const std::string& text) {
    std::ofstream out(path, std::ios::binary | std::ios::trunc);
    out << text;
    if (!out) throw std::runtime_error("demo: cannot write " + path);
}

int runDemo(const DemoOptions& opts) {
    DemoOptions o = opts;
    o.scenario = findDemoFile(o.scenario, kDefaultScenario);
    o.config = findDemoFile(o.config, kDefaultConfig);
    const auto cfg = engine::loadSurveyConfig(o.config);
    auto scenario = sim::loadScenario(o.scenario);
    if (!o.route.empty()) sim::loadRoute(o.route, scenario);
    if (!o.lines.empty()) scenario.run_lines = o.lines;
    if (o.run_out_m) scenario.plan.run_out_m = *o.run_out_m;
    if (o.no_faults) {
        scenario.faults.clear();
        scenario.random_faults.per_hour = 0.0;
    }
    sim::SimOptions sim_opts;
    sim_opts.seed = o.seed;
    if (!o.start.empty()) sim_opts.start_utc_ns = sim::parseUtc(o.start);
    if (o.duration_s > 0) sim_opts.duration_s = o.duration_s;
    if (o.to_s) sim_opts.duration_s = *o.to_s;
    sim::Simulator simulator(std::move(scenario), sim_opts);
    // A later session: the world runs from the start, only its lines from `from` on are fed.
    if (o.from_s) sim::skipUntil(simulator, *o.from_s);

    std::optional<site::Site> site;
    std::string log_path;
    if (!o.site.empty()) {
        std::filesystem::create_directories(o.site);
        site = openSite({o.site}, std::nullopt, "", false);
        const engine::SurveyConfig* ref = site->config_in_force ? &*site->config_in_force : nullptr;
        if (ref == nullptr && !site->usable().empty()) ref = &*site->usable().front()->config;
        if (ref != nullptr)
            if (auto d = site::firstSiteWideDifference(cfg, *ref))
                throw config::ConfigError(fmt::format("{}: differs from the site's config {} in {} (docs/site.md)",
                                                      o.config, ref->file, *d));
        // Named by the session's simulated start, as record names a log by its start.
        log_path = site::newLogPath(o.site, simulator.now_utc_ns());
    } else {
        std::filesystem::create_directories(o.out_dir);
        log_path = (std::filesystem::path(o.out_dir) / "demo.sglog").string();
        std::filesystem::remove(log_path);
    }
    io::HelmOutputs helm(cfg.outputs);  // [[output]]: steering sentences, as record sends them
    io::LogWriter writer(log_path, {500, false},
                         {{"config_text", cfg.text},
                          {"config_file", std::filesystem::absolute(o.config).string()},
                          {"origin", "swathguard demo (simulated instruments)"}});
    helm.setEventIds([&writer] { return writer.nextEventId(); });  // output_outage events
    engine::Pipeline pipeline(cfg, [&writer] { return writer.nextEventId(); });
    if (site) {
        pipeline.engine().seedSite(site::siteSeed(*site));
        std::printf("demo: site %s: %zu earlier log(s) joined; new log %s\n", o.site.c_str(),
                    pipeline.engine().priorSessions().size(), log_path.c_str());
    }

    // Channel -> input name: the input of the same name, else the input with the matching role.
    static const std::map<std::string, std::string> kRoleOf = {
        {"gnss", "gnss"}, {"gyro", "heading"}, {"sounder", "depth"},
        {"mag", "mag"},   {"altimeter", "altimeter"}, {"cable", "cable"}};
    std::map<int, std::string> source_of;
    for (int c = 0; c < sim::kChannelCount; ++c) {
        const std::string name = sim::channelName(static_cast<sim::Channel>(c));
        for (const auto& in : cfg.inputs)
            if (in.name == name) source_of[c] = name;
        if (!source_of.count(c))
            for (const auto& in : cfg.inputs)
                if (in.role == kRoleOf.at(name)) source_of[c] = in.name;
    }
    // One framer per channel, exactly as a reader frames its port's bytes.
    std::map<int, std::unique_ptr<LineFramer>> framers;
    TimeNs now_ns = 0;
    for (const auto& [c, source] : source_of) {
        framers[c] = std::make_unique<LineFramer>([&, src = source](std::string_view b, std::uint8_t f) {
            ReceivedLine l;
            l.source = src;
            l.mono_ns = now_ns;
            l.utc_ns = now_ns;
            l.bytes = std::string(b);
            l.flags = f;
            pipeline.feed(l);
        });
    }

    double speed = 0.0;
    if (o.speed != "max") {
        speed = std::stod(o.speed);
        if (!(speed > 0)) throw CLI::ValidationError("--speed", "expected 'max' or a factor > 0");
    }
    return runWithScreen(o.screen, "swathguard demo", [&](ScreenLink& link) {
    engine::SnapshotBuilder builder(pipeline.engine());
    builder.setInputCounters(&pipeline.decoder());
    auto last_publish = std::chrono::steady_clock::now();
    const TimeNs sim0 = simulator.now_utc_ns();  // a later session is paced from its start
    std::printf("demo: simulating '%s' (seed %llu) into %s\n", o.scenario.c_str(),
                static_cast<unsigned long long>(o.seed), log_path.c_str());
    const auto wall0 = std::chrono::steady_clock::now();
    TimeNs next_status = 0;
    std::uint64_t lines = 0;
    std::optional<TruthPeaks> truth;
    if (o.truth) truth.emplace(sim::plantedItems(simulator));
    // The crew's steering commands: a line of the reserved source at the latest receive time,
    // logged with the others (a replay of the demo log repeats the choice).
    const auto crewLine = [&](const std::string& text) {
        pipeline.feed({std::string(engine::Pipeline::kCrewSource), now_ns, now_ns, text, 0});
        std::printf("demo: crew: %s\n", text.c_str());
    };
    while (!simulator.done()) {
        const auto& out = simulator.step();
        if (truth) {
            // The live threshold the engine holds for that sensor as the sample is sent.
            for (const auto& m : out.mag) {
                double threshold = 0.0;
                for (const auto& st : pipeline.engine().sensors())
                    if (st.index == m.sensor) threshold = st.threshold_nT;
                truth->add(m, threshold);
            }
        }
        for (const auto& line : out.lines) {
            auto it = framers.find(static_cast<int>(line.channel));
            if (it == framers.end()) continue;
            now_ns = line.utc_ns;
            it->second->feed(line.bytes);
            it->second->feed("\r\n");
            ++lines;
        }
        pipeline.tick(out.utc_ns);
        if (!helm.empty()) helm.update(pipeline.engine(), out.utc_ns);
        if (link.stopRequested()) break;
        if (link.hasScreen()) {
            applyCommonCommands(link.commands(), pipeline.engine(), builder, o.out_dir, crewLine);
            const auto now = std::chrono::steady_clock::now();
            if (now - last_publish >= std::chrono::milliseconds(100)) {
                last_publish = now;
                link.publish(builder.build());
            }
        }
        if (speed > 0) {
            // Paced: simulated time runs `speed` times faster than the wall clock.
            const auto due = wall0 + std::chrono::nanoseconds(static_cast<std::int64_t>(
                                         static_cast<double>(out.utc_ns - sim0) / speed));
            std::this_thread::sleep_until(due);
        }
        if (out.utc_ns >= next_status) {
            if (next_status != 0 && !link.hasScreen())
                std::printf("%s | %s\n", utcText(out.utc_ns).c_str(),
                            engineStatus(pipeline.engine()).c_str());
            next_status = out.utc_ns + 60 * kNsPerSecond;
            auto batch = pipeline.takeBatch();
            helm.takeRows(batch);
            writer.post(std::move(batch));
        }
    }
    auto last_batch = pipeline.takeBatch();
    helm.takeRows(last_batch);
    writer.post(std::move(last_batch));
    std::printf("%s", helm.summaryText("demo").c_str());
    // A site session's end commits its gap names (as a run's end does) and keeps them in its own
    // log: the site opens with them (docs/site.md, "Gap names across sessions").
    std::optional<coverage::GapNamer::Committed> names;
    if (site && lines > 0) {
        names = pipeline.engine().endSessionNames();
        writer.post(site::gapNamesBatch(*names, cfg));
    }
    writer.stop();
    const double wall_s = std::chrono::duration<double>(std::chrono::steady_clock::now() - wall0).count();
    const double sim_s = simulator.elapsed_s();
    std::printf("demo: %llu lines, %.0f s of survey in %.1f s (%.0fx real time)\n",
                static_cast<unsigned long long>(lines), sim_s, wall_s, wall_s > 0 ? sim_s / wall_s : 0.0);

    engine::LogContext ctx;
    ctx.path = log_path;
    auto summary = engine::summarise(pipeline.engine(), pipeline.linesFed(), ctx);
    if (!summary.sessions.empty()) std::printf("%s", sessionsText(summary).c_str());
    std::printf("%s", engine::toText(summary).c_str());
    if (site && lines > 0) {
        std::printf("demo: gap names recorded: %zu gap run(s), next G%d\n", names->runs.size(), names->next);
        // The new log's own summary (the next session opens the site without replaying it).
        const auto sum = site::buildSessionSummary(log_path, cfg);
        site::writeSessionSummary(site::summaryPathFor(log_path), sum);
        std::printf("demo: session summary %s\n", site::summaryPathFor(log_path).c_str());
    }
    auto written = engine::writeExports(summary, pipeline.engine(), o.out_dir);
    if (truth) {
        const auto dir = std::filesystem::path(log_path).parent_path();
        writeText((dir / "truth_items.csv").string(), sim::plantedItemsCsv(truth->items()));
        writeText((dir / "truth_peaks.csv").string(), truth->csv());
        written.push_back((dir / "truth_items.csv").string());
        written.push_back((dir / "truth_peaks.csv").string());
    }
    std::printf("log: %s\n", log_path.c_str());
    for (const auto& p : written) std::printf("wrote %s\n", p.c_str());
    const int covered_rc = nothingCoveredExit(summary, pipeline.engine(), "demo");
    std::printf("Coverage is a model's estimate. Clearance of unexploded ordnance follows the "
                "project's risk assessment, local regulations and licensed specialists; the "
                "master decides on navigation.\n");
    if (link.hasScreen()) {
        link.publish(builder.build(true));
        while (!link.stopRequested()) {
            applyCommonCommands(link.commands(), pipeline.engine(), builder, o.out_dir);
            link.publish(builder.build());
            std::this_thread::sleep_for(std::chrono::milliseconds(200));
        }
    }
    return covered_rc;
    });
}

}  // namespace

void addDemoCommand(CLI::App& app) {
    auto o = std::make_shared<DemoOptions>();
    auto* cmd = app.add_subcommand("demo", "Simulate the demo survey through the whole core, in one process");
    cmd->add_option("--scenario", o->scenario, "Simulator scenario (TOML)")->capture_default_str();
    cmd->add_option("--config", o->config, "Survey config (TOML)")->capture_default_str();
    cmd->add_option("--out", o->out_dir, "Folder for the log and the exports")->capture_default_str();
    cmd->add_option("--seed", o->seed, "Simulator seed")->capture_default_str();
    cmd->add_option("--duration", o->duration_s, "Simulated seconds (default: the whole plan)");
    cmd->add_option("--speed", o->speed, "Simulated seconds per wall second, or max")->capture_default_str();
    cmd->add_option("--site", o->site, "Site folder: the log goes to SITE/logs, with the earlier logs joined first");
    cmd->add_option("--from", o->from_s, "This session starts at this simulated second (the world runs from 0)");
    cmd->add_option("--to", o->to_s, "This session stops at this simulated second");
    cmd->add_option("--lines", o->lines, "Fly only these plan lines (names, comma separated)")->delimiter(',');
    cmd->add_option("--route", o->route, "Fly the LineStrings of this GeoJSON (e.g. infill.geojson) instead");
    cmd->add_option("--run-out", o->run_out_m, "Straight run past each line's end (m)");
    cmd->add_flag("--no-faults", o->no_faults, "Leave out the scenario's faults");
    cmd->add_flag("--truth", o->truth,
                  "Also write the planted items (truth_items.csv) and how strongly the sensors saw them "
                  "(truth_peaks.csv) beside the log");
    cmd->add_option("--start", o->start, "Simulated start (UTC, e.g. 2026-06-15T08:00:00Z)");
    addScreenOptions(*cmd, o->screen);
    cmd->callback([o] {
        const int rc = runDemo(*o);
        if (rc != 0) throw CLI::RuntimeError(rc);
    });
}

}  // namespace sg::app
