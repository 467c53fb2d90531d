// Time plots of the last N minutes on the survey clock: one plot per group the engine sends
// (altitude against its limit, cross-track deviation against tolerance, total field, transverse
// gradient, noise against its limit, speed). Sensors are drawn as small multiples (one lane per
// sensor, sharing the group's value scale) or one chosen sensor; all plots share one time axis,
// labelled once under the lowest plot. Limit labels sit in a margin beside their lines, never
// under them. Series are decimated to min/max per pixel column, so the cost depends on the
// samples inside the window and the plot width, not on the length of the survey.
#include <algorithm>
#include <cmath>
#include <cstdio>
#include <string_view>

#include "ui/panel.hpp"
#include "ui/plot_draw.hpp"

namespace sg::ui {
namespace {

constexpr int kWindowChoices[] = {1, 2, 5, 10, 20, 30, 60, 120, 240, 720};

bool isHidden(const ScreenSettings& s, const std::string& title) {
    return std::find(s.hidden_plots.begin(), s.hidden_plots.end(), title) != s.hidden_plots.end();
}

// Sensor name of a per-sensor series ("mag2"), or empty for a series that belongs to no single
// sensor (deviation, speed). A gradient "mag2-mag1" belongs to its first sensor.
std::string sensorOf(const std::string& series) {
    if (series.rfind("mag", 0) != 0) return {};
    const auto dash = series.find('-');
    return dash == std::string::npos ? series : series.substr(0, dash);
}

class TimePlots final : public Panel {
public:
    const char* name() const override { return "Time plots"; }
    Slot slot() const override { return Slot::kPlots; }

