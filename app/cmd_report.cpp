// `swathguard report LOG --out DIR [--config FILE]`: replays the log through the core at full
// speed, then writes the end-of-site report (report/site_report.hpp) from the same summary that
// `swathguard gaps --json` prints, with a progress bar on the terminal.
#include <unistd.h>

#include <chrono>
#include <cstdio>
#include <string>

#include <fmt/format.h>

#include "app/commands.hpp"
#include "app/site_open.hpp"
#include "app/setup_gate.hpp"
#include "engine/log_replay.hpp"
#include "engine/survey_summary.hpp"
#include "report/site_report.hpp"

namespace sg::app {

namespace {

struct ReportOptions {
    std::vector<std::string> logs;  // one log, a site folder, or several logs
    std::string out;
    std::string config;
};

// A one-line progress bar on stderr when it is a terminal; otherwise a line every 10 %.
class ProgressBar {
public:
    ProgressBar() : m_tty(::isatty(STDERR_FILENO) != 0) {}
    void show(double fraction, const std::string& what) {
        const int pct = static_cast<int>(fraction * 100.0 + 0.5);
        if (m_tty) {
            constexpr int kWidth = 32;
            const int filled = pct * kWidth / 100;
            std::fprintf(stderr, "\r[%s%s] %3d %% %-28s", std::string(static_cast<std::size_t>(filled), '#').c_str(),
                         std::string(static_cast<std::size_t>(kWidth - filled), '.').c_str(), pct, what.c_str());
        } else if (pct >= m_next_pct || what != m_last_what) {
            std::fprintf(stderr, "report: %3d %% %s\n", pct, what.c_str());
            while (m_next_pct <= pct) m_next_pct += 10;
        }
        m_last_what = what;
        std::fflush(stderr);
    }
    void done() {
        if (m_tty) std::fprintf(stderr, "\n");
    }

private:
    bool m_tty;
    int m_next_pct = 0;
    std::string m_last_what;
};

// A site: the report of every log joined (per-log summaries, no replay of current ones).
int runSiteReport(const ReportOptions& o) {
    const auto wall0 = std::chrono::steady_clock::now();
    const auto site = openSite(o.logs, o.config.empty() ? std::nullopt : std::optional<std::string>(o.config));
    auto view = summariseSite(site);
    ProgressBar bar;
    const auto res = report::writeSiteReport(view.summary, *view.engine, o.out,
                                             [&](const std::string& step, double f) { bar.show(f, step); });
    bar.done();
    const auto& summary = view.summary;
    std::printf("%s", sessionsText(summary).c_str());
    std::printf("report: coverage %.2f %%, %zu gap(s), %zu infill line(s); %d PDF pages; %zu files in %s\n"
                "report: %.1f s in all\n",
                summary.coverage_pct, summary.significant_gaps, summary.infill.plan.lines.size(), res.pdf_pages,
                res.files.size(), o.out.c_str(),
                std::chrono::duration<double>(std::chrono::steady_clock::now() - wall0).count());
    for (const auto& f : res.files) std::printf("  %s\n", f.c_str());
    return 0;
}

int runReport(const ReportOptions& o) {
    if (namesSite(o.logs)) return runSiteReport(o);
    const auto wall0 = std::chrono::steady_clock::now();
    engine::LogReplay replay(o.logs.front(), o.config.empty() ? std::nullopt : std::optional<std::string>(o.config));
    if (!checkLogSetup(o.logs.front(), replay.config(), "report")) return kExitSetupError;
    ProgressBar bar;
    // The replay is most of the work: 0..80 % of the bar.
    constexpr double kReplayShare = 0.8;
    const auto total = static_cast<double>(std::max<std::int64_t>(1, replay.totalLines()));
    std::uint64_t n = 0;
    bar.show(0.0, "replaying the log");
    while (replay.step())
        if (++n % 50000 == 0) bar.show(kReplayShare * static_cast<double>(n) / total, "replaying the log");
    const auto wall_replayed = std::chrono::steady_clock::now();
    bar.show(kReplayShare, "summary, gaps, infill");
    auto& eng = replay.pipeline().engine();
    const auto summary = engine::summarise(eng, replay.linesFed(), replay.context());
    const auto res = report::writeSiteReport(summary, eng, o.out, [&](const std::string& step, double f) {
        bar.show(kReplayShare + (1.0 - kReplayShare) * f, step);
    });
    bar.done();
    const auto wall1 = std::chrono::steady_clock::now();
    const auto secs = [](auto a, auto b) { return std::chrono::duration<double>(b - a).count(); };
    std::printf("report: coverage %.2f %%, %zu gap(s), %zu infill line(s); %d PDF pages; %zu files in %s\n"
                "report: %.1f s in all: %.1f s replaying %lld lines, %.1f s for summary and files\n",
                summary.coverage_pct, summary.significant_gaps, summary.infill.plan.lines.size(), res.pdf_pages,
                res.files.size(), o.out.c_str(), secs(wall0, wall1), secs(wall0, wall_replayed),
                static_cast<long long>(replay.linesFed()), secs(wall_replayed, wall1));
    for (const auto& f : res.files) std::printf("  %s\n", f.c_str());
    return nothingCoveredExit(summary, eng, "report");
}

}  // namespace

void addReportCommand(CLI::App& app) {
    auto o = std::make_shared<ReportOptions>();
    auto* cmd = app.add_subcommand("report", "Write the end-of-site report (PDF, maps, GeoTIFF, CSV) of a survey log or a site");
    cmd->add_option("logs", o->logs, "Survey log (SQLite), a site folder, or several logs of one site")
        ->required()->check(CLI::ExistingPath);
    cmd->add_option("--out", o->out, "Folder to write the report into")->required();
    cmd->add_option("--config", o->config, "Survey config to use instead of the one in the log");
    cmd->callback([o] {
        const int rc = runReport(*o);
        if (rc != 0) throw CLI::RuntimeError(rc);
    });
}

}  // namespace sg::app
