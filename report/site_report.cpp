// The end-of-site report; see site_report.hpp.
#include "report/site_report.hpp"

#include <algorithm>
#include <chrono>
#include <cmath>
#include <ctime>
#include <filesystem>
#include <map>

#include <fmt/format.h>

#include "checks/check_set.hpp"
#include "coverage/exports.hpp"
#include "report/map_render.hpp"
#include "report/pdf_doc.hpp"
#include "report/pick_plots.hpp"

namespace sg::report {

namespace {

using engine::SurveySummary;

std::string csvRow(const std::vector<std::string>& fields) {
    std::string out;
    for (std::size_t i = 0; i < fields.size(); ++i) {
        if (i > 0) out += ',';
        out += coverage::csvField(fields[i]);
    }
    return out + "\r\n";
}

std::string optTime(const std::optional<TimeNs>& t) { return t ? utcDateTime(*t) : std::string(); }

std::string duration(double s) {
    if (s < 60) return fmt::format("{:.0f} s", s);
    if (s < 3600) return fmt::format("{:.1f} min", s / 60);
    return fmt::format("{:.2f} h", s / 3600);
}

std::string area(double m2) {
    return m2 >= 1e6 ? fmt::format("{:.3f} km2", m2 / 1e6) : fmt::format("{:.0f} m2", m2);
}

double planLength_m(const engine::SurveyEngine& e) {
    double sum = 0;
    if (const auto* p = e.plan())
        for (const auto& l : p->lines) sum += l.length_m();
    return sum;
}

// Infill lines that cover each gap, by gap id.
std::map<int, std::vector<std::string>> closers(const SurveySummary& s) {
    std::map<int, std::vector<std::string>> out;
    for (const auto& l : s.infill.plan.lines)
        for (int g : l.gap_ids) out[g].push_back(l.name);
    return out;
}

std::string join(const std::vector<std::string>& v, const char* sep = " ") {
    std::string out;
    for (const auto& x : v) out += (out.empty() ? "" : sep) + x;
    return out;
}

std::string orientationShort(const detect::TargetClass& t) {
    if (t.orientation == detect::Orientation::InducedRemanent)
        return fmt::format("induced + remanent <= {:g} x induced", t.remanence_ratio);
    return detect::orientationName(t.orientation);
}

std::string targetSize(const detect::TargetClass& t) {
    switch (t.model) {
    case detect::ModelKind::MassRule: return fmt::format("{:g} kg of steel", t.mass_kg);
    case detect::ModelKind::Dipole: return fmt::format("moment {:g} A m2, {}", t.moment_Am2, orientationShort(t));
    case detect::ModelKind::Sphere:
        return fmt::format("radius {:g} m, susceptibility {:g}, {}", t.radius_m, t.susceptibility,
                           orientationShort(t));
    }
    return "";
}

const char* modelSource(detect::ModelKind k) {
    switch (k) {
    case detect::ModelKind::MassRule:
        return "empirical mass rule A = C W / r^3, C set so one short ton gives about 1 nT at 100 ft (common practice)";
    case detect::ModelKind::Dipole: return "point dipole, total-field anomaly (Blakely 1995)";
    case detect::ModelKind::Sphere: return "induced sphere with demagnetisation (Blakely 1995)";
    }
    return "";
}

// The window of a gap's detail map: its box with a border of 60 % of its size, at least 30 m.
coverage::Box gapWindow(const coverage::Gap& g) {
    const double pad = std::max(30.0, 0.6 * std::max(g.bbox.max_e - g.bbox.min_e, g.bbox.max_n - g.bbox.min_n));
    return {g.bbox.min_e - pad, g.bbox.min_n - pad, g.bbox.max_e + pad, g.bbox.max_n + pad};
}

// A check named in the words the screen shows (checks::checkWords, issue #12): never the
// internal identifier. A silence check's outage kind likewise; "link" stays "link outage".
std::string checkText(const std::string& check) { return std::string(checks::checkWords(check)); }
std::string outageKindText(const std::string& kind) { return kind == "link" ? "link outage" : checkText(kind); }

// "forming_gap (alarm)" (engine::GapPass::checks) in words: "Gap forming beside the last line (alarm)".
std::string checkEntryText(const std::string& entry) {
    const auto paren = entry.find(" (");
    if (paren == std::string::npos) return checkText(entry);
    return checkText(entry.substr(0, paren)) + entry.substr(paren);
}

// The cause of a gap in words (the summary's GapCause::text names the checks by identifier):
// the same passes, offsets and alarms, each check by the words the screen shows.
std::string causeWords(const engine::GapCause& gc) {
    if (gc.passes.empty()) return gc.text;
    std::string text;
    for (const auto& p : gc.passes) {
        std::string what;
        for (const auto& x : p.checks) what += (what.empty() ? "" : ", ") + checkEntryText(x);
        for (const auto& x : p.outages) what += (what.empty() ? "" : ", ") + x;
        text += fmt::format("{}{} run {} ({:.0f} m off): {}", text.empty() ? "" : "; ", p.line, p.run, p.offset_m,
                            what.empty() ? "no alarm" : what);
    }
    return text;
}

// The cause text of gap `id` (see engine::GapCause), in words.
std::string causeOf(const SurveySummary& s, int id) {
    for (const auto& gc : s.gap_causes)
        if (gc.gap_id == id) return causeWords(gc);
    return "";
}

// `text` cut to `width` points at the current font, with "..." when cut.
std::string fitText(PdfDoc& d, std::string text, double width) {
    if (d.textAdvance(text) <= width) return text;
    while (text.size() > 3 && d.textAdvance(text + "...") > width) text.pop_back();
    return text + "...";
}

struct AlarmGroup {
    int episodes = 0, alarm_level = 0, open = 0;
    double total_s = 0, worst = 0;
    std::string unit;
    // The worst peak in words (checks::checkValueText: a fix-quality rank reads as its fix type).
    std::string worstText(const std::string& check) const { return checks::checkValueText(check, worst); }
};

std::map<std::string, AlarmGroup> groupAlarms(const SurveySummary& s) {
    std::map<std::string, AlarmGroup> g;
    for (const auto& a : s.alarms) {
        auto& x = g[a.check];
        ++x.episodes;
        if (a.peak_level == "alarm") ++x.alarm_level;
        if (!a.end_ns) ++x.open;
        x.total_s += toSeconds(a.end_ns.value_or(std::max(s.last_ns, a.start_ns)) - a.start_ns);
        x.worst = x.episodes == 1 ? a.peak_value : std::max(x.worst, a.peak_value);
        x.unit = a.unit;
    }
    return g;
}

// ------------------------------------------------------------------------------------------------
// PDF pages

void frontPage(PdfDoc& d, const SurveySummary& s, const engine::SurveyEngine& e) {
    d.title("Site coverage report");
    d.para(s.survey_name.empty() ? "(unnamed survey)" : s.survey_name, 12, true);
    d.space(4);
    if (s.sessions.empty()) {
        d.keyValue("Survey log", s.log_path.empty() ? "(in-process run, no log)" : s.log_path);
    } else {
        // A site (docs/site.md): several logs, sessions and perhaps vessels in one coverage.
        d.keyValue("Site", s.log_path);
        d.keyValue("Logs, sessions, vessels",
                   fmt::format("{} logs, {} sessions, {} vessel(s) (table 'Sessions of the site')", s.sessions.size(),
                               s.sessions.size(), s.vessels));
    }
    // Survey time (instrument-aligned, as the runs and alarms are) and, when it differs, the time the
    // log was received (a replayed or sped-up simulation is received on another clock).
    if (!s.runs.empty()) {
        const TimeNs t0 = s.runs.front().start_t_ns, t1 = s.runs.back().end_t_ns;
        d.keyValue("Lines run (UTC)", fmt::format("{} to {} ({}, {} runs)", utcDateTime(t0), utcDateTime(t1),
                                                  duration(toSeconds(t1 - t0)), s.runs.size()));
    }
    if (s.last_ns > s.first_ns)
        d.keyValue("Log received (UTC)", fmt::format("{} to {} ({})", utcDateTime(s.first_ns), utcDateTime(s.last_ns),
                                                     duration(toSeconds(s.last_ns - s.first_ns))));
    d.keyValue("Survey CRS", fmt::format("EPSG:{} {}", s.epsg, s.crs_name));
    d.keyValue("Coverage class", fmt::format("'{}' (the smallest target the survey must find)", s.coverage_class));
    d.keyValue("Raster cell", fmt::format("{:g} m", s.cell_size_m));
    d.keyValue("Lines processed", fmt::format("{}", s.lines_processed));
    // Traceability: the same log and config give the same raster hash on any replay.
    d.keyValue("Raster hash", fmt::format("{:016x} (equal on every replay of this log and config)", s.raster_hash));
    const auto now = std::chrono::system_clock::now().time_since_epoch();
    d.keyValue("Report written", utcDateTime(std::chrono::duration_cast<std::chrono::nanoseconds>(now).count()) + " UTC");

    // Headline box.
    d.space(8);
    const double box_y = d.y();
    auto* cr = d.cr();
    cairo_set_source_rgb(cr, 0.93, 0.95, 0.96);
    cairo_rectangle(cr, d.left(), box_y, d.textWidth(), 100);
    cairo_fill(cr);
    cairo_set_source_rgb(cr, 0, 0, 0);
    d.setY(box_y + 6);
    d.para(fmt::format("Coverage of the area: {:.2f} % ({} covered of {})", s.coverage_pct, area(s.covered_m2),
                       area(s.area_m2)),
           12, true);
    d.para(fmt::format("Gaps: {} (plus {} narrower than {:g} m, listed apart)", s.significant_gaps, s.small_gaps,
                       s.gaps.min_width_m),
           10.5, true);
    if (s.infill_error.empty())
        d.para(fmt::format("Infill: {} line(s), {:.0f} m in all; gaps left after flying them as planned: {}",
                           s.infill.plan.lines.size(), s.infill.plan.totalLength_m(), s.infill.after.significantCount()),
               10.5, true);
    else
        d.para("Infill: not planned: " + s.infill_error, 10.5, true);
    int open = 0;
    for (const auto& a : s.alarms) open += a.end_ns ? 0 : 1;
    d.para(fmt::format("Alarm episodes: {} ({} still open at the end of the log); data outages: {}", s.alarms.size(),
                       open, s.outages.size()),
           10.5);
    d.setY(std::max(d.y(), box_y + 100) + 8);

    d.heading("Plan");
    const auto& det = s.detection;
    d.keyValue("Area of interest", area(s.area_m2) + (e.plan() ? "  (" + e.plan()->area_file + ")" : ""));
    d.keyValue("Planned lines", fmt::format("{} lines, {:.2f} km{}", s.line_names.size(), planLength_m(e) / 1000,
                                            e.plan() && !e.plan()->lines_file.empty() ? "  (" + e.plan()->lines_file + ")" : ""));
    d.keyValue("Line spacing", det.line_spacing_m > 0 ? fmt::format("{:g} m", det.line_spacing_m) : "not set");
    d.keyValue("Planned altitude", det.planned_altitude_m > 0 ? fmt::format("{:g} m", det.planned_altitude_m) : "not set");
    d.keyValue("Survey heading", fmt::format("{:.1f} deg (grid)", det.survey_heading_deg));
    d.keyValue("Planned swath", fmt::format("+- {:.1f} m of the coverage class at the planned altitude", det.planned_half_width_m));
    d.keyValue("Altitude limit", det.max_overlap_altitude_m
                                     ? fmt::format("{:.1f} m (highest altitude at which adjacent swaths still meet)", *det.max_overlap_altitude_m)
                                     : std::string("not derived (no line spacing)"));

    d.heading("Cautions");
    d.bullet("The coverage in this report is an estimate from a detection model (section 'Detection model and "
             "assumptions'), the measured noise and the logged navigation. A covered cell means the model predicts "
             "that the configured target class would produce an anomaly above the threshold there; it is not a "
             "guarantee that an object is absent.");
    d.bullet("Clearance of unexploded ordnance follows the project's risk assessment, local regulations and "
             "licensed specialists. This report supports, and does not replace, their decisions.");
    d.bullet("Infill lines are proposals computed from the coverage raster. The vessel's master decides on "
             "navigation and on whether and how they are run.");

    d.heading("Sign-off");
    d.ensure(70);
    const double y0 = d.y();
    const double w = (d.textWidth() - 20) / 2;
    for (int i = 0; i < 2; ++i) {
        const double x = d.left() + i * (w + 20);
        cairo_set_line_width(cr, 0.6);
        cairo_rectangle(cr, x, y0, w, 64);
        cairo_stroke(cr);
        d.font(8.5, true);
        d.text(x + 5, y0 + 12, i == 0 ? "Party chief" : "Client representative");
        d.font(8);
        d.text(x + 5, y0 + 30, "Name:");
        d.text(x + 5, y0 + 44, "Signature:");
        d.text(x + 5, y0 + 58, "Date:");
    }
    d.setY(y0 + 72);
}

void mapPage(PdfDoc& d, const SurveySummary& s, const MapInput& in) {
    // A site wider than tall gets a landscape page.
    const auto window = surveyWindow(in);
    d.newPage(window.max_e - window.min_e > 1.2 * (window.max_n - window.min_n));
    d.heading("Coverage map");
    const double legend_h = 92;
    const double h = d.bottom() - d.y() - legend_h;
    const auto frame = fitFrame(window, d.left(), d.y(), d.textWidth(), h);
    MapOptions o;
    o.pixels_per_unit = 2.5;  // about 180 dpi
    o.line_scale = 0.8;
    drawMap(d.cr(), in, frame, o);
    d.setY(d.y() + h + 6);
    const double y0 = d.y();
    drawLegend(d.cr(), d.left(), y0, 8, false);
    d.font(7.5);
    const double tx = d.left() + (d.landscape() ? 330 : 200);
    double ty = y0 + 7;
    for (const auto& line :
         {fmt::format("Coverage {:.2f} % of the area; {} gap(s), {} small; {} infill line(s).", s.coverage_pct,
                      s.significant_gaps, s.small_gaps, s.infill.plan.lines.size()),
          fmt::format("Cells of {:g} m; each pixel shows the weakest cell under it,", s.cell_size_m),
          std::string("so a gap narrower than a pixel still shows. Outside the area the"),
          std::string("coverage is drawn faded. Grid north up; survey CRS ") + fmt::format("EPSG:{}.", s.epsg)}) {
        d.text(tx, ty, line);
        ty += 10;
    }
    d.setY(y0 + legend_h);
}

void gapMaps(PdfDoc& d, const SurveySummary& s, const MapInput& in) {
    std::vector<const coverage::Gap*> gaps;
    for (const auto& g : s.gaps.gaps)
        if (!g.small && gaps.size() < kMaxGapMaps) gaps.push_back(&g);
    if (gaps.empty()) return;
    const auto close = closers(s);
    const double cell_h = 195;
    for (std::size_t i = 0; i < gaps.size(); ++i) {
        if (i % 6 == 0) {
            d.newPage(false);
            d.heading(i == 0 ? "Gap details" : "Gap details (continued)");
        }
        const auto& g = *gaps[i];
        const double cell_w = (d.textWidth() - 12) / 2;  // after newPage: the map page may be landscape
        const double x = d.left() + static_cast<double>(i % 2) * (cell_w + 12);
        const double y = d.y() + static_cast<double>((i % 6) / 2) * (cell_h + 48);
        MapOptions o;
        o.pixels_per_unit = 2.5;
        o.line_scale = 0.7;
        o.highlight_gap = g.id;
        drawMap(d.cr(), in, fitFrame(gapWindow(g), x, y, cell_w, cell_h), o);
        d.font(7.5, true);
        const auto it = close.find(g.id);
        d.text(x, y + cell_h + 10,
               fmt::format("G{}: {:.0f} m2, {:.1f} m along x {:.1f} m across", g.id, g.area_m2, g.along_length_m,
                           g.across_width_m));
        d.font(7.5);
        d.text(x, y + cell_h + 20,
               fmt::format("centre E {:.1f} N {:.1f}; infill: {}", g.centroid.e_m, g.centroid.n_m,
                           it == close.end() ? std::string("none planned") : join(it->second)));
        {
            // The cause, on at most two lines under the map.
            const std::string cause = causeOf(s, g.id);
            const std::string first = fitText(d, cause, cell_w);
            if (first.size() >= 3 && first.compare(first.size() - 3, 3, "...") == 0) {
                std::size_t cut = first.size() - 3;
                const std::size_t space = cause.rfind(' ', cut);
                if (space != std::string::npos && space > cut / 2) cut = space;
                d.text(x, y + cell_h + 30, cause.substr(0, cut));
                d.text(x, y + cell_h + 40, fitText(d, cause.substr(cut + (cause[cut] == ' ' ? 1 : 0)), cell_w));
            } else {
                d.text(x, y + cell_h + 30, first);
            }
        }
        if (i % 6 == 5 || i + 1 == gaps.size())
            d.setY(d.y() + static_cast<double>((i % 6) / 2 + 1) * (cell_h + 48));
    }
}

void lineTables(PdfDoc& d, const SurveySummary& s) {
    d.newPage(false);
    d.heading("Coverage per planned line");
    d.para(fmt::format("Corridor of each line: the line +- {:.1f} m (half the line spacing). A line flown in several "
                       "runs counts once; coverage from neighbouring lines counts too.",
                       s.line_coverage.empty() ? 0.0 : s.line_coverage.front().corridor_half_width_m),
           8.5);
    std::vector<std::vector<std::string>> rows;
    for (const auto& l : s.line_coverage)
        rows.push_back({l.name, fmt::format("{:.0f}", l.length_m), fmt::format("{:.1f}", l.corridor_covered_pct),
                        fmt::format("{}", l.runs)});
    d.table({{"line", 150}, {"length (m)", 80, true}, {"corridor covered (%)", 110, true}, {"runs", 60, true}}, rows);

    d.heading("Line runs");
    d.para("One row per pass along a planned line (automatic or operator choice). Altitude is the sensor's height "
           "above the seabed; deviation is cross-track from the line (starboard positive); noise is the "
           "fourth-difference estimate of the sensors.",
           8.5);
    rows.clear();
    for (const auto& r : s.runs)
        rows.push_back({fmt::format("{}", r.id), engine::lineName(s, r.line), r.reversed ? "rev" : "fwd",
                        utcClock(r.start_t_ns), fmt::format("{:.1f}", toSeconds(r.end_t_ns - r.start_t_ns) / 60),
                        fmt::format("{:.1f}", r.meanAltitude_m()), fmt::format("{:.1f}", r.worst_altitude_m),
                        fmt::format("{:+.1f}", r.worst_deviation_m), fmt::format("{:.3f}", r.meanNoise_nT()),
                        fmt::format("{:.3f}", r.worst_noise_nT), fmt::format("{:.1f}", r.corridor_covered_pct),
                        fmt::format("{}", r.alarms)});
    d.table({{"run", 26, true},
             {"line", 58},
             {"dir", 24},
             {"start UTC", 46},
             {"minutes", 36, true},
             {"alt mean", 40, true},
             {"alt max", 40, true},
             {"dev max", 40, true},
             {"noise nT", 52, true},
             {"noise max", 52, true},
             {"cov %", 38, true},
             {"alarms", 34, true}},
            rows, 7);
}

// A site: one row per log (session) with its vessel, span of survey time and what it added.
void sessionTable(PdfDoc& d, const SurveySummary& s) {
    if (s.sessions.empty()) return;
    d.heading("Sessions of the site");
    d.para("One row per acquisition session (log), in time order. 'Covered' is what the session covered alone; "
           "'new' is the area that became covered when its coverage was joined after the earlier sessions' "
           "(whole raster, run-in and run-out included). Times are survey (instrument) time.",
           8.5);
    std::vector<std::vector<std::string>> rows;
    for (const auto& x : s.sessions)
        rows.push_back({fmt::format("{}", x.index + 1), x.log, x.vessel.empty() ? "(unnamed)" : x.vessel,
                        x.survey_first_ns > 0 ? utcDateTime(x.survey_first_ns) : "-",
                        x.survey_last_ns > 0 ? utcDateTime(x.survey_last_ns) : "-", fmt::format("{}", x.runs),
                        fmt::format("{:.0f}", x.own_covered_m2), fmt::format("{:.0f}", x.added_m2),
                        x.recomputed ? "recomputed" : ""});
    d.table({{"#", 16, true},
             {"log", 98},
             {"vessel", 70},
             {"from UTC", 78},
             {"to UTC", 78},
             {"runs", 28, true},
             {"covered m2", 50, true},
             {"new m2", 46, true},
             {"", 46}},
            rows, 7);
    for (const auto& m : s.site_messages) d.bullet(m);
}

void alarmPages(PdfDoc& d, const SurveySummary& s) {
    d.heading("Alarms");
    if (s.alarms.empty()) {
        d.para("No alarm episode was raised.", 9);
        return;
    }
    std::vector<std::vector<std::string>> rows;
    for (const auto& [check, g] : groupAlarms(s))
        rows.push_back({checkText(check), fmt::format("{}", g.episodes), fmt::format("{}", g.alarm_level),
                        fmt::format("{}", g.open), duration(g.total_s), g.worstText(check)});
    d.table({{"check", 190}, {"episodes", 50, true}, {"at alarm", 50, true}, {"open", 40, true}, {"total time", 65, true},
             {"worst peak", 110, true}},
            rows);
    constexpr std::size_t kMaxRows = 80;
    d.subheading(s.alarms.size() > kMaxRows
                     ? fmt::format("Episodes (first {} of {}; all in alarms.csv)", kMaxRows, s.alarms.size())
                     : std::string("Episodes"));
    rows.clear();
    for (std::size_t i = 0; i < s.alarms.size() && i < kMaxRows; ++i) {
        const auto& a = s.alarms[i];
        rows.push_back({checkText(a.check), utcClock(a.start_ns), a.end_ns ? utcClock(*a.end_ns) : "open",
                        a.end_ns ? duration(toSeconds(*a.end_ns - a.start_ns)) : "", a.peak_level,
                        checks::checkValueText(a.check, a.peak_value), a.ack_ns ? utcClock(*a.ack_ns) : "no"});
    }
    d.table({{"check", 175}, {"start UTC", 48}, {"end UTC", 48}, {"duration", 48, true}, {"peak level", 45},
             {"peak value", 90, true}, {"acknowledged", 55}},
            rows);
}

// Compact cause for the gap table: the checks near the passes, "none" or "not run".
std::string shortCause(const engine::GapCause& gc) {
    if (gc.passes.empty()) return "not run";
    std::vector<std::string> v;
    for (const auto& c : gc.checks) v.push_back(checkText(c));
    for (const auto& p : gc.passes)
        for (const auto& o : p.outages) v.push_back(o);
    return v.empty() ? "none" : join(v, ", ");
}

void gapPages(PdfDoc& d, const SurveySummary& s) {
    d.heading("Gaps");
    d.para(fmt::format("Connected groups of uncovered cells inside the area (8-connectivity). Gaps narrower than "
                       "{:g} m are flagged small and listed after the others, never dropped. Along/across: extent "
                       "along and across the survey direction ({:.1f} deg grid).",
                       s.gaps.min_width_m, s.gaps.survey_heading_deg),
           8.5);
    const auto close = closers(s);
    std::vector<std::vector<std::string>> rows;
    constexpr std::size_t kMaxRows = 120;
    for (std::size_t i = 0; i < s.gaps.gaps.size() && i < kMaxRows; ++i) {
        const auto& g = s.gaps.gaps[i];
        const auto it = close.find(g.id);
        rows.push_back({fmt::format("G{}", g.id), g.small ? "small" : "", fmt::format("{:.1f}", g.area_m2),
                        fmt::format("{:.1f}", g.centroid.e_m), fmt::format("{:.1f}", g.centroid.n_m),
                        fmt::format("{:.1f}", g.along_length_m), fmt::format("{:.1f}", g.across_width_m),
                        fmt::format("{:.2f}", g.width_m), it == close.end() ? "" : join(it->second),
                        i < s.gap_causes.size() ? shortCause(s.gap_causes[i]) : ""});
    }
    if (rows.empty()) d.para("No gap: every cell of the area is covered.", 9);
    else
        d.table({{"gap", 28}, {"kind", 30}, {"area m2", 42, true}, {"E (m)", 54, true}, {"N (m)", 60, true},
                 {"along m", 38, true}, {"across m", 40, true}, {"width m", 36, true}, {"infill", 66}, {"when passed", 117}},
                rows);
    d.para("When passed: the alarms (and link outages) active while the nearest line run was abreast of the gap "
           "(times estimated along the run at its mean speed, +-15 s); 'none' means no alarm was raised and the "
           "swaths simply did not meet there; 'not run' means no run passed within one line spacing.",
           8);
    if (s.gaps.gaps.size() > kMaxRows)
        d.para(fmt::format("{} more gaps in gaps.csv.", s.gaps.gaps.size() - kMaxRows), 8.5);

    d.heading("Infill plan");
    if (!s.infill_error.empty()) {
        d.para("No infill planned: " + s.infill_error, 9, true);
        return;
    }
    const auto& opt = s.infill.plan.options;
    d.para(fmt::format("{} line(s), {:.0f} m in all, along {:.1f} deg (grid), swath +- {:.1f} m at the planned altitude, "
                       "run-in {:g} m and run-out {:g} m included. Flying them as planned over the present coverage "
                       "leaves {} gap(s). Coordinates in EPSG:{}; the same lines are in infill.gpx, infill.geojson "
                       "and infill.csv.",
                       s.infill.plan.lines.size(), s.infill.plan.totalLength_m(), opt.heading_deg, opt.half_width_m,
                       opt.run_in_m, opt.run_out_m, s.infill.after.significantCount(), s.epsg),
           8.5);
    rows.clear();
    for (const auto& l : s.infill.plan.lines) {
        std::vector<std::string> ids;
        for (int g : l.gap_ids) ids.push_back(fmt::format("G{}", g));
        rows.push_back({l.name, fmt::format("{}", l.rank), fmt::format("{:.1f}", l.start.e_m), fmt::format("{:.1f}", l.start.n_m),
                        fmt::format("{:.1f}", l.end.e_m), fmt::format("{:.1f}", l.end.n_m), fmt::format("{:.0f}", l.length_m),
                        join(ids), fmt::format("{:.0f}", l.area_closed_m2)});
    }
    if (!rows.empty())
        d.table({{"line", 50}, {"rank", 30, true}, {"start E", 58, true}, {"start N", 64, true}, {"end E", 58, true},
                 {"end N", 64, true}, {"length m", 46, true}, {"gaps", 75}, {"area m2", 46, true}},
                rows);
}

void outagePage(PdfDoc& d, const SurveySummary& s) {
    d.heading("Data outages");
    d.para("Link outages are logged by the readers (port lost, then reconnected); silences are the alarm episodes of "
           "the GNSS, magnetometer and altitude silence checks. Samples without data cover nothing.",
           8.5);
    if (s.outages.empty()) {
        d.para("No data outage was logged.", 9);
    } else {
        std::vector<std::vector<std::string>> rows;
        for (const auto& o : s.outages)
            rows.push_back({outageKindText(o.kind), o.source, utcDateTime(o.start_ns), o.end_ns ? utcClock(*o.end_ns) : "open",
                            duration(o.duration_s), o.detail});
        d.table({{"kind", 100}, {"source", 50}, {"start UTC", 90}, {"end UTC", 50}, {"duration", 55, true}, {"detail", 160}},
                rows);
    }
    const auto& v = s.invalid;
    d.subheading("Samples that covered nothing, by reason");
    d.table({{"no field (dropout)", 85, true}, {"no position/heading", 90, true}, {"no altitude", 70, true},
             {"noise warm-up", 70, true}, {"noise too high", 70, true}, {"low signal", 65, true}},
            {{fmt::format("{}", v.no_field), fmt::format("{}", v.pose), fmt::format("{}", v.no_altitude),
              fmt::format("{}", v.noise_warmup), fmt::format("{}", v.noisy), fmt::format("{}", v.low_quality)}});
}

// Anomaly picks and the verification strip (docs/picks.md): every figure from s.picks.
void picksPages(PdfDoc& d, const SurveySummary& s) {
    const auto& p = s.picks;
    d.newPage();
    d.heading("Anomaly picks");
    d.para(std::string("Caution: ") + engine::kPicksCaution + ".", 9, true);
    d.para(std::string("Method: ") + engine::kPicksMethod + fmt::format(" (trend window {:g} s; {} single-sensor peaks).",
                                                                      p.settings.trend_window_s, p.peaks),
           8.5);
    if (!p.enabled) {
        d.para("Picking is switched off ([picks] enabled = false).", 9);
        return;
    }
    std::vector<std::vector<std::string>> rows;
    constexpr std::size_t kMaxRows = 150;
    const auto opt = [](const std::optional<double>& v, const char* f) {
        return v ? fmt::format(fmt::runtime(f), *v) : std::string("-");
    };
    for (std::size_t i = 0; i < p.picks.size() && i < kMaxRows; ++i) {
        const auto& k = p.picks[i];
        std::string runs;
        for (int r : k.runs) runs += (runs.empty() ? "" : ",") + std::to_string(r);
        rows.push_back({fmt::format("P{}", k.id), fmt::format("{:.1f}", k.easting_m), fmt::format("{:.1f}", k.northing_m),
                        fmt::format("{:.1f}", k.peak_nT), fmt::format("{:.1f}", k.width_m), opt(k.burial_m, "{:.1f}"),
                        opt(k.moment_Am2, "{:.3g}"), fmt::format("{:.2f}", k.fit_r2), k.quality, runs});
    }
    if (rows.empty()) d.para("No anomaly reached the live threshold on a line run.", 9);
    else
        d.table({{"pick", 30}, {"E (m)", 60, true}, {"N (m)", 66, true}, {"peak nT", 48, true}, {"width m", 42, true},
                 {"burial m", 50, true}, {"moment Am2", 64, true}, {"fit r2", 36, true}, {"quality", 44}, {"runs", 66}},
                rows);
    if (p.picks.size() > kMaxRows) d.para(fmt::format("{} more picks in picks.csv.", p.picks.size() - kMaxRows), 8.5);

    d.heading("Verification of the detection model");
    const auto& v = p.verification;
    if (v.verdicts.empty()) {
        d.para("No [[known_item]] is configured: the model is not verified on the water for this survey.", 9);
        return;
    }
    for (const auto& c : v.verdicts) d.bullet(c.text, 9);
    for (const auto& u : v.unplaced) d.bullet("not placed (no survey CRS): " + u, 8.5);
    std::vector<std::vector<std::string>> vrows;
    for (const auto& x : v.passes) {
        if (x.predicted_nT < 0.1 * x.threshold_nT && x.measured_nT < x.threshold_nT) continue;  // far passes
        vrows.push_back({x.item, std::to_string(x.run), std::to_string(x.sensor_slot), fmt::format("{:.1f}", x.offset_m),
                         fmt::format("{:.1f}", x.altitude_m), fmt::format("{:.2f}", x.predicted_nT),
                         fmt::format("{:.2f}", x.measured_nT), fmt::format("{:.2f}", x.ratio),
                         x.predicted_detected ? "yes" : "no", x.detected ? "yes" : "no"});
    }
    d.table({{"item", 80}, {"run", 28, true}, {"sensor", 36, true}, {"offset m", 44, true}, {"altitude m", 50, true},
             {"predicted nT", 58, true}, {"measured nT", 58, true}, {"ratio", 36, true}, {"model: seen", 52},
             {"seen", 34}},
            vrows);
    d.para(fmt::format("Verdict over the passes where the model predicts a detection: the median measured/predicted "
                       "within {:.0f} % of 1 confirms the model; below, the model is too optimistic and the claimed "
                       "coverage must shrink (the corrected parameter is given); above, it is conservative. A verdict "
                       "holds for this vessel and this day only. All passes: verification.csv.",
                       detect::kVerificationTolerance * 100.0),
           8);
}

void modelPage(PdfDoc& d, const SurveySummary& s) {
    const auto& det = s.detection;
    d.heading("Detection model and assumptions");
    std::vector<std::vector<std::string>> rows;
    for (const auto& t : det.targets)
        rows.push_back({t.name + (t.name == s.coverage_class ? " (coverage)" : ""), detect::modelName(t.model), targetSize(t),
                        fmt::format("{:g}", t.burial_m)});
    d.table({{"target class", 130}, {"model", 60}, {"size", 250}, {"burial m", 60, true}}, rows);
    // A field nothing used is not printed (a mass-rule-only survey needs none).
    d.keyValue("Ambient field", det.field_used
                                    ? fmt::format("inclination {:g} deg, declination {:g} deg, {:g} nT",
                                                  det.field.inclination_deg, det.field.declination_deg,
                                                  det.field.intensity_nT)
                                    : std::string(detect::kNoFieldNeeded));
    d.keyValue("Threshold", fmt::format("max({:g} nT, {:g} x noise); noise = std of the fourth difference over {} samples / sqrt(70)",
                                        det.settings.min_anomaly_nT, det.settings.k, det.settings.noise_window));
    d.keyValue("Mass-rule constant", fmt::format("C = {:.3f} nT m3/kg", det.settings.mass_rule_C));
    d.keyValue("Sensors", fmt::format("{}", det.sensors));
    d.space(4);
    d.subheading("Assumptions");
    for (const auto& t : det.targets)
        if (t.name == s.coverage_class) d.bullet(std::string("Coverage class model: ") + modelSource(t.model) + ".");
    for (const auto& t : det.targets) {
        if (t.model == detect::ModelKind::MassRule) continue;
        std::string why;
        switch (t.orientation) {
        case detect::Orientation::InducedRemanent:
            why = " A stated bound on the remanent to induced moment ratio (Koenigsberger ratio); ordnance "
                  "measured on a test stand showed remanence mostly smaller than its induced moment (Billings, "
                  "Pasion, Walker and Beran 2006, IEEE TGRS 44(8)); the bound is the survey's assumption, to be "
                  "reviewed against its own test items.";
            break;
        case detect::Orientation::Induced: why = " No remanence is allowed for: the optimistic reading."; break;
        case detect::Orientation::Worst:
            why = " The whole moment in its least favourable direction: blind straight below magnetic north-south "
                  "lines.";
            break;
        }
        d.bullet(fmt::format("Orientation rule in force for {}: {}.{}", t.name, detect::orientationRule(t), why));
    }
    d.bullet("A cell's margin is the peak anomaly of the coverage class at that cross-track offset divided by the "
             "threshold at that sample; the cell is covered when the best margin over all passes is at least 1. "
             "Margins are kept rounded down to 1/16.");
    d.bullet("The swath is swept between consecutive valid samples of each sensor; a sample with no field, no "
             "position or heading, no altitude, noise above its alarm limit or low signal covers nothing.");
    d.bullet("Sensor positions come from the GNSS antenna through the configured offsets and a straight-cable "
             "layback placed along the path the tow point travelled; errors in offsets, cable out or sensor depth "
             "move the painted swath.");
    d.bullet(det.extrapolation_s > 0
                 ? fmt::format("Past the last GNSS fix the position is carried on along the last course for at most "
                               "{:g} s ([vessel] extrapolation_s, set for this survey; the default is 0) and counted as "
                               "covered; beyond {:g} s from a fix a sample covers nothing.",
                               det.extrapolation_s, det.fix_max_age_s)
                 : fmt::format("No position is extrapolated past the last GNSS fix ([vessel] extrapolation_s = 0, the "
                               "default): samples after it are held at the last fix, so no ground beyond it is counted "
                               "as covered; beyond {:g} s from a fix a sample covers nothing.",
                               det.fix_max_age_s));
    d.bullet("Altitude is the sensor's height above the seabed from the altimeter, else water depth minus sensor "
             "depth; the target lies at the configured burial depth below the seabed.");
    d.bullet("Geology, remanent magnetisation and the target's orientation can make a real anomaly smaller than the "
             "model's; margins close to 1 deserve the least trust.");
}

}  // namespace

std::string utcDateTime(TimeNs t) {
    const std::time_t secs = static_cast<std::time_t>(t / 1'000'000'000);
    std::tm tm{};
    gmtime_r(&secs, &tm);
    char buf[32];
    std::strftime(buf, sizeof buf, "%Y-%m-%d %H:%M:%S", &tm);
    return buf;
}

std::string utcClock(TimeNs t) { return utcDateTime(t).substr(11); }

std::string linesCsv(const SurveySummary& s) {
    std::string out = csvRow({"line", "length_m", "corridor_half_width_m", "corridor_covered_pct", "runs"});
    for (const auto& l : s.line_coverage)
        out += csvRow({l.name, fmt::format("{:.2f}", l.length_m), fmt::format("{:.2f}", l.corridor_half_width_m),
                       fmt::format("{:.2f}", l.corridor_covered_pct), fmt::format("{}", l.runs)});
    return out;
}

std::string runsCsv(const SurveySummary& s) {
    std::string out = csvRow({"run", "line", "reversed", "start_utc", "end_utc", "duration_s", "mean_altitude_m",
                              "worst_altitude_m", "worst_deviation_m", "mean_noise_nT", "worst_noise_nT",
                              "corridor_covered_pct", "alarms"});
    for (const auto& r : s.runs)
        out += csvRow({fmt::format("{}", r.id), engine::lineName(s, r.line), r.reversed ? "1" : "0", utcDateTime(r.start_t_ns),
                       utcDateTime(r.end_t_ns), fmt::format("{:.1f}", toSeconds(r.end_t_ns - r.start_t_ns)),
                       fmt::format("{:.2f}", r.meanAltitude_m()), fmt::format("{:.2f}", r.worst_altitude_m),
                       fmt::format("{:.2f}", r.worst_deviation_m), fmt::format("{:.4f}", r.meanNoise_nT()),
                       fmt::format("{:.4f}", r.worst_noise_nT), fmt::format("{:.2f}", r.corridor_covered_pct),
                       fmt::format("{}", r.alarms)});
    return out;
}

std::string alarmsCsv(const SurveySummary& s) {
    std::string out = csvRow({"check", "start_utc", "end_utc", "peak_level", "peak_value", "unit", "ack_utc"});
    for (const auto& a : s.alarms)
        out += csvRow({a.check, utcDateTime(a.start_ns), optTime(a.end_ns), a.peak_level, fmt::format("{:.4f}", a.peak_value),
                       a.unit, optTime(a.ack_ns)});
    return out;
}

std::string outagesCsv(const SurveySummary& s) {
    std::string out = csvRow({"kind", "source", "start_utc", "end_utc", "duration_s", "detail"});
    for (const auto& o : s.outages)
        out += csvRow({o.kind, o.source, utcDateTime(o.start_ns), optTime(o.end_ns), fmt::format("{:.1f}", o.duration_s),
                       o.detail});
    return out;
}

ReportResult writeSiteReport(const SurveySummary& s, const engine::SurveyEngine& e, const std::string& dir,
                             const Progress& progress) {
    namespace fs = std::filesystem;
    const auto step = [&](const std::string& name, double f) {
        if (progress) progress(name, f);
    };
    fs::create_directories(dir);
    ReportResult res;
    const auto path = [&](const std::string& name) { return (fs::path(dir) / name).string(); };
    const auto put = [&](const std::string& name, const std::string& text) {
        coverage::writeTextFile(path(name), text);
        res.files.push_back(path(name));
    };

    step("tables", 0.0);
    put("summary.json", engine::toJson(s).dump(2) + "\n");
    put("lines.csv", linesCsv(s));
    put("runs.csv", runsCsv(s));
    put("alarms.csv", alarmsCsv(s));
    put("outages.csv", outagesCsv(s));
    for (auto& f : engine::writeExports(s, e, dir)) res.files.push_back(std::move(f));

    const auto outlines = coverage::gapOutlines(s.gaps);
    MapInput in;
    in.raster = &e.raster();
    in.area = e.plan() ? &e.plan()->area : nullptr;
    in.lines = e.plan() ? &e.plan()->lines : nullptr;
    in.gaps = &s.gaps;
    in.gap_outlines = &outlines;
    in.infill = &s.infill.plan;

    step("GeoTIFF", 0.1);
    if (s.epsg > 0 && (e.raster().tileCount() > 0 || in.area != nullptr)) {
        res.geotiff = writeMarginGeoTiff(e.raster(), s.epsg, in.area ? coverage::bounds(*in.area) : coverage::Box{1, 1, 0, 0},
                                         path("coverage_margin.tif"));
        res.files.push_back(path("coverage_margin.tif"));
    }

    step("maps", 0.3);
    const std::string name = s.survey_name.empty() ? "survey" : s.survey_name;
    writeMapPng(in, surveyWindow(in), 2400, name + ": coverage " + fmt::format("{:.2f} %", s.coverage_pct),
                path("coverage_map.png"));
    res.files.push_back(path("coverage_map.png"));
    std::size_t maps = 0;
    for (const auto& g : s.gaps.gaps) {
        if (g.small || maps >= kMaxGapMaps) continue;
        ++maps;
        const auto file = path(fmt::format("gap_G{}.png", g.id));
        writeMapPng(in, gapWindow(g), 1000, fmt::format("{}: gap G{}, {:.0f} m2", name, g.id, g.area_m2), file, g.id);
        res.files.push_back(file);
    }

    step("PDF", 0.6);
    {
        PdfDoc d(path("report.pdf"), fmt::format("swathguard site coverage report - {} - coverage {:.2f} %", name, s.coverage_pct));
        frontPage(d, s, e);
        mapPage(d, s, in);
        gapMaps(d, s, in);
        lineTables(d, s);
        lineProfilePages(d, s);
        sessionTable(d, s);
        alarmPages(d, s);
        gapPages(d, s);
        outagePage(d, s);
        modelPage(d, s);
        picksPages(d, s);
        picksMapPage(d, s, in);
        res.pdf_pages = d.pages();
        d.finish();
    }
    res.files.push_back(path("report.pdf"));
    step("done", 1.0);
    return res;
}

}  // namespace sg::report
