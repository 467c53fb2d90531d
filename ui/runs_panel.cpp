// Runs and infill panel: per-line progress (runs with % covered, altitude and deviation figures,
// alarm count), choosing the active line, the gap list (click to show a gap in the plan view) and
// the infill proposals with export buttons (GeoJSON, GPX, CSV -> UiCommand::kExportInfill).
#include <algorithm>
#include <cstdio>
#include <string>
#include <vector>

#include "ui/panel.hpp"
#include "ui/plot_draw.hpp"
#include "ui/text_fit.hpp"

namespace sg::ui {
namespace {

class RunsPanel final : public Panel {
public:
    const char* name() const override { return "Runs & infill"; }
    const char* shortName() const override { return "Runs"; }
    Slot slot() const override { return Slot::kTab; }

    void draw(FrameContext& ctx, ImVec2, ImVec2) override {
        const engine::Snapshot* s = ctx.snapshot;
        if (!s) return;
        const float sc = ctx.scale;
        // A little inner padding: a child window clips exactly at its edge, where a glyph with a
        // negative left bearing (a leading "T") would lose a pixel column.
        ImGui::PushStyleVar(ImGuiStyleVar_WindowPadding, {std::max(2.0f, 2 * sc), 0.0f});
        ImGui::BeginChild("runs_scroll", ImGui::GetContentRegionAvail(), false, ImGuiWindowFlags_AlwaysUseWindowPadding);
        ImGui::PopStyleVar();
        bool unused = false;
        bool& hide_earlier = ctx.settings ? ctx.settings->hide_earlier_sessions : unused;
        if (ImGui::CollapsingHeader("Runs", ImGuiTreeNodeFlags_DefaultOpen)) drawRuns(ctx, *s, sc, hide_earlier);
        if (ImGui::CollapsingHeader("Planned lines")) drawLines(ctx, *s);
        char head[64];
        std::snprintf(head, sizeof head, "Gaps (%zu)###gaps", s->gaps.size());
        if (ImGui::CollapsingHeader(head, ImGuiTreeNodeFlags_DefaultOpen)) drawGaps(ctx, *s);
        std::snprintf(head, sizeof head, "Infill proposals (%zu)###infill", s->infill.size());
        if (ImGui::CollapsingHeader(head, ImGuiTreeNodeFlags_DefaultOpen)) drawInfill(ctx, *s);
        ImGui::EndChild();
    }

private:
    static void drawRuns(FrameContext&, const engine::Snapshot& s, float, bool& hide_earlier) {
        if (s.runs.empty()) {
            ImGui::TextDisabled("No runs recorded yet.");
            return;
        }
        // A site: runs of earlier logs come first; they and their coverage on the plan can be
        // hidden to see today's work only.
        std::size_t earlier = 0;
        for (const auto& r : s.runs) earlier += r.earlier_session ? 1 : 0;
        if (s.earlier_sessions > 0) {
            char label[128];
            std::snprintf(label, sizeof label, "This session only (hide %zu runs and the coverage of %d earlier log%s)",
                          earlier, s.earlier_sessions, s.earlier_sessions == 1 ? "" : "s");
            ImGui::Checkbox("##this_session_only", &hide_earlier);
            ImGui::SameLine();
            textFitted(label);
        }
        // Columns by priority: a narrow column (large UI scale) drops the log name, then the
        // altitude and deviation figures; each column is at least as wide as its figures (the
        // stretch weights are those widths), and every cell is elided to its column, whole on
        // hover.
        enum Col { kRun, kLog, kCovered, kMeanAlt, kWorstAlt, kWorstDev, kAlarms, kStart, kCount };
        const char* heads[kCount] = {"run", "log", "covered", "alt m", "max alt", "max dev", "alarms", "start, duration"};
        // Header words in full, on hover.
        const char* tips[kCount] = {"run", "log", "covered", "mean altitude (m)", "worst (highest) altitude (m)",
                                    "worst deviation from the line (m)", "alarms", "start (survey UTC), duration"};
        const float cell_pad = ImGui::GetStyle().CellPadding.x * 2 + 1;
        auto tw = [](const char* t) { return ImGui::CalcTextSize(t).x; };
        float run_w = tw("run");
        for (const auto& r : s.runs) run_w = std::max(run_w, tw((r.name + (r.active ? " (now)" : "")).c_str()));
        const std::vector<StripField> cols = {
            {std::min(run_w, tw("00000000 (now)")) + cell_pad, 100},
            {tw("log_000") + cell_pad, 10},
            {tw("100.0 %") + ImGui::GetStyle().FramePadding.x * 2 + cell_pad, 100},
            {std::max(tw("000.0"), tw(heads[kMeanAlt])) + cell_pad, 30},
            {std::max(tw("000.0"), tw(heads[kWorstAlt])) + cell_pad, 35},
            {std::max(tw("-00.0"), tw(heads[kWorstDev])) + cell_pad, 40},
            {tw("alarms") + cell_pad, 60},
            {tw("00:00:00, 00m00s") + cell_pad, 80},
        };
        const auto use = fitStrip(cols, ImGui::GetContentRegionAvail().x, 0.0f, 100);
        int n_cols = 0;
        for (bool u : use) n_cols += u ? 1 : 0;
        if (!ImGui::BeginTable("runs", n_cols, ImGuiTableFlags_RowBg | ImGuiTableFlags_SizingStretchProp)) return;
        for (int c = 0; c < kCount; ++c)
            if (use[static_cast<std::size_t>(c)])
                ImGui::TableSetupColumn(heads[c], ImGuiTableColumnFlags_WidthStretch, cols[static_cast<std::size_t>(c)].width);
        ImGui::TableNextRow(ImGuiTableRowFlags_Headers);
        for (int c = 0; c < kCount; ++c) {
            if (!use[static_cast<std::size_t>(c)]) continue;
            ImGui::TableNextColumn();
            const std::string shown = elideToWidth(heads[c], ImGui::GetContentRegionAvail().x);
            ImGui::PushID(c);
            ImGui::TableHeader((shown + "##h").c_str());
            if (ImGui::IsItemHovered() && (shown != heads[c] || std::string(tips[c]) != heads[c]))
                ImGui::SetTooltip("%s", tips[c]);
            ImGui::PopID();
        }
        char buf[64];
        auto figure = [&](Col c, double v) {
            if (!use[c]) return;
            ImGui::TableNextColumn();
            std::snprintf(buf, sizeof buf, "%.1f", v);
            textFitted(buf);
        };
        for (const auto& r : s.runs) {
            if (hide_earlier && r.earlier_session) continue;
            ImGui::TableNextRow();
            ImGui::TableNextColumn();
            textFitted(r.name + (r.active ? " (now)" : ""));
            if (use[kLog]) {
                ImGui::TableNextColumn();
                textFitted(r.log);
            }
            ImGui::TableNextColumn();
            std::snprintf(buf, sizeof buf, "%.1f %%", r.percent_covered);
            ImGui::ProgressBar(static_cast<float>(r.percent_covered / 100.0), {-1, ImGui::GetTextLineHeight()}, buf);
            figure(kMeanAlt, r.mean_altitude_m);
            figure(kWorstAlt, r.worst_altitude_m);
            figure(kWorstDev, r.worst_deviation_m);
            if (use[kAlarms]) {
                ImGui::TableNextColumn();
                textFitted(std::to_string(r.alarm_count));
            }
            if (use[kStart]) {
                ImGui::TableNextColumn();
                // Start and end are on the survey clock, like now_s (issue #12: a duration once read
                // 4156 h, the survey start subtracted from the receive clock of a replay).
                const double end = r.active ? s.now_s : r.end_s;
                textFitted(formatUtcTime(r.start_s) + ", " + (end >= r.start_s ? formatDuration(end - r.start_s) : "--"));
            }
        }
        ImGui::EndTable();
    }

