// `swathguard record`: acquire from the configured inputs into a new survey log, printing a
// status line every second. Stops on SIGINT/SIGTERM, after --duration, or when every input is a
// file that has been read to its end.
#include <csignal>
#include <cstdio>
#include <filesystem>
#include <fstream>
#include <sstream>

#include <boost/asio/signal_set.hpp>
#include <fmt/format.h>

#include "app/commands.hpp"
#include "common/config_section.hpp"
#include "common/input_config.hpp"
#include "decode/field_map.hpp"
#include "io/recorder.hpp"
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

int runRecord(const RecordOptions& o) {
    // Every config check before acquisition starts (and before the log is created).
    engine::SurveyConfig cfg;
    if (!printSetupReport(engine::checkConfigFile(o.config, engine::SetupUse::kRecord, &cfg), "record"))
        return kExitSetupError;
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
    const std::string log_path = o.log.empty() ? fromConfig(cfg.log.path) : o.log;
    if (log_path.empty()) root.fail("log", "[log] path, or --log FILE");

    // The config's own path is stored absolute so replay finds the plan files it names.
    const bool log_existed = std::filesystem::exists(log_path);
    io::LogWriter writer(log_path, {cfg.log.commit_interval_ms, true},
                         {{"config_text", cfg.text},
                          {"config_file", std::filesystem::absolute(o.config).string()}});
    int exit_code = 0;
    try {
    const int rc = runWithScreen(o.screen, "swathguard record", [&](ScreenLink& link) {
    io::asio::io_context ctx;
    io::Recorder rec(ctx, cfg, writer);
    engine::SnapshotBuilder builder(rec.pipeline()->engine());
    const auto export_dir = (std::filesystem::path(log_path).parent_path() / "exports").string();
    // Every flush (100 ms): the screen's commands, then a fresh snapshot for it.
    rec.onFlush([&] {
        if (!link.hasScreen()) return;
        applyCommonCommands(link.commands(), rec.pipeline()->engine(), builder, export_dir);
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
    rec.start();
    schedule();
    ctx.run();
    rec.stop();
    writer.stop();
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
    const auto st = writer.stats();
    std::printf("record: %llu lines in %s (%llu commits)%s\n",
                static_cast<unsigned long long>(st.raw_committed), log_path.c_str(),
                static_cast<unsigned long long>(st.commits),
                st.last_error.empty() ? "" : (" LAST ERROR: " + st.last_error).c_str());
    if (!st.last_error.empty()) {
        std::fprintf(stderr, "record: error: %s\n", st.last_error.c_str());
        exit_code = 2;
    }
    return exit_code;
}

}  // namespace

void addRecordCommand(CLI::App& app) {
    auto opts = std::make_shared<RecordOptions>();
    auto* cmd = app.add_subcommand("record", "Acquire from the configured inputs into a survey log");
    cmd->add_option("--config", opts->config, "Survey configuration (TOML)")->required();
    cmd->add_option("--log", opts->log, "Log file to create (default: [log] path)");
    cmd->add_option("--duration", opts->duration_s, "Stop after this many seconds")
        ->check(CLI::NonNegativeNumber);
    addScreenOptions(*cmd, opts->screen);
    cmd->callback([opts] {
        const int rc = runRecord(*opts);
        if (rc != 0) throw CLI::RuntimeError(rc);
    });
}

}  // namespace sg::app