    void draw(FrameContext& ctx, ImVec2, ImVec2) override {
        ScreenSettings& set = *ctx.settings;
        const Palette& pal = *ctx.palette;
        const float sc = ctx.scale;
        ImGui::SetNextItemWidth(ImGui::CalcTextSize("720 min").x + ImGui::GetFrameHeight() + 8 * sc);
        char label[48];
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
        // The sensors the series name, for the sensor chooser.
        std::vector<std::string> sensors;
        for (const auto& g : s->plots)
            for (const auto& ser : g.series)
                if (ser) {
                    const auto n = sensorOf(ser->name);
                    if (!n.empty() && std::find(sensors.begin(), sensors.end(), n) == sensors.end())
                        sensors.push_back(n);
                }
        std::sort(sensors.begin(), sensors.end());
        // Beside the window choice when the column has room for it, else under it.
        const float sensor_w = ImGui::CalcTextSize("every sensor").x + ImGui::GetFrameHeight() + 8 * sc;
        if (ImGui::GetItemRectMax().x + ImGui::GetStyle().ItemSpacing.x * 2 + sensor_w + ImGui::CalcTextSize("sensor").x <=
            ImGui::GetWindowPos().x + ImGui::GetWindowContentRegionMax().x)
            ImGui::SameLine();
        ImGui::SetNextItemWidth(sensor_w);
        if (ImGui::BeginCombo("sensor", m_sensor.empty() ? "every sensor" : m_sensor.c_str())) {
            if (ImGui::Selectable("every sensor", m_sensor.empty())) m_sensor.clear();
            for (const auto& n : sensors)
                if (ImGui::Selectable(n.c_str(), n == m_sensor)) m_sensor = n;
            ImGui::EndCombo();
        }
        if (!m_sensor.empty() && std::find(sensors.begin(), sensors.end(), m_sensor) == sensors.end()) m_sensor.clear();
        const auto toggle = [&](const engine::PlotGroup& g) {
            bool shown = !isHidden(set, g.title);
            if (ImGui::Checkbox(g.title.c_str(), &shown)) {
                auto& h = set.hidden_plots;
                if (shown) h.erase(std::remove(h.begin(), h.end(), g.title), h.end());
                else h.push_back(g.title);
                ctx.settings_changed = true;
            }
        };
        // Plot toggles sit beside the choosers and wrap onto at most one further row; when they
        // would need more (large UI scales) they go into a "plots" pop-up, so the rows they would
        // take are left to the plots themselves.
        const float right_edge = ImGui::GetWindowPos().x + ImGui::GetWindowContentRegionMax().x;
        const float spacing = ImGui::GetStyle().ItemSpacing.x;
        float toggles_w = 0.0f;
        int n_shown = 0;
        for (const auto& g : s->plots) {
            toggles_w += ImGui::GetFrameHeight() + ImGui::CalcTextSize(g.title.c_str()).x + spacing * 2;
            n_shown += isHidden(set, g.title) ? 0 : 1;
        }
        const float row_w = ImGui::GetContentRegionAvail().x;
        const float left_on_row = std::max(0.0f, right_edge - ImGui::GetItemRectMax().x - spacing);
        if (toggles_w <= left_on_row + row_w) {
            for (const auto& g : s->plots) {
                const float w = ImGui::GetFrameHeight() + ImGui::CalcTextSize(g.title.c_str()).x + spacing * 2;
                if (ImGui::GetItemRectMax().x + w < right_edge) ImGui::SameLine();
                toggle(g);
            }
        } else {
            char plots_label[48];
            std::snprintf(plots_label, sizeof plots_label, "plots %d of %zu", n_shown, s->plots.size());
            const float w = ImGui::CalcTextSize(plots_label).x + 2 * ImGui::GetStyle().FramePadding.x + spacing;
            if (ImGui::GetItemRectMax().x + w < right_edge) ImGui::SameLine();
            if (ImGui::Button(plots_label)) ImGui::OpenPopup("plot_toggles");
            if (ImGui::IsItemHovered()) ImGui::SetTooltip("Choose the plots shown");
            if (ImGui::BeginPopup("plot_toggles")) {
                for (const auto& g : s->plots) toggle(g);
                ImGui::EndPopup();
            }
        }
        std::vector<const engine::PlotGroup*> visible;
        for (const auto& g : s->plots)
            if (!isHidden(set, g.title)) visible.push_back(&g);
        if (visible.empty()) return;

        const ImVec2 avail = ImGui::GetContentRegionAvail();
        const float line_h = ImGui::GetTextLineHeight();
        const float axis_h = line_h + 4.0f * sc;  // the one shared time axis, under the last plot
        // Each Dummy below also adds the style's item spacing: count it, or the shared time axis
        // under the last plot would be scrolled out of view.
        const float gap = 4.0f * sc + ImGui::GetStyle().ItemSpacing.y;
        const float plot_h = std::max(
            40.0f * sc, (avail.y - axis_h - 2.0f - gap * static_cast<float>(visible.size())) / static_cast<float>(visible.size()));
        ImGui::BeginChild("plots_scroll", avail, false);
        const double t1 = s->now_s;
        const double t0 = t1 - set.plot_minutes * 60.0;
        m_last_areas.clear();
        for (std::size_t k = 0; k < visible.size(); ++k) {
            const auto& g = *visible[k];
            const ImVec2 p0 = ImGui::GetCursorScreenPos();
            const float w = ImGui::GetContentRegionAvail().x;
            const bool last = k + 1 == visible.size();
            const float h = plot_h + (last ? axis_h : 0.0f);
            drawPlot(ImGui::GetWindowDrawList(), g, {p0, {p0.x + w, p0.y + h}}, t0, t1, pal, sc, last);
            ImGui::Dummy({w, h + 4.0f * sc});
        }
        ImGui::EndChild();
        m_summaries.endFrame();
    }

private:
    // Decimals that mean something for a group's values (a tenth of a metre of altitude or
    // speed, hundredths of a nanotesla of noise).
    static int decimalsFor(const std::string& title) {
        if (title == "Gradient" || title == "Noise") return 2;
        return 1;
    }

