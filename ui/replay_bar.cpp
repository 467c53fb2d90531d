// Replay strip (only while replaying a log): play/pause, speed, a seek slider over the log's time
// span and "next alarm". Every control sends a UiCommand; the replay driver does the work and the
// next snapshot shows the result.
#include <cstdio>

#include "ui/panel.hpp"
#include "ui/plot_draw.hpp"

namespace sg::ui {
namespace {

constexpr double kSpeeds[] = {0.5, 1.0, 2.0, 5.0, 10.0, 30.0, 60.0, 0.0};

std::string speedLabel(double v) {
    if (v == 0.0) return "max";
    char buf[16];
    std::snprintf(buf, sizeof buf, "%gx", v);
    return buf;
}

class ReplayBar final : public Panel {
public:
    const char* name() const override { return "Replay"; }
    Slot slot() const override { return Slot::kReplay; }

    void draw(FrameContext& ctx, ImVec2, ImVec2) override {
        const engine::Snapshot* s = ctx.snapshot;
        if (!s || !s->replay.is_replay) return;
        const auto& r = s->replay;
        const float sc = ctx.scale;
        ImGui::TextUnformatted("REPLAY");
        ImGui::SameLine();
        if (r.paused) {
            if (ImGui::Button("Play")) ctx.send({engine::UiCommand::Kind::kReplayPlay, 0, 0.0, {}});
        } else {
            if (ImGui::Button("Pause")) ctx.send({engine::UiCommand::Kind::kReplayPause, 0, 0.0, {}});
        }
        ImGui::SameLine();
        ImGui::SetNextItemWidth(80 * sc);
        if (ImGui::BeginCombo("speed", speedLabel(r.speed).c_str())) {
            for (double v : kSpeeds)
                if (ImGui::Selectable(speedLabel(v).c_str(), v == r.speed))
                    ctx.send({engine::UiCommand::Kind::kReplaySpeed, 0, v, {}});
            ImGui::EndCombo();
        }
        ImGui::SameLine();
        const int n = static_cast<int>(r.episode_starts_s.size());
        const bool at_last = n == 0 || r.episode_visited + 1 >= n;
        ImGui::BeginDisabled(at_last && r.episode_visited >= 0);
        if (ImGui::Button("Next alarm (N)")) ctx.send({engine::UiCommand::Kind::kReplayNextAlarm, 0, 0.0, {}});
        ImGui::EndDisabled();
        ImGui::SameLine();
        if (n == 0) ImGui::TextDisabled("no alarms in this log");
        else if (r.episode_visited < 0) ImGui::Text("%d in log", n);
        else ImGui::Text("%d of %d%s", r.episode_visited + 1, n, r.episode_visited + 1 >= n ? " (last)" : "");
        ImGui::SameLine();
        ImGui::Text("survey %s", formatUtcTime(r.t_s).c_str());
        ImGui::SameLine();
        // While dragging, the slider shows the operator's value; the seek is sent on release only,
        // so a drag does not flood the replay driver.
        if (!m_dragging) m_seek_t = r.t_s;
        ImGui::SetNextItemWidth(-(ImGui::CalcTextSize("00:00:00").x + ImGui::GetStyle().ItemSpacing.x * 2));
        const double lo = r.t_start_s, hi = std::max(r.t_end_s, r.t_start_s + 1.0);
        const std::string label = formatUtcTime(m_seek_t);
        ImGui::SliderScalar("##seek", ImGuiDataType_Double, &m_seek_t, &lo, &hi, label.c_str());
        m_dragging = ImGui::IsItemActive();
        if (ImGui::IsItemDeactivatedAfterEdit()) ctx.send({engine::UiCommand::Kind::kReplaySeek, 0, m_seek_t, {}});
        ImGui::SameLine();
        ImGui::Text("%s", formatUtcTime(r.t_end_s).c_str());
    }

private:
    double m_seek_t = 0.0;
    bool m_dragging = false;
};

}  // namespace

std::unique_ptr<Panel> makeReplayBar() { return std::make_unique<ReplayBar>(); }

}  // namespace sg::ui
