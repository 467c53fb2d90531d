// The alarm banner: while any alarm-level episode waits for acknowledgement, a wide band across
// the top of the screen that grows and shrinks (about once a second) with hazard stripes sliding
// along it, a warning-triangle symbol, the word ALARM with the newest unacknowledged alarm, and
// acknowledge buttons. Size and motion make it visible across a bridge even for colour-blind
// operators; it disappears once everything is acknowledged.
#include <algorithm>
#include <cmath>
#include <cstdio>

#include "ui/panel.hpp"

namespace sg::ui {

namespace {

constexpr double kPi = 3.14159265358979323846;

class AlarmBanner final : public Panel {
public:
    const char* name() const override { return "Alarm banner"; }
    Slot slot() const override { return Slot::kOverlay; }

    void draw(FrameContext& ctx, ImVec2 amin, ImVec2 amax) override {
        const engine::Snapshot* s = ctx.snapshot;
        if (!s || !s->hasUnacknowledgedAlarm()) return;
        const Palette& pal = *ctx.palette;
        const float sc = ctx.scale;
        const engine::AlarmView* newest = nullptr;
        int count = 0;
        for (const auto& a : s->alarms) {
            if (a.episode.ack_ns || a.episode.peak_level != checks::Level::kAlarm) continue;
            ++count;
            if (!newest || a.episode.start_ns > newest->episode.start_ns) newest = &a;
        }
        // Pulse between 70 % and 100 % of the full height.
        const double phase = std::sin(ctx.wall_s * 2.0 * kPi * 0.9);
        const float full_h = amax.y - amin.y;
        const float h = full_h * (0.85f + 0.15f * static_cast<float>(phase));
        ImGui::SetNextWindowPos(amin);
        ImGui::SetNextWindowSize({amax.x - amin.x, h});
        ImGui::PushStyleColor(ImGuiCol_WindowBg, IM_COL32(0, 0, 0, 0));
        ImGui::PushStyleVar(ImGuiStyleVar_WindowPadding, {0, 0});
        ImGui::PushStyleVar(ImGuiStyleVar_WindowBorderSize, 0.0f);
        ImGui::Begin("##alarm_banner", nullptr,
                     ImGuiWindowFlags_NoDecoration | ImGuiWindowFlags_NoMove | ImGuiWindowFlags_NoSavedSettings |
                         ImGuiWindowFlags_NoFocusOnAppearing | ImGuiWindowFlags_NoScrollWithMouse);
        ImDrawList* dl = ImGui::GetWindowDrawList();
        const ImVec2 a = amin, b{amax.x, amin.y + h};
        dl->AddRectFilled(a, b, pal.banner);
        // Sliding hazard stripes along the bottom edge.
        const float band = std::round(12 * sc);
        const float stripe = 22 * sc;
        const float offset = std::fmod(static_cast<float>(ctx.wall_s) * 80.0f * sc, 2 * stripe);
        dl->PushClipRect({a.x, b.y - band}, b, true);
        for (float x = a.x - 2 * stripe + offset; x < b.x + stripe; x += 2 * stripe) {
            dl->AddQuadFilled({x, b.y}, {x + stripe, b.y}, {x + stripe + band, b.y - band}, {x + band, b.y - band},
                              pal.banner_stripe);
        }
        dl->PopClipRect();
        // Symbol, big text and buttons.
        const float body = h - band;
        const float sym = std::min(body - 10 * sc, 56 * sc);
        const ImVec2 sp{a.x + 14 * sc, a.y + (body - sym) * 0.5f};
        dl->AddTriangleFilled({sp.x + sym * 0.5f, sp.y}, {sp.x + sym, sp.y + sym}, {sp.x, sp.y + sym}, pal.banner_text);
        dl->AddRectFilled({sp.x + sym * 0.46f, sp.y + sym * 0.32f}, {sp.x + sym * 0.54f, sp.y + sym * 0.72f}, pal.banner);
        dl->AddRectFilled({sp.x + sym * 0.46f, sp.y + sym * 0.8f}, {sp.x + sym * 0.54f, sp.y + sym * 0.9f}, pal.banner);

        ImGui::SetWindowFontScale(2.0f);
        const float line_h = ImGui::GetTextLineHeight();
        char title[256];
        std::snprintf(title, sizeof title, "ALARM  %s%s", newest ? (newest->text.empty() ? newest->episode.check.c_str() : newest->text.c_str()) : "",
                      newest && newest->episode.end_ns ? "  (ended, not acknowledged)" : "");
        dl->AddText(ImGui::GetFont(), ImGui::GetFontSize(), {sp.x + sym + 16 * sc, a.y + (body - line_h) * 0.5f},
                    pal.banner_text, title);
        ImGui::SetWindowFontScale(1.3f);
        char more[64];
        std::snprintf(more, sizeof more, "Acknowledge all (%d)", count);
        const float bw = ImGui::CalcTextSize(more).x + 24 * sc;
        const float bh = ImGui::GetFrameHeight();
        ImGui::SetCursorScreenPos({b.x - bw - 16 * sc, a.y + (body - bh) * 0.5f});
        ImGui::PushStyleColor(ImGuiCol_Button, ImGui::ColorConvertU32ToFloat4(pal.banner_stripe));
        ImGui::PushStyleColor(ImGuiCol_Text, ImGui::ColorConvertU32ToFloat4(pal.banner_text));
        if (ImGui::Button(more, {bw, bh})) ctx.send({engine::UiCommand::Kind::kAcknowledgeAll, 0, 0.0, {}});
        if (newest) {
            const char* one = "Acknowledge";
            const float ow = ImGui::CalcTextSize(one).x + 24 * sc;
            ImGui::SetCursorScreenPos({b.x - bw - ow - 28 * sc, a.y + (body - bh) * 0.5f});
            if (ImGui::Button(one, {ow, bh}))
                ctx.send({engine::UiCommand::Kind::kAcknowledgeAlarm, newest->episode.id, 0.0, {}});
        }
        ImGui::PopStyleColor(2);
        ImGui::SetWindowFontScale(1.0f);
        ImGui::End();
        ImGui::PopStyleVar(2);
        ImGui::PopStyleColor();
    }
};

}  // namespace

std::unique_ptr<Panel> makeAlarmBanner() { return std::make_unique<AlarmBanner>(); }

}  // namespace sg::ui
