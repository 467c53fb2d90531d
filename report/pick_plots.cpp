// The picks map and the line profiles of the report; see pick_plots.hpp.
#include "report/pick_plots.hpp"

#include <algorithm>
#include <cmath>
#include <map>
#include <string>

#include <fmt/format.h>

#include "report/site_report.hpp"

namespace sg::report {

namespace {

using engine::SurveySummary;

void setRgb(cairo_t* cr, colour::Rgb8 c) { cairo_set_source_rgb(cr, c.r / 255.0, c.g / 255.0, c.b / 255.0); }

// The caution every page with picks carries (docs/picks.md).
constexpr const char* kNotAClearance =
    "A pick list is not a clearance: the project's risk assessment, local regulations and licensed specialists "
    "decide what is investigated and what is cleared. Picks are anomalies a model fitted; depths and moments are "
    "estimates.";

// Lines of `text` no wider than `width` at the current font.
std::vector<std::string> wrapText(PdfDoc& d, const std::string& text, double width) {
    std::vector<std::string> out;
    std::string line, word;
    for (std::size_t i = 0; i <= text.size(); ++i) {
        if (i < text.size() && text[i] != ' ') {
            word += text[i];
            continue;
        }
        if (word.empty()) continue;
        const std::string candidate = line.empty() ? word : line + " " + word;
        if (!line.empty() && d.textAdvance(candidate) > width) {
            out.push_back(line);
            line = word;
        } else {
            line = candidate;
        }
        word.clear();
    }
    if (!line.empty()) out.push_back(line);
    return out;
}

// The map page's frame height is the page less the heading and this legend strip.
constexpr double kMapTop_pt = PdfDoc::kMargin + 34.0;
constexpr double kLegend_pt = 96.0;

}  // namespace

// ---- picks map ---------------------------------------------------------------------------------

PicksMapLayout picksMapLayout(const MapInput& in) {
    PicksMapLayout l;
    const auto window = surveyWindow(in);
    // As the coverage map: a site wider than tall gets a landscape page.
    l.landscape = window.max_e - window.min_e > 1.2 * (window.max_n - window.min_n);
    const double w = l.landscape ? PdfDoc::kHeight : PdfDoc::kWidth;
    const double h = l.landscape ? PdfDoc::kWidth : PdfDoc::kHeight;
    const double bottom = h - PdfDoc::kMargin - 14.0;
    l.frame = fitFrame(window, PdfDoc::kMargin, kMapTop_pt, w - 2 * PdfDoc::kMargin, bottom - kMapTop_pt - kLegend_pt);
    return l;
}

void drawPickMarker(cairo_t* cr, double x, double y, double half, const std::string& label) {
    // Diamond: a shape no other map symbol uses (gaps are outlines, infill dashed lines).
    const auto diamond = [&] {
        cairo_move_to(cr, x, y - half);
        cairo_line_to(cr, x + half, y);
        cairo_line_to(cr, x, y + half);
        cairo_line_to(cr, x - half, y);
        cairo_close_path(cr);
    };
    diamond();
    cairo_set_source_rgb(cr, 1, 1, 1);
    cairo_set_line_width(cr, 0.5 * half);
    cairo_stroke_preserve(cr);
    setRgb(cr, colour::kLight.pick);
    cairo_fill(cr);
    if (label.empty()) return;
    cairo_select_font_face(cr, "DejaVu Sans", CAIRO_FONT_SLANT_NORMAL, CAIRO_FONT_WEIGHT_BOLD);
    cairo_set_font_size(cr, 1.6 * half);
    // A white halo keeps the label readable over any margin class.
    cairo_move_to(cr, x + 1.2 * half, y - 0.5 * half);
    cairo_text_path(cr, label.c_str());
    cairo_set_source_rgb(cr, 1, 1, 1);
    cairo_set_line_width(cr, 0.5 * half);
    cairo_stroke_preserve(cr);
    setRgb(cr, colour::kLight.pick);
    cairo_fill(cr);
}

void picksMapPage(PdfDoc& d, const SurveySummary& s, const MapInput& in) {
    const auto& p = s.picks;
    if (!p.enabled || p.picks.empty()) return;
    const auto l = picksMapLayout(in);
    d.newPage(l.landscape);
    d.heading("Anomaly picks: map");
    MapOptions o;
    o.pixels_per_unit = 2.5;
    o.line_scale = 0.8;
    o.label_infill = false;  // the picks' labels have the room
    drawMap(d.cr(), in, l.frame, o);
    auto* cr = d.cr();
    cairo_save(cr);
    cairo_rectangle(cr, l.frame.x, l.frame.y, l.frame.w, l.frame.h);
    cairo_clip(cr);
    for (const auto& k : p.picks)
        drawPickMarker(cr, l.frame.toX(k.easting_m), l.frame.toY(k.northing_m), kPickMarker_pt, fmt::format("P{}", k.id));
    cairo_restore(cr);

    // Legend: the map's own, then the pick symbol and the caution beside it.
    const double y0 = l.frame.y + l.frame.h + 8;
    drawLegend(cr, d.left(), y0, 8, false);
    const double tx = d.left() + (d.landscape() ? 330 : 200);
    drawPickMarker(cr, tx + 4, y0 + 4, kPickMarker_pt, "");
    d.font(7.5);
    cairo_set_source_rgb(cr, 0.1, 0.1, 0.1);
    d.text(tx + 12, y0 + 7,
           fmt::format("anomaly pick P<id> ({} in all; positions from the fit, table 'Anomaly picks')", p.picks.size()));
    d.font(7.5, true);
    double ty = y0 + 20;
    for (const auto& line : wrapText(d, kNotAClearance, d.left() + d.textWidth() - tx)) {
        d.text(tx, ty, line);
        ty += 9.5;
    }
    d.font(7.5);
    d.text(tx, ty + 2, fmt::format("Grid north up; survey CRS EPSG:{}; coverage class '{}'.", s.epsg, s.coverage_class));
    d.setY(d.bottom());
}

// ---- line profiles -----------------------------------------------------------------------------

namespace {

constexpr double kBlock_pt = 226.0;      // one line's block
constexpr double kBlocksTop_pt = PdfDoc::kMargin + 70.0;  // under the heading and the key
constexpr double kLabelColumn_pt = 62.0;  // panel names and y ticks left of the frames
constexpr double kPanel_pt = 40.0, kPanelGap_pt = 6.0, kTitle_pt = 22.0;

struct Extent {
    double lo = 0, hi = 0;
    bool any = false;
    void add(double v) {
        lo = any ? std::min(lo, v) : v;
        hi = any ? std::max(hi, v) : v;
        any = true;
    }
};

const char* panelName(int k) {
    switch (k) {
    case kAltitude: return "altitude m";
    case kDeviation: return "deviation m";
    case kNoise: return "noise nT";
    default: return "pick / thr.";
    }
}

// A "nice" tick step (1, 2 or 5 x 10^n) giving about `n` ticks over `span`.
double tickStep(double span, int n) {
    const double raw = span / std::max(1, n);
    const double mag = std::pow(10.0, std::floor(std::log10(std::max(raw, 1e-9))));
    for (double m : {1.0, 2.0, 5.0, 10.0})
        if (m * mag >= raw) return m * mag;
    return 10 * mag;
}

}  // namespace

std::vector<LineBlock> lineProfileLayout(const SurveySummary& s) {
    std::map<int, std::vector<const engine::RunProfileSummary*>> by_line;
    for (const auto& rp : s.profiles)
        if (!rp.profile.bins.empty()) by_line[rp.profile.line].push_back(&rp);
    std::vector<LineBlock> out;
    const auto& lim = s.profile_limits;
    for (const auto& [line, runs] : by_line) {
        LineBlock b;
        b.line = line;
        b.runs = runs;
        const int k = static_cast<int>(out.size());
        b.page = k / kLinesPerPage;
        b.top = kBlocksTop_pt + (k % kLinesPerPage) * kBlock_pt;
        Extent along, alt, dev, noise, snr;
        along.add(0.0);
        if (line >= 0 && static_cast<std::size_t>(line) < s.line_coverage.size())
            along.add(s.line_coverage[static_cast<std::size_t>(line)].length_m);
        for (const auto* r : runs) {
            for (const auto& bin : r->profile.bins) {
                along.add(bin.along_m);
                if (bin.altitude_m) alt.add(*bin.altitude_m);
                if (bin.deviation_m) dev.add(std::abs(*bin.deviation_m));
                if (bin.noise_nT) noise.add(*bin.noise_nT);
            }
            for (const auto& pk : r->picks) {
                along.add(pk.along_m);
                snr.add(pk.snr);
            }
        }
        b.along_lo = along.lo;
        b.along_hi = std::max(along.hi, along.lo + 1.0);
        // Every range includes its alarm limit, so the limits are always drawn.
        const auto top = [](const Extent& e, const checks::Limits& l, double floor) {
            double v = std::max(floor, e.any ? e.hi : 0.0);
            if (l.enabled) v = std::max(v, l.alarm);
            return 1.15 * v;
        };
        const double x = PdfDoc::kMargin + kLabelColumn_pt;
        const double w = PdfDoc::kWidth - 2 * PdfDoc::kMargin - kLabelColumn_pt - 4;
        for (int i = 0; i < kPanelCount; ++i) {
            auto& pn = b.panels[static_cast<std::size_t>(i)];
            pn.x = x;
            pn.w = w;
            pn.h = kPanel_pt;
            pn.y = b.top + kTitle_pt + i * (kPanel_pt + kPanelGap_pt);
        }
        b.panels[kAltitude].lo = 0;
        b.panels[kAltitude].hi = top(alt, lim.altitude, 1.0);
        const double dmax = top(dev, lim.deviation, 1.0);
        b.panels[kDeviation].lo = -dmax;
        b.panels[kDeviation].hi = dmax;
        b.panels[kNoise].lo = 0;
        b.panels[kNoise].hi = top(noise, lim.noise, 0.05);
        b.panels[kPicks].lo = 0;
        b.panels[kPicks].hi = 1.15 * std::max(2.0, snr.any ? snr.hi : 0.0);
        out.push_back(std::move(b));
    }
    return out;
}

int lineProfilePages(PdfDoc& d, const SurveySummary& s) {
    const auto blocks = lineProfileLayout(s);
    if (blocks.empty()) return 0;
    auto* cr = d.cr();
    int first_page = 0;
    const auto key = [&](bool first) {
        d.heading(first ? "Line profiles" : "Line profiles (continued)");
        // The key: run colours, limits, pick stems; then how to read the panels.
        double x = d.left();
        const double y = PdfDoc::kMargin + 40.0;
        d.font(7.5);
        const auto item = [&](colour::Rgb8 c, bool dashed, double width, const std::string& label) {
            setRgb(cr, c);
            cairo_set_line_width(cr, width);
            const double dash[] = {3.0, 2.0};
            if (dashed) cairo_set_dash(cr, dash, 2, 0);
            cairo_move_to(cr, x, y - 2.5);
            cairo_line_to(cr, x + 16, y - 2.5);
            cairo_stroke(cr);
            cairo_set_dash(cr, nullptr, 0, 0);
            cairo_set_source_rgb(cr, 0.1, 0.1, 0.1);
            d.text(x + 19, y, label);
            x += 19 + d.textAdvance(label) + 12;
        };
        item(kRunTrace[0], false, 1.2, "1st run");
        item(kRunTrace[1], false, 1.2, "2nd run");
        item(kRunTrace[2], false, 1.2, "3rd run");
        item(kLimitColour, false, 0.9, "alarm limit");
        item(kLimitColour, true, 0.7, "warn limit");
        drawPickMarker(cr, x + 4, y - 2.5, 3.2, "");
        cairo_set_source_rgb(cr, 0.1, 0.1, 0.1);
        d.text(x + 11, y, "pick (its peak / the live threshold)");
        d.font(7);
        d.text(d.left(), y + 11,
               "Against the distance along the planned line from its start (m), every run of the line on one axis. "
               "Each point is the worst value within 1 m");
        d.text(d.left(), y + 20,
               "(highest altitude, largest deviation, highest noise of any sensor). Deviation: starboard of the "
               "line's direction +. Times: survey clock, UTC.");
    };
    std::string title;
    for (std::size_t i = 0; i < blocks.size(); ++i) {
        const auto& b = blocks[i];
        if (i % kLinesPerPage == 0) {
            d.newPage(false);
            if (i == 0) first_page = d.pages();
            key(i == 0);
        }
        // Heading: the line, then each run with its direction and survey-clock times.
        std::string runs_text;
        for (std::size_t r = 0; r < b.runs.size(); ++r) {
            const int id = b.runs[r]->profile.run;
            if (id < 0 || static_cast<std::size_t>(id) >= s.runs.size()) continue;
            const auto& run = s.runs[static_cast<std::size_t>(id)];
            runs_text += fmt::format("{}run {} {} {}-{}", runs_text.empty() ? "" : ";  ", run.id,
                                     run.reversed ? "rev" : "fwd", utcClock(run.start_t_ns), utcClock(run.end_t_ns));
        }
        d.font(9, true);
        cairo_set_source_rgb(cr, 0.08, 0.20, 0.30);
        const std::string name = engine::lineName(s, b.line);
        d.text(d.left(), b.top + 10, name);
        const double nx = d.left() + d.textAdvance(name) + 10;
        d.font(7.5);
        cairo_set_source_rgb(cr, 0.1, 0.1, 0.1);
        std::string day;
        if (!b.runs.empty() && !b.runs.front()->profile.bins.empty())
            day = utcDateTime(b.runs.front()->profile.bins.front().t_ns).substr(0, 10) + "  ";
        std::string head = day + runs_text;
        while (head.size() > 4 && d.textAdvance(head) > d.left() + d.textWidth() - nx) head = head.substr(0, head.size() - 4) + "~";
        d.text(nx, b.top + 10, head);

        const auto& lim = s.profile_limits;
        for (int k = 0; k < kPanelCount; ++k) {
            const auto& pn = b.panels[static_cast<std::size_t>(k)];
            // Frame and ticks.
            cairo_set_source_rgb(cr, 0.62, 0.62, 0.62);
            cairo_set_line_width(cr, 0.5);
            cairo_rectangle(cr, pn.x, pn.y, pn.w, pn.h);
            cairo_stroke(cr);
            d.font(7, true);
            cairo_set_source_rgb(cr, 0.1, 0.1, 0.1);
            d.text(d.left(), pn.y + 9, panelName(k));
            d.font(6);
            const double step = tickStep(pn.hi - pn.lo, 3);
            for (double v = std::ceil(pn.lo / step) * step; v <= pn.hi + 1e-9; v += step) {
                const double y = pn.toY(v);
                const std::string t = fmt::format("{:g}", std::abs(v) < 1e-9 ? 0.0 : v);
                d.text(pn.x - 3 - d.textAdvance(t), y + 2, t);
                cairo_set_source_rgb(cr, 0.85, 0.85, 0.85);
                cairo_set_line_width(cr, 0.3);
                cairo_move_to(cr, pn.x, y);
                cairo_line_to(cr, pn.x + pn.w, y);
                cairo_stroke(cr);
                cairo_set_source_rgb(cr, 0.1, 0.1, 0.1);
            }
            cairo_save(cr);
            cairo_rectangle(cr, pn.x, pn.y, pn.w, pn.h);
            cairo_clip(cr);
            // Limits: alarm solid, warn dashed; deviation on both sides of the line.
            const auto limitLine = [&](double v, bool warn) {
                setRgb(cr, kLimitColour);
                cairo_set_line_width(cr, warn ? 0.7 : 0.9);
                const double dash[] = {3.0, 2.0};
                if (warn) cairo_set_dash(cr, dash, 2, 0);
                cairo_move_to(cr, pn.x, pn.toY(v));
                cairo_line_to(cr, pn.x + pn.w, pn.toY(v));
                cairo_stroke(cr);
                cairo_set_dash(cr, nullptr, 0, 0);
            };
            const checks::Limits* l = k == kAltitude ? &lim.altitude : k == kDeviation ? &lim.deviation
                                                   : k == kNoise     ? &lim.noise
                                                                     : nullptr;
            if (l && l->enabled) {
                limitLine(l->warn, true);
                limitLine(l->alarm, false);
                if (k == kDeviation) {
                    limitLine(-l->warn, true);
                    limitLine(-l->alarm, false);
                }
            }
            if (k == kPicks) limitLine(1.0, false);  // the live threshold
            if (k == kDeviation) {
                cairo_set_source_rgb(cr, 0.55, 0.55, 0.55);
                cairo_set_line_width(cr, 0.4);
                cairo_move_to(cr, pn.x, pn.toY(0));
                cairo_line_to(cr, pn.x + pn.w, pn.toY(0));
                cairo_stroke(cr);
            }
            // Traces, one per run; a break where a value is missing or the bins jump (> 5 m).
            for (std::size_t r = 0; r < b.runs.size(); ++r) {
                const auto& rp = *b.runs[r];
                if (k == kPicks) {
                    for (const auto& pk : rp.picks) {
                        const double x = b.toX(pk.along_m);
                        setRgb(cr, kRunTrace[r % kRunTrace.size()]);
                        cairo_set_line_width(cr, 0.8);
                        cairo_move_to(cr, x, pn.toY(0));
                        cairo_line_to(cr, x, pn.toY(std::min(pk.snr, pn.hi)));
                        cairo_stroke(cr);
                        drawPickMarker(cr, x, pn.toY(std::min(pk.snr, pn.hi)), 3.2, fmt::format("P{}", pk.id));
                    }
                    continue;
                }
                setRgb(cr, kRunTrace[r % kRunTrace.size()]);
                cairo_set_line_width(cr, 1.2);
                cairo_set_line_join(cr, CAIRO_LINE_JOIN_ROUND);
                bool pen = false;
                double last_along = 0;
                for (const auto& bin : rp.profile.bins) {
                    const auto& v = k == kAltitude ? bin.altitude_m : k == kDeviation ? bin.deviation_m : bin.noise_nT;
                    if (!v || (pen && std::abs(bin.along_m - last_along) > 5.0)) {
                        if (pen) cairo_stroke(cr);
                        pen = false;
                        if (!v) continue;
                    }
                    const double x = b.toX(bin.along_m), y = pn.toY(std::clamp(*v, pn.lo, pn.hi));
                    if (pen) cairo_line_to(cr, x, y);
                    else cairo_move_to(cr, x, y);
                    pen = true;
                    last_along = bin.along_m;
                }
                if (pen) cairo_stroke(cr);
            }
            cairo_restore(cr);
        }
        // The shared along-track axis, under the last panel.
        const auto& last = b.panels[kPanelCount - 1];
        d.font(6);
        cairo_set_source_rgb(cr, 0.1, 0.1, 0.1);
        const double step = tickStep(b.along_hi - b.along_lo, 8);
        for (double a = std::ceil(b.along_lo / step) * step; a <= b.along_hi + 1e-9; a += step) {
            const std::string t = fmt::format("{:g}", std::abs(a) < 1e-9 ? 0.0 : a);
            d.text(b.toX(a) - d.textAdvance(t) / 2, last.y + last.h + 8, t);
        }
        d.text(d.left(), last.y + last.h + 8, "along m");
    }
    d.setY(d.bottom());
    return first_page;
}

}  // namespace sg::report
