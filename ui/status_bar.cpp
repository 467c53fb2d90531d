// Toolbar (palette, UI scale) and status bar (safety caution, survey time, CRS, health items,
// age of the latest state). The caution is always on screen: coverage is a model's estimate.
#include <chrono>
#include <cmath>
#include <cstdio>
#include <string>
#include <vector>

#include "ui/panel.hpp"
#include "ui/plot_draw.hpp"
#include "ui/screen.hpp"
#include "ui/text_fit.hpp"

namespace sg::ui {

const char* defaultCaution() {
    return "Coverage is a model's estimate. UXO clearance follows local regulations and licensed "
           "specialists. The master decides on navigation.";
}

namespace {

// Toolbar and status bar fields drop by priority when the strip is narrow (large UI scales): the
// survey clock and the safety caution always stay (the caution shortened, whole on hover).
constexpr int kKeep = 90;

float spacingX() { return ImGui::GetStyle().ItemSpacing.x; }

class Toolbar final : public Panel {
public:
    const char* name() const override { return "Toolbar"; }
    Slot slot() const override { return Slot::kToolbar; }

    void draw(FrameContext& ctx, ImVec2 amin, ImVec2 amax) override {
        ScreenSettings& set = *ctx.settings;
        const engine::Snapshot* s = ctx.snapshot;
        const float frame_extra = ImGui::GetStyle().FramePadding.x * 2;
        const float palette_w = ImGui::CalcTextSize("night").x + ImGui::GetFrameHeight() + frame_extra;
        const float scale_w = ImGui::CalcTextSize("0.00").x + 60 * ctx.scale;
        // Survey time: the instruments' clock, the same as the plots, alarms and runs.
        // 1 kn = 1852 m / 3600 s.
        std::string clock, motion;
        if (s) {
            double heading_deg = std::fmod(s->heading_rad * 180.0 / 3.14159265358979323846, 360.0);
            if (heading_deg < 0) heading_deg += 360.0;
            clock = "survey time " + formatUtcTime(s->now_s) + " UTC";
            char buf[96];
            std::snprintf(buf, sizeof buf, "speed %.1f kn (%.1f m/s)   heading %03.0f deg", s->speed_mps * 3600.0 / 1852.0,
                          s->speed_mps, heading_deg);
            motion = buf;
        }
        enum Field { kName, kPaletteLabel, kPalette, kScaleLabel, kScale, kClock, kMotion, kKeys };
        auto tw = [](const char* t) { return ImGui::CalcTextSize(t).x; };
        const std::vector<StripField> fields = {
            {tw("swathguard"), 10},       {tw("palette"), 20}, {palette_w, 70},           {tw("UI scale"), 20},
            {scale_w, 70},                {s ? tw(clock.c_str()) : 0.0f, 100},
            {s ? tw(motion.c_str()) : 0.0f, 50}, {s ? tw("F1: keys") : 0.0f, 30},
        };
        const auto shown = fitStrip(fields, amax.x - amin.x, spacingX(), kKeep);
        bool first = true;
        auto next = [&] {
            if (!first) ImGui::SameLine();
            first = false;
        };
        if (shown[kName]) {
            next();
            ImGui::TextUnformatted("swathguard");
        }
        if (shown[kPaletteLabel]) {
            next();
            ImGui::TextUnformatted("palette");
        }
        if (shown[kPalette]) {
            next();
            int pal = set.night ? 1 : 0;
            ImGui::SetNextItemWidth(palette_w);
            if (ImGui::Combo("##palette", &pal, "day\0night\0")) {
                set.night = pal == 1;
                ctx.settings_changed = true;
            }
            if (!shown[kPaletteLabel] && ImGui::IsItemHovered()) ImGui::SetTooltip("palette");
        }
        if (shown[kScaleLabel]) {
            next();
            ImGui::TextUnformatted("UI scale");
        }
        if (shown[kScale]) {
            next();
            ImGui::SetNextItemWidth(scale_w);
            // Edited on a copy and applied on release: the font is rebuilt once, not on every drag step.
            if (!m_editing) m_scale = set.ui_scale;
            ImGui::SliderFloat("##ui_scale", &m_scale, 0.75f, 3.0f, "%.2f");
            m_editing = ImGui::IsItemActive();
            if (ImGui::IsItemDeactivatedAfterEdit()) {
                set.ui_scale = m_scale;
                ctx.settings_changed = true;
            }
            if (!shown[kScaleLabel] && ImGui::IsItemHovered()) ImGui::SetTooltip("UI scale");
        }
        if (!s) return;
        next();
        ImGui::TextUnformatted(clock.c_str());
        if (shown[kMotion]) {
            next();
            ImGui::TextUnformatted(motion.c_str());
        }
        if (shown[kKeys]) {
            next();
            ImGui::TextDisabled("F1: keys");
        }
    }

private:
    float m_scale = 1.0f;
    bool m_editing = false;
};

class StatusBar final : public Panel {
public:
    const char* name() const override { return "Status"; }
    Slot slot() const override { return Slot::kStatus; }

