// Plan view: coverage raster (tile textures coloured by detection margin), area, planned lines,
// tracks, live swath edges, gaps, infill proposals, vessel and sensors; pan (drag), zoom (wheel),
// fit (double-click), follow-vessel mode, scale bar, north arrow, margin legend and a cursor
// read-out (E/N, lon/lat, margin and run of the cell under the cursor).
#include "ui/plan_view.hpp"

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <initializer_list>
#include <string>

#include "ui/label_placer.hpp"
#include "ui/panel.hpp"
#include "ui/picks_panel.hpp"
#include "ui/plot_draw.hpp"

namespace sg::ui {

void BoundsEN::add(engine::PointEN p) {
    if (!valid) {
        min_e = max_e = p.e_m;
        min_n = max_n = p.n_m;
        valid = true;
        return;
    }
    min_e = std::min(min_e, p.e_m);
    max_e = std::max(max_e, p.e_m);
    min_n = std::min(min_n, p.n_m);
    max_n = std::max(max_n, p.n_m);
}

BoundsEN surveyBounds(const engine::Snapshot& s) {
    BoundsEN b;
    for (const auto& ring : s.area)
        for (const auto& p : ring) b.add(p);
    if (!b.valid)
        for (const auto& l : s.lines)
            for (const auto& p : l.points) b.add(p);
    if (!b.valid)
        for (const auto& t : s.tiles) {
            const double side = t.size_cells * t.cell_m;
            b.add({t.origin_e, t.origin_n});
            b.add({t.origin_e + side, t.origin_n + side});
        }
    if (!b.valid) {
        b.add({s.vessel.e_m - 500.0, s.vessel.n_m - 500.0});
        b.add({s.vessel.e_m + 500.0, s.vessel.n_m + 500.0});
    }
    return b;
}

const std::vector<engine::CoverageTileView>& planTiles(const engine::Snapshot& s, bool hide_earlier) {
    return hide_earlier && s.earlier_sessions > 0 ? s.session_tiles : s.tiles;
}

PlanTransform fitTransform(const BoundsEN& b, const Rect& rect) {
    PlanTransform t;
    t.rect_center = {(rect.min.x + rect.max.x) * 0.5f, (rect.min.y + rect.max.y) * 0.5f};
    t.center_e = (b.min_e + b.max_e) * 0.5;
    t.center_n = (b.min_n + b.max_n) * 0.5;
    const double w = std::max(b.max_e - b.min_e, 1.0) * 1.1;
    const double h = std::max(b.max_n - b.min_n, 1.0) * 1.1;
    t.px_per_m = std::min(std::max(rect.width(), 1.0f) / w, std::max(rect.height(), 1.0f) / h);
    return t;
}

namespace {

// Screen-space thinning of a long polyline: points closer than 1.5 px to the last kept point are
// dropped, segments entirely off one side of the view are skipped, and short segments whose both
// ends fall in screen cells this track already passed through are skipped too (a re-run line or
// a whole day of lines seen from afar would otherwise be drawn over itself many times).
class TrackDrawer {
public:
    TrackDrawer() = default;
    TrackDrawer(const PlanTransform& t, const Rect& clip) : m_t(t), m_clip(clip) {
        const float pad = 8.0f;
        m_lo = {clip.min.x - pad, clip.min.y - pad};
        m_hi = {clip.max.x + pad, clip.max.y + pad};
        m_cols = static_cast<int>(clip.width() / kCellPx) + 1;
        m_rows = static_cast<int>(clip.height() / kCellPx) + 1;
        m_occ.assign(static_cast<std::size_t>(m_cols) * static_cast<std::size_t>(m_rows), 0);
    }
    // Finished pieces go to `out` (screen points, each piece a polyline of >= 2 points).
    void setOutput(std::vector<std::vector<ImVec2>>* out) { m_out = out; }

