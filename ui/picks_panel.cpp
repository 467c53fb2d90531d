// "Anomalies" tab: the pick list (click a row to centre the plan on it), the caution that a pick
// list is not a clearance, and the verification strip's result as the passes are run (per pass
// predicted vs measured peak, ratio, detected or not; the verdict per target class).
#include "ui/picks_panel.hpp"

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <string>
#include <vector>

#include "ui/panel.hpp"
#include "ui/plot_draw.hpp"
#include "ui/text_fit.hpp"

namespace sg::ui {

std::string significant(double v, int digits) {
    if (!std::isfinite(v)) return "-";
    if (v == 0.0) return "0";
    const int mag = static_cast<int>(std::floor(std::log10(std::fabs(v))));
    const int decimals = std::max(0, digits - 1 - mag);
    const double step = std::pow(10.0, mag - digits + 1);
    const double r = std::round(v / step) * step;
    char buf[64];
    std::snprintf(buf, sizeof buf, "%.*f", decimals, r);
    return buf;
}

std::string pickLabel(const engine::PickView& p) { return "P" + std::to_string(p.id); }

PickRow pickRow(const engine::PickView& p) {
    PickRow r;
    char buf[160];
    r.id = pickLabel(p);
    r.first_seen = formatUtcTime(p.first_s);
    std::snprintf(buf, sizeof buf, "E %.1f  N %.1f", p.at.e_m, p.at.n_m);
    r.position = buf;
    std::snprintf(buf, sizeof buf, "%+.1f nT", p.peak_nT);
    r.peak = buf;
    if (p.burial_m) {
        if (p.depth_below_sensor_m) std::snprintf(buf, sizeof buf, "%.1f m (%.1f m)", *p.burial_m, *p.depth_below_sensor_m);
        else std::snprintf(buf, sizeof buf, "%.1f m", *p.burial_m);
        r.depth = buf;
    } else {
        r.depth = "-";
    }
    if (p.moment_Am2) {
        r.size = significant(*p.moment_Am2, 2) + " A m²";
        if (p.mass_rule_kg) r.size += ", ~" + significant(*p.mass_rule_kg, 2) + " kg";
    } else if (p.mass_rule_kg) {
        r.size = "~" + significant(*p.mass_rule_kg, 2) + " kg";
    } else {
        r.size = "-";
    }
    std::snprintf(buf, sizeof buf, "%s, r² %.2f, %.1fx thr", p.quality.c_str(), p.fit_r2, p.snr);
    r.quality = buf;
    for (const auto& run : p.runs) r.runs += (r.runs.empty() ? "" : ", ") + run;
    return r;
}

VerificationRow verificationRow(const engine::VerificationPassView& p) {
    VerificationRow r;
    char buf[64];
    r.time = formatUtcTime(p.t_s);
    r.item = p.item;
    r.run = p.run;
    r.sensor = std::to_string(p.sensor_slot);
    std::snprintf(buf, sizeof buf, "%+.1f m", p.offset_m);
    r.offset = buf;
    std::snprintf(buf, sizeof buf, "%.1f m", p.altitude_m);
    r.altitude = buf;
    std::snprintf(buf, sizeof buf, "%.2f nT", p.predicted_nT);
    r.predicted = buf;
    std::snprintf(buf, sizeof buf, "%.2f nT", p.measured_nT);
    r.measured = buf;
    std::snprintf(buf, sizeof buf, "%.2f", p.ratio);
    r.ratio = buf;
    r.model_sees = p.predicted_detected ? "yes" : "no";
    r.seen = p.detected ? "yes" : "no";
    return r;
}

bool verificationPassShown(const engine::VerificationPassView& p) {
    return !(p.predicted_nT < 0.1 * p.threshold_nT && p.measured_nT < p.threshold_nT);
}

std::vector<const engine::VerificationPassView*> shownPassesNewestFirst(const engine::PicksView& v) {
    std::vector<const engine::VerificationPassView*> out;
    for (const auto& p : v.passes)
        if (verificationPassShown(p)) out.push_back(&p);
    // A pass is one line run by one item, seen by each sensor at nearly the same moment: group the
    // sensors of a pass under the pass's latest time, the sensor with the largest prediction
    // (the nearest) first.
    const auto passTime = [&](const engine::VerificationPassView* p) {
        double t = p->t_s;
        for (const auto* q : out)
            if (q->item == p->item && q->run == p->run) t = std::max(t, q->t_s);
        return t;
    };
    std::stable_sort(out.begin(), out.end(), [&](const auto* a, const auto* b) {
        const double ta = passTime(a), tb = passTime(b);
        if (ta != tb) return ta > tb;
        if (a->item != b->item) return a->item < b->item;
        return a->predicted_nT > b->predicted_nT;
    });
    return out;
}

std::string latestPassText(const engine::PicksView& v) {
    const auto shown = shownPassesNewestFirst(v);
    if (shown.empty()) return {};
    // The newest pass the verdict counts (the model predicts a detection there), else the newest.
    const auto counted = std::find_if(shown.begin(), shown.end(), [](const auto* q) { return q->predicted_detected; });
    const engine::VerificationPassView& p = counted != shown.end() ? **counted : *shown.front();
    const VerificationRow r = verificationRow(p);
    return "latest pass " + r.time + "  " + r.item + ", " + r.run + ", sensor " + r.sensor + " at " + r.offset + ", " +
           r.altitude + " up: predicted " + r.predicted + ", measured " + r.measured + ", ratio " + r.ratio + ", " +
           (p.detected ? "seen" : "not seen") + " (model: " + (p.predicted_detected ? "seen" : "not seen") + ")";
}

std::string verificationHeadline(const engine::PicksView& v) {
    std::string h = "Known-item check: ";
    if (v.verdicts.empty()) return h + "no known item";
    char buf[64];
    for (std::size_t i = 0; i < v.verdicts.size(); ++i) {
        const auto& c = v.verdicts[i];
        h += (i ? "; " : "") + c.target_class + " " + verdictWords(c.verdict);
        if (c.passes_used > 0) {
            std::snprintf(buf, sizeof buf, ", ratio %.2f", c.median_ratio);
            h += buf;
        }
    }
    return h + " (" + std::to_string(v.passes.size()) + (v.passes.size() == 1 ? " pass)" : " passes)");
}

std::string verdictWords(const std::string& verdict) {
    std::string w = verdict;
    for (char& c : w)
        if (c == '_') c = ' ';
    return w;
}

float pickMarkerRadius(float scale) { return 7.0f * scale; }

void drawPickMarker(ImDrawList* dl, ImVec2 c, float sc, const Palette& pal, bool filled) {
    const float r = pickMarkerRadius(sc), h = r + 3.0f * sc;
    dl->AddQuadFilled({c.x, c.y - h}, {c.x + h, c.y}, {c.x, c.y + h}, {c.x - h, c.y}, pal.background);
    if (filled) {
        dl->AddQuadFilled({c.x, c.y - r}, {c.x + r, c.y}, {c.x, c.y + r}, {c.x - r, c.y}, pal.pick);
    } else {
        const float k = r - 1.25f * sc;
        dl->AddQuad({c.x, c.y - k}, {c.x + k, c.y}, {c.x, c.y + k}, {c.x - k, c.y}, pal.pick, 2.5f * sc);
    }
}

namespace {

// Dim text that wraps at the panel's edge (ImGui::TextDisabled does not wrap: at large UI scales
// a long note would run past the tab).
void mutedWrapped(const std::string& text) {
    ImGui::PushStyleColor(ImGuiCol_Text, ImGui::GetStyleColorVec4(ImGuiCol_TextDisabled));
    ImGui::TextWrapped("%s", text.c_str());
    ImGui::PopStyleColor();
}

class PicksPanel final : public Panel {
public:
    const char* name() const override { return "Anomalies"; }
    const char* shortName() const override { return "Picks"; }
    Slot slot() const override { return Slot::kTab; }