    void draw(FrameContext& ctx, ImVec2 amin, ImVec2 amax) override {
        const Palette& pal = *ctx.palette;
        const engine::Snapshot* s = ctx.snapshot;
        // Staleness: how long since the screen saw a new snapshot (wall clock).
        if (s && s->seq != m_last_seq) {
            m_last_seq = s->seq;
            m_last_change_s = ctx.wall_s;
        }
        const double age = ctx.wall_s - m_last_change_s;
        char buf[64];
        std::string state;
        ImU32 state_colour = pal.ok;
        if (!s) {
            state = "NO SURVEY STATE YET";
            state_colour = pal.warn;
        } else if (age > 3.0 && !(s->replay.is_replay && s->replay.paused)) {
            std::snprintf(buf, sizeof buf, "STATE NOT UPDATED FOR %.0f s", age);
            state = buf;
            state_colour = pal.warn;
        } else {
            state = s->replay.is_replay ? "replay" : "live";
        }
        const std::string caution =
            std::string("CAUTION: ") + ((s && !s->cautions.empty()) ? s->cautions.c_str() : defaultCaution());
        // Fields in screen order; the caution takes what is left (at least its first words).
        std::vector<std::string> texts = {state, caution};
        std::vector<StripField> fields = {{ImGui::CalcTextSize(state.c_str()).x, 100},
                                          {ImGui::CalcTextSize("CAUTION: Coverage is a model's...").x, kKeep}};
        if (s) {
            texts.push_back("| " + (s->crs_name.empty() ? std::string("CRS ?") : s->crs_name) + " |");
            fields.push_back({ImGui::CalcTextSize(texts.back().c_str()).x, 40});
            // The receive clock, apart: when the latest line reached this computer (log health).
            if (s->receive_s > 0) {
                texts.push_back("received " + formatUtcTime(s->receive_s) + " UTC |");
                fields.push_back({ImGui::CalcTextSize(texts.back().c_str()).x, 20});
            }
            for (const auto& item : s->status) {
                texts.push_back(item);
                fields.push_back({ImGui::CalcTextSize(item.c_str()).x, 30});
            }
        }
        const float room = amax.x - amin.x;
        const auto shown = fitStrip(fields, room, spacingX(), kKeep);
        // Room for the caution: the strip less every other shown field.
        float others = 0.0f;
        int n = 0;
        for (std::size_t i = 0; i < fields.size(); ++i)
            if (shown[i]) {
                ++n;
                if (i != 1) others += fields[i].width;
            }
        const float caution_room = std::max(0.0f, room - others - spacingX() * static_cast<float>(n - 1));
        for (std::size_t i = 0; i < texts.size(); ++i) {
            if (!shown[i]) continue;
            if (i > 0) ImGui::SameLine();
            if (i == 0) textFittedColoured(texts[i], state_colour);
            else if (i == 1) textFittedColoured(texts[i], pal.caution, caution_room);
            else if (i == 2 || (s && s->receive_s > 0 && i == 3)) textFittedColoured(texts[i], ImGui::GetColorU32(ImGuiCol_TextDisabled));
            else textFitted(texts[i]);
        }
    }

private:
    std::uint64_t m_last_seq = ~std::uint64_t{0};
    double m_last_change_s = 0.0;
};

}  // namespace

std::unique_ptr<Panel> makeToolbar() { return std::make_unique<Toolbar>(); }
std::unique_ptr<Panel> makeStatusBar() { return std::make_unique<StatusBar>(); }

}  // namespace sg::ui