    void add(engine::PointEN w) {
        const ImVec2 p = m_t.toScreen(w);
        const int code = outCode(p);
        if (m_has_prev) {
            if ((code & m_prev_code) != 0) {
                flush();  // the segment lies entirely beyond one edge of the view
            } else if (!m_pts.empty() && dist2(m_pts.back(), p) < kMinPx2) {
                m_pending_last = p;  // too close to the last kept point
                m_has_pending = true;
            } else {
                const ImVec2 from = m_pts.empty() ? m_prev : m_pts.back();
                const bool seen = dist2(from, p) < kShortPx2 && occupied(from) && occupied(p);
                if (seen) {
                    flush();
                } else {
                    if (m_pts.empty()) push(m_prev);
                    push(p);
                    m_has_pending = false;
                }
            }
        }
        m_prev = p;
        m_prev_code = code;
        m_has_prev = true;
    }
    void flush() {
        if (m_has_pending && !m_pts.empty()) m_pts.push_back(m_pending_last);
        m_has_pending = false;
        // Mark cells only now: a piece never hides itself, only later passes over it.
        for (const ImVec2& q : m_pts) mark(q);
        if (m_pts.size() >= 2 && m_out) m_out->push_back(m_pts);
        m_pts.clear();
    }

private:
    static constexpr float kMinPx2 = 1.5f * 1.5f;
    static constexpr float kCellPx = 3.0f;
    static constexpr float kShortPx2 = 2.0f * kCellPx * 2.0f * kCellPx;
    static float dist2(ImVec2 a, ImVec2 b) { return (a.x - b.x) * (a.x - b.x) + (a.y - b.y) * (a.y - b.y); }
    int outCode(ImVec2 p) const {
        return (p.x < m_lo.x ? 1 : 0) | (p.x > m_hi.x ? 2 : 0) | (p.y < m_lo.y ? 4 : 0) | (p.y > m_hi.y ? 8 : 0);
    }
    std::uint8_t* cell(ImVec2 p) {
        const float fx = (p.x - m_clip.min.x) / kCellPx, fy = (p.y - m_clip.min.y) / kCellPx;
        if (fx < 0 || fy < 0 || fx >= static_cast<float>(m_cols) || fy >= static_cast<float>(m_rows)) return nullptr;
        return &m_occ[static_cast<std::size_t>(fy) * static_cast<std::size_t>(m_cols) + static_cast<std::size_t>(fx)];
    }
    bool occupied(ImVec2 p) {
        const std::uint8_t* c = cell(p);
        return c && *c;
    }
    void mark(ImVec2 p) {
        if (std::uint8_t* c = cell(p)) *c = 1;
    }
    void push(ImVec2 p) {
        m_pts.push_back(p);
        // Long pieces are finished in parts so that their cells count for the rest of the track.
        if (m_pts.size() >= 512) {
            const ImVec2 last = m_pts.back();
            flush();
            m_pts.push_back(last);
        }
    }
    PlanTransform m_t;
    Rect m_clip{};
    std::vector<std::uint8_t> m_occ;
    int m_cols = 0, m_rows = 0;
    ImVec2 m_lo{0, 0}, m_hi{0, 0};
    std::vector<ImVec2> m_pts;
    std::vector<std::vector<ImVec2>>* m_out = nullptr;
    ImVec2 m_prev{0, 0};
    int m_prev_code = 0;
    bool m_has_prev = false;
    ImVec2 m_pending_last{0, 0};
    bool m_has_pending = false;
};

// What one track looked like after all its chunks but the last, for an unchanged view: the full
// chunks never change, so while the view stands still only the last chunk is processed per frame.
struct TrackCache {
    bool valid = false;
    PlanTransform t;
    Rect clip{};
    std::vector<const void*> prefix;  // chunk addresses
    std::vector<std::vector<ImVec2>> pieces;
    TrackDrawer state;
};

bool sameView(const PlanTransform& a, const PlanTransform& b, const Rect& ra, const Rect& rb) {
    return a.center_e == b.center_e && a.center_n == b.center_n && a.px_per_m == b.px_per_m &&
           a.rect_center.x == b.rect_center.x && a.rect_center.y == b.rect_center.y && ra.min.x == rb.min.x &&
           ra.min.y == rb.min.y && ra.max.x == rb.max.x && ra.max.y == rb.max.y;
}

void drawTrack(ImDrawList* dl, const engine::Chunked<engine::PointEN>& track, const PlanTransform& t,
               const Rect& clip, ImU32 colour, float thickness, TrackCache& cache) {
    const auto& chunks = track.chunks;
    const std::size_t nprefix = chunks.empty() ? 0 : chunks.size() - 1;
    bool valid = cache.valid && sameView(cache.t, t, cache.clip, clip) && cache.prefix.size() == nprefix;
    for (std::size_t i = 0; valid && i < nprefix; ++i) valid = cache.prefix[i] == chunks[i].get();
    if (!valid) {
        cache.t = t;
        cache.clip = clip;
        cache.prefix.clear();
        cache.pieces.clear();
        cache.state = TrackDrawer(t, clip);
        cache.state.setOutput(&cache.pieces);
        for (std::size_t i = 0; i < nprefix; ++i) {
            cache.prefix.push_back(chunks[i].get());
            if (chunks[i])
                for (const auto& p : *chunks[i]) cache.state.add(p);
        }
        cache.valid = true;
    }
    TrackDrawer d = cache.state;  // continue from the end of the prefix
    std::vector<std::vector<ImVec2>> tail;
    d.setOutput(&tail);
    if (!chunks.empty() && chunks.back())
        for (const auto& p : *chunks.back()) d.add(p);
    d.flush();
    for (const auto& piece : cache.pieces) drawPolylineChunked(dl, piece, colour, thickness);
    for (const auto& piece : tail) drawPolylineChunked(dl, piece, colour, thickness);
}

void drawWorldPolyline(ImDrawList* dl, const std::vector<engine::PointEN>& pts, const PlanTransform& t,
                       ImU32 colour, float thickness, bool closed) {
    std::vector<ImVec2> s;
    s.reserve(pts.size());
    for (const auto& p : pts) s.push_back(t.toScreen(p));
    if (s.size() >= 2) dl->AddPolyline(s.data(), static_cast<int>(s.size()), colour,
                                       closed ? ImDrawFlags_Closed : ImDrawFlags_None, thickness);
}

ImU32 withAlpha(ImU32 c, int alpha) { return (c & ~IM_COL32_A_MASK) | (static_cast<ImU32>(alpha) << IM_COL32_A_SHIFT); }

class PlanView final : public Panel {
public:
    const char* name() const override { return "Plan"; }
    Slot slot() const override { return Slot::kPlan; }

