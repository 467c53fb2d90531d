// The helm panel: what the surveyor and the helm watch, in large print at the top of the right
// column. First row (largest): the active line, the distance off it with the side, and the
// distance and time to its end. Second row: speed in knots and m/s, coverage of the area, sensor
// altitude, layback and cable out, the GNSS fix by its NMEA 0183 name with satellites and HDOP.
// Third row (live, when infill lines exist): buttons to steer to an infill line or back to the
// planned lines. Last row: the health of each input (rate, age of its latest line, errors) on the
// receive clock.
// Values come from the engine's snapshot (engine::HelmView); unknown ones read "--", never 0.
#include <algorithm>
#include <cmath>
#include <cstdio>
#include <functional>
#include <string>

#include "ui/panel.hpp"
#include "ui/text_fit.hpp"

namespace sg::ui {

namespace {

// 1 international knot = 1852 m per hour.
constexpr double kKnotPerMps = 3600.0 / 1852.0;

std::string distanceText(double m) {
    char buf[32];
    if (std::fabs(m) >= 10000) std::snprintf(buf, sizeof buf, "%.1f km", m / 1000.0);
    else if (std::fabs(m) >= 100) std::snprintf(buf, sizeof buf, "%.0f m", m);
    else std::snprintf(buf, sizeof buf, "%.1f m", m);
    return buf;
}

std::string minutesText(double s) {
    char buf[32];
    const auto total = static_cast<long long>(std::max(0.0, std::round(s)));
    if (total >= 3600) std::snprintf(buf, sizeof buf, "%lld h %02lld min", total / 3600, (total / 60) % 60);
    else std::snprintf(buf, sizeof buf, "%lld min %02lld s", total / 60, total % 60);
    return buf;
}

template <class Put>
void drawLineRow(const engine::HelmView& h, const Palette& pal, float big, float gap, float sc, Put& put) {
    if (h.line.empty()) {
        put(big, pal.text_dim, "No active line", gap);
        return;
    }
    // A label goes to the next row together with its value (never alone at a row's end).
    auto w = [&](const std::string& t) { return ImGui::GetFont()->CalcTextSizeA(big, 1e9f, 0.0f, t.c_str()).x; };
    // An infill line the crew steers to (key I) says so: "INFILL I7".
    put(big * 0.55f, pal.text_dim, h.infill ? "INFILL" : "LINE", 6 * sc, w(h.line));
    put(big, pal.line_active, h.line, gap);
    if (h.off_line_m) {
        const double d = *h.off_line_m;
        // Starboard of the line positive (LineTracker::crossTrack).
        const std::string side = std::fabs(d) < 0.05 ? "on line" : (d > 0 ? "STARBOARD of line" : "PORT of line");
        const std::string off = distanceText(std::fabs(d)) + " " + side;
        put(big * 0.55f, pal.text_dim, "OFF", 6 * sc, w(off));
        put(big, pal.text, off, gap);
    }
    if (h.to_end_m) {
        std::string t = distanceText(*h.to_end_m);
        if (h.to_end_s) t += "  " + minutesText(*h.to_end_s);
        put(big * 0.55f, pal.text_dim, "TO END", 6 * sc, w(t));
        put(big, pal.text, t, gap);
    }
}

// Lays the panel out in amin..amax, drawing into `dl`, or only measuring when `dl` is null.
// `send` (drawing only) takes the crew's steering buttons; null when measuring. Returns the
// height used.
float layoutHelm(const engine::Snapshot* s, const Palette& pal, float sc, ImDrawList* dl, ImVec2 amin, ImVec2 amax,
                 const std::function<void(const engine::UiCommand&)>* send) {
    ImFont* font = ImGui::GetFont();
    const float base = ImGui::GetFontSize();
    float y = amin.y;
    float bottom = amin.y;  // the lowest text drawn (or measured)
    if (!s) {
        if (dl) dl->AddText(font, base * 1.4f, {amin.x, y}, pal.text_dim, "Waiting for survey data");
        return base * 1.4f;
    }
    const auto& h = s->helm;
    float x = amin.x;
    bool measure = false;  // a dry run measures the large row, so it can be made to fit
    float row_h = base;
    // `with_next`: the width of what must stay on the same row after this text (a label's value).
    auto put = [&](float size, ImU32 colour, const std::string& text, float gap_after, float with_next = 0.0f) {
        float w = font->CalcTextSizeA(size, 1e9f, 0.0f, text.c_str()).x;
        // A field wider than the whole panel is shortened (never cut at the edge).
        const std::string shown = !measure && w > amax.x - amin.x ? elideToWidth(text, amax.x - amin.x, font, size) : text;
        if (shown.size() != text.size()) w = font->CalcTextSizeA(size, 1e9f, 0.0f, shown.c_str()).x;
        // Rows wrap rather than run off the panel (large UI scales, narrow windows).
        const float glued = with_next > 0.0f ? w + gap_after + with_next : w;
        if (!measure && x > amin.x && x + std::min(glued, amax.x - amin.x) > amax.x) {
            x = amin.x;
            y += row_h + 2 * sc;
        }
        // Text that would run below the panel is left out (never cut): the last rows go first. A
        // label is left out with its value (the value may be taller: the row's height counts).
        const float needs = with_next > 0.0f ? std::max(size, row_h) : size;
        if (!measure && (!dl || y + needs <= amax.y + 0.5f)) {
            if (dl && !shown.empty()) dl->AddText(font, size, {x, y}, colour, shown.c_str());
            bottom = std::max(bottom, y + size);
        }
        x += w + gap_after;
    };
    const float gap = 22 * sc;
    // Row 1, large: line, off line with side, to the end; as large as fits (at most 2x).
    float big = base * 2.0f;
    for (int pass = 0; pass < 2; ++pass) {
        measure = pass == 0;
        x = amin.x;
        row_h = big;
        drawLineRow(h, pal, big, gap, sc, put);
        if (measure && x - gap > amax.x)
            big = std::max(base * 1.2f, big * (amax.x - amin.x) / (x - gap - amin.x));
    }
    y += big + 4 * sc;
    x = amin.x;
    row_h = base * 1.15f;
    // Row 2: speed, coverage, altitude, layback and cable, GNSS.
    const float mid = base * 1.15f;
    x = amin.x;
    char buf[160];
    if (h.speed_mps) std::snprintf(buf, sizeof buf, "%.1f kn  %.2f m/s", *h.speed_mps * kKnotPerMps, *h.speed_mps);
    else std::snprintf(buf, sizeof buf, "-- kn");
    auto wm = [&](const std::string& t) { return font->CalcTextSizeA(mid, 1e9f, 0.0f, t.c_str()).x; };
    put(mid, pal.text_dim, "speed", 5 * sc, wm(buf));
    put(mid, pal.text, buf, gap);
    // Coverage of the area next: when rows must be left out at large scales it is kept.
    char cov[32];
    if (h.coverage_pct) std::snprintf(cov, sizeof cov, "%.1f %%", *h.coverage_pct);
    else std::snprintf(cov, sizeof cov, "--");
    put(mid, pal.text_dim, "area covered", 5 * sc, wm(cov));
    put(mid, pal.text, cov, gap);
    std::string alt;
    for (const auto& sv : s->sensors) {
        if (!sv.altitude_m) continue;
        std::snprintf(buf, sizeof buf, "%s%s %.1f", alt.empty() ? "" : "  ", sv.name.c_str(), *sv.altitude_m);
        alt += buf;
    }
    const std::string alt_text = alt.empty() ? "--" : alt + " m";
    put(mid, pal.text_dim, "altitude", 5 * sc, wm(alt_text));
    put(mid, pal.text, alt_text, gap);
    const std::string layback = h.layback_m ? distanceText(*h.layback_m) : "--";
    put(mid, pal.text_dim, "layback", 5 * sc, wm(layback));
    put(mid, pal.text, layback, gap);
    const std::string cable = h.cable_out_m ? distanceText(*h.cable_out_m) : "--";
    put(mid, pal.text_dim, "cable out", 5 * sc, wm(cable));
    put(mid, pal.text, cable, gap);
    y += mid + 3 * sc;
    x = amin.x;
    const bool fix_poor = !h.fix_quality || *h.fix_quality == 0 || *h.fix_quality == 6;
    std::string fix = h.fix_name.empty() ? "--" : h.fix_name;
    if (h.satellites) fix += "  " + std::to_string(*h.satellites) + " satellites";
    if (h.hdop) {
        std::snprintf(buf, sizeof buf, "  HDOP %.1f", *h.hdop);
        fix += buf;
    }
    put(mid, pal.text_dim, "GNSS", 5 * sc, wm(fix));
    put(mid, fix_poor ? pal.warn : pal.text, fix, gap);
    y += mid + 3 * sc;

    // Row 3 (live only): the crew's steering choice, as keys I and P do (docs/helm-output.md).
    // A replay shows the log's own choices and takes none.
    x = amin.x;
    if (!s->replay.is_replay && (!s->infill.empty() || h.infill)) {
        row_h = mid;
        put(mid, pal.text_dim, "steer to", 6 * sc);
        const float bh = ImGui::GetFrameHeight();
        const bool room = y + bh <= amax.y + 0.5f;  // buttons that would run below the panel are left out
        auto button = [&](const std::string& label, const engine::UiCommand& cmd) {
            // The width of what is shown: the text before "##" (the button's hidden ID part).
            const float w = ImGui::CalcTextSize(label.c_str(), nullptr, true).x + 2 * ImGui::GetStyle().FramePadding.x;
            if (x + w > amax.x) return false;  // what does not fit is left to key I
            if (dl && send && room) {
                ImGui::SetCursorScreenPos({x, y});
                if (ImGui::SmallButton(label.c_str())) (*send)(cmd);
            }
            x += w + 6 * sc;
            return true;
        };
        ImGui::PushID("steer");
        if (h.infill) button("Planned lines##steer", {engine::UiCommand::Kind::kSteerPlanned, 0, 0.0, {}});
        for (const auto& l : s->infill) {
            if (h.infill && l.name == h.line) continue;
            if (!button(l.name + "##steer", {engine::UiCommand::Kind::kSteerInfill, 0, 0.0, l.name})) break;
        }
        ImGui::PopID();
        if (!dl || room) bottom = std::max(bottom, y + std::max(mid, bh));
        y += std::max(mid, bh) + 3 * sc;
    }

    // Row 4: input health (receive clock).
    x = amin.x;
    const float small = base;
    row_h = small;
    for (const auto& in : s->inputs) {
        const bool stale = in.in_outage || in.age_s < 0 || in.age_s > 2.0;
        char rate[24];
        if (in.rate_hz >= 0) std::snprintf(rate, sizeof rate, "%.0f Hz", in.rate_hz);
        else std::snprintf(rate, sizeof rate, "-- Hz");
        if (in.age_s >= 0)
            std::snprintf(buf, sizeof buf, "%s %s, %.1f s ago, %llu errors%s", in.name.c_str(), rate, in.age_s,
                          static_cast<unsigned long long>(in.errors), in.in_outage ? ", LINK DOWN" : "");
        else std::snprintf(buf, sizeof buf, "%s: nothing received", in.name.c_str());
        put(small, stale ? pal.warn : (in.errors > 0 ? pal.text : pal.text_dim), buf, 16 * sc);
    }
    return bottom - amin.y;
}

class HelmPanel final : public Panel {
public:
    const char* name() const override { return "Helm"; }
    Slot slot() const override { return Slot::kHelm; }

