// The helm panel: what the surveyor and the helm watch, in large print at the top of the right
// column. First row (largest): the active line, the distance off it with the side, and the
// distance and time to its end. Second row: speed in knots and m/s, sensor altitude, layback and
// cable out, the GNSS fix by its NMEA 0183 name with satellites and HDOP, coverage of the area.
// Third row: the health of each input (rate, age of its latest line, errors) on the receive clock.
// Values come from the engine's snapshot (engine::HelmView); unknown ones read "--", never 0.
#include <algorithm>
#include <cmath>
#include <cstdio>
#include <string>

#include "ui/panel.hpp"

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
    // An infill line the crew steers to (key I) says so: "INFILL I7".
    put(big * 0.55f, pal.text_dim, h.infill ? "INFILL" : "LINE", 6 * sc);
    put(big, pal.line_active, h.line, gap);
    if (h.off_line_m) {
        const double d = *h.off_line_m;
        // Starboard of the line positive (LineTracker::crossTrack).
        const std::string side = std::fabs(d) < 0.05 ? "on line" : (d > 0 ? "STARBOARD of line" : "PORT of line");
        put(big * 0.55f, pal.text_dim, "OFF", 6 * sc);
        put(big, pal.text, distanceText(std::fabs(d)) + " " + side, gap);
    }
    if (h.to_end_m) {
        put(big * 0.55f, pal.text_dim, "TO END", 6 * sc);
        std::string t = distanceText(*h.to_end_m);
        if (h.to_end_s) t += "  " + minutesText(*h.to_end_s);
        put(big, pal.text, t, gap);
    }
}

class HelmPanel final : public Panel {
public:
    const char* name() const override { return "Helm"; }
    Slot slot() const override { return Slot::kHelm; }

    void draw(FrameContext& ctx, ImVec2 amin, ImVec2 amax) override {
        const engine::Snapshot* s = ctx.snapshot;
        const Palette& pal = *ctx.palette;
        const float sc = ctx.scale;
        ImDrawList* dl = ImGui::GetWindowDrawList();
        dl->PushClipRect(amin, amax, true);
        ImFont* font = ImGui::GetFont();
        const float base = ImGui::GetFontSize();
        float y = amin.y;
        if (!s) {
            dl->AddText(font, base * 1.4f, {amin.x, y}, pal.text_dim, "Waiting for survey data");
            dl->PopClipRect();
            return;
        }
        const auto& h = s->helm;
        float x = amin.x;
        bool measure = false;  // a dry run measures the large row, so it can be made to fit
        float row_h = base;
        auto put = [&](float size, ImU32 colour, const std::string& text, float gap_after) {
            const float w = font->CalcTextSizeA(size, 1e9f, 0.0f, text.c_str()).x;
            // Rows wrap rather than run off the panel (large UI scales, narrow windows).
            if (!measure && x > amin.x && x + w > amax.x) {
                x = amin.x;
                y += row_h + 2 * sc;
            }
            if (!measure) dl->AddText(font, size, {x, y}, colour, text.c_str());
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
        // Row 2: speed, altitude, layback and cable, GNSS, coverage.
        const float mid = base * 1.15f;
        x = amin.x;
        char buf[160];
        if (h.speed_mps) std::snprintf(buf, sizeof buf, "%.1f kn  %.2f m/s", *h.speed_mps * kKnotPerMps, *h.speed_mps);
        else std::snprintf(buf, sizeof buf, "-- kn");
        put(mid, pal.text_dim, "speed", 5 * sc);
        put(mid, pal.text, buf, gap);
        std::string alt;
        for (const auto& sv : s->sensors) {
            if (!sv.altitude_m) continue;
            std::snprintf(buf, sizeof buf, "%s%s %.1f", alt.empty() ? "" : "  ", sv.name.c_str(), *sv.altitude_m);
            alt += buf;
        }
        put(mid, pal.text_dim, "altitude", 5 * sc);
        put(mid, pal.text, alt.empty() ? "--" : alt + " m", gap);
        put(mid, pal.text_dim, "layback", 5 * sc);
        put(mid, pal.text, h.layback_m ? distanceText(*h.layback_m) : "--", gap);
        put(mid, pal.text_dim, "cable out", 5 * sc);
        put(mid, pal.text, h.cable_out_m ? distanceText(*h.cable_out_m) : "--", gap);
        y += mid + 3 * sc;
        x = amin.x;
        put(mid, pal.text_dim, "GNSS", 5 * sc);
        const bool fix_poor = !h.fix_quality || *h.fix_quality == 0 || *h.fix_quality == 6;
        std::string fix = h.fix_name.empty() ? "--" : h.fix_name;
        if (h.satellites) fix += "  " + std::to_string(*h.satellites) + " satellites";
        if (h.hdop) {
            std::snprintf(buf, sizeof buf, "  HDOP %.1f", *h.hdop);
            fix += buf;
        }
        put(mid, fix_poor ? pal.warn : pal.text, fix, gap);
        put(mid, pal.text_dim, "area covered", 5 * sc);
        if (h.coverage_pct) std::snprintf(buf, sizeof buf, "%.1f %%", *h.coverage_pct);
        else std::snprintf(buf, sizeof buf, "--");
        put(mid, pal.text, buf, gap);
        y += mid + 3 * sc;

        // Row 3 (live only): the crew's steering choice, as keys I and P do (docs/helm-output.md).
        // A replay shows the log's own choices and takes none.
        x = amin.x;
        if (!s->replay.is_replay && (!s->infill.empty() || h.infill)) {
            put(mid, pal.text_dim, "steer to", 6 * sc);
            const float bh = ImGui::GetFrameHeight();
            auto button = [&](const std::string& label, const engine::UiCommand& cmd) {
                const float w = ImGui::CalcTextSize(label.c_str()).x + 2 * ImGui::GetStyle().FramePadding.x;
                if (x + w > amax.x) return false;  // what does not fit is left to key I
                ImGui::SetCursorScreenPos({x, y});
                if (ImGui::SmallButton(label.c_str())) ctx.send(cmd);
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
        dl->PopClipRect();
    }
};

}  // namespace

std::unique_ptr<Panel> makeHelmPanel() { return std::make_unique<HelmPanel>(); }

// Height the helm panel needs at font size `font_px` (the screen carves it off the plots).
float helmPanelHeight(float font_px, float scale) { return font_px * (2.0f + 1.15f * 2.0f + 1.3f + 2.2f) + 29.0f * scale; }

}  // namespace sg::ui