    void draw(FrameContext& ctx, ImVec2 amin, ImVec2 amax) override {
        const Rect rect{amin, amax};
        const Palette& pal = *ctx.palette;
        ImDrawList* dl = ImGui::GetWindowDrawList();
        dl->AddRectFilled(amin, amax, pal.background);
        ImGui::SetCursorScreenPos(amin);
        ImGui::InvisibleButton("plan_canvas", {std::max(rect.width(), 1.0f), std::max(rect.height(), 1.0f)});
        ImGui::SetItemAllowOverlap();
        const bool hovered = ImGui::IsItemHovered();
        const bool active = ImGui::IsItemActive();
        const engine::Snapshot* s = ctx.snapshot;
        if (!s) {
            dl->AddText({amin.x + 12, amin.y + 40}, pal.text_dim, "Waiting for the first survey state...");
            return;
        }

        // ---- view state ----
        if (!m_fitted || rect.width() != m_last_rect.width() || rect.height() != m_last_rect.height()) {
            if (!m_fitted) m_t = fitTransform(surveyBounds(*s), rect);
            m_fitted = true;
        }
        m_t.rect_center = {(amin.x + amax.x) * 0.5f, (amin.y + amax.y) * 0.5f};
        m_last_rect = rect;
        ImGuiIO& io = ImGui::GetIO();
        if (active && (io.MouseDelta.x != 0.0f || io.MouseDelta.y != 0.0f)) {
            m_t.center_e -= io.MouseDelta.x / m_t.px_per_m;
            m_t.center_n += io.MouseDelta.y / m_t.px_per_m;
            if (ctx.settings->follow_vessel) {
                ctx.settings->follow_vessel = false;
                ctx.settings_changed = true;
            }
        }
        if (hovered && io.MouseWheel != 0.0f) {
            const engine::PointEN before = m_t.toWorld(io.MousePos);
            m_t.px_per_m = std::clamp(m_t.px_per_m * std::pow(1.25, static_cast<double>(io.MouseWheel)), 1e-4, 200.0);
            const engine::PointEN after = m_t.toWorld(io.MousePos);
            m_t.center_e += before.e_m - after.e_m;
            m_t.center_n += before.n_m - after.n_m;
        }
        if (ctx.fit_request || (hovered && ImGui::IsMouseDoubleClicked(ImGuiMouseButton_Left))) {
            m_t = fitTransform(surveyBounds(*s), rect);
            if (ctx.settings->follow_vessel) {
                ctx.settings->follow_vessel = false;
                ctx.settings_changed = true;
            }
        }
        if (ctx.focus_request) {
            m_t.center_e = ctx.focus_request->e_m;
            m_t.center_n = ctx.focus_request->n_m;
            ctx.focus_request.reset();
            if (ctx.settings->follow_vessel) {
                ctx.settings->follow_vessel = false;
                ctx.settings_changed = true;
            }
        }
        if (ctx.settings->follow_vessel) {
            // Recentre when the vessel leaves the middle 60 % of the view (or on the first frame):
            // the map then stands still most of the time, which is calmer to watch and lets the
            // track drawing reuse its work.
            const ImVec2 v = m_t.toScreen(s->vessel);
            const float mx = rect.width() * 0.2f, my = rect.height() * 0.2f;
            if (!m_followed || v.x < amin.x + mx || v.x > amax.x - mx || v.y < amin.y + my || v.y > amax.y - my) {
                m_t.center_e = s->vessel.e_m;
                m_t.center_n = s->vessel.n_m;
            }
            m_followed = true;
        } else {
            m_followed = false;
        }

        dl->PushClipRect(amin, amax, true);
        const float sc = ctx.scale;

        // ---- coverage raster (a site: this session's own when earlier sessions are hidden) ----
        const bool own_only = ctx.settings && ctx.settings->hide_earlier_sessions && s->earlier_sessions > 0;
        for (const auto& tile : planTiles(*s, own_only)) {
            const double side = tile.size_cells * tile.cell_m;
            const ImVec2 a = m_t.toScreen({tile.origin_e, tile.origin_n + side});  // top-left
            const ImVec2 b = m_t.toScreen({tile.origin_e + side, tile.origin_n});  // bottom-right
            if (b.x < amin.x || a.x > amax.x || b.y < amin.y || a.y > amax.y) continue;
            if (ImTextureID tex = ctx.textures ? ctx.textures->textureFor(tile, pal) : nullptr)
                dl->AddImage(tex, a, b);
        }
        if (own_only) {
            // Never let hidden coverage pass for missing coverage: say so on the plan itself.
            char note[128];
            std::snprintf(note, sizeof note, "This session only: coverage of %d earlier log%s hidden",
                          s->earlier_sessions, s->earlier_sessions == 1 ? " is" : "s is");
            dl->AddText({amin.x + 8.0f * sc, amax.y - ImGui::GetTextLineHeight() - 8.0f * sc}, pal.text, note);
        }

        // ---- ground not run yet (quiet), area, lines, gaps, infill ----
        if (!s->not_run_yet.empty() && !s->area.empty()) {
            // A faint veil over the ground of lines not run yet, kept inside the area's box: not a
            // gap, nothing to act on (docs/coverage.md, "Not run yet and missed").
            ImVec2 bmin{1e30f, 1e30f}, bmax{-1e30f, -1e30f};
            for (const auto& ring : s->area)
                for (const auto& p : ring) {
                    const ImVec2 q = m_t.toScreen(p);
                    bmin = {std::min(bmin.x, q.x), std::min(bmin.y, q.y)};
                    bmax = {std::max(bmax.x, q.x), std::max(bmax.y, q.y)};
                }
            dl->PushClipRect({std::max(bmin.x, amin.x), std::max(bmin.y, amin.y)},
                             {std::min(bmax.x, amax.x), std::min(bmax.y, amax.y)}, true);
            for (const auto& quad : s->not_run_yet) {
                ImVec2 pts[4];
                const std::size_t n = std::min<std::size_t>(4, quad.size());
                for (std::size_t k = 0; k < n; ++k) pts[k] = m_t.toScreen(quad[k]);
                if (n == 4) dl->AddConvexPolyFilled(pts, 4, withAlpha(pal.text_dim, 26));
            }
            dl->PopClipRect();
        }
        for (const auto& ring : s->area) drawWorldPolyline(dl, ring, m_t, pal.area, 2.0f * sc, true);
        for (std::size_t i = 0; i < s->lines.size(); ++i) {
            const auto& line = s->lines[i];
            const bool is_active = static_cast<int>(i) == s->active_line;
            drawWorldPolyline(dl, line.points, m_t, is_active ? pal.line_active : pal.line,
                              (is_active ? 3.0f : 1.0f) * sc, false);
        }
        for (const auto& gap : s->gaps)
            for (const auto& ring : gap.rings) drawWorldPolyline(dl, ring, m_t, pal.gap, 2.5f * sc, true);
        for (const auto& inf : s->infill) {
            for (std::size_t k = 1; k < inf.points.size(); ++k)
                drawDashedLine(dl, m_t.toScreen(inf.points[k - 1]), m_t.toScreen(inf.points[k]), pal.infill,
                               2.0f * sc, 8.0f * sc);
        }

        // ---- tracks ----
        m_track_cache.resize(s->sensors.size() + 1);
        drawTrack(dl, s->tow_track, m_t, rect, pal.tow_track, 1.5f * sc, m_track_cache[0]);
        for (std::size_t i = 0; i < s->sensors.size(); ++i)
            drawTrack(dl, s->sensors[i].track, m_t, rect, withAlpha(pal.seriesColour(i), 200), 1.0f * sc, m_track_cache[i + 1]);

        // ---- labels (after the tracks so they stay readable; placed without overlap) ----
        const Rect legend = legendRect(rect, sc), scale_bar = scaleBarRect(rect, sc);
        const bool show_picks = ctx.settings && ctx.settings->show_picks && s->picks;
        placeLabels(dl, rect, pal, *s, sc, show_picks, {legend, scale_bar, controlsRect(rect, sc), northArrowRect(rect, sc)});

        // ---- forming gap: a ring with a cross where it forms, while its alarm is active ----
        if (s->forming_gap.active) {
            const ImVec2 c = m_t.toScreen(s->forming_gap.at);
            const float r = 11.0f * sc;
            dl->AddCircle(c, r + 2.0f * sc, pal.background, 24, 5.0f * sc);
            dl->AddCircle(c, r, pal.gap, 24, 2.5f * sc);
            dl->AddLine({c.x - 1.6f * r, c.y}, {c.x + 1.6f * r, c.y}, pal.gap, 2.0f * sc);
            dl->AddLine({c.x, c.y - 1.6f * r}, {c.x, c.y + 1.6f * r}, pal.gap, 2.0f * sc);
        }

        // ---- anomaly picks: diamonds (ui/picks_panel.hpp), hollow when weak ----
        if (show_picks)
            for (const auto& p : s->picks->picks)
                drawPickMarker(dl, m_t.toScreen(p.at), sc, pal, p.quality != "weak");

        // ---- live swath, sensors, vessel ----
        for (std::size_t i = 0; i < s->sensors.size(); ++i) {
            const auto& sen = s->sensors[i];
            const ImVec2 l = m_t.toScreen(sen.swath_left), r = m_t.toScreen(sen.swath_right);
            const ImVec2 c = m_t.toScreen(sen.position);
            dl->AddLine(l, r, pal.swath_edge, 2.0f * sc);
            dl->AddCircle(l, 3.5f * sc, pal.swath_edge, 8, 1.5f * sc);
            dl->AddCircle(r, 3.5f * sc, pal.swath_edge, 8, 1.5f * sc);
            dl->AddCircleFilled(c, 4.0f * sc, pal.seriesColour(i), 10);
        }
        {
            const ImVec2 tp = m_t.toScreen(s->tow_point), v = m_t.toScreen(s->vessel);
            dl->AddLine(v, tp, pal.tow_track, 1.0f * sc);
            dl->AddCircle(tp, 3.0f * sc, pal.tow_track, 8, 1.5f * sc);
            const float hs = static_cast<float>(std::sin(s->heading_rad)), hc = static_cast<float>(std::cos(s->heading_rad));
            const float len = 14.0f * sc, half = 6.0f * sc;
            // Screen y grows downwards: heading (clockwise from grid north) -> (sin, -cos).
            const ImVec2 tip{v.x + hs * len, v.y - hc * len};
            const ImVec2 left{v.x - hc * half - hs * len * 0.5f, v.y - hs * half + hc * len * 0.5f};
            const ImVec2 right{v.x + hc * half - hs * len * 0.5f, v.y + hs * half + hc * len * 0.5f};
            dl->AddTriangleFilled(tip, left, right, pal.vessel);
        }

        drawScaleBar(dl, rect, pal, sc);
        drawNorthArrow(dl, rect, pal, sc);
        drawLegend(dl, rect, pal, sc);
        if (hovered) drawReadout(dl, rect, pal, *s, io.MousePos, sc);
        dl->PopClipRect();

        // ---- overlay controls ----
        ImGui::SetCursorScreenPos({amin.x + 6 * sc, amin.y + 6 * sc});
        if (ImGui::SmallButton("Fit")) m_t = fitTransform(surveyBounds(*s), rect);
        ImGui::SameLine();
        if (ImGui::Checkbox("Follow vessel", &ctx.settings->follow_vessel)) ctx.settings_changed = true;
        ImGui::SameLine();
        if (ImGui::Checkbox("Picks", &ctx.settings->show_picks)) ctx.settings_changed = true;
    }

private:
    // The corner furniture's rectangles: labels keep clear of them.
    static Rect controlsRect(const Rect& r, float sc) {
        const ImGuiStyle& st = ImGui::GetStyle();
        const float w = ImGui::CalcTextSize("Fit").x + ImGui::CalcTextSize("Follow vessel").x + ImGui::GetFrameHeight() +
                        4 * st.FramePadding.x + st.ItemSpacing.x + st.ItemInnerSpacing.x +
                        // the "Picks" checkbox
                        st.ItemSpacing.x + ImGui::GetFrameHeight() + st.ItemInnerSpacing.x + ImGui::CalcTextSize("Picks").x;
        return {r.min, {r.min.x + 6 * sc + w + 6 * sc, r.min.y + 6 * sc + ImGui::GetFrameHeight() + 4 * sc}};
    }
    static Rect northArrowRect(const Rect& r, float sc) {
        const float lh = ImGui::GetTextLineHeight();
        const float w = std::max(ImGui::CalcTextSize("grid").x, 14 * sc) + 12 * sc;
        const ImVec2 c{r.max.x - 30 * sc, r.min.y + 50 * sc};
        return {{c.x - w * 0.5f - 4 * sc, c.y - 22 * sc}, {c.x + w * 0.5f + 4 * sc, c.y + 18 * 0.7f * sc + 2 * lh + 4 * sc}};
    }
    static Rect scaleBarRect(const Rect& r, float sc) {
        const float lh = ImGui::GetTextLineHeight();
        const float w = 120 * sc + ImGui::CalcTextSize("500 m").x + 20 * sc;
        const ImVec2 a{r.min.x + 10 * sc, r.max.y - 10 * sc - lh - 8 * sc};
        return {a, {a.x + w, r.max.y - 6 * sc}};
    }
    // Legend: title over one swatch per detectable margin class (the screen shows covered cells
    // only, so the class below 1 never appears here).
    static Rect legendRect(const Rect& r, float sc) {
        const float lh = ImGui::GetTextLineHeight(), sw = lh;
        float w = 0;
        for (int k = 1; k < colour::kMarginClassCount; ++k)
            w += sw + 4 * sc + ImGui::CalcTextSize(colour::kMarginClassShort[static_cast<std::size_t>(k)]).x + 10 * sc;
        w = std::max(w, ImGui::CalcTextSize(kLegendTitle).x);
        const float h = lh + 4 * sc + sw;
        const ImVec2 a{r.max.x - w - 16 * sc, r.max.y - h - 12 * sc};
        Rect box{{a.x - 6 * sc, a.y - 4 * sc}, {a.x + w + 6 * sc, a.y + h + 4 * sc}};
        // In a narrow view the legend would run into the scale bar: it goes above it then.
        const Rect bar = scaleBarRect(r, sc);
        if (overlaps(box, bar)) {
            const float up = box.max.y - (bar.min.y - 4 * sc);
            box.min.y -= up;
            box.max.y -= up;
        }
        return box;
    }
    static constexpr const char* kLegendTitle = "detection margin (x threshold)";