    void draw(FrameContext& ctx, ImVec2, ImVec2) override {
        const engine::Snapshot* s = ctx.snapshot;
        if (!s) return;
        const Palette& pal = *ctx.palette;
        ImGui::BeginChild("picks_scroll", ImGui::GetContentRegionAvail(), false);
        const engine::PicksView* v = s->picks.get();
        const std::string caution = v && !v->caution.empty() ? v->caution : "a pick list is not a clearance";
        ImGui::PushStyleColor(ImGuiCol_Text, pal.caution);
        ImGui::TextWrapped("Caution: %s.", caution.c_str());
        ImGui::PopStyleColor();
        if (!v) {
            mutedWrapped("No pick list yet.");
        } else if (!v->enabled) {
            mutedWrapped("Picking is switched off ([picks] enabled = false).");
        } else {
            // What changes as the passes are run comes first, readable without scrolling at large
            // UI scales; the lists follow. (Picks on the plan: the plan view's "Picks" toggle.)
            drawVerificationStatus(pal, *v);
            char head[64];
            std::snprintf(head, sizeof head, "Picks (%zu)###picks", v->picks.size());
            if (ImGui::CollapsingHeader(head, ImGuiTreeNodeFlags_DefaultOpen)) drawPicks(ctx, *v);
            // A header does not wrap: its text is elided to the row (the whole on hover; the
            // verdicts are also wrapped in full above).
            const std::string headline = verificationHeadline(*v);
            const float room = ImGui::GetContentRegionAvail().x - ImGui::GetTreeNodeToLabelSpacing() -
                               ImGui::GetStyle().FramePadding.x;
            const std::string known = elideToWidth(headline, room) + "###known";
            const bool open = ImGui::CollapsingHeader(known.c_str(), ImGuiTreeNodeFlags_DefaultOpen);
            if (ImGui::IsItemHovered() && known.size() != headline.size() + 8) ImGui::SetTooltip("%s", headline.c_str());
            if (open) drawVerification(pal, *v);
        }
        ImGui::EndChild();
    }

private:
    // Columns as wide as their text, at most 10 rows high. A tab too narrow for the whole table
    // (large UI scales) lists each row as wrapped text instead: nothing is cut or hidden sideways.
    static constexpr ImGuiTableFlags kTableFlags = ImGuiTableFlags_RowBg | ImGuiTableFlags_SizingFixedFit |
                                                   ImGuiTableFlags_ScrollY | ImGuiTableFlags_BordersInnerV;