    void draw(FrameContext& ctx, ImVec2 amin, ImVec2 amax) override {
        ImDrawList* dl = ImGui::GetWindowDrawList();
        // The clip reaches a little left of the text (into the window padding): a row starting
        // with a glyph of negative left bearing ("T") is not cut.
        dl->PushClipRect({amin.x - ImGui::GetStyle().WindowPadding.x * 0.5f, amin.y}, amax, true);
        const std::function<void(const engine::UiCommand&)> send = [&](const engine::UiCommand& c) { ctx.send(c); };
        layoutHelm(ctx.snapshot, *ctx.palette, ctx.scale, dl, amin, amax, &send);
        dl->PopClipRect();
    }
};

}  // namespace

std::unique_ptr<Panel> makeHelmPanel() { return std::make_unique<HelmPanel>(); }

// Height the helm panel needs for `s` at `width` pixels of content and the current font (the
// screen carves it off the plots): the rows as they wrap at this width, plus the window padding.
float helmPanelHeight(const engine::Snapshot* s, float width, float scale) {
    const ImVec2 pad = ImGui::GetStyle().WindowPadding;
    const float inner = std::max(1.0f, width - 2 * pad.x);
    return layoutHelm(s, paletteFor(false), scale, nullptr, {0, 0}, {inner, 1e6f}, nullptr) + 2 * pad.y + 2 * scale;
}

}  // namespace sg::ui