    void drawScaleBar(ImDrawList* dl, const Rect& r, const Palette& pal, float sc) const {
        const Rect box = scaleBarRect(r, sc);
        const double target_m = 120.0 * sc / m_t.px_per_m;
        const double mag = std::pow(10.0, std::floor(std::log10(target_m)));
        double len_m = mag;
        for (double m : {1.0, 2.0, 5.0})
            if (m * mag <= target_m) len_m = m * mag;
        const float len_px = static_cast<float>(len_m * m_t.px_per_m);
        char buf[32];
        if (len_m >= 1000.0) std::snprintf(buf, sizeof buf, "%g km", len_m / 1000.0);
        else std::snprintf(buf, sizeof buf, "%g m", len_m);
        const float lh = ImGui::GetTextLineHeight();
        const ImVec2 a{box.min.x + 6 * sc, box.max.y - 8 * sc};
        dl->AddRectFilled(box.min, {std::max(box.max.x, a.x + len_px + 12 * sc), box.max.y}, pal.background);
        dl->AddLine(a, {a.x + len_px, a.y}, pal.text, 3.0f * sc);
        dl->AddLine({a.x, a.y - 6 * sc}, {a.x, a.y}, pal.text, 2.0f);
        dl->AddLine({a.x + len_px, a.y - 6 * sc}, {a.x + len_px, a.y}, pal.text, 2.0f);
        dl->AddText({a.x, a.y - 8 * sc - lh}, pal.text, buf);
    }
    void drawNorthArrow(ImDrawList* dl, const Rect& r, const Palette& pal, float sc) const {
        const ImVec2 c{r.max.x - 30 * sc, r.min.y + 50 * sc};
        const float h = 18 * sc, lh = ImGui::GetTextLineHeight();
        dl->AddTriangleFilled({c.x, c.y - h}, {c.x - 7 * sc, c.y + h * 0.6f}, {c.x, c.y + h * 0.2f}, pal.text);
        dl->AddTriangle({c.x, c.y - h}, {c.x + 7 * sc, c.y + h * 0.6f}, {c.x, c.y + h * 0.2f}, pal.text, 1.5f);
        const float y = c.y + h * 0.7f;
        dl->AddText({c.x - ImGui::CalcTextSize("N").x * 0.5f, y}, pal.text, "N");
        dl->AddText({c.x - ImGui::CalcTextSize("grid").x * 0.5f, y + lh}, pal.text_dim, "grid");
    }
    void drawLegend(ImDrawList* dl, const Rect& r, const Palette& pal, float sc) const {
        const Rect box = legendRect(r, sc);
        const float lh = ImGui::GetTextLineHeight(), sw = lh;
        dl->AddRectFilled(box.min, box.max, pal.background);
        ImVec2 a{box.min.x + 6 * sc, box.min.y + 4 * sc};
        dl->AddText(a, pal.text, kLegendTitle);
        a.y += lh + 4 * sc;
        for (int k = 1; k < colour::kMarginClassCount; ++k) {
            dl->AddRectFilled(a, {a.x + sw, a.y + sw}, pal.margin_class[k]);
            const char* label = colour::kMarginClassShort[static_cast<std::size_t>(k)];
            dl->AddText({a.x + sw + 4 * sc, a.y}, pal.text, label);
            a.x += sw + 4 * sc + ImGui::CalcTextSize(label).x + 10 * sc;
        }
    }

