// Stacked profiles of the current or a chosen run: each sensor's total field with the ambient
// trend removed, plotted against along-track distance, one lane per sensor (port at the top),
// all lanes on the same nT scale so anomalies compare across the array.
#include <algorithm>
#include <cmath>
#include <cstdio>

#include "ui/panel.hpp"
#include "ui/plot_draw.hpp"

namespace sg::ui {
namespace {

class ProfilesPanel final : public Panel {
public:
    const char* name() const override { return "Profiles"; }
    Slot slot() const override { return Slot::kTab; }

    void draw(FrameContext& ctx, ImVec2, ImVec2) override {
        const engine::Snapshot* s = ctx.snapshot;
        const Palette& pal = *ctx.palette;
        const float sc = ctx.scale;
        if (!s) return;
        const auto& prof = s->profiles;
        ImGui::SetNextItemWidth(220 * sc);
        const char* preview = prof.run_name.empty() ? "(no run)" : prof.run_name.c_str();
        if (ImGui::BeginCombo("run", preview)) {
            if (ImGui::Selectable("current run", false))
                ctx.send({engine::UiCommand::Kind::kChooseProfileRun, 0, -1.0, {}});
            for (std::size_t i = 0; i < s->runs.size(); ++i) {
                ImGui::PushID(static_cast<int>(i));
                if (ImGui::Selectable(s->runs[i].name.c_str(), static_cast<int>(i) == prof.run_index))
                    ctx.send({engine::UiCommand::Kind::kChooseProfileRun, 0, static_cast<double>(i), {}});
                ImGui::PopID();
            }
            ImGui::EndCombo();
        }
        ImGui::SameLine();
        ImGui::SetNextItemWidth(120 * sc);
        ImGui::Combo("lane scale", &m_scale_choice, "auto\0+/-2 nT\0+/-5 nT\0+/-20 nT\0+/-100 nT\0");
        if (prof.traces.empty()) {
            ImGui::TextDisabled("No profile for this run yet.");
            return;
        }

        // Common scales.
        float x_max = 1.0f, amp = 0.0f;
        for (const auto& t : prof.traces) {
            if (!t.along_m.empty()) x_max = std::max(x_max, t.along_m.back());
            for (float v : t.residual_nT)
                if (std::isfinite(v)) amp = std::max(amp, std::fabs(v));
        }
        static constexpr float kFixed[] = {0.0f, 2.0f, 5.0f, 20.0f, 100.0f};
        amp = m_scale_choice > 0 ? kFixed[m_scale_choice] : std::max(amp * 1.1f, 0.5f);

        const ImVec2 p0 = ImGui::GetCursorScreenPos();
        const ImVec2 avail = ImGui::GetContentRegionAvail();
        const float left = 60 * sc, bottom = ImGui::GetTextLineHeight() + 4;
        const Rect area{{p0.x + left, p0.y}, {p0.x + avail.x - 6 * sc, p0.y + avail.y - bottom}};
        if (area.width() < 20 || area.height() < 20) return;
        ImDrawList* dl = ImGui::GetWindowDrawList();
        dl->AddRectFilled(area.min, area.max, pal.background);
        const auto lanes = static_cast<float>(prof.traces.size());
        const float lane_h = area.height() / lanes;
        const int cols = std::max(1, static_cast<int>(area.width()));
        char buf[64];

        for (double d : niceTicks(0.0, x_max, std::max(2, static_cast<int>(area.width() / (90 * sc))))) {
            const float x = area.min.x + static_cast<float>(d / x_max) * area.width();
            dl->AddLine({x, area.min.y}, {x, area.max.y}, pal.grid);
            std::snprintf(buf, sizeof buf, "%g m", d);
            dl->AddText({x + 2, area.max.y + 2}, pal.text_dim, buf);
        }
        dl->PushClipRect(area.min, area.max, true);
        for (std::size_t k = 0; k < prof.traces.size(); ++k) {
            const auto& tr = prof.traces[k];
            const float mid = area.min.y + lane_h * (static_cast<float>(k) + 0.5f);
            dl->AddLine({area.min.x, mid}, {area.max.x, mid}, pal.grid);
            // Min/max per pixel column along the run.
            m_lo.assign(static_cast<std::size_t>(cols), 0.0f);
            m_hi.assign(static_cast<std::size_t>(cols), 0.0f);
            m_n.assign(static_cast<std::size_t>(cols), 0);
            const std::size_t n = std::min(tr.along_m.size(), tr.residual_nT.size());
            for (std::size_t i = 0; i < n; ++i) {
                const float v = tr.residual_nT[i];
                if (!std::isfinite(v)) continue;
                auto c = static_cast<std::size_t>(std::clamp(tr.along_m[i] / x_max, 0.0f, 1.0f) * static_cast<float>(cols - 1));
                if (m_n[c]++ == 0) m_lo[c] = m_hi[c] = v;
                else {
                    m_lo[c] = std::min(m_lo[c], v);
                    m_hi[c] = std::max(m_hi[c], v);
                }
            }
            m_pts.clear();
            const float ys = lane_h * 0.5f / amp;
            for (std::size_t c = 0; c < m_n.size(); ++c) {
                if (m_n[c] == 0) continue;
                const float x = area.min.x + static_cast<float>(c) + 0.5f;
                m_pts.emplace_back(x, mid - std::clamp(m_lo[c], -amp, amp) * ys);
                if (m_hi[c] != m_lo[c]) m_pts.emplace_back(x, mid - std::clamp(m_hi[c], -amp, amp) * ys);
            }
            drawPolylineChunked(dl, m_pts, pal.seriesColour(k), 1.2f * sc);
        }
        dl->PopClipRect();
        for (std::size_t k = 0; k < prof.traces.size(); ++k) {
            const float mid = area.min.y + lane_h * (static_cast<float>(k) + 0.5f);
            dl->AddText({p0.x + 2, mid - ImGui::GetTextLineHeight()}, pal.seriesColour(k), prof.traces[k].sensor.c_str());
            std::snprintf(buf, sizeof buf, "+/-%.3g nT", static_cast<double>(amp));
            dl->AddText({p0.x + 2, mid}, pal.text_dim, buf);
        }
        dl->AddRect(area.min, area.max, pal.axis);
        ImGui::Dummy(avail);
    }

private:
    int m_scale_choice = 0;
    std::vector<float> m_lo, m_hi;
    std::vector<int> m_n;
    std::vector<ImVec2> m_pts;
};

}  // namespace

std::unique_ptr<Panel> makeProfilesPanel() { return std::make_unique<ProfilesPanel>(); }

}  // namespace sg::ui
