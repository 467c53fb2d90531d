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

#include "ui/panel.hpp"

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

        // Buttons on the right, two separate actions; their width fixes where the words end.
        ImGui::SetWindowFontScale(1.2f);
        const float bh = ImGui::GetFrameHeight();
        char ack_alarms[64], ack_warns[64];
        std::snprintf(ack_alarms, sizeof ack_alarms, "Acknowledge alarms (%d)", alarms_unacked);
        std::snprintf(ack_warns, sizeof ack_warns, "Acknowledge warnings (%d)", warnings_unacked);
        const float pad = ImGui::GetStyle().FramePadding.x * 2;
        const float w_alarms = ImGui::CalcTextSize(ack_alarms).x + pad;
        const float w_warns = ImGui::CalcTextSize(ack_warns).x + pad;
        const float gap = 10 * sc;
        float bx = b.x - 12 * sc - w_warns;
        const float by = a.y + (body - bh) * 0.5f;
        float words_end = b.x - 12 * sc;
        if (banner) {
            ImGui::PushStyleColor(ImGuiCol_Button, ImGui::ColorConvertU32ToFloat4(pal.banner_stripe));
            ImGui::PushStyleColor(ImGuiCol_Text, ImGui::ColorConvertU32ToFloat4(pal.banner_text));
        }
        if (warnings_unacked > 0) {
            ImGui::SetCursorScreenPos({bx, by});
            if (ImGui::Button(ack_warns, {w_warns, bh}))
                ctx.send({engine::UiCommand::Kind::kAcknowledgeWarnings, 0, 0.0, {}});
            words_end = bx - gap;
            bx -= gap + w_alarms;
        } else {
            bx = b.x - 12 * sc - w_alarms;
        }
        if (alarms_unacked > 0) {
            ImGui::SetCursorScreenPos({bx, by});
            if (ImGui::Button(ack_alarms, {w_alarms, bh}))
                ctx.send({engine::UiCommand::Kind::kAcknowledgeAlarms, 0, 0.0, {}});
            words_end = bx - gap;
        }
        if (banner) ImGui::PopStyleColor(2);

        if (banner) {
            const float sym = std::min(body - 10 * sc, 56 * sc);
            const ImVec2 sp{a.x + 14 * sc, a.y + (body - sym) * 0.5f};
            dl->AddTriangleFilled({sp.x + sym * 0.5f, sp.y}, {sp.x + sym, sp.y + sym}, {sp.x, sp.y + sym}, pal.banner_text);
            dl->AddRectFilled({sp.x + sym * 0.46f, sp.y + sym * 0.32f}, {sp.x + sym * 0.54f, sp.y + sym * 0.72f}, pal.banner);
            dl->AddRectFilled({sp.x + sym * 0.46f, sp.y + sym * 0.8f}, {sp.x + sym * 0.54f, sp.y + sym * 0.9f}, pal.banner);
            // The words, as large as the room before the buttons allows (1.8x down to 1.2x the
            // font), clipped there only if even that does not fit.
            std::string title = "ALARM  " + newest->words + ": " + newest->value_text;
            if (alarms_unacked > 1) title += "   (+" + std::to_string(alarms_unacked - 1) + " more)";
            const float tx = sp.x + sym + 16 * sc;
            ImGui::SetWindowFontScale(1.0f);
            const float w1 = ImGui::CalcTextSize(title.c_str()).x;
            const float room = words_end - tx;
            ImGui::SetWindowFontScale(std::clamp(w1 > 0 ? room / w1 : 1.8f, 1.2f, 1.8f));
            const float line_h = ImGui::GetTextLineHeight();
            dl->PushClipRect({tx, a.y}, {std::max(tx, words_end), b.y}, true);
            dl->AddText(ImGui::GetFont(), ImGui::GetFontSize(), {tx, a.y + (body - line_h) * 0.5f}, fg, title.c_str());
            dl->PopClipRect();
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
                for (const auto* al : on) {
                    drawLevelSymbol(dl, {x, y}, line_h, al->episode.peak_level, true, pal);
                    x += line_h + 6 * sc;
                    std::string t = al->words + ": " + al->value_text;
                    if (al->episode.ack_ns) t += " (acknowledged)";
                    dl->AddText(ImGui::GetFont(), ImGui::GetFontSize(), {x, y},
                                al->episode.peak_level == checks::Level::kAlarm ? pal.alarm : pal.text, t.c_str());
                    x += ImGui::CalcTextSize(t.c_str()).x + 24 * sc;
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