    // Greedy placement (ui/label_placer.hpp), most important first: the active line, gaps, picks,
    // infill, then the other planned lines. What does not fit is not drawn.
    void placeLabels(ImDrawList* dl, const Rect& rect, const Palette& pal, const engine::Snapshot& s, float sc,
                     bool show_picks, std::initializer_list<Rect> blocked) const {
        const float inset = 2 * sc;
        LabelPlacer placer({{rect.min.x + inset, rect.min.y + inset}, {rect.max.x - inset, rect.max.y - inset}},
                           3 * sc);
        for (const Rect& b : blocked) placer.block(b);
        const float gap = 5 * sc, px = 3 * sc, py = 1 * sc;
        auto put = [&](ImVec2 anchor, const std::string& text, ImU32 colour, const std::vector<LabelSpot>& spots) {
            const ImVec2 ts = ImGui::CalcTextSize(text.c_str());
            const auto r = placer.place(anchor, {ts.x + 2 * px, ts.y + 2 * py}, spots, gap);
            if (!r) return false;
            dl->AddRectFilled(r->min, r->max, pal.background);  // opaque plate: the contrast is the tested one
            dl->AddText({r->min.x + px, r->min.y + py}, colour, text.c_str());
            return true;
        };
        const std::vector<LabelSpot> around{LabelSpot::kRight,      LabelSpot::kLeft,       LabelSpot::kAbove,
                                            LabelSpot::kBelow,      LabelSpot::kAboveRight, LabelSpot::kBelowRight,
                                            LabelSpot::kAboveLeft,  LabelSpot::kBelowLeft};
        // Pick markers are drawn after the labels: no label may cover one (halo included), so
        // they are blocked before any label is placed.
        if (show_picks) {
            const float r = pickMarkerRadius(sc) + 3 * sc;
            for (const auto& p : s.picks->picks) {
                const ImVec2 c = m_t.toScreen(p.at);
                if (rect.contains(c)) placer.block({{c.x - r, c.y - r}, {c.x + r, c.y + r}});
            }
        }
        // The forming gap first (its marker is drawn after the labels, so keep its ring clear).
        if (s.forming_gap.active) {
            const ImVec2 c = m_t.toScreen(s.forming_gap.at);
            const float r = 1.6f * 11.0f * sc;
            placer.block({{c.x - r, c.y - r}, {c.x + r, c.y + r}});
            char buf[96];
            std::snprintf(buf, sizeof buf, "forming gap %.1f m", s.forming_gap.width_m);
            const ImVec2 ts = ImGui::CalcTextSize(buf);
            if (const auto at = placer.place(c, {ts.x + 2 * px, ts.y + 2 * py}, around, r + gap)) {
                dl->AddRectFilled(at->min, at->max, pal.background);
                dl->AddText({at->min.x + px, at->min.y + py}, pal.gap, buf);
            }
        }
        auto lineLabel = [&](std::size_t i) {
            const auto& line = s.lines[i];
            const bool is_active = static_cast<int>(i) == s.active_line;
            ImVec2 first{}, first_dir{}, last{}, last_dir{};
            if (!visibleEnds(line.points, rect, first, first_dir, last, last_dir)) return;
            const ImU32 colour = is_active ? pal.line_active : pal.line_label;
            // At the line's end where it is visible; else at its visible start.
            if (!put(last, line.name, colour, spotsBeyond(last_dir)))
                put(first, line.name, colour, spotsBeyond({-first_dir.x, -first_dir.y}));
        };
        if (s.active_line >= 0 && static_cast<std::size_t>(s.active_line) < s.lines.size())
            lineLabel(static_cast<std::size_t>(s.active_line));
        for (const auto& gap_view : s.gaps) {
            const std::string text = (gap_view.name.empty() ? "gap " + std::to_string(gap_view.id) : gap_view.name) + "  " + roundedArea(gap_view.area_m2);
            put(m_t.toScreen(gap_view.centroid), text, pal.gap, around);
        }
        if (show_picks) {
            const float r = pickMarkerRadius(sc) + 3 * sc;
            for (const auto& p : s.picks->picks) {
                const ImVec2 c = m_t.toScreen(p.at);
                if (!rect.contains(c)) continue;
                const std::string text = pickLabel(p);
                const ImVec2 ts = ImGui::CalcTextSize(text.c_str());
                if (const auto at = placer.place(c, {ts.x + 2 * px, ts.y + 2 * py}, around, r + gap)) {
                    dl->AddRectFilled(at->min, at->max, pal.background);
                    dl->AddText({at->min.x + px, at->min.y + py}, pal.pick, text.c_str());
                }
            }
        }
        for (const auto& inf : s.infill) {
            ImVec2 first{}, first_dir{}, last{}, last_dir{};
            if (!visibleEnds(inf.points, rect, first, first_dir, last, last_dir)) continue;
            put(first, inf.name, pal.infill, spotsBeyond({-first_dir.x, -first_dir.y}));
        }
        for (std::size_t i = 0; i < s.lines.size(); ++i)
            if (static_cast<int>(i) != s.active_line) lineLabel(i);
    }

