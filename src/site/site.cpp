// Site discovery, summaries and the engine seed; see site.hpp.
#include "site/site.hpp"

#include <algorithm>
#include <chrono>
#include <ctime>
#include <filesystem>
#include <map>

#include <fmt/format.h>

#include "coverage/raster_io.hpp"
#include "engine/log_replay.hpp"
#include "log/log_reader.hpp"
#include "site/site_config.hpp"

namespace sg::site {

namespace fs = std::filesystem;

std::vector<const SiteLog*> Site::usable() const {
    std::vector<const SiteLog*> out;
    for (const auto& l : logs)
        if (!l.skipped && l.summary && l.config) out.push_back(&l);
    return out;
}

engine::SurveyConfig Site::engineConfig() const {
    if (config_in_force) return *config_in_force;
    for (const auto& l : logs)
        if (!l.skipped && l.config) return *l.config;
    throw SiteError(dir.empty() ? "no usable log among the files given" : fmt::format("{}: no usable log in the site", dir));
}

bool isSiteDir(const std::string& path) {
    std::error_code ec;
    return fs::is_directory(path, ec) &&
           (fs::exists(fs::path(path) / "survey.toml", ec) || fs::is_directory(fs::path(path) / "logs", ec));
}

std::string newLogPath(const std::string& site_dir, TimeNs utc_ns) {
    const auto dir = fs::path(site_dir) / "logs";
    fs::create_directories(dir);
    const std::time_t secs = static_cast<std::time_t>(utc_ns / kNsPerSecond);
    std::tm tm{};
    gmtime_r(&secs, &tm);
    char stem[32];
    std::strftime(stem, sizeof stem, "%Y%m%dT%H%M%SZ", &tm);
    for (int n = 1;; ++n) {
        const auto name = n == 1 ? fmt::format("{}.sglog", stem) : fmt::format("{}-{}.sglog", stem, n);
        const auto p = dir / name;
        std::error_code ec;
        if (!fs::exists(p, ec) && !fs::exists(fs::path(p).replace_extension(".sgsum"), ec)) return p.string();
    }
}

Site discoverSite(const std::vector<std::string>& paths, const std::optional<std::string>& config_path,
                  const std::string& exclude) {
    Site site;
    std::vector<std::string> logs;
    std::optional<std::string> force = config_path;
    std::error_code ec;
    if (paths.size() == 1 && fs::is_directory(paths[0], ec)) {
        site.dir = paths[0];
        const auto logs_dir = fs::path(site.dir) / "logs";
        if (fs::is_directory(logs_dir, ec))
            for (const auto& e : fs::directory_iterator(logs_dir))
                if (e.is_regular_file() && e.path().extension() == ".sglog") logs.push_back(e.path().string());
        std::sort(logs.begin(), logs.end());
        const auto survey = fs::path(site.dir) / "survey.toml";
        if (!force && fs::exists(survey, ec)) force = survey.string();
    } else {
        for (const auto& p : paths) {
            if (fs::is_directory(p, ec))
                throw SiteError(fmt::format("{}: a folder among log files: give one site folder, or log files", p));
            if (!fs::exists(p, ec)) throw SiteError(fmt::format("{}: no such log file", p));
            logs.push_back(p);
        }
    }
    if (force) site.config_in_force = engine::loadSurveyConfig(*force, config::InputUse::Offline);

    const std::string exclude_abs = exclude.empty() ? "" : fs::weakly_canonical(exclude, ec).string();
    for (const auto& path : logs) {
        if (!exclude_abs.empty() && fs::weakly_canonical(path, ec).string() == exclude_abs) continue;
        SiteLog l;
        l.path = path;
        l.summary_path = summaryPathFor(path);
        std::optional<engine::SurveyConfig> own;  // the log's own config, read once
        try {
            log::LogReader reader(path);
            own = engine::configForLog(reader, std::nullopt);
            l.config = site.config_in_force ? effectiveConfig(*own, *site.config_in_force) : *own;
            if (site.config_in_force && !fs::exists(l.summary_path, ec))
                if (auto d = firstSiteWideDifference(*own, *site.config_in_force))
                    l.stale_reason = fmt::format("recorded with another {}: computed under the config in force", *d);
        } catch (const std::exception& e) {
            l.skipped = true;
            l.skip_reason = e.what();
            site.logs.push_back(std::move(l));
            continue;
        }
        if (!fs::exists(l.summary_path, ec)) {
            if (l.stale_reason.empty()) l.stale_reason = "no summary yet";
        } else {
            try {
                auto sum = readSessionSummary(l.summary_path, false);
                const auto stamp = stampOf(path);
                if (stamp != sum.log_stamp && fileContentHash(path) != sum.log_hash) {
                    l.stale_reason = "the log changed since its summary";
                } else if (sum.config_hash != siteWideHash(*l.config)) {
                    const auto d = site.config_in_force ? firstSiteWideDifference(*own, *site.config_in_force) : std::nullopt;
                    l.stale_reason = d ? fmt::format("recorded with another {}: recomputed under the config in force", *d)
                                       : "the config in force changed since its summary: recomputed";
                } else {
                    if (stamp != sum.log_stamp) {
                        // Same content, new stamp (the site was copied): keep the summary, restamp it.
                        auto full = readSessionSummary(l.summary_path, true);
                        full.log_stamp = stamp;
                        try {
                            writeSessionSummary(l.summary_path, full);
                        } catch (const std::exception&) {
                        }
                        sum.log_stamp = stamp;
                    }
                    sum.info.path = path;
                    l.summary = std::move(sum);
                }
            } catch (const std::exception& e) {
                l.stale_reason = fmt::format("its summary could not be read ({})", e.what());
            }
        }
        site.logs.push_back(std::move(l));
    }

    if (!site.config_in_force) {
        const SiteLog* first = nullptr;
        for (const auto& l : site.logs) {
            if (l.skipped) continue;
            if (first == nullptr) {
                first = &l;
                continue;
            }
            if (auto d = firstSiteWideDifference(*first->config, *l.config))
                throw SiteError(fmt::format(
                    "{} and {} differ in {}: the logs of one site share the CRS, target classes and "
                    "coverage settings (docs/site.md); give --config FILE to recompute them under one config",
                    first->path, l.path, *d));
        }
    }
    return site;
}

void runSequential(std::vector<std::function<void()>>& jobs) {
    for (auto& j : jobs) j();
}

void refreshSummaries(Site& site, const JobRunner& run) {
    std::vector<std::function<void()>> jobs;
    struct Outcome {
        std::string error;
        bool damaged = false;
    };
    std::vector<Outcome> outcomes(site.logs.size());
    for (std::size_t k = 0; k < site.logs.size(); ++k) {
        SiteLog& l = site.logs[k];
        if (l.skipped || l.summary) continue;
        jobs.push_back([&l, &out = outcomes[k]] {
            try {
                auto s = buildSessionSummary(l.path, *l.config);
                try {
                    writeSessionSummary(l.summary_path, s);
                    s.raster_bytes.clear();
                    s.raster_bytes.shrink_to_fit();
                } catch (const std::exception& e) {
                    l.raster_in_memory = true;  // read-only folder: the summary lives in memory
                    out.error = e.what();
                }
                s.info.path = l.path;
                l.summary = std::move(s);
            } catch (const DamagedLog& e) {
                out.damaged = true;
                out.error = e.what();
            } catch (const std::exception& e) {
                out.damaged = true;
                out.error = e.what();
            }
        });
    }
    run(jobs);
    for (std::size_t k = 0; k < site.logs.size(); ++k) {
        SiteLog& l = site.logs[k];
        const auto& out = outcomes[k];
        if (out.damaged) {
            l.skipped = true;
            l.skip_reason = out.error;
        } else if (l.summary && !l.stale_reason.empty()) {
            l.summary->info.recomputed = true;
            l.summary->info.note = l.stale_reason;
            site.messages.push_back(fmt::format("{}: {}", l.path, l.stale_reason));
            if (l.raster_in_memory)
                site.messages.push_back(fmt::format("{}: summary kept in memory only ({})", l.path, out.error));
        }
        if (l.skipped) site.messages.push_back(fmt::format("{}: skipped: {}", l.path, l.skip_reason));
    }
    // Empty logs add nothing: say so and leave them out.
    for (auto& l : site.logs)
        if (!l.skipped && l.summary && l.summary->info.lines == 0) {
            l.skipped = true;
            l.skip_reason = "empty log (no lines)";
            site.messages.push_back(fmt::format("{}: skipped: {}", l.path, l.skip_reason));
        }
    // Gap names (docs/site.md, "Gap names across sessions"): a log without usable recorded names
    // has its new gaps numbered in one step when it is joined.
    for (const auto& l : site.logs)
        if (!l.skipped && l.summary && !l.summary->names && !l.summary->names_note.empty() && l.summary->covered_cells > 0)
            site.messages.push_back(fmt::format("{}: {}; its new gaps are numbered in one step when it is joined",
                                                l.path, l.summary->names_note));
    // Time order: the first line's receive time, then the file name. Skipped logs last.
    std::stable_sort(site.logs.begin(), site.logs.end(), [](const SiteLog& a, const SiteLog& b) {
        const bool ua = !a.skipped && a.summary, ub = !b.skipped && b.summary;
        if (ua != ub) return ua;
        if (!ua) return a.path < b.path;
        if (a.summary->info.first_ns != b.summary->info.first_ns)
            return a.summary->info.first_ns < b.summary->info.first_ns;
        // Logs that start together (simulations): the file name, then the whole path, so that the
        // order never depends on how the logs were listed.
        const auto fa = fs::path(a.path).filename(), fb = fs::path(b.path).filename();
        if (fa != fb) return fa < fb;
        std::error_code ec;
        return fs::weakly_canonical(a.path, ec).string() < fs::weakly_canonical(b.path, ec).string();
    });
    // One CRS for the site (logs without any fix have none and add nothing).
    if (!site.config_in_force || !site.config_in_force->survey.epsg) {
        const SiteLog* first = nullptr;
        for (const auto* l : site.usable()) {
            if (l->summary->epsg == 0) continue;
            if (first == nullptr) first = l;
            else if (l->summary->epsg != first->summary->epsg)
                throw SiteError(fmt::format(
                    "key 'survey.epsg': {} lies in EPSG:{} and {} in EPSG:{} (each took the UTM zone of its "
                    "first fix); set [survey] epsg in the config in force ({}) so every log is computed in one CRS",
                    first->path, first->summary->epsg, l->path, l->summary->epsg,
                    site.dir.empty() ? "--config FILE" : site.dir + "/survey.toml"));
        }
    }
}

engine::SiteSeed siteSeed(const Site& site, std::optional<std::size_t> upto) {
    engine::SiteSeed seed;
    auto logs = site.usable();
    if (upto && *upto < logs.size()) logs.resize(*upto);
    int base = 0;
    std::vector<int> bases;
    for (const auto* l : logs) {
        const auto& s = *l->summary;
        if (!seed.epsg && s.epsg != 0) seed.epsg = s.epsg;
        const int session = static_cast<int>(seed.sessions.size());
        engine::SessionInfo info = s.info;
        info.index = session;
        info.first_run = base;
        info.runs = static_cast<int>(s.runs.size());
        seed.sessions.push_back(info);
        seed.names.push_back(s.names);
        for (auto r : s.runs) {
            r.id += base;
            r.session = session;
            seed.runs.push_back(r);
        }
        for (auto a : s.alarms) {
            a.session = session;
            seed.alarms.push_back(std::move(a));
        }
        for (auto o : s.outages) {
            o.session = session;
            seed.outages.push_back(std::move(o));
        }
        // Picks and verification passes: runs renumbered across the site, tagged with the session.
        auto picks = s.picks;
        for (auto& k : picks) {
            for (auto& r : k.runs)
                if (r >= 0) r += base;
            for (auto& o : k.observations) {
                if (o.run >= 0) o.run += base;
                o.session = session;
            }
            k.sessions = {session};
        }
        seed.picks.push_back(std::move(picks));
        for (auto p : s.verification_passes) {
            if (p.run >= 0) p.run += base;
            p.session = session;
            seed.verification_passes.push_back(std::move(p));
        }
        bases.push_back(base);
        base += static_cast<int>(s.runs.size());
    }
    std::stable_sort(seed.alarms.begin(), seed.alarms.end(),
                     [](const auto& a, const auto& b) { return a.start_ns < b.start_ns; });
    std::stable_sort(seed.outages.begin(), seed.outages.end(),
                     [](const auto& a, const auto& b) { return a.start_ns < b.start_ns; });
    seed.merge_into = [logs, bases](coverage::CoverageRaster& raster, std::vector<engine::SessionInfo>& sessions,
                                    const std::function<void(std::size_t)>& joined) {
        const double cell_m2 = raster.cellSize() * raster.cellSize();
        std::string buffer;
        for (std::size_t k = 0; k < logs.size(); ++k) {
            const auto* l = logs[k];
            const std::string_view bytes =
                l->raster_in_memory ? std::string_view(l->summary->raster_bytes) : readSessionRaster(l->summary_path, buffer);
            if (bytes.empty()) continue;  // the log had no [plan] or no fix: no raster
            std::uint64_t added = 0;
            try {
                added = coverage::mergeRasterBytes(bytes, raster, bases[k]);
            } catch (const std::exception& e) {
                throw SiteError(fmt::format("{}: {}", l->summary_path, e.what()));
            }
            if (k < sessions.size()) sessions[k].added_m2 = static_cast<double>(added) * cell_m2;
            if (joined) joined(k);
        }
    };
    return seed;
}

}  // namespace sg::site
