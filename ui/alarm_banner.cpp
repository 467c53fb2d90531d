// The alert strip under the toolbar. Its space is always reserved (the layout never moves when an
// alarm comes or goes, so a click cannot land on the wrong control):
// - while an alarm is active and not acknowledged: the alarm banner - a band with hazard stripes
//   sliding along its lower edge, a warning-triangle symbol, the newest such alarm in large
//   words, and two separate actions, "Acknowledge alarms" and "Acknowledge warnings". Motion,
//   symbol and words make it visible across a bridge for colour-blind operators too.
// - otherwise a quiet strip with what is on now (active alarms already acknowledged, active
//   warnings), so warnings are visible at a glance and not only in a tab.
// Ended episodes never raise the banner: they are in the alarm list.
#include <algorithm>
#include <cmath>
#include <cstdio>
#include <string>
#include <vector>

#include "ui/panel.hpp"
#include "ui/text_fit.hpp"

namespace sg::ui {

namespace {

class AlarmBanner final : public Panel {
public:
    const char* name() const override { return "Alarm banner"; }
    Slot slot() const override { return Slot::kOverlay; }

    void draw(FrameContext& ctx, ImVec2 amin, ImVec2 amax) override {
        const engine::Snapshot* s = ctx.snapshot;
        const Palette& pal = *ctx.palette;
        const float sc = ctx.scale;
        const engine::AlarmView* newest = nullptr;
        int alarms_unacked = 0, warnings_unacked = 0;
        std::vector<const engine::AlarmView*> on;  // active, for the quiet strip
        if (s)
            for (const auto& a : s->alarms) {
                const auto& e = a.episode;
                const bool alarm = e.peak_level == checks::Level::kAlarm;
                if (!e.ack_ns) (alarm ? alarms_unacked : warnings_unacked) += 1;
                if (e.end_ns) continue;
                on.push_back(&a);
                if (alarm && !e.ack_ns && (!newest || e.start_ns > newest->episode.start_ns)) newest = &a;
            }
        const bool banner = newest != nullptr;
        ImGui::SetNextWindowPos(amin);
        ImGui::SetNextWindowSize({amax.x - amin.x, amax.y - amin.y});
        ImGui::PushStyleColor(ImGuiCol_WindowBg, IM_COL32(0, 0, 0, 0));
        ImGui::PushStyleVar(ImGuiStyleVar_WindowPadding, {0, 0});
        ImGui::PushStyleVar(ImGuiStyleVar_WindowBorderSize, 0.0f);
        ImGui::Begin("##alarm_banner", nullptr,
                     ImGuiWindowFlags_NoDecoration | ImGuiWindowFlags_NoMove | ImGuiWindowFlags_NoSavedSettings |
                         ImGuiWindowFlags_NoFocusOnAppearing | ImGuiWindowFlags_NoScrollWithMouse);
        ImDrawList* dl = ImGui::GetWindowDrawList();
        const ImVec2 a = amin, b = amax;
        const float h = b.y - a.y;
        float body = h;
        if (banner) {
            dl->AddRectFilled(a, b, pal.banner);
            // Sliding hazard stripes along the bottom edge (motion, not only colour).
            const float band = std::round(12 * sc);
            const float stripe = 22 * sc;
            const float offset = std::fmod(static_cast<float>(ctx.wall_s) * 80.0f * sc, 2 * stripe);
            dl->PushClipRect({a.x, b.y - band}, b, true);
            for (float x = a.x - 2 * stripe + offset; x < b.x + stripe; x += 2 * stripe)
                dl->AddQuadFilled({x, b.y}, {x + stripe, b.y}, {x + stripe + band, b.y - band}, {x + band, b.y - band},
                                  pal.banner_stripe);
            dl->PopClipRect();
            body = h - band;
        } else {
            dl->AddRectFilled(a, b, pal.background);
            dl->AddLine({a.x, b.y - 1}, {b.x, b.y - 1}, pal.grid);
        }
        const ImU32 fg = banner ? pal.banner_text : pal.text;

        // Buttons on the right, two separate actions; their width fixes where the words end. When
        // side by side they would leave the words less than half the strip (large UI scales,
        // narrow windows), they stack, one above the other.
        ImGui::SetWindowFontScale(1.2f);
        char ack_alarms[64], ack_warns[64];
        std::snprintf(ack_alarms, sizeof ack_alarms, "Acknowledge alarms (%d)", alarms_unacked);
        std::snprintf(ack_warns, sizeof ack_warns, "Acknowledge warnings (%d)", warnings_unacked);
        const float margin = 12 * sc;
        const float gap = 10 * sc;
        const int n_buttons = (alarms_unacked > 0 ? 1 : 0) + (warnings_unacked > 0 ? 1 : 0);
        auto buttonWidth = [](const char* t) { return ImGui::CalcTextSize(t).x + ImGui::GetStyle().FramePadding.x * 2; };
        float w_alarms = buttonWidth(ack_alarms), w_warns = buttonWidth(ack_warns);
        float bh = ImGui::GetFrameHeight();
        const float side_by_side = (alarms_unacked > 0 ? w_alarms : 0) + (warnings_unacked > 0 ? w_warns : 0) +
                                   (n_buttons == 2 ? gap : 0);
        bool stacked = n_buttons == 2 && (b.x - a.x) - side_by_side - 2 * margin < (b.x - a.x) * 0.5f;
        if (stacked && 2 * bh + gap * 0.5f > body - 4 * sc) {
            ImGui::SetWindowFontScale(1.0f);  // smaller buttons, so two fit above each other
            w_alarms = buttonWidth(ack_alarms);
            w_warns = buttonWidth(ack_warns);
            bh = ImGui::GetFrameHeight();
        }
        float words_end = b.x - margin;
        if (banner) {
            ImGui::PushStyleColor(ImGuiCol_Button, ImGui::ColorConvertU32ToFloat4(pal.banner_stripe));
            ImGui::PushStyleColor(ImGuiCol_Text, ImGui::ColorConvertU32ToFloat4(pal.banner_text));
        }
        if (stacked) {
            const float bw = std::max(w_alarms, w_warns);
            const float bx = b.x - margin - bw;
            const float by = a.y + (body - (2 * bh + gap * 0.5f)) * 0.5f;
            ImGui::SetCursorScreenPos({bx, by});
            if (ImGui::Button(ack_alarms, {bw, bh})) ctx.send({engine::UiCommand::Kind::kAcknowledgeAlarms, 0, 0.0, {}});
            ImGui::SetCursorScreenPos({bx, by + bh + gap * 0.5f});
            if (ImGui::Button(ack_warns, {bw, bh})) ctx.send({engine::UiCommand::Kind::kAcknowledgeWarnings, 0, 0.0, {}});
            words_end = bx - gap;
        } else {
            float bx = b.x - margin;
            const float by = a.y + (body - bh) * 0.5f;
            if (warnings_unacked > 0) {
                bx -= w_warns;
                ImGui::SetCursorScreenPos({bx, by});
                if (ImGui::Button(ack_warns, {w_warns, bh}))
                    ctx.send({engine::UiCommand::Kind::kAcknowledgeWarnings, 0, 0.0, {}});
                words_end = bx - gap;
                bx -= gap;
            }
            if (alarms_unacked > 0) {
                bx -= w_alarms;
                ImGui::SetCursorScreenPos({bx, by});
                if (ImGui::Button(ack_alarms, {w_alarms, bh}))
                    ctx.send({engine::UiCommand::Kind::kAcknowledgeAlarms, 0, 0.0, {}});
                words_end = bx - gap;
            }
        }
        if (banner) ImGui::PopStyleColor(2);
        ImGui::SetWindowFontScale(1.0f);

        if (banner) {
            const float sym = std::min(body - 10 * sc, 56 * sc);
            const ImVec2 sp{a.x + 14 * sc, a.y + (body - sym) * 0.5f};
            dl->AddTriangleFilled({sp.x + sym * 0.5f, sp.y}, {sp.x + sym, sp.y + sym}, {sp.x, sp.y + sym}, pal.banner_text);
            dl->AddRectFilled({sp.x + sym * 0.46f, sp.y + sym * 0.32f}, {sp.x + sym * 0.54f, sp.y + sym * 0.72f}, pal.banner);
            dl->AddRectFilled({sp.x + sym * 0.46f, sp.y + sym * 0.8f}, {sp.x + sym * 0.54f, sp.y + sym * 0.9f}, pal.banner);
            // The words in the room before the buttons: as large as fits (1.8x down to 1.0x the
            // font) on one line or wrapped onto more; if even 1.0x does not fit, the last line
            // that fits ends in "..." and the whole text shows on hover.
            // The alarm's one sentence (engine::alarmStatement, the same the headless status line
            // prints): a forming gap says where, line, side, width and distance along the line.
            std::string title = "ALARM  " + (newest->text.empty()
                                                 ? newest->words + ": " + newest->value_text
                                                 : newest->text);
            if (alarms_unacked > 1) title += "   (+" + std::to_string(alarms_unacked - 1) + " more)";
            const float tx = sp.x + sym + 16 * sc;
            const float room = std::max(0.0f, words_end - tx);
            ImFont* font = ImGui::GetFont();
            const float base = ImGui::GetFontSize();
            std::vector<std::string> lines;
            float size = base;
            for (const float f : {1.8f, 1.6f, 1.4f, 1.2f, 1.0f}) {
                size = base * f;
                lines = wrapToWidth(title, room, font, size);
                const auto fits = static_cast<float>(lines.size()) * size <= body - 4 * sc;
                if (fits && (lines.size() == 1 || f <= 1.4f)) break;  // one large line, or a few smaller ones
            }
            const auto max_lines = static_cast<std::size_t>(std::max(1.0f, std::floor((body - 4 * sc) / size)));
            bool cut = false;
            if (lines.size() > max_lines) {
                std::string rest = lines[max_lines - 1];
                for (std::size_t i = max_lines; i < lines.size(); ++i) rest += " " + lines[i];
                lines.resize(max_lines);
                lines.back() = elideToWidth(rest, room, font, size);
                cut = true;
            }
            for (const auto& l : lines) cut = cut || (l.size() >= 3 && l.compare(l.size() - 3, 3, "...") == 0);
            float ty = a.y + (body - size * static_cast<float>(lines.size())) * 0.5f;
            for (const auto& l : lines) {
                if (!l.empty()) dl->AddText(font, size, {tx, ty}, fg, l.c_str());
                ty += size;
            }
            if (cut && ImGui::IsMouseHoveringRect({tx, a.y}, {tx + room, a.y + body})) ImGui::SetTooltip("%s", title.c_str());
        } else {
            // Quiet strip: what is on now, each with its level symbol, or that all is well.
            ImGui::SetWindowFontScale(1.2f);
            const float line_h = ImGui::GetTextLineHeight();
            float x = a.x + 12 * sc;
            const float y = a.y + (body - line_h) * 0.5f;
            dl->PushClipRect({a.x, a.y}, {std::max(a.x, words_end), b.y}, true);
            if (!s) {
                dl->AddText(ImGui::GetFont(), ImGui::GetFontSize(), {x, y}, pal.text_dim, "Waiting for survey data");
            } else if (on.empty()) {
                dl->AddText(ImGui::GetFont(), ImGui::GetFontSize(), {x, y}, pal.text_dim, "No alarm or warning on");
            } else {
                // Each item whole or elided to the room left (whole on hover); none runs under the buttons.
                for (const auto* al : on) {
                    std::string t = al->words + ": " + al->value_text;
                    if (al->episode.ack_ns) t += " (acknowledged)";
                    const float tx = x + line_h + 6 * sc;
                    const std::string shown = elideToWidth(t, words_end - tx);
                    if (shown.empty() || (shown != t && shown.size() < 8)) break;
                    drawLevelSymbol(dl, {x, y}, line_h, al->episode.peak_level, true, pal);
                    dl->AddText(ImGui::GetFont(), ImGui::GetFontSize(), {tx, y},
                                al->episode.peak_level == checks::Level::kAlarm ? pal.alarm : pal.text, shown.c_str());
                    const float tw = ImGui::CalcTextSize(shown.c_str()).x;
                    if (shown != t && ImGui::IsMouseHoveringRect({tx, y}, {tx + tw, y + line_h}))
                        ImGui::SetTooltip("%s", t.c_str());
                    x = tx + tw + 24 * sc;
                }
            }
            dl->PopClipRect();
        }
        ImGui::SetWindowFontScale(1.0f);
        ImGui::End();
        ImGui::PopStyleVar(2);
        ImGui::PopStyleColor();
    }
};

}  // namespace

std::unique_ptr<Panel> makeAlarmBanner() { return std::make_unique<AlarmBanner>(); }

}  // namespace sg::ui
