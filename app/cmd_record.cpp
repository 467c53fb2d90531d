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
#include "engine/survey_config.hpp"
#include "io/status_line.hpp"

namespace sg::app {

namespace {

struct RecordOptions {
    std::string config;
    std::string log;
    double duration_s = 0.0;
    bool headless = false;
};

int runRecord(const RecordOptions& o) {
    const auto cfg = engine::loadSurveyConfig(o.config);
    const auto root = cfg.root();
    if (cfg.inputs.empty()) root.fail("input", "at least one [[input]] table");
    const std::string log_path = o.log.empty() ? cfg.log.path : o.log;
    if (log_path.empty()) root.fail("log", "[log] path, or --log FILE");

    // The config's own path is stored absolute so replay finds the plan files it names.
    io::LogWriter writer(log_path, {cfg.log.commit_interval_ms, true},
                         {{"config_text", cfg.text},
                          {"config_file", std::filesystem::absolute(o.config).string()}});
    io::asio::io_context ctx;
    io::Recorder rec(ctx, cfg, writer);

    int exit_code = 0;
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
            std::printf("%s | %s\n",
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
    const auto st = writer.stats();
    std::printf("record: %llu lines in %s (%llu commits)%s\n",
                static_cast<unsigned long long>(st.raw_committed), log_path.c_str(),
                static_cast<unsigned long long>(st.commits),
                st.last_error.empty() ? "" : (" LAST ERROR: " + st.last_error).c_str());
    if (!st.last_error.empty()) exit_code = 2;
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
    cmd->add_flag("--headless", opts->headless,
                  "No screen: status line only (the screen is not part of record yet)");
    cmd->callback([opts] {
        const int rc = runRecord(*opts);
        if (rc != 0) throw CLI::RuntimeError(rc);
    });
}

}  // namespace sg::app