    // Whether a table of these headers and rows fits the room left on the line, columns as wide
    // as their widest text.
    static bool tableFits(const std::vector<const char*>& heads, const std::vector<std::vector<const std::string*>>& rows) {
        const ImGuiStyle& st = ImGui::GetStyle();
        float total = rows.size() > 10 ? st.ScrollbarSize : 0.0f;
        for (std::size_t c = 0; c < heads.size(); ++c) {
            float w = ImGui::CalcTextSize(heads[c]).x;
            for (const auto& r : rows) w = std::max(w, ImGui::CalcTextSize(r[c]->c_str()).x);
            total += w + 2 * st.CellPadding.x + 1.0f;
        }
        return total <= ImGui::GetContentRegionAvail().x;
    }

    // "head value" pairs of a row joined for the wrapped list, empty values left out.
    static std::string joined(const std::vector<const char*>& heads, const std::vector<const std::string*>& row,
                              std::size_t from) {
        std::string out;
        for (std::size_t c = from; c < heads.size(); ++c) {
            if (row[c]->empty()) continue;
            if (!out.empty()) out += ";  ";
            out += std::string(heads[c]) + " " + *row[c];
        }
        return out;
    }
    static ImVec2 tableSize(std::size_t rows) {
        const float row = ImGui::GetTextLineHeightWithSpacing() + 2.0f * ImGui::GetStyle().CellPadding.y;
        const float n = static_cast<float>(std::min<std::size_t>(rows, 10) + 1);
        return {0.0f, n * row + ImGui::GetStyle().ScrollbarSize + 4.0f};
    }

    static void drawPicks(FrameContext& ctx, const engine::PicksView& v) {
        if (v.picks.empty()) {
            mutedWrapped("No anomaly has reached the live threshold on a line run yet.");
            return;
        }
        ImGui::PushStyleColor(ImGuiCol_Text, ImGui::GetStyleColorVec4(ImGuiCol_TextDisabled));
        ImGui::TextWrapped("burial below the seabed (depth below the sensor); size: dipole moment, mass by the mass "
                           "rule. Click a row to centre the plan on the pick.");
        ImGui::PopStyleColor();
        const std::vector<const char*> heads = {"pick", "first seen", "E / N m", "peak", "burial (depth)", "size",
                                                "quality", "runs"};
        std::vector<PickRow> rows;
        std::vector<std::vector<const std::string*>> cells;
        rows.reserve(v.picks.size());
        for (const auto& p : v.picks) rows.push_back(pickRow(p));
        for (const auto& r : rows)
            cells.push_back({&r.id, &r.first_seen, &r.position, &r.peak, &r.depth, &r.size, &r.quality, &r.runs});
        if (!tableFits(heads, cells)) {
            for (std::size_t i = 0; i < rows.size(); ++i) {
                ImGui::PushID(v.picks[i].id);
                ImGui::Separator();
                if (ImGui::Selectable(rows[i].id.c_str())) ctx.focus_request = v.picks[i].at;
                ImGui::TextWrapped("%s", joined(heads, cells[i], 1).c_str());
                ImGui::PopID();
            }
            return;
        }
        if (!ImGui::BeginTable("picks", 8, kTableFlags, tableSize(v.picks.size()))) return;
        for (const char* h : heads) ImGui::TableSetupColumn(h);
        ImGui::TableSetupScrollFreeze(0, 1);
        ImGui::TableHeadersRow();
        for (std::size_t i = 0; i < v.picks.size(); ++i) {
            const auto& p = v.picks[i];
            const PickRow& r = rows[i];
            ImGui::PushID(p.id);
            ImGui::TableNextRow();
            ImGui::TableNextColumn();
            if (ImGui::Selectable(r.id.c_str(), false, ImGuiSelectableFlags_SpanAllColumns))
                ctx.focus_request = p.at;
            for (const std::string* t : {&r.first_seen, &r.position, &r.peak, &r.depth, &r.size, &r.quality, &r.runs}) {
                ImGui::TableNextColumn();
                ImGui::TextUnformatted(t->c_str());
            }
            ImGui::PopID();
        }
        ImGui::EndTable();
    }