    // The first and last points of a polyline inside `r` (segments clipped to it, Liang-Barsky)
    // and the screen direction of the segment there. False when no part is visible.
    bool visibleEnds(const std::vector<engine::PointEN>& pts, const Rect& r, ImVec2& first, ImVec2& first_dir,
                     ImVec2& last, ImVec2& last_dir) const {
        bool any = false;
        for (std::size_t k = 1; k < pts.size(); ++k) {
            const ImVec2 a = m_t.toScreen(pts[k - 1]), b = m_t.toScreen(pts[k]);
            const float dx = b.x - a.x, dy = b.y - a.y;
            float t0 = 0, t1 = 1;
            bool inside = true;
            const float p[4] = {-dx, dx, -dy, dy};
            const float q[4] = {a.x - r.min.x, r.max.x - a.x, a.y - r.min.y, r.max.y - a.y};
            for (int e = 0; e < 4 && inside; ++e) {
                if (p[e] == 0.0f) {
                    inside = q[e] >= 0;
                } else {
                    const float t = q[e] / p[e];
                    if (p[e] < 0) t0 = std::max(t0, t);
                    else t1 = std::min(t1, t);
                    inside = t0 <= t1;
                }
            }
            if (!inside || (dx == 0.0f && dy == 0.0f)) continue;
            if (!any) {
                first = {a.x + t0 * dx, a.y + t0 * dy};
                first_dir = {dx, dy};
            }
            last = {a.x + t1 * dx, a.y + t1 * dy};
            last_dir = {dx, dy};
            any = true;
        }
        return any;
    }

