// Runs and infill panel: per-line progress (runs with % covered, altitude and deviation figures,
// alarm count), choosing the active line, the gap list (click to show a gap in the plan view) and
// the infill proposals with export buttons (GeoJSON, GPX, CSV -> UiCommand::kExportInfill).
#include <cstdio>

#include "ui/panel.hpp"
#include "ui/plot_draw.hpp"

namespace sg::ui {
namespace {

class RunsPanel final : public Panel {
public:
    const char* name() const override { return "Runs & infill"; }
    Slot slot() const override { return Slot::kTab; }

    void draw(FrameContext& ctx, ImVec2, ImVec2) override {
        const engine::Snapshot* s = ctx.snapshot;
        if (!s) return;
        const float sc = ctx.scale;
        ImGui::BeginChild("runs_scroll", ImGui::GetContentRegionAvail(), false);
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
            ImGui::Checkbox(label, &hide_earlier);
        }
        if (!ImGui::BeginTable("runs", 8, ImGuiTableFlags_RowBg | ImGuiTableFlags_SizingStretchProp)) return;
        ImGui::TableSetupColumn("run", ImGuiTableColumnFlags_WidthStretch, 2.0f);
        ImGui::TableSetupColumn("log", ImGuiTableColumnFlags_WidthStretch, 2.0f);
        ImGui::TableSetupColumn("covered", ImGuiTableColumnFlags_WidthStretch, 2.0f);
        ImGui::TableSetupColumn("mean alt m", ImGuiTableColumnFlags_WidthStretch, 1.0f);
        ImGui::TableSetupColumn("worst alt m", ImGuiTableColumnFlags_WidthStretch, 1.0f);
        ImGui::TableSetupColumn("worst dev m", ImGuiTableColumnFlags_WidthStretch, 1.0f);
        ImGui::TableSetupColumn("alarms", ImGuiTableColumnFlags_WidthStretch, 0.8f);
        ImGui::TableSetupColumn("start, duration", ImGuiTableColumnFlags_WidthStretch, 1.6f);
        ImGui::TableHeadersRow();
        for (const auto& r : s.runs) {
            if (hide_earlier && r.earlier_session) continue;
            ImGui::TableNextRow();
            ImGui::TableNextColumn();
            ImGui::Text("%s%s", r.name.c_str(), r.active ? " (now)" : "");
            ImGui::TableNextColumn();
            ImGui::TextUnformatted(r.log.c_str());
            ImGui::TableNextColumn();
            char pct[32];
            std::snprintf(pct, sizeof pct, "%.1f %%", r.percent_covered);
            ImGui::ProgressBar(static_cast<float>(r.percent_covered / 100.0), {-1, ImGui::GetTextLineHeight()}, pct);
            ImGui::TableNextColumn();
            ImGui::Text("%.1f", r.mean_altitude_m);
            ImGui::TableNextColumn();
            ImGui::Text("%.1f", r.worst_altitude_m);
            ImGui::TableNextColumn();
            ImGui::Text("%.1f", r.worst_deviation_m);
            ImGui::TableNextColumn();
            ImGui::Text("%d", r.alarm_count);
            ImGui::TableNextColumn();
            // Start and end are on the survey clock, like now_s (issue #12: a duration once read
            // 4156 h, the survey start subtracted from the receive clock of a replay).
            const double end = r.active ? s.now_s : r.end_s;
            ImGui::Text("%s, %s", formatUtcTime(r.start_s).c_str(),
                        end >= r.start_s ? formatDuration(end - r.start_s).c_str() : "--");
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
            ImGui::TextUnformatted(s.lines[i].name.c_str());
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
        ImGui::Text("Total uncovered: %.0f m2", total);
        for (const auto& g : s.gaps) {
            ImGui::PushID(static_cast<int>(g.id));
            if (ImGui::SmallButton("show")) ctx.focus_request = g.centroid;
            ImGui::SameLine();
            ImGui::Text("gap %llu: %.0f m2 at E %.0f N %.0f", static_cast<unsigned long long>(g.id), g.area_m2,
                        g.centroid.e_m, g.centroid.n_m);
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
        ImGui::Text("%zu lines, %.0f m in total. Export:", s.infill.size(), total);
        for (const char* fmt : {"GeoJSON", "GPX", "CSV"}) {
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
            ImGui::Text("%s: %.0f m, closes gap %s", f.name.c_str(), f.length_m, gaps.c_str());
            ImGui::PopID();
        }
    }
};

}  // namespace

std::unique_ptr<Panel> makeRunsPanel() { return std::make_unique<RunsPanel>(); }

}  // namespace sg::ui
