// Stacked profiles of the current or a chosen run: each sensor's total field with the ambient
// trend removed, plotted against along-track distance, one lane per sensor (port at the top),
// all lanes on the same nT scale so anomalies compare across the array.
#include <algorithm>
#include <cmath>
#include <cstdio>
#include <string>

#include "ui/panel.hpp"
#include "ui/plot_draw.hpp"
#include "ui/text_fit.hpp"

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
        // The run choice takes at most the row; the lane scale goes beside it while the row has room.
        const ImGuiStyle& st = ImGui::GetStyle();
        const float row_w = ImGui::GetContentRegionAvail().x;
        ImGui::SetNextItemWidth(std::max(ImGui::GetFrameHeight() * 2, std::min(220 * sc, row_w - ImGui::CalcTextSize("run").x - st.ItemInnerSpacing.x)));
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
        const float scale_w = ImGui::CalcTextSize("+/-100 nT").x + ImGui::GetFrameHeight() + st.FramePadding.x * 2;
        if (ImGui::GetItemRectMax().x + st.ItemSpacing.x + scale_w + st.ItemInnerSpacing.x + ImGui::CalcTextSize("lane scale").x <=
            ImGui::GetWindowPos().x + ImGui::GetWindowContentRegionMax().x)
            ImGui::SameLine();
        ImGui::SetNextItemWidth(scale_w);
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
        const float line_h = ImGui::GetTextLineHeight();
        char buf[64];
        std::snprintf(buf, sizeof buf, "+/-%.3g nT", static_cast<double>(amp));
        const std::string amp_label = buf;
        // The left margin holds the lane names and the lane scale (up to 40 % of the width; longer
        // names are elided, whole on hover).
        float left = std::max(60 * sc, ImGui::CalcTextSize(amp_label.c_str()).x);
        for (const auto& t : prof.traces) left = std::max(left, ImGui::CalcTextSize(t.sensor.c_str()).x);
        left = std::min(left + 8 * sc, avail.x * 0.4f);
        const float bottom = line_h + 4 * sc;
        const Rect area{{p0.x + left, p0.y}, {p0.x + avail.x - 6 * sc, p0.y + avail.y - bottom}};
        if (area.width() < 20 || area.height() < 20) return;
        ImDrawList* dl = ImGui::GetWindowDrawList();
        dl->AddRectFilled(area.min, area.max, pal.background);
        const auto lanes = static_cast<float>(prof.traces.size());
        const float lane_h = area.height() / lanes;
        const int cols = std::max(1, static_cast<int>(area.width()));

        // Distance ticks: as many as their labels allow; a label right of its line, or left of it
        // at the right edge; one that would touch its neighbour is left out.
        std::snprintf(buf, sizeof buf, "%g m", static_cast<double>(x_max));
        const float label_w = ImGui::CalcTextSize(buf).x;
        float prev_end = -1e9f;
        for (double d : niceTicks(0.0, x_max, std::max(2, static_cast<int>(area.width() / (label_w + 24 * sc))))) {
            const float x = area.min.x + static_cast<float>(d / x_max) * area.width();
            dl->AddLine({x, area.min.y}, {x, area.max.y}, pal.grid);
            std::snprintf(buf, sizeof buf, "%g m", d);
            const float w = ImGui::CalcTextSize(buf).x;
            float lx = x + 2 * sc;
            if (lx + w > area.max.x) lx = x - 2 * sc - w;
            if (lx < prev_end + 6 * sc || lx < p0.x) continue;
            prev_end = lx + w;
            dl->AddText({lx, area.max.y + 2 * sc}, pal.text_dim, buf);
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
        // Lane names in the left margin, centred on their lane while lanes are tall enough; the
        // lane scale under each name when there is room, else once under the lanes. A name that
        // would lie on the one above is left out (its trace keeps its colour).
        const bool amp_per_lane = lane_h >= 2 * line_h;
        float prev_bottom = -1e9f;
        for (std::size_t k = 0; k < prof.traces.size(); ++k) {
            const float mid = area.min.y + lane_h * (static_cast<float>(k) + 0.5f);
            const float y = std::clamp(amp_per_lane ? mid - line_h : mid - line_h * 0.5f, area.min.y, area.max.y - line_h);
            if (y < prev_bottom) continue;
            const std::string& name = prof.traces[k].sensor;
            const std::string shown = elideToWidth(name, left - 6 * sc);
            dl->AddText({p0.x + 2 * sc, y}, pal.seriesColour(k), shown.c_str());
            if (shown != name && ImGui::IsMouseHoveringRect({p0.x, y}, {p0.x + left, y + line_h})) ImGui::SetTooltip("%s", name.c_str());
            prev_bottom = y + line_h;
            if (amp_per_lane) {
                dl->AddText({p0.x + 2 * sc, y + line_h}, pal.text_dim, elideToWidth(amp_label, left - 6 * sc).c_str());
                prev_bottom += line_h;
            }
        }
        if (!amp_per_lane) dl->AddText({p0.x + 2 * sc, area.max.y + 2 * sc}, pal.text_dim, elideToWidth(amp_label, left - 6 * sc).c_str());
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