    static ImU32 verdictColour(const Palette& pal, const std::string& verdict) {
        return verdict == "too_optimistic" ? pal.alarm : verdict == "confirmed" ? pal.ok : pal.text;
    }

    // One line per class with its verdict (in the verdict's colour), then the latest pass.
    static void drawVerificationStatus(const Palette& pal, const engine::PicksView& v) {
        if (v.verdicts.empty()) {
            mutedWrapped("No [[known_item]] configured: the detection model is not checked on the water.");
            return;
        }
        for (const auto& c : v.verdicts) {
            ImGui::PushStyleColor(ImGuiCol_Text, verdictColour(pal, c.verdict));
            if (c.passes_used > 0)
                ImGui::TextWrapped("Known items, %s: %s (median ratio %.2f over %d passes)", c.target_class.c_str(),
                                   verdictWords(c.verdict).c_str(), c.median_ratio, c.passes_used);
            else
                ImGui::TextWrapped("Known items, %s: %s", c.target_class.c_str(), verdictWords(c.verdict).c_str());
            ImGui::PopStyleColor();
        }
        const auto shown = shownPassesNewestFirst(v);
        if (shown.empty()) {
            mutedWrapped("No pass near a known item yet.");
            return;
        }
        // Alarm colour when the model said the item would be seen and it was not.
        const auto counted = std::find_if(shown.begin(), shown.end(), [](const auto* q) { return q->predicted_detected; });
        const bool missed = counted != shown.end() && !(*counted)->detected;
        ImGui::PushStyleColor(ImGuiCol_Text, missed ? pal.alarm : pal.text);
        ImGui::TextWrapped("%s", latestPassText(v).c_str());
        ImGui::PopStyleColor();
    }

    static void drawVerification(const Palette&, const engine::PicksView& v) {
        if (v.verdicts.empty()) return;
        for (const auto& c : v.verdicts) ImGui::TextWrapped("%s", c.text.c_str());
        for (const auto& u : v.unplaced) ImGui::TextWrapped("not placed (no survey CRS): %s", u.c_str());
        if (v.passes.empty()) {
            mutedWrapped("No pass near a known item yet.");
            return;
        }
        // Newest first: the pass just run is the top row.
        const auto shown = shownPassesNewestFirst(v);
        const std::size_t hidden = v.passes.size() - shown.size();
        const std::vector<const char*> heads = {"passed", "item", "run", "sensor", "offset", "altitude", "predicted",
                                                "measured", "ratio", "model: seen", "seen"};
        std::vector<VerificationRow> rows;
        std::vector<std::vector<const std::string*>> cells;
        rows.reserve(shown.size());
        for (const auto* p : shown) rows.push_back(verificationRow(*p));
        for (const auto& r : rows)
            cells.push_back({&r.time, &r.item, &r.run, &r.sensor, &r.offset, &r.altitude, &r.predicted, &r.measured,
                             &r.ratio, &r.model_sees, &r.seen});
        if (!shown.empty() && !tableFits(heads, cells)) {
            for (const auto& c : cells) {
                ImGui::Separator();
                ImGui::TextWrapped("%s", joined(heads, c, 0).c_str());
            }
        } else if (!shown.empty() && ImGui::BeginTable("verification", 11, kTableFlags, tableSize(shown.size()))) {
            for (const char* h : heads) ImGui::TableSetupColumn(h);
            ImGui::TableSetupScrollFreeze(0, 1);
            ImGui::TableHeadersRow();
            for (const auto& c : cells) {
                ImGui::TableNextRow();
                for (const std::string* t : c) {
                    ImGui::TableNextColumn();
                    ImGui::TextUnformatted(t->c_str());
                }
            }
            ImGui::EndTable();
        }
        if (hidden > 0) mutedWrapped(std::to_string(hidden) + " far passes not listed (as in the report).");
    }
};

}  // namespace

std::unique_ptr<Panel> makePicksPanel() { return std::make_unique<PicksPanel>(); }

}  // namespace sg::ui
