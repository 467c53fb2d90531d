// `swathguard replay LOG`: runs a recorded log through the whole core again, paced at 1x, a
// factor, or as fast as possible, printing progress, and ends with the coverage summary.
// `swathguard gaps LOG`: the same at full speed, then the gap list and infill proposals, with
// exports. Both use the survey config stored in the log unless --config overrides it.
#include <algorithm>
#include <chrono>
#include <filesystem>
#include <cstdio>
#include <thread>

#include <fmt/format.h>

#include "app/commands.hpp"
#include "app/engine_status.hpp"
#include "app/screen_session.hpp"
#include "app/site_open.hpp"
#include "app/setup_gate.hpp"
#include "engine/log_replay.hpp"
#include "engine/snapshot_builder.hpp"
#include "engine/survey_summary.hpp"

namespace sg::app {

namespace {

struct ReplayOptions {
    std::vector<std::string> logs;  // one log, several logs, or a site folder
    std::string log;                // the log replayed
    std::string config;
    std::string speed = "max";
    ScreenArgs screen;
    bool json = false;
    std::string export_dir;
    bool no_picks = false;  // --no-picks: this run without anomaly picks and verification strip
    double status_every_s = 0.0;  // --status-every: status line period, survey clock (s); 0 = off
};

// "max" -> 0 (no pacing), else a positive factor.
double parseSpeed(const std::string& text) {
    if (text == "max") return 0.0;
    std::size_t used = 0;
    double v = 0.0;
    try {
        v = std::stod(text, &used);
    } catch (const std::exception&) {
        used = 0;
    }
    if (used != text.size() || !(v > 0.0) || v > 1e6)
        throw CLI::ValidationError("--speed", "expected 'max' or a factor > 0, got '" + text + "'");
    return v;
}

std::optional<std::string> configOverride(const ReplayOptions& o) {
    return o.config.empty() ? std::nullopt : std::optional<std::string>(o.config);
}

// A site: the newest usable log is replayed on top of the earlier ones, as it was recorded.
std::unique_ptr<engine::LogReplay> makeReplay(ReplayOptions& o) {
    if (!namesSite(o.logs)) {
        o.log = o.logs.front();
        auto replay = std::make_unique<engine::LogReplay>(o.log, configOverride(o));
        if (o.no_picks) replay->switchOffPicks();
        return replay;
    }
    auto site = std::make_shared<site::Site>(openSite(o.logs, configOverride(o)));
    const auto usable = site->usable();
    const auto* last = usable.back();
    o.log = last->path;
    auto replay = std::make_unique<engine::LogReplay>(o.log, *last->config);
    if (o.no_picks) replay->switchOffPicks();
    const std::size_t earlier = usable.size() - 1;
    std::printf("replay: site %s: %zu earlier log(s) joined before %s\n",
                site->dir.empty() ? "(logs given)" : site->dir.c_str(), earlier, o.log.c_str());
    replay->setSiteSeed([site, earlier] { return site::siteSeed(*site, earlier); });
    return replay;
}

int runReplay(ReplayOptions& o) {
    double speed = parseSpeed(o.speed);
    auto replay_ptr = makeReplay(o);
    auto& replay = *replay_ptr;
    std::printf("replay: %s, %lld lines, %s .. %s, speed %s\n", o.log.c_str(),
                static_cast<long long>(replay.totalLines()), utcText(replay.firstTime()).c_str(),
                utcText(replay.lastTime()).c_str(), o.speed.c_str());
    // Episodes the operator of the day saw, from the log's events (training view: "next alarm"),
    // by their survey start times.
    engine::EpisodeCursor episodes(replay.episodeStarts());
    const auto export_dir = (std::filesystem::path(o.log).parent_path() / "exports").string();

    return runWithScreen(o.screen, "swathguard replay", [&](ScreenLink& link) {
        // Only a screen needs the snapshot history (it costs time at full replay speed).
        auto makeBuilder = [&] {
            if (!link.hasScreen()) return std::unique_ptr<engine::SnapshotBuilder>();
            auto b = std::make_unique<engine::SnapshotBuilder>(replay.pipeline().engine());
            b->setInputCounters(&replay.pipeline().decoder());
            return b;
        };
        auto builder = makeBuilder();
        bool paused = false;
        const auto wall0 = std::chrono::steady_clock::now();
        // Pacing runs on the survey clock: speed 1 replays the survey in its own time, whatever
        // speed the log was recorded at (a simulation sent at 20x included).
        auto pace_wall = wall0;
        TimeNs pace_log = replay.surveyFirst();
        auto last_print = wall0;
        auto last_publish = wall0;
        const std::int64_t step = std::max<std::int64_t>(1, replay.totalLines() / 10);
        std::int64_t next_print = step;
        // --status-every: status lines at fixed steps of the survey clock, whatever the speed, so
        // the same log always prints the same lines (a trainer's record of the day; tests).
        const auto every_ns = static_cast<TimeNs>(o.status_every_s * 1e9);
        TimeNs next_status = replay.surveyFirst() + every_ns;
        const auto now_log = [&] { return replay.surveyNow() != 0 ? replay.surveyNow() : replay.surveyFirst(); };
        const auto seekTo = [&](TimeNs target) {
            target = std::clamp(target, replay.surveyFirst(), replay.surveyLast());
            if (target < replay.surveyNow()) {
                replay.restart();
                builder = makeBuilder();
                episodes = engine::EpisodeCursor(replay.episodeStarts());
            }
            replay.runUntilSurvey(target);
            pace_wall = std::chrono::steady_clock::now();
            pace_log = now_log();
        };
        const auto publish = [&](bool force_gaps) {
            engine::ReplayView rv;
            rv.is_replay = true;
            rv.t_s = toSeconds(now_log());
            rv.t_start_s = toSeconds(replay.surveyFirst());
            rv.t_end_s = toSeconds(std::max(replay.surveyLast(), now_log()));
            rv.speed = speed;
            rv.paused = paused;
            for (const TimeNs t : episodes.starts()) rv.episode_starts_s.push_back(toSeconds(t));
            rv.episode_visited = episodes.lastVisited();
            rv.receive_t_s = toSeconds(replay.pipeline().engine().clock_ns());
            if (!builder) return;
            builder->setReplay(rv);
            link.publish(builder->build(force_gaps));
        };
        while (!link.stopRequested()) {
            std::vector<engine::UiCommand> commands;
            if (builder) commands = applyCommonCommands(link.commands(), replay.pipeline().engine(), *builder, export_dir);
            for (auto& c : commands) {
                using Kind = engine::UiCommand::Kind;
                if (c.kind == Kind::kReplayPause) paused = true;
                if (c.kind == Kind::kReplayPlay) {
                    paused = false;
                    pace_wall = std::chrono::steady_clock::now();
                    pace_log = now_log();
                }
                if (c.kind == Kind::kReplaySpeed) {
                    speed = c.value;
                    pace_wall = std::chrono::steady_clock::now();
                    pace_log = now_log();
                }
                if (c.kind == Kind::kReplaySeek) seekTo(static_cast<TimeNs>(c.value * 1e9));
                if (c.kind == Kind::kReplayNextAlarm) {
                    // Every episode of the day in order; after the last one the replay stays.
                    if (replay.nextEpisode(episodes)) {
                        pace_wall = std::chrono::steady_clock::now();
                        pace_log = now_log();
                        paused = true;  // the trainer stops at each alarm of the day
                    }
                }
            }
            const bool at_end = !replay.nextTime().has_value();
            const auto printDueStatus = [&] {
                if (link.hasScreen() || every_ns <= 0 || now_log() < next_status) return;
                std::printf("%s | %s\n", utcText(now_log()).c_str(),
                            engineStatus(replay.pipeline().engine()).c_str());
                std::fflush(stdout);
                while (next_status <= now_log()) next_status += every_ns;
            };
            if (!paused && !at_end) {
                if (speed == 0.0 && every_ns > 0 && !link.hasScreen()) {
                    replay.runUntilSurvey(next_status);
                    printDueStatus();
                } else if (speed == 0.0) {
                    for (int i = 0; i < 20000 && replay.step(); ++i) {
                    }
                    if (!link.hasScreen() && static_cast<std::int64_t>(replay.linesFed()) >= next_print) {
                        next_print += step;
                        std::printf("  %3.0f %% | %s\n",
                                    100.0 * static_cast<double>(replay.linesFed()) /
                                        static_cast<double>(std::max<std::int64_t>(1, replay.totalLines())),
                                    engineStatus(replay.pipeline().engine()).c_str());
                        std::fflush(stdout);
                    }
                } else {
                    const double wall_s = std::chrono::duration<double>(std::chrono::steady_clock::now() - pace_wall).count();
                    replay.runUntilSurvey(pace_log + static_cast<TimeNs>(wall_s * speed * 1e9));
                    const auto now = std::chrono::steady_clock::now();
                    if (every_ns > 0) {
                        printDueStatus();
                    } else if (!link.hasScreen() && now - last_print >= std::chrono::seconds(1)) {
                        last_print = now;
                        std::printf("%s | %s\n", utcText(now_log()).c_str(),
                                    engineStatus(replay.pipeline().engine()).c_str());
                        std::fflush(stdout);
                    }
                    std::this_thread::sleep_for(std::chrono::milliseconds(10));
                }
            }
            const auto now = std::chrono::steady_clock::now();
            if (link.hasScreen() && now - last_publish >= std::chrono::milliseconds(100)) {
                last_publish = now;
                publish(at_end);
            }
            if (at_end) {
                if (!link.hasScreen()) break;
                std::this_thread::sleep_for(std::chrono::milliseconds(50));
            } else if (paused) {
                std::this_thread::sleep_for(std::chrono::milliseconds(20));
            }
        }
        const double wall_s = std::chrono::duration<double>(std::chrono::steady_clock::now() - wall0).count();
        const double log_s = toSeconds(replay.lastTime() - replay.firstTime());
        std::printf("replay: %llu lines in %.2f s wall for %.0f s of survey (%.0fx real time)\n",
                    static_cast<unsigned long long>(replay.linesFed()), wall_s, log_s,
                    wall_s > 0 ? log_s / wall_s : 0.0);
        auto summary = engine::summarise(replay.pipeline().engine(), replay.linesFed(), replay.context());
        if (!summary.sessions.empty()) std::printf("%s", sessionsText(summary).c_str());
        std::printf("%s", engine::toText(summary).c_str());
        std::printf("raster hash %016llx\n", static_cast<unsigned long long>(summary.raster_hash));
        return 0;
    });
}

int runGaps(const ReplayOptions& o) {
    std::unique_ptr<engine::LogReplay> replay;
    SiteView view;
    engine::SurveyEngine* eng = nullptr;
    engine::SurveySummary summary;
    if (namesSite(o.logs)) {
        if (o.no_picks)
            throw CLI::ValidationError("--no-picks", "applies to one log; a site's gaps join the sessions' "
                                       "summaries as they were made");
        // A site: the per-log summaries joined, no replay of logs whose summary is current.
        const auto site = openSite(o.logs, configOverride(o));
        view = summariseSite(site);
        eng = view.engine.get();
        summary = std::move(view.summary);
    } else {
        replay = std::make_unique<engine::LogReplay>(o.logs.front(), configOverride(o));
        if (o.no_picks) replay->switchOffPicks();
        if (!checkLogSetup(o.logs.front(), replay->config(), "gaps")) return kExitSetupError;
        replay->runToEnd();
        eng = &replay->pipeline().engine();
        summary = engine::summarise(*eng, replay->linesFed(), replay->context());
    }
    std::vector<std::string> written;
    if (!o.export_dir.empty()) written = engine::writeExports(summary, *eng, o.export_dir);
    if (o.json) {
        auto j = engine::toJson(summary);
        j["exports"] = written;
        std::printf("%s\n", j.dump(2).c_str());
    } else {
        if (!summary.sessions.empty()) std::printf("%s", sessionsText(summary).c_str());
        std::printf("%s", engine::toText(summary).c_str());
        for (const auto& p : written) std::printf("wrote %s\n", p.c_str());
    }
    return nothingCoveredExit(summary, *eng, "gaps");
}

}  // namespace

void addReplayCommands(CLI::App& app) {
    auto ro = std::make_shared<ReplayOptions>();
    auto* replay = app.add_subcommand("replay", "Run a survey log through the core again");
    replay->add_option("logs", ro->logs, "Survey log (SQLite), or a site folder, or several logs (the last is "
                       "replayed on top of the others)")->required()->check(CLI::ExistingPath);
    replay->add_option("--speed", ro->speed, "Replay speed: a factor (1 = real time) or max")
        ->default_str("max");
    replay->add_option("--config", ro->config, "Survey config to use instead of the one in the log");
    replay->add_flag("--no-picks", ro->no_picks,
                     "Replay without anomaly picks and the verification strip (as [picks] enabled = false)");
    replay->add_option("--status-every", ro->status_every_s,
                       "Without a screen: a status line every this many seconds of survey time, "
                       "at any speed (default: every wall second when paced, every 10 % of the "
                       "log at max)")
        ->check(CLI::PositiveNumber);
    addScreenOptions(*replay, ro->screen);
    replay->callback([ro] { runReplay(*ro); });

    auto go = std::make_shared<ReplayOptions>();
    auto* gaps = app.add_subcommand("gaps", "Coverage, gap list and infill lines of a survey log");
    gaps->add_option("logs", go->logs, "Survey log (SQLite), a site folder, or several logs of one site")
        ->required()->check(CLI::ExistingPath);
    gaps->add_option("--export", go->export_dir,
                     "Write gaps.geojson, gaps.csv, infill.geojson, infill.gpx, infill.csv here");
    gaps->add_flag("--json", go->json, "Print the summary as JSON");
    gaps->add_option("--config", go->config, "Survey config to use instead of the one in the log");
    gaps->add_flag("--no-picks", go->no_picks,
                   "Without anomaly picks and the verification strip (as [picks] enabled = false; one log only)");
    gaps->callback([go] {
        const int rc = runGaps(*go);
        if (rc != 0) throw CLI::RuntimeError(rc);
    });
}

}  // namespace sg::app
