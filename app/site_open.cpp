// Opening a site for the commands; see site_open.hpp.
#include "app/site_open.hpp"

#include <chrono>
#include <cstdio>
#include <cstdlib>
#include <filesystem>

#include <fmt/format.h>

#include "app/engine_status.hpp"
#include "io/job_runner.hpp"

namespace sg::app {

bool namesSite(const std::vector<std::string>& paths) {
    return paths.size() > 1 || (paths.size() == 1 && std::filesystem::is_directory(paths[0]));
}

site::Site openSite(const std::vector<std::string>& paths, const std::optional<std::string>& config,
                    const std::string& exclude, bool need_logs) {
    auto site = site::discoverSite(paths, config, exclude);
    std::size_t stale = 0;
    for (const auto& l : site.logs) stale += (!l.skipped && !l.summary) ? 1 : 0;
    const auto t0 = std::chrono::steady_clock::now();
    if (stale > 0)
        std::fprintf(stderr, "site: summarising %zu of %zu log(s) (replaying each alone, on every core)\n", stale,
                     site.logs.size());
    // Every core by default; SWATHGUARD_JOBS=n sets the number of threads (bench/bench_site.sh).
    unsigned threads = 0;
    if (const char* j = std::getenv("SWATHGUARD_JOBS")) threads = static_cast<unsigned>(std::max(0, std::atoi(j)));
    site::refreshSummaries(site, [threads](std::vector<std::function<void()>>& jobs) { io::runJobs(jobs, threads); });
    if (stale > 0)
        std::fprintf(stderr, "site: summaries ready in %.1f s\n",
                     std::chrono::duration<double>(std::chrono::steady_clock::now() - t0).count());
    for (const auto& m : site.messages) std::fprintf(stderr, "site: %s\n", m.c_str());
    if (need_logs && site.usable().empty())
        throw site::SiteError(fmt::format("{}: no usable log (see the messages above)",
                                          site.dir.empty() ? "the logs given" : site.dir));
    return site;
}

SiteView summariseSite(const site::Site& site) {
    SiteView v;
    std::int64_t next_event = 1;
    v.engine = std::make_unique<engine::SurveyEngine>(site.engineConfig(), [&next_event] { return next_event++; });
    v.engine->seedSite(site::siteSeed(site));
    engine::LogContext ctx;
    ctx.path = site.dir.empty() ? (site.usable().empty() ? "" : site.usable().front()->path) : site.dir;
    for (const auto* l : site.usable()) {
        const auto& i = l->summary->info;
        if (ctx.first_ns == 0 || i.first_ns < ctx.first_ns) ctx.first_ns = i.first_ns;
        ctx.last_ns = std::max(ctx.last_ns, i.last_ns);
    }
    std::uint64_t lines = 0;
    for (const auto* l : site.usable()) lines += l->summary->info.lines;
    v.summary = engine::summarise(*v.engine, 0, ctx);
    v.summary.lines_processed = lines;
    v.summary.site_messages = site.messages;
    for (const auto* l : site.usable()) v.summary.invalid += l->summary->info.invalid;
    return v;
}

std::string sessionsText(const engine::SurveySummary& s) {
    std::string out = fmt::format("site: {} log(s), {} vessel(s)\n", s.sessions.size(), s.vessels);
    for (const auto& x : s.sessions)
        out += fmt::format("  session {} {}: vessel '{}', {} .. {}, {} runs, {:.0f} m2 covered, {:.0f} m2 new{}\n",
                           x.index + 1, x.log, x.vessel.empty() ? "(unnamed)" : x.vessel, utcText(x.survey_first_ns),
                           utcText(x.survey_last_ns), x.runs, x.own_covered_m2, x.added_m2,
                           x.recomputed ? " (recomputed)" : "");
    return out;
}

}  // namespace sg::app