    void drawPlot(ImDrawList* dl, const engine::PlotGroup& g, const Rect& box, double t0, double t1,
                  const Palette& pal, float sc, bool with_time_axis) {
        const float line_h = ImGui::GetTextLineHeight();
        const int dec = decimalsFor(g.title);
        // Which series, and how many lanes: every sensor in its own lane, or the chosen one.
        std::vector<std::size_t> shown;
        for (std::size_t i = 0; i < g.series.size(); ++i) {
            if (!g.series[i]) continue;
            const auto sensor = sensorOf(g.series[i]->name);
            if (!m_sensor.empty() && !sensor.empty() && sensor != m_sensor) continue;
            shown.push_back(i);
        }
        // A chosen sensor without a series of its own here (e.g. the first one of a gradient).
        if (shown.empty())
            for (std::size_t i = 0; i < g.series.size(); ++i)
                if (g.series[i]) shown.push_back(i);

        char buf[96];
        // Limit labels go in a right margin, beside their lines.
        float limit_w = 0;
        for (const auto& l : g.limits) {
            std::snprintf(buf, sizeof buf, "%s %.*f", l.level == checks::Level::kAlarm ? "alarm" : "warn", dec, l.value);
            limit_w = std::max(limit_w, ImGui::CalcTextSize(buf).x);
        }
        const float left = ImGui::CalcTextSize("-00000.0").x + 6 * sc;
        const float right = limit_w > 0 ? limit_w + 8 * sc : 6 * sc;
        const float top = line_h + 2 * sc;
        const float bottom = with_time_axis ? line_h + 4 * sc : 0.0f;
        const Rect area{{box.min.x + left, box.min.y + top}, {box.max.x - right, box.max.y - bottom}};
        if (area.width() < 10 || area.height() < 10) return;
        m_last_areas.push_back(area);
        const int cols = std::max(1, static_cast<int>(area.width()));

        // Decimate every shown series once; one value range for all lanes (a shared scale).
        m_cols.resize(g.series.size());
        float lo = 0, hi = 0;
        bool any = false;
        for (std::size_t i : shown) {
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

        // Title and the latest value of each shown series, rounded.
        float x = box.min.x + 2;
        std::snprintf(buf, sizeof buf, "%s (%s)", g.title.c_str(), g.unit.c_str());
        dl->AddText({x, box.min.y}, pal.text, buf);
        x += ImGui::CalcTextSize(buf).x + 12 * sc;
        // One lane per sensor while each lane has room for its name and a trace; a short plot
        // (large UI scale, small window) draws the sensors in one lane, named in the title row.
        const bool lanes = shown.size() > 1 && area.height() / static_cast<float>(shown.size()) >= line_h * 1.5f;
        for (std::size_t i : shown) {
            const auto& sr = *g.series[i];
            const engine::SeriesPoint* latest = nullptr;
            if (!sr.points.chunks.empty() && sr.points.chunks.back() && !sr.points.chunks.back()->empty())
                latest = &sr.points.chunks.back()->back();
            if (latest) std::snprintf(buf, sizeof buf, "%s %.*f", sr.name.c_str(), dec, static_cast<double>(latest->value));
            else std::snprintf(buf, sizeof buf, "%s --", sr.name.c_str());
            const float tw = ImGui::CalcTextSize(buf).x;
            if (x + 13 * sc + tw > box.max.x) break;  // no room: the lanes carry the names
            dl->AddRectFilled({x, box.min.y + line_h * 0.35f}, {x + 10 * sc, box.min.y + line_h * 0.65f}, pal.seriesColour(i));
            dl->AddText({x + 13 * sc, box.min.y}, pal.text, buf);
            x += tw + 24 * sc;
        }

        // Vertical time grid, shared by every plot; labels under the last plot only.
        const double span = t1 - t0;
        const double min_px = ImGui::CalcTextSize("00:00:00").x + 24.0f * sc;
        double tick_s = 7200;
        for (double step : {10.0, 30.0, 60.0, 120.0, 300.0, 600.0, 900.0, 1800.0, 3600.0, 7200.0})
            if (step / span * area.width() >= min_px) {
                tick_s = step;
                break;
            }

        const std::size_t n_lanes = lanes ? shown.size() : 1;
        const float lane_h = area.height() / static_cast<float>(n_lanes);
        for (std::size_t lane = 0; lane < n_lanes; ++lane) {
            const Rect r{{area.min.x, area.min.y + lane_h * static_cast<float>(lane)},
                         {area.max.x, area.min.y + lane_h * static_cast<float>(lane + 1) - (lanes ? 1.0f : 0.0f)}};
            if (r.height() < 4) continue;
            dl->AddRectFilled(r.min, r.max, pal.background);
            auto Y = [&](double v) { return static_cast<float>(r.max.y - (v - y_lo) / (y_hi - y_lo) * r.height()); };
            for (double t = std::ceil(t0 / tick_s) * tick_s; t <= t1; t += tick_s) {
                const float tx = static_cast<float>(r.min.x + (t - t0) / span * r.width());
                dl->AddLine({tx, r.min.y}, {tx, r.max.y}, pal.grid);
            }
            // Value ticks: a few per lane when it has room, else its top and bottom values.
            // Their labels stay inside the lane's height and apart from each other.
            const int max_ticks = std::max(1, static_cast<int>(r.height() / (line_h * 1.6f)));
            const auto ticks = niceTicks(y_lo, y_hi, max_ticks);
            std::vector<float> tick_ys;
            for (double v : ticks) {
                const float y = Y(v);
                dl->AddLine({r.min.x, y}, {r.max.x, y}, pal.grid);
                if (r.height() < line_h * 1.2f) continue;
                std::snprintf(buf, sizeof buf, "%g", v);
                const float ty = std::clamp(y - line_h * 0.5f, r.min.y, r.max.y - line_h);
                if (std::any_of(tick_ys.begin(), tick_ys.end(), [&](float p) { return std::fabs(p - ty) < line_h; })) continue;
                tick_ys.push_back(ty);
                dl->AddText({r.min.x - ImGui::CalcTextSize(buf).x - 4 * sc, ty}, pal.text_dim, buf);
            }
            dl->AddRect(r.min, r.max, pal.axis);
            // Limits: warn dashed, alarm solid and thicker (shape as well as colour).
            dl->PushClipRect(r.min, r.max, true);
            for (const auto& l : g.limits) {
                const float y = Y(l.value);
                if (l.level == checks::Level::kAlarm) dl->AddLine({r.min.x, y}, {r.max.x, y}, pal.alarm, 2.0f * sc);
                else drawDashedLine(dl, {r.min.x, y}, {r.max.x, y}, pal.warn, 1.5f * sc, 6 * sc);
            }
            const std::size_t from = lanes ? lane : 0, to = lanes ? lane + 1 : shown.size();
            for (std::size_t k = from; k < to; ++k) {
                const std::size_t i = shown[k];
                drawColumns(dl, m_cols[i], t0, t1, r, y_lo, y_hi, g.series[i]->break_after_s, pal.seriesColour(i),
                            1.5f * sc);
            }
            dl->PopClipRect();
            if (lanes) {
                // The lane's sensor, inside its top-left corner on the background.
                const char* nm = g.series[shown[lane]]->name.c_str();
                const ImVec2 ts = ImGui::CalcTextSize(nm);
                if (r.height() >= ts.y) {
                    dl->AddRectFilled({r.min.x + 1, r.min.y + 1}, {r.min.x + ts.x + 6 * sc, r.min.y + ts.y + 1}, pal.background);
                    dl->AddText({r.min.x + 3 * sc, r.min.y + 1}, pal.seriesColour(shown[lane]), nm);
                }
            }
            // Limit labels beside their lines, in the right margin, kept apart from each other.
            // Each label stays inside the lane's height (never in the title row or on the time
            // axis); one that would lie on another is left out (the line is still drawn).
            if (lane == 0 || !lanes) {
                std::vector<float> placed;
                for (const auto& l : g.limits) {
                    const float y = Y(l.value);
                    if (y < r.min.y - 1 || y > r.max.y + 1 || r.height() < line_h) continue;
                    float ty = std::clamp(y - line_h * 0.5f, r.min.y, r.max.y - line_h);
                    for (float p : placed)
                        if (std::fabs(ty - p) < line_h) ty = p + (ty >= p ? line_h : -line_h);
                    if (ty < r.min.y - 0.5f || ty + line_h > r.max.y + 0.5f) continue;
                    if (std::any_of(placed.begin(), placed.end(), [&](float p) { return std::fabs(p - ty) < line_h - 0.5f; }))
                        continue;
                    placed.push_back(ty);
                    std::snprintf(buf, sizeof buf, "%s %.*f", l.level == checks::Level::kAlarm ? "alarm" : "warn", dec, l.value);
                    dl->AddText({r.max.x + 4 * sc, ty}, l.level == checks::Level::kAlarm ? pal.alarm : pal.warn, buf);
                }
            }
        }
        if (with_time_axis) {
            float prev_end = -1e9f;
            for (double t = std::ceil(t0 / tick_s) * tick_s; t <= t1; t += tick_s) {
                const float tx = static_cast<float>(area.min.x + (t - t0) / span * area.width());
                const std::string lab = formatUtcTime(t);
                const float tw = ImGui::CalcTextSize(lab.c_str()).x;
                const float lx = std::clamp(tx - tw * 0.5f, area.min.x, area.max.x + right - tw);
                if (lx < prev_end + 4 * sc) continue;  // pushed onto its neighbour at an edge
                prev_end = lx + tw;
                dl->AddText({lx, area.max.y + 2 * sc}, pal.text_dim, lab.c_str());
            }
        }
    }

    std::vector<std::vector<Column>> m_cols;
    SeriesSummaryCache m_summaries;
    std::string m_sensor;  // empty: every sensor, one lane each
    std::vector<Rect> m_last_areas;
};

}  // namespace

std::unique_ptr<Panel> makeTimePlots() { return std::make_unique<TimePlots>(); }

}  // namespace sg::ui
