// Alarms panel: active episodes first, then past ones, each with start, duration, peak value and
// its acknowledgement; acknowledge one or all (sends UiCommands). Each level has its own symbol
// (alarm: triangle, warn: square; filled while active, hollow once ended), not colour alone.
#include <cmath>
#include <cstdio>

#include "ui/panel.hpp"
#include "ui/plot_draw.hpp"

namespace sg::ui {

// Draws the level symbol in a box of side `size` at `p` (shared with the banner).
void drawLevelSymbol(ImDrawList* dl, ImVec2 p, float size, checks::Level level, bool active, const Palette& pal) {
    const ImU32 c = level == checks::Level::kAlarm ? pal.alarm : level == checks::Level::kWarn ? pal.warn : pal.ok;
    const float t = std::max(1.0f, size * 0.12f);
    if (level == checks::Level::kAlarm) {
        const ImVec2 a{p.x + size * 0.5f, p.y}, b{p.x + size, p.y + size}, d{p.x, p.y + size};
        if (active) dl->AddTriangleFilled(a, b, d, c);
        else dl->AddTriangle(a, b, d, c, t);
    } else {
        const ImVec2 a{p.x + size * 0.1f, p.y + size * 0.1f}, b{p.x + size * 0.9f, p.y + size * 0.9f};
        if (active) dl->AddRectFilled(a, b, c);
        else dl->AddRect(a, b, c, 0.0f, 0, t);
    }
}

std::string formatDuration(double s) {
    char buf[32];
    const auto total = static_cast<long long>(std::max(0.0, std::round(s)));
    if (total >= 3600) std::snprintf(buf, sizeof buf, "%lldh%02lldm", total / 3600, (total / 60) % 60);
    else if (total >= 60) std::snprintf(buf, sizeof buf, "%lldm%02llds", total / 60, total % 60);
    else std::snprintf(buf, sizeof buf, "%llds", total);
    return buf;
}

namespace {

class AlarmsPanel final : public Panel {
public:
    const char* name() const override { return "Alarms"; }
    Slot slot() const override { return Slot::kTab; }

    void draw(FrameContext& ctx, ImVec2, ImVec2) override {
        const engine::Snapshot* s = ctx.snapshot;
        if (!s) return;
        const Palette& pal = *ctx.palette;
        int active = 0, unacked_alarms = 0, unacked_warnings = 0;
        for (const auto& a : s->alarms) {
            active += a.episode.end_ns ? 0 : 1;
            if (!a.episode.ack_ns)
                (a.episode.peak_level == checks::Level::kAlarm ? unacked_alarms : unacked_warnings) += 1;
        }
        ImGui::Text("%d on now, %d alarms and %d warnings not acknowledged, %zu in total", active, unacked_alarms,
                    unacked_warnings, s->alarms.size());
        // Alarms and warnings are acknowledged apart: one click never clears both.
        ImGui::BeginDisabled(unacked_alarms == 0);
        if (ImGui::Button("Acknowledge alarms")) ctx.send({engine::UiCommand::Kind::kAcknowledgeAlarms, 0, 0.0, {}});
        ImGui::EndDisabled();
        ImGui::SameLine();
        ImGui::BeginDisabled(unacked_warnings == 0);
        if (ImGui::Button("Acknowledge warnings"))
            ctx.send({engine::UiCommand::Kind::kAcknowledgeWarnings, 0, 0.0, {}});
        ImGui::EndDisabled();

        const ImGuiTableFlags flags = ImGuiTableFlags_RowBg | ImGuiTableFlags_BordersInnerV |
                                      ImGuiTableFlags_ScrollY | ImGuiTableFlags_SizingStretchProp;
        if (!ImGui::BeginTable("alarms", 7, flags)) return;
        ImGui::TableSetupScrollFreeze(0, 1);
        ImGui::TableSetupColumn("", ImGuiTableColumnFlags_WidthFixed, 18 * ctx.scale);
        ImGui::TableSetupColumn("what", ImGuiTableColumnFlags_WidthStretch, 3.0f);
        ImGui::TableSetupColumn("level", ImGuiTableColumnFlags_WidthStretch, 1.0f);
        ImGui::TableSetupColumn("start (survey UTC)", ImGuiTableColumnFlags_WidthStretch, 1.2f);
        ImGui::TableSetupColumn("duration", ImGuiTableColumnFlags_WidthStretch, 1.0f);
        ImGui::TableSetupColumn("peak", ImGuiTableColumnFlags_WidthStretch, 1.2f);
        ImGui::TableSetupColumn("ack", ImGuiTableColumnFlags_WidthStretch, 1.2f);
        ImGui::TableHeadersRow();
        ImGuiListClipper clipper;
        clipper.Begin(static_cast<int>(s->alarms.size()));
        while (clipper.Step()) {
            for (int row = clipper.DisplayStart; row < clipper.DisplayEnd; ++row) {
                const auto& a = s->alarms[static_cast<std::size_t>(row)];
                const auto& e = a.episode;
                const bool is_active = !e.end_ns;
                ImGui::PushID(row);
                ImGui::TableNextRow();
                ImGui::TableNextColumn();
                const float h = ImGui::GetTextLineHeight();
                drawLevelSymbol(ImGui::GetWindowDrawList(), ImGui::GetCursorScreenPos(), h, e.peak_level, is_active, pal);
                ImGui::Dummy({h, h});
                ImGui::TableNextColumn();
                if (a.words.empty()) ImGui::TextUnformatted(a.text.empty() ? e.check.c_str() : a.text.c_str());
                else ImGui::TextUnformatted(a.words.c_str());
                if (!e.detail.empty() && ImGui::IsItemHovered()) ImGui::SetTooltip("%s", e.detail.c_str());
                ImGui::TableNextColumn();
                ImGui::Text("%s%s", e.peak_level == checks::Level::kAlarm ? "alarm" : "warning", is_active ? " (on)" : "");
                ImGui::TableNextColumn();
                const double start_s = toSeconds(e.start_ns);
                ImGui::TextUnformatted(formatUtcTime(start_s).c_str());
                ImGui::TableNextColumn();
                const double end_s = e.end_ns ? toSeconds(*e.end_ns) : s->now_s;
                ImGui::TextUnformatted(formatDuration(end_s - start_s).c_str());
                ImGui::TableNextColumn();
                if (a.value_text.empty()) ImGui::Text("%.3g %s", e.peak_value, a.unit.c_str());
                else ImGui::TextUnformatted(a.value_text.c_str());
                ImGui::TableNextColumn();
                if (e.ack_ns) {
                    ImGui::TextDisabled("%s", formatUtcTime(toSeconds(*e.ack_ns)).c_str());
                } else if (ImGui::SmallButton("Acknowledge")) {
                    ctx.send({engine::UiCommand::Kind::kAcknowledgeAlarm, e.id, 0.0, {}});
                }
                ImGui::PopID();
            }
        }
        ImGui::EndTable();
    }
};

}  // namespace

std::unique_ptr<Panel> makeAlarmsPanel() { return std::make_unique<AlarmsPanel>(); }

}  // namespace sg::ui
