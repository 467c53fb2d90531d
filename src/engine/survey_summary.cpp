// Survey summary: one computation for every report; see survey_summary.hpp.
#include "engine/survey_summary.hpp"

#include <algorithm>
#include <cmath>
#include <cstdint>
#include <filesystem>
#include <limits>

#include <fmt/format.h>

#include "coverage/exports.hpp"

namespace sg::engine {

// Samples that covered nothing, by reason, as "reason N" joined by ", " (empty when none).
std::string invalidReasonsText(const InvalidCounts& c) {
    std::string out;
    const auto add = [&out](const char* what, std::uint64_t n) {
        if (n > 0) out += fmt::format("{}{} {}", out.empty() ? "" : ", ", what, n);
    };
    add("sensor index with no [[sensor]]", c.unknown_sensor);
    add("no fix", c.pose_no_fix);
    add("stale fix", c.pose_stale_fix);
    add("no heading", c.pose_no_heading);
    add("no cable out", c.pose_no_cable_out);
    add("no sensor depth", c.pose_no_sensor_depth);
    add("other pose", c.pose_other);
    add("no altitude", c.no_altitude);
    add("no field", c.no_field);
    add("noise warm-up", c.noise_warmup);
    add("noisy", c.noisy);
    add("low quality", c.low_quality);
    return out;
}

namespace {

// Silence checks whose alarm episodes are data outages.
bool isSilenceCheck(const std::string& name) {
    return name == "gnss_silence" || name == "mag_silence" || name == "altitude_lost";
}

}  // namespace

std::vector<OutageSummary> sessionOutages(const SurveyEngine& engine, const LogContext& log, int session) {
    std::vector<OutageSummary> out;
    const TimeNs end_of_log = std::max(log.last_ns, engine.clock_ns());
    const auto duration = [&](TimeNs start, std::optional<TimeNs> end) {
        return toSeconds(std::max<TimeNs>(0, end.value_or(end_of_log) - start));
    };
    for (const auto& e : log.events)
        if (e.kind == "outage")
            out.push_back({"link", e.source, e.start_utc_ns, e.end_utc_ns,
                           duration(e.start_utc_ns, e.end_utc_ns), e.detail, session});
    for (const auto& ep : engine.checks().episodes())
        if (isSilenceCheck(ep.check))
            // Silence episodes are on the survey clock: one still open ends at its reading.
            out.push_back({ep.check, "", ep.start_ns, ep.end_ns,
                           toSeconds(std::max<TimeNs>(0, ep.end_ns.value_or(engine.surveyClock_ns()) - ep.start_ns)),
                           fmt::format("peak {:.1f} s without data", ep.peak_value), session});
    std::stable_sort(out.begin(), out.end(),
                     [](const OutageSummary& a, const OutageSummary& b) { return a.start_ns < b.start_ns; });
    return out;
}

std::vector<AlarmSummary> sessionAlarms(const SurveyEngine& engine, int session) {
    std::vector<AlarmSummary> out;
    for (const auto& ep : engine.checks().episodes()) {
        const auto& c = engine.checks().check(ep.check);
        out.push_back({ep.check, c.unit(), ep.start_ns, ep.end_ns, checks::levelName(ep.peak_level),
                       ep.peak_value, ep.ack_ns, session});
    }
    return out;
}

namespace {

// Passes of each run by each gap, and the alarms and outages near them (see GapCause).
std::vector<GapCause> gapCauses(const SurveySummary& s, double spacing_m,
                                const std::vector<coverage::Point>& track) {
    std::vector<GapCause> out;
    const double reach = std::max(spacing_m, 1.0);
    for (const auto& g : s.gaps.gaps) {
        GapCause gc;
        gc.gap_id = g.id;
        const auto c = g.centroid;
        for (const auto& r : s.runs) {
            const double dx = r.end_pos.e_m - r.start_pos.e_m, dy = r.end_pos.n_m - r.start_pos.n_m;
            const double len2 = dx * dx + dy * dy;
            if (len2 < 1.0 || r.end_t_ns <= r.start_t_ns) continue;
            const double f = ((c.e_m - r.start_pos.e_m) * dx + (c.n_m - r.start_pos.n_m) * dy) / len2;
            const double len = std::sqrt(len2);
            // Abreast of the gap somewhere along the run (a gap's half-length of slack at the ends).
            const double slack = 0.5 * g.along_length_m / len;
            if (f < -slack || f > 1.0 + slack) continue;
            const double offset = std::abs((c.e_m - r.start_pos.e_m) * dy - (c.n_m - r.start_pos.n_m) * dx) / len;
            if (offset > reach) continue;
            const auto t = r.start_t_ns + static_cast<TimeNs>(std::clamp(f, 0.0, 1.0) * static_cast<double>(r.end_t_ns - r.start_t_ns));
            GapPass pass;
            pass.run = r.id;
            pass.line = lineName(s, r.line);
            pass.t_ns = t;
            pass.offset_m = offset;
            gc.passes.push_back(std::move(pass));
        }
        std::sort(gc.passes.begin(), gc.passes.end(), [](const GapPass& a, const GapPass& b) { return a.offset_m < b.offset_m; });
        // The window: the time to run the gap's length at the run's mean speed, plus 15 s either side
        // (checks hold before they raise; a sensor's swath trails the vessel by the layback).
        const auto add = [](std::vector<std::string>& v, std::string x) {
            if (std::find(v.begin(), v.end(), x) == v.end()) v.push_back(std::move(x));
        };
        std::string text;
        for (auto& p : gc.passes) {
            const auto& r = s.runs[static_cast<std::size_t>(p.run)];
            const double len = std::hypot(r.end_pos.e_m - r.start_pos.e_m, r.end_pos.n_m - r.start_pos.n_m);
            const double speed = len / std::max(1e-9, toSeconds(r.end_t_ns - r.start_t_ns));
            const double half_s = 0.5 * g.along_length_m / std::max(0.1, speed) + 15.0;
            const TimeNs t0 = p.t_ns - static_cast<TimeNs>(half_s * 1e9), t1 = p.t_ns + static_cast<TimeNs>(half_s * 1e9);
            for (const auto& a : s.alarms)
                if (a.start_ns <= t1 && a.end_ns.value_or(INT64_MAX) >= t0) {
                    add(p.checks, a.check + " (" + a.peak_level + ")");
                    add(gc.checks, a.check);
                }
            for (const auto& o : s.outages)
                if (o.kind == "link" && o.start_ns <= t1 && o.end_ns.value_or(INT64_MAX) >= t0)
                    add(p.outages, "link " + o.source);
            std::string what;
            for (const auto& x : p.checks) what += (what.empty() ? "" : ", ") + x;
            for (const auto& x : p.outages) what += (what.empty() ? "" : ", ") + x;
            text += fmt::format("{}{} run {} ({:.0f} m off): {}", text.empty() ? "" : "; ", p.line, p.run, p.offset_m,
                                what.empty() ? "no alarm" : what);
        }
        if (gc.passes.empty()) {
            // No line run passed; but the vessel may have gone by with samples that could not be
            // used (a broken setup): that is not "ground not run over".
            // Within the planned half-width of a stretch the vessel ran with unplaceable samples:
            // the swath would have covered it.
            double nearest = std::numeric_limits<double>::infinity();
            for (const auto& p : track) nearest = std::min(nearest, std::hypot(p.e_m - c.e_m, p.n_m - c.n_m));
            const double swath_reach = std::max(s.detection.planned_half_width_m, s.cell_size_m);
            if (nearest <= swath_reach) {
                const auto reasons = invalidReasonsText(s.invalid);
                text = fmt::format("the vessel passed {:.0f} m from its centre but no usable magnetometer sample "
                                   "covered it (samples unusable: {}): ground run over with a setup or data "
                                   "problem, not ground left unrun",
                                   nearest, reasons.empty() ? "none counted" : reasons);
            } else {
                text = "no line run passed within one line spacing: ground not run over";
            }
        }
        gc.text = text;
        out.push_back(std::move(gc));
    }
    return out;
}

}  // namespace

std::string lineName(const SurveySummary& s, int line) {
    return line >= 0 && static_cast<std::size_t>(line) < s.line_names.size()
               ? s.line_names[static_cast<std::size_t>(line)]
               : std::string();
}

SurveySummary summarise(SurveyEngine& engine, std::uint64_t lines_processed, const LogContext& log) {
    engine.finishPending();  // magnetometer samples still waiting for a fix after their time
    SurveySummary s;
    s.picks = summarisePicks(engine);
    s.log_path = log.path;
    s.first_ns = log.first_ns;
    s.last_ns = log.last_ns;
    const auto& cfg = engine.config();
    s.survey_name = cfg.survey.name;
    if (engine.crs()) {
        s.epsg = engine.crs()->epsg();
        s.crs_name = engine.crs()->name();
    }
    s.coverage_class = engine.coverageModel().targetClass().name;
    s.lines_processed = lines_processed;
    s.invalid = engine.invalidCounts();
    engine.flushCoverage();
    s.cell_size_m = engine.raster().cellSize();
    s.raster_hash = engine.raster().contentHash();
    s.raster_covered_cells = engine.raster().coveredCells();
    if (engine.coverage() != nullptr) {
        // A summary of lines processed is that of a finished log (the screen's passes 0).
        s.gaps = engine.gapReport(lines_processed > 0);
        s.next_gap_number = engine.gapNamer().nextNumber();
        s.area_m2 = s.gaps.areaM2();
        s.covered_m2 = static_cast<double>(s.gaps.covered_cells) * s.cell_size_m * s.cell_size_m;
        s.coverage_pct = s.gaps.coveragePercent();
        s.significant_gaps = s.gaps.significantCount();
        s.small_gaps = s.gaps.smallCount();
        try {
            s.infill = engine.infillPlan(s.gaps);
        } catch (const std::exception& e) {
            s.infill_error = e.what();
        }
        s.runs = engine.lines()->runs();
        for (const auto& l : engine.lines()->lines()) s.line_names.push_back(l.name);
        // Corridor of each planned line: +- half the planned spacing (else the planned swath).
        const auto* plan = engine.plan();
        const double half = plan->line_spacing_m > 0 ? 0.5 * plan->line_spacing_m
                                                     : std::max(0.1, engine.plannedHalfWidth_m());
        const auto& lines = engine.lines()->lines();
        for (std::size_t i = 0; i < lines.size(); ++i) {
            LineCoverage lc{lines[i].name, lines[i].length_m(), half,
                            coverage::corridorCoveragePercent(engine.raster(), lines[i], half), 0};
            for (const auto& r : s.runs) lc.runs += r.line == static_cast<int>(i) ? 1 : 0;
            s.line_coverage.push_back(std::move(lc));
        }
        // Line profiles (report): the engine's bins, each run's picks placed along its line.
        for (const auto& rp : engine.runProfiles().profiles()) {
            RunProfileSummary ps;
            ps.profile = rp;
            for (const auto& k : s.picks.picks)
                for (const auto& ob : k.observations)
                    if (ob.run == rp.run)
                        ps.picks.push_back({k.id, engine.lines()->alongTrack(rp.line, {ob.easting_m, ob.northing_m}),
                                            ob.snr, ob.peak_nT});
            s.profiles.push_back(std::move(ps));
        }
        s.profile_limits.altitude = engine.checks().check("altitude").limits();
        s.profile_limits.deviation = engine.checks().check("deviation").limits();
        s.profile_limits.noise = engine.checks().check("noise").limits();
    }
    auto& d = s.detection;
    d.field = cfg.detection.field;
    d.field_used = detect::usesAmbientField(cfg.detection);
    d.settings = cfg.detection.detection;
    d.targets = cfg.detection.targets;
    d.sensors = engine.sensors().size();
    if (const auto* plan = engine.plan()) {
        d.line_spacing_m = plan->line_spacing_m;
        d.planned_altitude_m = plan->planned_altitude_m;
        d.planned_half_width_m = engine.plannedHalfWidth_m();
        d.survey_heading_deg = plan->surveyHeadingDeg();
    }
    d.max_overlap_altitude_m = engine.maxOverlapAltitude_m();
    d.extrapolation_s = cfg.nav.vessel.extrapolation_s;
    d.fix_max_age_s = cfg.nav.vessel.fix_max_age_s;
    const int session = static_cast<int>(engine.priorSessions().size());
    s.outages = engine.priorOutages();
    for (auto& o : sessionOutages(engine, log, session)) s.outages.push_back(std::move(o));
    std::stable_sort(s.outages.begin(), s.outages.end(),
                     [](const OutageSummary& a, const OutageSummary& b) { return a.start_ns < b.start_ns; });
    s.alarms = engine.priorAlarms();
    for (auto& a : sessionAlarms(engine, session)) s.alarms.push_back(std::move(a));
    s.sessions = engine.priorSessions();
    if (engine.isSite() && lines_processed > 0) {
        // The session being recorded or replayed on top of the site.
        SessionInfo live;
        live.index = session;
        live.log = std::filesystem::path(log.path).filename().string();
        live.path = log.path;
        live.vessel = cfg.nav.vessel.name;
        live.sensors = engine.sensors().size();
        live.first_ns = log.first_ns;
        live.last_ns = log.last_ns;
        live.survey_first_ns = engine.firstSample_ns();
        live.survey_last_ns = engine.lastSample_ns();
        live.lines = lines_processed;
        live.invalid = engine.invalidCounts();
        live.live = true;
        for (const auto& r : s.runs)
            if (r.session == session) {
                if (live.runs == 0) live.first_run = r.id;
                ++live.runs;
            }
        s.sessions.push_back(std::move(live));
    }
    {
        std::vector<std::string> names;
        for (const auto& x : s.sessions)
            if (std::find(names.begin(), names.end(), x.vessel) == names.end()) names.push_back(x.vessel);
        s.vessels = names.size();
    }
    // The log of each session, for the picks' `logs` (one log alone: its own file name).
    for (const auto& x : s.sessions) {
        if (x.index < 0) continue;
        if (s.picks.session_logs.size() <= static_cast<std::size_t>(x.index))
            s.picks.session_logs.resize(static_cast<std::size_t>(x.index) + 1);
        s.picks.session_logs[static_cast<std::size_t>(x.index)] = x.log;
    }
    if (s.sessions.empty()) s.picks.session_logs = {std::filesystem::path(log.path).filename().string()};
    s.gap_causes = gapCauses(s, d.line_spacing_m, engine.vesselTrack());  // needs the runs, alarms and outages above
    s.field_samples = engine.fieldSamples();
    s.crs_problem = engine.crsProblem();
    for (const auto& [index, n] : engine.unknownSensorSamples()) s.unknown_sensors.push_back({index, n});
    return s;
}

nlohmann::json toJson(const SurveySummary& s) {
    using nlohmann::json;
    json j;
    j["survey"] = s.survey_name;
    j["crs"] = {{"epsg", s.epsg}, {"name", s.crs_name}};
    j["coverage_class"] = s.coverage_class;
    j["cell_size_m"] = s.cell_size_m;
    j["area_m2"] = s.area_m2;
    j["covered_m2"] = s.covered_m2;
    j["coverage_pct"] = s.coverage_pct;
    j["gap_count"] = s.significant_gaps;
    j["small_gap_count"] = s.small_gaps;
    j["raster_hash"] = fmt::format("{:016x}", s.raster_hash);
    j["raster_covered_cells"] = s.raster_covered_cells;
    j["lines_processed"] = s.lines_processed;
    json gaps = json::array();
    for (std::size_t gi = 0; gi < s.gaps.gaps.size(); ++gi) {
        const auto& g = s.gaps.gaps[gi];
        json passes = json::array();
        json cause = nullptr;
        if (gi < s.gap_causes.size()) {
            const auto& gc = s.gap_causes[gi];
            for (const auto& p : gc.passes)
                passes.push_back({{"run", p.run}, {"line", p.line}, {"t_ns", p.t_ns}, {"offset_m", p.offset_m},
                                  {"checks", p.checks}, {"outages", p.outages}});
            cause = {{"passes", passes}, {"checks", gc.checks}, {"text", gc.text}};
        }
        gaps.push_back({{"id", g.id},
                        {"name", fmt::format("G{}", g.id)},
                        {"area_m2", g.area_m2},
                        {"centroid_e", g.centroid.e_m},
                        {"centroid_n", g.centroid.n_m},
                        {"bbox", {g.bbox.min_e, g.bbox.min_n, g.bbox.max_e, g.bbox.max_n}},
                        {"along_length_m", g.along_length_m},
                        {"across_width_m", g.across_width_m},
                        {"width_m", g.width_m},
                        {"small", g.small},
                        {"cause", cause}});
    }
    j["gaps"] = gaps;
    // Ground of planned lines not run yet: in no gap, no infill (docs/coverage.md).
    j["not_run_yet"] = {{"lines_total", s.gaps.lines_total},
                        {"lines", s.gaps.lines_not_run},
                        {"area_m2", s.gaps.notRunM2()},
                        {"message", s.gaps.notRunMessage()}};
    j["next_gap_number"] = s.next_gap_number;
    json infill = json::array();
    for (const auto& l : s.infill.plan.lines)
        infill.push_back({{"name", l.name},
                          {"rank", l.rank},
                          {"start", {l.start.e_m, l.start.n_m}},
                          {"end", {l.end.e_m, l.end.n_m}},
                          {"length_m", l.length_m},
                          {"gap_ids", l.gap_ids},
                          {"main_gap", fmt::format("G{}", l.main_gap_id)},
                          {"area_closed_m2", l.area_closed_m2}});
    j["infill"] = {{"lines", infill},
                   {"total_length_m", s.infill.plan.totalLength_m()},
                   {"half_width_m", s.infill.plan.options.half_width_m},
                   {"gaps_left_after_flying", s.infill.after.significantCount()},
                   {"error", s.infill_error}};
    json runs = json::array();
    for (const auto& r : s.runs) {
        const std::string name = lineName(s, r.line);
        runs.push_back({{"id", r.id},
                        {"line", name},
                        {"reversed", r.reversed},
                        {"start_ns", r.start_t_ns},
                        {"end_ns", r.end_t_ns},
                        {"corridor_covered_pct", r.corridor_covered_pct},
                        {"mean_altitude_m", r.meanAltitude_m()},
                        {"worst_altitude_m", r.worst_altitude_m},
                        {"worst_deviation_m", r.worst_deviation_m},
                        {"mean_noise_nT", r.meanNoise_nT()},
                        {"worst_noise_nT", r.worst_noise_nT},
                        {"alarms", r.alarms},
                        {"session", r.session}});
    }
    j["runs"] = runs;
    if (!s.sessions.empty()) {
        json sessions = json::array();
        for (const auto& x : s.sessions)
            sessions.push_back({{"index", x.index},
                                {"log", x.log},
                                {"path", x.path},
                                {"vessel", x.vessel},
                                {"sensors", x.sensors},
                                {"first_ns", x.first_ns},
                                {"last_ns", x.last_ns},
                                {"survey_first_ns", x.survey_first_ns},
                                {"survey_last_ns", x.survey_last_ns},
                                {"lines", x.lines},
                                {"first_run", x.first_run},
                                {"runs", x.runs},
                                {"own_covered_m2", x.own_covered_m2},
                                {"added_m2", x.added_m2},
                                {"recomputed", x.recomputed},
                                {"note", x.note},
                                {"live", x.live}});
        j["site"] = {{"sessions", sessions}, {"vessels", s.vessels}, {"messages", s.site_messages}};
    }
    json alarms = json::array();
    for (const auto& a : s.alarms) {
        json x{{"check", a.check}, {"unit", a.unit}, {"start_ns", a.start_ns},
               {"peak_level", a.peak_level}, {"peak_value", a.peak_value}};
        x["end_ns"] = a.end_ns ? json(*a.end_ns) : json(nullptr);
        x["ack_ns"] = a.ack_ns ? json(*a.ack_ns) : json(nullptr);
        alarms.push_back(std::move(x));
    }
    j["alarms"] = alarms;
    j["log"] = {{"path", s.log_path}, {"first_ns", s.first_ns}, {"last_ns", s.last_ns}};
    json lines = json::array();
    for (const auto& l : s.line_coverage)
        lines.push_back({{"name", l.name},
                         {"length_m", l.length_m},
                         {"corridor_half_width_m", l.corridor_half_width_m},
                         {"corridor_covered_pct", l.corridor_covered_pct},
                         {"runs", l.runs}});
    j["lines"] = lines;
    json outs = json::array();
    for (const auto& o : s.outages) {
        json x{{"kind", o.kind}, {"source", o.source}, {"start_ns", o.start_ns},
               {"duration_s", o.duration_s}, {"detail", o.detail}};
        x["end_ns"] = o.end_ns ? json(*o.end_ns) : json(nullptr);
        outs.push_back(std::move(x));
    }
    j["outages"] = outs;
    const auto& d = s.detection;
    json targets = json::array();
    for (const auto& t : d.targets)
        targets.push_back({{"name", t.name},
                           {"model", detect::modelName(t.model)},
                           {"mass_kg", t.mass_kg},
                           {"moment_Am2", t.moment_Am2},
                           {"radius_m", t.radius_m},
                           {"susceptibility", t.susceptibility},
                           {"burial_m", t.burial_m},
                           {"orientation", detect::orientationName(t.orientation)},
                           {"orientation_rule", detect::orientationRule(t)},
                           {"remanence_ratio", t.orientation == detect::Orientation::InducedRemanent
                                                   ? json(t.remanence_ratio)
                                                   : json(nullptr)}});
    const auto fieldValue = [&d](double v) { return d.field_used ? json(v) : json(nullptr); };
    j["detection"] = {{"inclination_deg", fieldValue(d.field.inclination_deg)},
                      {"declination_deg", fieldValue(d.field.declination_deg)},
                      {"intensity_nT", fieldValue(d.field.intensity_nT)},
                      {"ambient_field", d.field_used ? json("used by the dipole/sphere classes")
                                                     : json(detect::kNoFieldNeeded)},
                      {"k", d.settings.k},
                      {"min_anomaly_nT", d.settings.min_anomaly_nT},
                      {"noise_window", d.settings.noise_window},
                      {"mass_rule_C", d.settings.mass_rule_C},
                      {"targets", targets},
                      {"sensors", d.sensors},
                      {"line_spacing_m", d.line_spacing_m},
                      {"planned_altitude_m", d.planned_altitude_m},
                      {"planned_half_width_m", d.planned_half_width_m},
                      {"survey_heading_deg", d.survey_heading_deg},
                      {"extrapolation_s", d.extrapolation_s},
                      {"fix_max_age_s", d.fix_max_age_s}};
    j["detection"]["max_overlap_altitude_m"] =
        d.max_overlap_altitude_m ? json(*d.max_overlap_altitude_m) : json(nullptr);
    j["invalid_samples"] = {{"no_field", s.invalid.no_field},       {"pose", s.invalid.pose},
                            {"no_altitude", s.invalid.no_altitude}, {"noise_warmup", s.invalid.noise_warmup},
                            {"noisy", s.invalid.noisy},             {"low_quality", s.invalid.low_quality},
                            {"unknown_sensor", s.invalid.unknown_sensor},
                            {"pose_no_fix", s.invalid.pose_no_fix},
                            {"pose_stale_fix", s.invalid.pose_stale_fix},
                            {"pose_no_heading", s.invalid.pose_no_heading},
                            {"pose_no_cable_out", s.invalid.pose_no_cable_out},
                            {"pose_no_sensor_depth", s.invalid.pose_no_sensor_depth},
                            {"pose_other", s.invalid.pose_other}};
    j["field_samples"] = s.field_samples;
    j["picks"] = toJson(s.picks);
    j["verification"] = verificationJson(s.picks);
    return j;
}

std::string toText(const SurveySummary& s) {
    std::string out;
    out += fmt::format("survey: {} ({}), coverage class '{}', cell {} m\n",
                       s.survey_name.empty() ? "(unnamed)" : s.survey_name, s.crs_name,
                       s.coverage_class, s.cell_size_m);
    out += fmt::format("coverage: {:.2f} % of {:.0f} m2 ({:.0f} m2 covered)\n", s.coverage_pct,
                       s.area_m2, s.covered_m2);
    out += fmt::format("gaps: {} (plus {} narrower than {} m)\n", s.significant_gaps, s.small_gaps,
                       s.gaps.min_width_m);
    for (const auto& g : s.gaps.gaps)
        out += fmt::format("  G{:<4}{} {:9.1f} m2 at E {:.1f} N {:.1f}, {:.1f} m along x {:.1f} m across\n",
                           g.id, g.small ? " (small)" : "", g.area_m2, g.centroid.e_m, g.centroid.n_m,
                           g.along_length_m, g.across_width_m);
    if (!s.gaps.lines_not_run.empty())
        out += fmt::format("not run yet: {} ({:.0f} m2 of their ground)\n", s.gaps.notRunMessage(), s.gaps.notRunM2());
    if (!s.infill_error.empty()) out += "infill: not planned: " + s.infill_error + "\n";
    else out += fmt::format("infill: {} line(s), {:.0f} m in all, half-width {:.1f} m; gaps left after flying them: {}\n",
                       s.infill.plan.lines.size(), s.infill.plan.totalLength_m(),
                       s.infill.plan.options.half_width_m, s.infill.after.significantCount());
    for (const auto& l : s.infill.plan.lines)
        out += fmt::format("  {} (rank {}): E {:.1f} N {:.1f} -> E {:.1f} N {:.1f}, {:.0f} m\n", l.name,
                           l.rank, l.start.e_m, l.start.n_m, l.end.e_m, l.end.n_m, l.length_m);
    int open = 0;
    for (const auto& a : s.alarms) open += a.end_ns ? 0 : 1;
    out += fmt::format("alarms: {} episode(s), {} still active\n", s.alarms.size(), open);
    return out;
}

std::vector<std::string> writeExports(const SurveySummary& s, const SurveyEngine& engine,
                                      const std::string& dir) {
    std::filesystem::create_directories(dir);
    std::vector<std::string> written;
    const auto put = [&](const std::string& name, const std::string& text) {
        const auto path = (std::filesystem::path(dir) / name).string();
        coverage::writeTextFile(path, text);
        written.push_back(path);
    };
    put("gaps.csv", coverage::gapsCsv(s.gaps));
    put("infill.csv", coverage::infillCsv(s.infill.plan));
    if (engine.crs() != nullptr) {
        const auto to_lonlat = coverage::toLonLatWith(*engine.crs());
        put("gaps.geojson", coverage::gapsGeoJson(s.gaps, to_lonlat));
        put("infill.geojson", coverage::infillGeoJson(s.infill.plan, to_lonlat));
        put("infill.gpx", coverage::infillGpx(s.infill.plan, to_lonlat));
        put("picks.geojson", picksGeoJson(s.picks));
    }
    put("picks.csv", picksCsv(s.picks));
    put("verification.csv", verificationCsv(s.picks));
    return written;
}

std::optional<std::string> nothingCoveredProblem(const SurveySummary& s, const SurveyEngine& engine) {
    if (s.field_samples == 0 || s.raster_covered_cells > 0) return std::nullopt;
    const auto& c = s.invalid;
    std::string configured;
    for (const auto& o : engine.config().nav.sensors)
        configured += (configured.empty() ? "" : ", ") + std::to_string(o.index);
    std::vector<std::string> hints;
    if (engine.plan() == nullptr)
        hints.push_back("the config has no [plan] (area and lines): coverage needs an area");
    std::uint64_t known = 0;
    for (const auto& st : engine.sensors()) known += st.samples;
    if (!s.unknown_sensors.empty()) {
        std::string idx;
        for (const auto& [i, n] : s.unknown_sensors) idx += (idx.empty() ? "" : ", ") + std::to_string(i);
        hints.push_back(fmt::format(
            "the strings carry sensor index {} but [[sensor]] configures {} (key [[sensor]] index): add a "
            "[[sensor]] with index = {} and its offsets, or correct the field map's sensor field",
            idx, configured, idx));
    }
    if (!s.crs_problem.empty()) hints.push_back(s.crs_problem);
    // A reason that spoiled at least half of the configured sensors' samples is a likely cause.
    const auto most = [known](std::uint64_t n) { return known > 0 && 2 * n >= known; };
    if (s.crs_problem.empty() && most(c.pose_no_fix))
        hints.push_back("no position fix reached the samples: check the GNSS [[input]], its role and "
                        "clock (an instrument clock needs a dated RMC or ZDA)");
    if (most(c.pose_no_heading))
        hints.push_back("no heading: check the heading input or [vessel] heading_source");
    if (most(c.pose_no_cable_out))
        hints.push_back("no cable out: set [tow] cable_out_m, add a cable input, or set [tow] "
                        "sensor_at_antenna = true");
    if (most(c.pose_no_sensor_depth))
        hints.push_back("no sensor depth: set [tow] sensor_depth_m or a depth_m field in the "
                        "magnetometer field map");
    if (most(c.no_altitude) && !most(c.pose_no_fix))
        hints.push_back("no sensor altitude: an altimeter field, or an echo sounder input plus the "
                        "sensor depth");
    if (most(c.noisy)) hints.push_back("noise above [checks.noise] alarm on most samples");
    if (most(c.low_quality))
        hints.push_back("signal quality below [checks.signal_quality] alarm on most samples");
    if (hints.empty()) hints.push_back("no single reason dominates; see the counts");
    const auto reasons = invalidReasonsText(c);
    std::string text = fmt::format(
        "nothing was covered although {} magnetometer samples with a field arrived (samples unusable: "
        "{}). Likely setup mistake:",
        s.field_samples, reasons.empty() ? "none counted" : reasons);
    for (const auto& h : hints) text += "\n  - " + h;
    return text;
}

std::optional<std::string> nothingCoveredProblem(SurveyEngine& engine) {
    if (engine.fieldSamples() == 0) return std::nullopt;
    engine.flushCoverage();
    SurveySummary s;
    s.field_samples = engine.fieldSamples();
    // This session's own coverage (a site's raster also holds the earlier logs').
    s.raster_covered_cells = engine.coverage() != nullptr ? engine.coverage()->sessionRaster().coveredCells()
                                                          : engine.raster().coveredCells();
    s.invalid = engine.invalidCounts();
    s.crs_problem = engine.crsProblem();
    for (const auto& [index, n] : engine.unknownSensorSamples()) s.unknown_sensors.push_back({index, n});
    return nothingCoveredProblem(s, engine);
}

}  // namespace sg::engine
