// `swathguard record`: acquire from the configured inputs into a new survey log, printing a
// status line every second. Stops on SIGINT/SIGTERM, after --duration, or when every input is a
// file that has been read to its end.
#include <chrono>
#include <csignal>
#include <cstdio>
#include <filesystem>
#include <fstream>
#include <sstream>

#include <boost/asio/signal_set.hpp>
#include <fmt/format.h>

#include "app/commands.hpp"
#include "app/site_open.hpp"
#include "site/site_config.hpp"
#include "common/config_section.hpp"
#include "common/input_config.hpp"
#include "decode/field_map.hpp"
#include "io/helm_output.hpp"
#include "io/recorder.hpp"
#include "io/sources.hpp"
#include "app/engine_status.hpp"
#include "app/screen_session.hpp"
#include "app/setup_gate.hpp"
#include "engine/snapshot_builder.hpp"
#include "engine/survey_config.hpp"
#include "io/status_line.hpp"

namespace sg::app {

namespace {

struct RecordOptions {
    std::string config;
    std::string log;
    std::string site;  // site folder: a new log in SITE/logs, the earlier logs joined first
    double duration_s = 0.0;
    ScreenArgs screen;
};

// Removes a log this run created that holds no line (a setup or start-up error), so no empty
// log is left behind.
void removeEmptyLog(const std::string& path, bool existed_before, std::uint64_t lines) {
    if (existed_before || lines > 0) return;
    std::error_code ec;
    for (const char* suffix : {"", "-wal", "-shm"}) std::filesystem::remove(path + suffix, ec);
}

int runRecord(RecordOptions o) {
    std::optional<site::Site> site;
    if (!o.site.empty()) {
        const auto site_cfg = std::filesystem::path(o.site) / "survey.toml";
        if (o.config.empty()) {
            if (!std::filesystem::exists(site_cfg))
                throw config::ConfigError(fmt::format(
                    "{}: the site has no survey.toml: give --config FILE (the vessel's survey config)", o.site));
            o.config = site_cfg.string();
        }
        if (!o.log.empty()) throw config::ConfigError("--log and --site: a site names its logs itself (SITE/logs/)");
    }
    if (o.config.empty()) throw config::ConfigError("--config FILE (or --site DIR holding survey.toml) is required");
    // Every config check before acquisition starts (and before the log is created).
    engine::SurveyConfig cfg;
    if (!printSetupReport(engine::checkConfigFile(o.config, engine::SetupUse::kRecord, &cfg), "record"))
        return kExitSetupError;
    if (!o.site.empty()) {
        std::filesystem::create_directories(o.site);
        // Before the first new line: every earlier log of the site, summarised (on every core).
        site = openSite({o.site}, std::nullopt, "", false);
        const engine::SurveyConfig* ref = site->config_in_force ? &*site->config_in_force : nullptr;
        const auto usable = site->usable();
        if (ref == nullptr && !usable.empty()) ref = &*usable.front()->config;
        if (ref != nullptr)
            if (auto d = site::firstSiteWideDifference(cfg, *ref))
                throw config::ConfigError(fmt::format(
                    "{}: differs from the site's config {} in {}: the logs of one site share the CRS, target "
                    "classes and coverage settings (docs/site.md)",
                    o.config, ref->file, *d));
    }
    const auto root = cfg.root();
    if (cfg.inputs.empty()) root.fail("input", "at least one [[input]] table");
    // Relative paths in the config start at the config file's folder (cfg.dir); paths on the
    // command line start at the working directory.
    auto fromConfig = [&cfg](const std::string& p) {
        return p.empty() || std::filesystem::path(p).is_absolute()
                   ? p
                   : (std::filesystem::path(cfg.dir) / p).string();
    };
    for (auto& i : cfg.inputs) i.path = fromConfig(i.path);
    const std::string log_path =
        site ? site::newLogPath(o.site, std::chrono::duration_cast<std::chrono::nanoseconds>(
                                            std::chrono::system_clock::now().time_since_epoch()).count())
             : (o.log.empty() ? fromConfig(cfg.log.path) : o.log);
    if (log_path.empty()) root.fail("log", "[log] path, or --log FILE");

    // A UDP port another process holds ends the run here, before a log is created.
    io::checkUdpPortsFree(cfg.inputs);
    // So does a serial device another process holds (opened exclusively or locked).
    io::checkSerialDevicesFree(cfg.inputs);
    // The helm's outputs ([[output]]): a host that does not resolve or a missing device ends the
    // run here, before a log is created.
    io::HelmOutputs helm(cfg.outputs);
    // The config's own path is stored absolute so replay finds the plan files it names.
    const bool log_existed = std::filesystem::exists(log_path);
    io::LogWriterOptions wopt;
    wopt.commit_interval_ms = cfg.log.commit_interval_ms;
    wopt.queue_limit_bytes = static_cast<std::size_t>(cfg.log.queue_limit_mb * 1024.0 * 1024.0);
    wopt.stop_timeout_s = cfg.log.stop_timeout_s;
    io::LogWriter writer(log_path, wopt,
                         {{"config_text", cfg.text},
                          {"config_file", std::filesystem::absolute(o.config).string()}});
    helm.setEventIds([&writer] { return writer.nextEventId(); });  // output_outage events
    int exit_code = 0;
    try {
    const int rc = runWithScreen(o.screen, "swathguard record", [&](ScreenLink& link) {
    io::asio::io_context ctx;
    io::Recorder rec(ctx, cfg, writer);
    if (site) {
        auto& eng = rec.pipeline()->engine();
        eng.seedSite(site::siteSeed(*site));
        std::printf("record: site %s: %zu earlier log(s) joined, %zu runs; new log %s\n", o.site.c_str(),
                    eng.priorSessions().size(), eng.lines() ? eng.lines()->runs().size() : std::size_t{0},
                    log_path.c_str());
    }
    engine::SnapshotBuilder builder(rec.pipeline()->engine());
    builder.setInputCounters(&rec.pipeline()->decoder());
    const auto export_dir = (std::filesystem::path(log_path).parent_path() / "exports").string();
    // The crew's steering commands: a line of the reserved source, logged with the others.
    const auto crewLine = [&](const std::string& text) {
        ReceivedLine l{std::string(engine::Pipeline::kCrewSource), io::monoNowNs(), io::utcNowNs(), text, 0};
        rec.pipeline()->feed(l);
        std::printf("record: crew: %s\n", text.c_str());
    };
    // Every flush (100 ms): the screen's commands, then a fresh snapshot for it.
    rec.onFlush([&] {
        if (!helm.empty()) {
            // Steering sentences at rate_hz of survey time; what was sent goes to the log.
            helm.update(rec.pipeline()->engine(), io::utcNowNs());
            log::Batch sent;
            helm.takeRows(sent);
            if (!sent.empty()) writer.post(std::move(sent));
        }
        if (!link.hasScreen()) return;
        applyCommonCommands(link.commands(), rec.pipeline()->engine(), builder, export_dir, crewLine);
        link.publish(builder.build());
    });

    auto finish = [&] {
        rec.stop();
        ctx.stop();
    };
    io::asio::signal_set signals(ctx, SIGINT, SIGTERM);
    signals.async_wait([&](const boost::system::error_code& ec, int sig) {
        if (ec) return;
        std::fprintf(stderr, "\nrecord: signal %d, stopping\n", sig);
        finish();
    });
    io::asio::steady_timer duration(ctx);
    if (o.duration_s > 0) {
        duration.expires_after(std::chrono::nanoseconds(static_cast<std::int64_t>(o.duration_s * 1e9)));
        duration.async_wait([&](const boost::system::error_code& ec) {
            if (!ec) finish();
        });
    }
    io::StatusLine status;
    io::asio::steady_timer tick(ctx);
    auto last = std::chrono::steady_clock::now();
    std::function<void()> schedule = [&] {
        tick.expires_after(std::chrono::seconds(1));
        tick.async_wait([&](const boost::system::error_code& ec) {
            if (ec) return;
            const auto now = std::chrono::steady_clock::now();
            const double dt = std::chrono::duration<double>(now - last).count();
            last = now;
            if (link.stopRequested()) return finish();
            if (!link.hasScreen()) std::printf("%s | %s\n",
                        status.update(rec.dispatcher().counters(), writer.stats(), dt).c_str(),
                        engineStatus(rec.pipeline()->engine()).c_str());
            std::fflush(stdout);
            if (rec.allFinished()) return finish();
            schedule();
        });
    };
    try {
        rec.start();
    } catch (const std::exception& e) {
        std::fprintf(stderr, "record: %s\n", e.what());
        exit_code = 1;
        rec.stop();
        writer.stop();
        return 1;
    }
    schedule();
    ctx.run();
    rec.stop();
    if (site && writer.stats().raw_posted > 0) {
        // The names this session gave, kept in its own log (docs/site.md): the site opens with them.
        const auto names = rec.pipeline()->engine().endSessionNames();
        writer.post(site::gapNamesBatch(names, cfg));
        std::printf("record: gap names recorded: %zu gap run(s), next G%d\n", names.runs.size(), names.next);
    }
    writer.stop();
    for (const auto& s : rec.sources())
        if (s->dropped() > 0)
            std::fprintf(stderr, "record: input '%s': %llu datagrams dropped by the kernel before "
                                 "they were read (not in the log)\n",
                         s->name().c_str(), static_cast<unsigned long long>(s->dropped()));
    // Samples arrived but nothing was covered: a setup mistake, said with its reasons.
    exit_code = nothingCoveredExit(rec.pipeline()->engine(), "record");
    return 0;
    });
    (void)rc;
    } catch (...) {
        writer.stop();
        removeEmptyLog(log_path, log_existed, writer.stats().raw_committed);
        throw;
    }
    std::printf("%s", helm.summaryText("record").c_str());
    const auto st = writer.stats();
    std::printf("record: %llu lines in %s (%llu commits)\n",
                static_cast<unsigned long long>(st.raw_committed), log_path.c_str(),
                static_cast<unsigned long long>(st.commits));
    if (st.rawLost() > 0) {
        std::fprintf(stderr,
                     "record: %llu of %llu lines NOT logged (%llu dropped while the disk did not "
                     "take rows and the backlog was full, %llu still waiting when stopping)\n",
                     static_cast<unsigned long long>(st.rawLost()),
                     static_cast<unsigned long long>(st.raw_posted),
                     static_cast<unsigned long long>(st.raw_dropped),
                     static_cast<unsigned long long>(st.raw_unwritten));
        exit_code = 2;
    }
    if (st.decoded_dropped > 0)
        std::fprintf(stderr, "record: %llu decoded rows not logged (replay recomputes them from "
                             "the raw lines)\n",
                     static_cast<unsigned long long>(st.decoded_dropped));
    if (!st.last_error.empty()) {
        std::fprintf(stderr, "record: last log error: %s\n", st.last_error.c_str());
        exit_code = 2;
    }
    if (site && st.raw_committed > 0) {
        // The new log's own summary, so that the next session opens the site without replaying it.
        try {
            const auto sum = site::buildSessionSummary(log_path, cfg);
            site::writeSessionSummary(site::summaryPathFor(log_path), sum);
            std::printf("record: session summary %s\n", site::summaryPathFor(log_path).c_str());
        } catch (const std::exception& e) {
            std::fprintf(stderr, "record: no session summary written (%s); the next opening of the site rebuilds it\n",
                         e.what());
        }
    }
    return exit_code;
}

}  // namespace

void addRecordCommand(CLI::App& app) {
    auto opts = std::make_shared<RecordOptions>();
    auto* cmd = app.add_subcommand("record", "Acquire from the configured inputs into a survey log");
    cmd->add_option("--config", opts->config, "Survey configuration (TOML); default SITE/survey.toml with --site");
    cmd->add_option("--log", opts->log, "Log file to create (default: [log] path)");
    cmd->add_option("--site", opts->site,
                    "Site folder: a new log in SITE/logs, with the coverage, runs and alarms of its earlier logs");
    cmd->add_option("--duration", opts->duration_s, "Stop after this many seconds")
        ->check(CLI::NonNegativeNumber);
    addScreenOptions(*cmd, opts->screen);
    cmd->callback([opts] {
        const int rc = runRecord(*opts);
        if (rc != 0) throw CLI::RuntimeError(rc);
    });
}

}  // namespace sg::app
