// Time plots of the last N minutes: one plot per group the engine sends (altitude against its
// limit, cross-track deviation against tolerance, total field, transverse gradient, noise against
// its limit, speed). Series are decimated to min/max per pixel column, so the cost depends on the
// samples inside the window and the plot width, not on the length of the survey.
#include <algorithm>
#include <cmath>
#include <cstdio>

#include "ui/panel.hpp"
#include "ui/plot_draw.hpp"

namespace sg::ui {
namespace {

constexpr int kWindowChoices[] = {1, 2, 5, 10, 20, 30, 60, 120, 240, 720};

bool isHidden(const ScreenSettings& s, const std::string& title) {
    return std::find(s.hidden_plots.begin(), s.hidden_plots.end(), title) != s.hidden_plots.end();
}

class TimePlots final : public Panel {
public:
    const char* name() const override { return "Time plots"; }
    Slot slot() const override { return Slot::kPlots; }

    void draw(FrameContext& ctx, ImVec2, ImVec2) override {
        ScreenSettings& set = *ctx.settings;
        const Palette& pal = *ctx.palette;
        const float sc = ctx.scale;
        ImGui::SetNextItemWidth(90 * sc);
        char label[32];
        std::snprintf(label, sizeof label, "%d min", set.plot_minutes);
        if (ImGui::BeginCombo("window", label)) {
            for (int m : kWindowChoices) {
                std::snprintf(label, sizeof label, "%d min", m);
                if (ImGui::Selectable(label, m == set.plot_minutes)) {
                    set.plot_minutes = m;
                    ctx.settings_changed = true;
                }
            }
            ImGui::EndCombo();
        }
        const engine::Snapshot* s = ctx.snapshot;
        if (!s) return;
        for (const auto& g : s->plots) {
            ImGui::SameLine();
            bool shown = !isHidden(set, g.title);
            if (ImGui::Checkbox(g.title.c_str(), &shown)) {
                auto& h = set.hidden_plots;
                if (shown) h.erase(std::remove(h.begin(), h.end(), g.title), h.end());
                else h.push_back(g.title);
                ctx.settings_changed = true;
            }
        }
        int visible = 0;
        for (const auto& g : s->plots) visible += isHidden(set, g.title) ? 0 : 1;
        if (visible == 0) return;

        const ImVec2 avail = ImGui::GetContentRegionAvail();
        const float gap = ImGui::GetStyle().ItemSpacing.y + 4.0f;
        const float plot_h = std::max(50.0f * sc, (avail.y - gap * static_cast<float>(visible)) / static_cast<float>(visible));
        ImGui::BeginChild("plots_scroll", avail, false);
        const double t1 = s->now_s;
        const double t0 = t1 - set.plot_minutes * 60.0;
        for (const auto& g : s->plots) {
            if (isHidden(set, g.title)) continue;
            const ImVec2 p0 = ImGui::GetCursorScreenPos();
            const float w = ImGui::GetContentRegionAvail().x;
            drawPlot(ImGui::GetWindowDrawList(), g, {p0, {p0.x + w, p0.y + plot_h}}, t0, t1, pal, sc);
            ImGui::Dummy({w, plot_h + 4.0f});
        }
        ImGui::EndChild();
        m_summaries.endFrame();
    }

private:
    void drawPlot(ImDrawList* dl, const engine::PlotGroup& g, const Rect& box, double t0, double t1,
                  const Palette& pal, float sc) {
        const float left = 56 * sc, top = ImGui::GetTextLineHeight() + 4, bottom = ImGui::GetTextLineHeight() + 2;
        const Rect area{{box.min.x + left, box.min.y + top}, {box.max.x - 8 * sc, box.max.y - bottom}};
        if (area.width() < 10 || area.height() < 10) return;
        dl->AddRectFilled(area.min, area.max, pal.background);
        const int cols = std::max(1, static_cast<int>(area.width()));

        // Decimate every series once, then take the range from the columns and the limits.
        m_cols.resize(g.series.size());
        float lo = 0, hi = 0;
        bool any = false;
        for (std::size_t i = 0; i < g.series.size(); ++i) {
            if (!g.series[i]) continue;
            decimateSeries(*g.series[i], t0, t1, cols, m_cols[i], &m_summaries);
            float a = 0, b = 0;
            if (columnsRange(m_cols[i], a, b)) {
                lo = any ? std::min(lo, a) : a;
                hi = any ? std::max(hi, b) : b;
                any = true;
            }
        }
        for (const auto& l : g.limits) {
            const auto v = static_cast<float>(l.value);
            lo = any ? std::min(lo, v) : v;
            hi = any ? std::max(hi, v) : v;
            any = true;
        }
        if (!any) {
            lo = 0;
            hi = 1;
        }
        double y_lo = lo, y_hi = hi;
        const double pad = std::max((y_hi - y_lo) * 0.08, std::max(std::fabs(y_hi), 1.0) * 1e-3);
        y_lo -= pad;
        y_hi += pad;
        auto Y = [&](double v) { return static_cast<float>(area.max.y - (v - y_lo) / (y_hi - y_lo) * area.height()); };

        // Grid and axis labels.
        char buf[64];
        for (double v : niceTicks(y_lo, y_hi, std::max(2, static_cast<int>(area.height() / (22 * sc))))) {
            const float y = Y(v);
            dl->AddLine({area.min.x, y}, {area.max.x, y}, pal.grid);
            std::snprintf(buf, sizeof buf, "%g", v);
            dl->AddText({box.min.x + 2, y - ImGui::GetTextLineHeight() * 0.5f}, pal.text_dim, buf);
        }
        const double span = t1 - t0;
        // The shortest tick step that leaves room for a label between ticks.
        const double min_px = ImGui::CalcTextSize("00:00:00").x + 24.0f * sc;
        double tick_s = 7200;
        for (double step : {10.0, 30.0, 60.0, 120.0, 300.0, 600.0, 900.0, 1800.0, 3600.0, 7200.0})
            if (step / span * area.width() >= min_px) {
                tick_s = step;
                break;
            }
        for (double t = std::ceil(t0 / tick_s) * tick_s; t <= t1; t += tick_s) {
            const float x = static_cast<float>(area.min.x + (t - t0) / span * area.width());
            dl->AddLine({x, area.min.y}, {x, area.max.y}, pal.grid);
            const std::string lab = formatUtcTime(t);
            dl->AddText({x - ImGui::CalcTextSize(lab.c_str()).x * 0.5f, area.max.y + 1}, pal.text_dim, lab.c_str());
        }
        dl->AddRect(area.min, area.max, pal.axis);

        // Limits: warn dashed, alarm solid and thicker (shape as well as colour).
        dl->PushClipRect(area.min, area.max, true);
        for (const auto& l : g.limits) {
            const float y = Y(l.value);
            if (l.level == checks::Level::kAlarm) dl->AddLine({area.min.x, y}, {area.max.x, y}, pal.alarm, 2.0f * sc);
            else drawDashedLine(dl, {area.min.x, y}, {area.max.x, y}, pal.warn, 1.5f * sc, 6 * sc);
            const ImU32 c = l.level == checks::Level::kAlarm ? pal.alarm : pal.warn;
            std::snprintf(buf, sizeof buf, "%s %g", l.label.c_str(), l.value);
            dl->AddText({area.max.x - ImGui::CalcTextSize(buf).x - 4, y - ImGui::GetTextLineHeight()}, c, buf);
        }
        for (std::size_t i = 0; i < g.series.size(); ++i)
            if (g.series[i])
                drawColumns(dl, m_cols[i], t0, t1, area, y_lo, y_hi, g.series[i]->break_after_s, pal.seriesColour(i),
                            1.5f * sc);
        dl->PopClipRect();

        // Title and legend with the latest value of each series.
        float x = box.min.x + 2;
        std::snprintf(buf, sizeof buf, "%s (%s)", g.title.c_str(), g.unit.c_str());
        dl->AddText({x, box.min.y}, pal.text, buf);
        x += ImGui::CalcTextSize(buf).x + 14 * sc;
        for (std::size_t i = 0; i < g.series.size(); ++i) {
            if (!g.series[i]) continue;
            const auto& sr = *g.series[i];
            const engine::SeriesPoint* last = nullptr;
            if (!sr.points.chunks.empty() && sr.points.chunks.back() && !sr.points.chunks.back()->empty())
                last = &sr.points.chunks.back()->back();
            if (last) std::snprintf(buf, sizeof buf, "%s %.2f", sr.name.c_str(), static_cast<double>(last->value));
            else std::snprintf(buf, sizeof buf, "%s --", sr.name.c_str());
            dl->AddRectFilled({x, box.min.y + 5}, {x + 10 * sc, box.min.y + 9}, pal.seriesColour(i));
            dl->AddText({x + 13 * sc, box.min.y}, pal.text, buf);
            x += ImGui::CalcTextSize(buf).x + 26 * sc;
        }
    }

    std::vector<std::vector<Column>> m_cols;
    SeriesSummaryCache m_summaries;
};

}  // namespace

std::unique_ptr<Panel> makeTimePlots() { return std::make_unique<TimePlots>(); }

}  // namespace sg::ui
