// Alarms panel: active episodes first, then past ones, each with start, duration, peak value and
// its acknowledgement; acknowledge one or all (sends UiCommands). Each level has its own symbol
// (alarm: triangle, warn: square; filled while active, hollow once ended), not colour alone.
#include <cmath>
#include <cstdio>
#include <string>
#include <vector>

#include "ui/panel.hpp"
#include "ui/plot_draw.hpp"
#include "ui/text_fit.hpp"

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
        char summary[160];
        std::snprintf(summary, sizeof summary, "%d on now, %d alarms and %d warnings not acknowledged, %zu in total", active,
                      unacked_alarms, unacked_warnings, s->alarms.size());
        // Wrapped in the column (never under its edge at large UI scales).
        ImGui::PushTextWrapPos(0.0f);
        ImGui::TextUnformatted(summary);
        ImGui::PopTextWrapPos();
        // Alarms and warnings are acknowledged apart: one click never clears both. The second
        // button goes under the first when the column is too narrow for both.
        ImGui::BeginDisabled(unacked_alarms == 0);
        if (ImGui::Button("Acknowledge alarms")) ctx.send({engine::UiCommand::Kind::kAcknowledgeAlarms, 0, 0.0, {}});
        ImGui::EndDisabled();
        const float warn_w = ImGui::CalcTextSize("Acknowledge warnings").x + ImGui::GetStyle().FramePadding.x * 2;
        if (ImGui::GetItemRectMax().x + ImGui::GetStyle().ItemSpacing.x + warn_w <=
            ImGui::GetWindowPos().x + ImGui::GetWindowContentRegionMax().x)
            ImGui::SameLine();
        ImGui::BeginDisabled(unacked_warnings == 0);
        if (ImGui::Button("Acknowledge warnings"))
            ctx.send({engine::UiCommand::Kind::kAcknowledgeWarnings, 0, 0.0, {}});
        ImGui::EndDisabled();

        // Columns by priority: a narrow column (large UI scale) drops the level words (the symbol
        // shows the level), then the duration, then the peak; each column but "what" is as wide
        // as its figures, "what" takes the rest; what is shown is elided to its column with the
        // whole text on hover.
        const float cw = ImGui::CalcTextSize("0").x;
        // The table scrolls vertically: its scrollbar takes part of the width when the list is long.
        const float room = ImGui::GetContentRegionAvail().x - ImGui::GetStyle().ScrollbarSize;
        const float line_h = ImGui::GetTextLineHeight();
        const float cell_pad = ImGui::GetStyle().CellPadding.x * 2 + 1;
        const std::string ack_label = "Acknowledge";
        const float ack_w = ImGui::CalcTextSize(ack_label.c_str()).x + ImGui::GetStyle().FramePadding.x * 2;
        const float time_w = ImGui::CalcTextSize("00:00:00").x;
        enum Col { kSymbol, kWhat, kLevel, kStart, kDuration, kPeak, kAck, kCount };
        const std::vector<StripField> cols = {
            {line_h + cell_pad, 100},      {12 * cw + cell_pad, 100}, {ImGui::CalcTextSize("warning (on)").x + cell_pad, 10},
            {time_w + cell_pad, 80},       {7 * cw + cell_pad, 20},   {9 * cw + cell_pad, 40},
            {std::max(ack_w, time_w) + cell_pad, 100},
        };
        const auto use = fitStrip(cols, room, 0.0f, 100);
        int n_cols = 0;
        for (bool u : use) n_cols += u ? 1 : 0;
        const ImGuiTableFlags flags = ImGuiTableFlags_RowBg | ImGuiTableFlags_BordersInnerV |
                                      ImGuiTableFlags_ScrollY | ImGuiTableFlags_SizingStretchProp;
        if (!ImGui::BeginTable("alarms", n_cols, flags)) return;
        ImGui::TableSetupScrollFreeze(0, 1);
        const char* heads[kCount] = {"", "what", "level", "start (survey UTC)", "duration", "peak", "ack"};
        for (int c = 0; c < kCount; ++c) {
            if (!use[static_cast<std::size_t>(c)]) continue;
            if (c == kSymbol) ImGui::TableSetupColumn("", ImGuiTableColumnFlags_WidthFixed, line_h);
            else if (c == kWhat) ImGui::TableSetupColumn(heads[c], ImGuiTableColumnFlags_WidthStretch, 1.0f);
            else ImGui::TableSetupColumn(heads[c], ImGuiTableColumnFlags_WidthFixed, cols[static_cast<std::size_t>(c)].width - cell_pad);
        }
        // Headers elided to their columns (the whole name on hover).
        ImGui::TableNextRow(ImGuiTableRowFlags_Headers);
        for (int c = 0; c < kCount; ++c) {
            if (!use[static_cast<std::size_t>(c)]) continue;
            ImGui::TableNextColumn();
            std::string head = heads[c];
            if (c == kStart && ImGui::CalcTextSize(heads[c]).x > ImGui::GetContentRegionAvail().x) head = "start";
            const std::string shown = elideToWidth(head, ImGui::GetContentRegionAvail().x);
            ImGui::PushID(c);
            ImGui::TableHeader((shown + "##h").c_str());
            if (shown != heads[c] && ImGui::IsItemHovered()) ImGui::SetTooltip("%s", heads[c]);
            ImGui::PopID();
        }
        ImGuiListClipper clipper;
        clipper.Begin(static_cast<int>(s->alarms.size()));
        while (clipper.Step()) {
            for (int row = clipper.DisplayStart; row < clipper.DisplayEnd; ++row) {
                const auto& a = s->alarms[static_cast<std::size_t>(row)];
                const auto& e = a.episode;
                const bool is_active = !e.end_ns;
                const std::string level = std::string(e.peak_level == checks::Level::kAlarm ? "alarm" : "warning") +
                                          (is_active ? " (on)" : "");
                ImGui::PushID(row);
                ImGui::TableNextRow();
                if (use[kSymbol]) {
                    ImGui::TableNextColumn();
                    const float h = ImGui::GetTextLineHeight();
                    drawLevelSymbol(ImGui::GetWindowDrawList(), ImGui::GetCursorScreenPos(), h, e.peak_level, is_active, pal);
                    ImGui::Dummy({h, h});
                    if (!use[kLevel] && ImGui::IsItemHovered()) ImGui::SetTooltip("%s", level.c_str());
                }
                ImGui::TableNextColumn();
                const std::string what = a.words.empty() ? (a.text.empty() ? e.check : a.text) : a.words;
                const bool cut = textFitted(what);
                if (!cut && !e.detail.empty() && ImGui::IsItemHovered()) ImGui::SetTooltip("%s", e.detail.c_str());
                if (cut && ImGui::IsItemHovered())
                    ImGui::SetTooltip("%s%s%s", what.c_str(), e.detail.empty() ? "" : "\n", e.detail.c_str());
                if (use[kLevel]) {
                    ImGui::TableNextColumn();
                    textFitted(level);
                }
                const double start_s = toSeconds(e.start_ns);
                if (use[kStart]) {
                    ImGui::TableNextColumn();
                    textFitted(formatUtcTime(start_s));
                }
                if (use[kDuration]) {
                    ImGui::TableNextColumn();
                    const double end_s = e.end_ns ? toSeconds(*e.end_ns) : s->now_s;
                    textFitted(formatDuration(end_s - start_s));
                }
                if (use[kPeak]) {
                    ImGui::TableNextColumn();
                    char peak[64];
                    if (a.value_text.empty()) std::snprintf(peak, sizeof peak, "%.3g %s", e.peak_value, a.unit.c_str());
                    textFitted(a.value_text.empty() ? std::string(peak) : a.value_text);
                }
                ImGui::TableNextColumn();
                if (e.ack_ns) {
                    textFittedColoured(formatUtcTime(toSeconds(*e.ack_ns)), ImGui::GetColorU32(ImGuiCol_TextDisabled));
                } else {
                    // A small button with a little vertical padding: with none (SmallButton) ImGui
                    // clips the label to the button and cuts the descender of its "g".
                    ImGui::PushStyleVar(ImGuiStyleVar_FramePadding,
                                        {ImGui::GetStyle().FramePadding.x, ImGui::GetStyle().FramePadding.y * 0.5f});
                    if (ImGui::Button(ack_label.c_str())) ctx.send({engine::UiCommand::Kind::kAcknowledgeAlarm, e.id, 0.0, {}});
                    ImGui::PopStyleVar();
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
