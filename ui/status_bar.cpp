// Toolbar (palette, UI scale) and status bar (safety caution, survey time, CRS, health items,
// age of the latest state). The caution is always on screen: coverage is a model's estimate.
#include <chrono>
#include <cmath>
#include <cstdio>

#include "ui/panel.hpp"
#include "ui/plot_draw.hpp"
#include "ui/screen.hpp"

namespace sg::ui {

const char* defaultCaution() {
    return "Coverage is a model's estimate. UXO clearance follows local regulations and licensed "
           "specialists. The master decides on navigation.";
}

namespace {

class Toolbar final : public Panel {
public:
    const char* name() const override { return "Toolbar"; }
    Slot slot() const override { return Slot::kToolbar; }

    void draw(FrameContext& ctx, ImVec2, ImVec2) override {
        ScreenSettings& set = *ctx.settings;
        ImGui::TextUnformatted("swathguard");
        ImGui::SameLine();
        int pal = set.night ? 1 : 0;
        ImGui::SetNextItemWidth(90 * ctx.scale);
        if (ImGui::Combo("palette", &pal, "day\0night\0")) {
            set.night = pal == 1;
            ctx.settings_changed = true;
        }
        ImGui::SameLine();
        ImGui::SetNextItemWidth(120 * ctx.scale);
        // Edited on a copy and applied on release: the font is rebuilt once, not on every drag step.
        if (!m_editing) m_scale = set.ui_scale;
        ImGui::SliderFloat("UI scale", &m_scale, 0.75f, 3.0f, "%.2f");
        m_editing = ImGui::IsItemActive();
        if (ImGui::IsItemDeactivatedAfterEdit()) {
            set.ui_scale = m_scale;
            ctx.settings_changed = true;
        }
        if (const engine::Snapshot* s = ctx.snapshot) {
            ImGui::SameLine();
            // Survey time: the instruments' clock, the same as the plots, alarms and runs.
            // 1 kn = 1852 m / 3600 s.
            double heading_deg = std::fmod(s->heading_rad * 180.0 / 3.14159265358979323846, 360.0);
            if (heading_deg < 0) heading_deg += 360.0;
            ImGui::Text("  survey time %s UTC   speed %.1f kn (%.1f m/s)   heading %03.0f deg",
                        formatUtcTime(s->now_s).c_str(), s->speed_mps * 3600.0 / 1852.0, s->speed_mps, heading_deg);
            ImGui::SameLine();
            ImGui::TextDisabled("  F1: keys");
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

    void draw(FrameContext& ctx, ImVec2, ImVec2) override {
        const Palette& pal = *ctx.palette;
        const engine::Snapshot* s = ctx.snapshot;
        // Staleness: how long since the screen saw a new snapshot (wall clock).
        if (s && s->seq != m_last_seq) {
            m_last_seq = s->seq;
            m_last_change_s = ctx.wall_s;
        }
        const double age = ctx.wall_s - m_last_change_s;
        if (!s) {
            ImGui::TextColored(ImGui::ColorConvertU32ToFloat4(pal.warn), "NO SURVEY STATE YET");
        } else if (age > 3.0 && !(s->replay.is_replay && s->replay.paused)) {
            ImGui::TextColored(ImGui::ColorConvertU32ToFloat4(pal.warn), "STATE NOT UPDATED FOR %.0f s", age);
        } else {
            ImGui::TextColored(ImGui::ColorConvertU32ToFloat4(pal.ok), "%s", s->replay.is_replay ? "replay" : "live");
        }
        ImGui::SameLine();
        const char* caution = (s && !s->cautions.empty()) ? s->cautions.c_str() : defaultCaution();
        ImGui::TextColored(ImGui::ColorConvertU32ToFloat4(pal.caution), "CAUTION: %s", caution);
        if (s) {
            ImGui::SameLine();
            ImGui::TextDisabled("| %s |", s->crs_name.empty() ? "CRS ?" : s->crs_name.c_str());
            // The receive clock, apart: when the latest line reached this computer (log health).
            if (s->receive_s > 0) {
                ImGui::SameLine();
                ImGui::TextDisabled("received %s UTC |", formatUtcTime(s->receive_s).c_str());
            }
            for (const auto& item : s->status) {
                ImGui::SameLine();
                ImGui::TextUnformatted(item.c_str());
            }
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