    static void drawLines(FrameContext& ctx, const engine::Snapshot& s) {
        for (std::size_t i = 0; i < s.lines.size(); ++i) {
            ImGui::PushID(static_cast<int>(i));
            const bool is_active = static_cast<int>(i) == s.active_line;
            ImGui::BeginDisabled(is_active);
            if (ImGui::SmallButton(is_active ? "active" : "make active"))
                ctx.send({engine::UiCommand::Kind::kSetActiveLine, i, 0.0, {}});
            ImGui::EndDisabled();
            ImGui::SameLine();
            textFitted(s.lines[i].name);
            ImGui::PopID();
        }
    }

    static void drawGaps(FrameContext& ctx, const engine::Snapshot& s) {
        if (s.gaps.empty()) {
            ImGui::TextDisabled("No gaps inside the area.");
            return;
        }
        double total = 0;
        for (const auto& g : s.gaps) total += g.area_m2;
        char sum[64];
        std::snprintf(sum, sizeof sum, "Total uncovered: %.0f m2", total);
        textFitted(sum);
        for (const auto& g : s.gaps) {
            ImGui::PushID(static_cast<int>(g.id));
            if (ImGui::SmallButton("show")) ctx.focus_request = g.centroid;
            ImGui::SameLine();
            char line[128];
            std::snprintf(line, sizeof line, "gap %llu: %.0f m2 at E %.0f N %.0f", static_cast<unsigned long long>(g.id),
                          g.area_m2, g.centroid.e_m, g.centroid.n_m);
            textFitted(line);
            ImGui::PopID();
        }
    }

    static void drawInfill(FrameContext& ctx, const engine::Snapshot& s) {
        if (s.infill.empty()) {
            ImGui::TextDisabled("No infill proposed.");
            return;
        }
        double total = 0;
        for (const auto& f : s.infill) total += f.length_m;
        char summary[96];
        std::snprintf(summary, sizeof summary, "%zu lines, %.0f m in total. Export:", s.infill.size(), total);
        textFitted(summary);
        // The export buttons follow on the same row while they fit, else on the next.
        for (const char* fmt : {"GeoJSON", "GPX", "CSV"}) {
            const float w = ImGui::CalcTextSize(fmt).x + ImGui::GetStyle().FramePadding.x * 2;
            if (ImGui::GetItemRectMax().x + ImGui::GetStyle().ItemSpacing.x + w <=
                ImGui::GetWindowPos().x + ImGui::GetWindowContentRegionMax().x)
                ImGui::SameLine();
            if (ImGui::Button(fmt)) {
                std::string key = fmt;
                for (char& c : key) c = static_cast<char>(c >= 'A' && c <= 'Z' ? c - 'A' + 'a' : c);
                ctx.send({engine::UiCommand::Kind::kExportInfill, 0, 0.0, key});
            }
        }
        for (const auto& f : s.infill) {
            ImGui::PushID(static_cast<int>(f.id));
            if (ImGui::SmallButton("show") && !f.points.empty()) ctx.focus_request = f.points.front();
            ImGui::SameLine();
            std::string gaps;
            for (auto id : f.gap_ids) gaps += (gaps.empty() ? "" : ", ") + std::to_string(id);
            char line[64];
            std::snprintf(line, sizeof line, ": %.0f m, closes gap ", f.length_m);
            textFitted(f.name + line + gaps);
            ImGui::PopID();
        }
    }
};

}  // namespace

std::unique_ptr<Panel> makeRunsPanel() { return std::make_unique<RunsPanel>(); }

}  // namespace sg::ui