    void drawReadout(ImDrawList* dl, const Rect& r, const Palette& pal, const engine::Snapshot& s, ImVec2 mouse,
                     float sc) const {
        const engine::PointEN w = m_t.toWorld(mouse);
        char line1[96], line2[96] = "", line3[128] = "cell: not covered";
        std::snprintf(line1, sizeof line1, "E %.1f  N %.1f m", w.e_m, w.n_m);
        if (s.to_lonlat) {
            const auto [lon, lat] = s.to_lonlat(w.e_m, w.n_m);
            std::snprintf(line2, sizeof line2, "lat %.6f  lon %.6f deg", lat, lon);
        }
        for (const auto& t : s.tiles) {
            const double col = std::floor((w.e_m - t.origin_e) / t.cell_m);
            const double row = std::floor((w.n_m - t.origin_n) / t.cell_m);
            if (col < 0 || row < 0 || col >= t.size_cells || row >= t.size_cells || !t.margin_q) continue;
            const auto idx = static_cast<std::size_t>(row) * static_cast<std::size_t>(t.size_cells) +
                             static_cast<std::size_t>(col);
            if (idx >= t.margin_q->size()) break;
            const std::uint8_t q = (*t.margin_q)[idx];
            if (q == 0) break;
            std::string run = "";
            if (t.run_of_cell && idx < t.run_of_cell->size()) {
                const std::uint16_t k = (*t.run_of_cell)[idx];
                if (k > 0 && k <= s.runs.size()) run = ", run " + s.runs[k - 1].name;
            }
            std::snprintf(line3, sizeof line3, "cell: margin %.1f %s%s", s.margin.value(q), s.margin.unit.c_str(),
                          run.c_str());
            break;
        }
        const ImVec2 a{r.min.x + 6 * sc, r.min.y + 30 * sc};
        const float h = ImGui::GetTextLineHeight();
        float wmax = std::max({ImGui::CalcTextSize(line1).x, ImGui::CalcTextSize(line2).x, ImGui::CalcTextSize(line3).x});
        dl->AddRectFilled({a.x - 4, a.y - 2}, {a.x + wmax + 6, a.y + 3 * h + 4}, withAlpha(pal.background, 220));
        dl->AddText(a, pal.text, line1);
        dl->AddText({a.x, a.y + h}, pal.text, line2[0] ? line2 : "lat/lon: no CRS");
        dl->AddText({a.x, a.y + 2 * h}, pal.text, line3);
    }

    PlanTransform m_t;
    std::vector<TrackCache> m_track_cache;  // [0] tow point, [1..] sensors
    bool m_fitted = false;
    bool m_followed = false;
    Rect m_last_rect{};
};

}  // namespace

std::unique_ptr<Panel> makePlanView() { return std::make_unique<PlanView>(); }

}  // namespace sg::ui
