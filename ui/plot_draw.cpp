// Decimation and drawing helpers for plots.
#include "ui/plot_draw.hpp"

#include <algorithm>
#include <cmath>
#include <cstdio>

namespace sg::ui {

namespace {

void addSample(Column& c, const engine::SeriesPoint& p) {
    if (c.count == 0) {
        c.lo = c.hi = c.first = p.value;
        c.t_first = p.t_s;
    } else {
        c.lo = std::min(c.lo, p.value);
        c.hi = std::max(c.hi, p.value);
    }
    c.last = p.value;
    c.t_last = p.t_s;
    ++c.count;
}

void addBlock(Column& c, const Column& b) {
    if (c.count == 0) {
        c = b;
        return;
    }
    c.lo = std::min(c.lo, b.lo);
    c.hi = std::max(c.hi, b.hi);
    c.last = b.last;
    c.t_last = b.t_last;
    c.count += b.count;
}

}  // namespace

const std::vector<Column>& SeriesSummaryCache::blocks(
    const std::shared_ptr<const std::vector<engine::SeriesPoint>>& chunk) {
    Entry& e = m_entries[chunk.get()];
    if (e.chunk.lock() != chunk) {  // new, or an old chunk's address reused
        e.chunk = chunk;
        e.blocks.clear();
        const auto& v = *chunk;
        for (std::size_t i = 0; i + kSummaryBlock <= v.size(); i += kSummaryBlock) {
            Column c;
            for (std::size_t k = i; k < i + kSummaryBlock; ++k) addSample(c, v[k]);
            e.blocks.push_back(c);
        }
    }
    return e.blocks;
}

void SeriesSummaryCache::endFrame() {
    if (++m_frames % 64 != 0) return;  // expiry is cheap but need not run every frame
    for (auto it = m_entries.begin(); it != m_entries.end();)
        it = it->second.chunk.expired() ? m_entries.erase(it) : std::next(it);
}

std::size_t decimateSeries(const engine::Series& series, double t0, double t1, int columns,
                           std::vector<Column>& out, SeriesSummaryCache* cache) {
    out.assign(static_cast<std::size_t>(std::max(columns, 1)), Column{});
    const double per_col = static_cast<double>(out.size()) / (t1 - t0);
    auto columnOf = [&](double t) {
        auto ci = static_cast<std::size_t>((t - t0) * per_col);
        return ci >= out.size() ? out.size() - 1 : ci;
    };
    const auto& chunks = series.points.chunks;
    // First chunk that may hold t >= t0 (chunks are in time order).
    auto it = std::partition_point(chunks.begin(), chunks.end(), [t0](const auto& c) {
        return !c || c->empty() || c->back().t_s < t0;
    });
    std::size_t covered = 0;
    for (; it != chunks.end(); ++it) {
        if (!*it) continue;
        const auto& v = **it;
        if (v.empty()) continue;
        if (v.front().t_s > t1) break;
        // Blocks pay off only when a column spans several of them.
        const double span = v.back().t_s - v.front().t_s;
        const bool use_blocks = cache && v.size() >= 2 * kSummaryBlock && span > 0.0 &&
                                static_cast<double>(v.size()) / span / per_col >= 2.0 * kSummaryBlock;
        const std::vector<Column>* blocks = use_blocks ? &cache->blocks(*it) : nullptr;
        std::size_t i = static_cast<std::size_t>(
            std::lower_bound(v.begin(), v.end(), t0, [](const engine::SeriesPoint& s, double t) { return s.t_s < t; }) -
            v.begin());
        while (i < v.size()) {
            if (v[i].t_s > t1) return covered;
            if (blocks && i % kSummaryBlock == 0 && i / kSummaryBlock < blocks->size()) {
                const Column& b = (*blocks)[i / kSummaryBlock];
                if (b.t_last <= t1 && columnOf(b.t_first) == columnOf(b.t_last)) {
                    addBlock(out[columnOf(b.t_first)], b);
                    covered += kSummaryBlock;
                    i += kSummaryBlock;
                    continue;
                }
            }
            addSample(out[columnOf(v[i].t_s)], v[i]);
            ++covered;
            ++i;
        }
    }
    return covered;
}

bool columnsRange(const std::vector<Column>& cols, float& lo, float& hi) {
    bool any = false;
    for (const Column& c : cols) {
        if (c.count == 0 || !std::isfinite(c.lo) || !std::isfinite(c.hi)) continue;
        if (!any) {
            lo = c.lo;
            hi = c.hi;
            any = true;
        } else {
            lo = std::min(lo, c.lo);
            hi = std::max(hi, c.hi);
        }
    }
    return any;
}

void drawColumns(ImDrawList* dl, const std::vector<Column>& cols, double t0, double t1, const Rect& rect,
                 double y_lo, double y_hi, double break_after_s, ImU32 colour, float thickness) {
    if (cols.empty() || !(y_hi > y_lo)) return;
    const double sx = rect.width() / (t1 - t0);
    const double sy = rect.height() / (y_hi - y_lo);
    auto X = [&](double t) { return static_cast<float>(rect.min.x + (t - t0) * sx); };
    auto Y = [&](double v) { return static_cast<float>(rect.max.y - (v - y_lo) * sy); };
    const float col_w = rect.width() / static_cast<float>(cols.size());
    std::vector<ImVec2> pts;
    pts.reserve(cols.size() * 4);
    const Column* prev = nullptr;
    for (std::size_t i = 0; i < cols.size(); ++i) {
        const Column& c = cols[i];
        if (c.count == 0) continue;
        if (prev && c.t_first - prev->t_last > break_after_s) {
            drawPolylineChunked(dl, pts, colour, thickness);
            pts.clear();
        }
        if (c.count == 1) {
            pts.emplace_back(X(c.t_first), Y(c.first));
        } else {
            const float x = rect.min.x + (static_cast<float>(i) + 0.5f) * col_w;
            // Visit the extreme nearer the previous value first, so the line does not zig-zag.
            const bool low_first = std::fabs(c.first - c.lo) < std::fabs(c.first - c.hi);
            pts.emplace_back(x, Y(c.first));
            pts.emplace_back(x, Y(low_first ? c.lo : c.hi));
            pts.emplace_back(x, Y(low_first ? c.hi : c.lo));
            pts.emplace_back(x, Y(c.last));
        }
        prev = &c;
    }
    drawPolylineChunked(dl, pts, colour, thickness);
}

void drawPolylineChunked(ImDrawList* dl, const std::vector<ImVec2>& pts, ImU32 colour, float thickness) {
    constexpr std::size_t kChunk = 4000;  // AA polylines use up to ~4 vertices per point
    if (pts.size() < 2) {
        if (pts.size() == 1) dl->AddCircleFilled(pts[0], thickness + 0.5f, colour, 6);
        return;
    }
    for (std::size_t start = 0; start + 1 < pts.size(); start += kChunk - 1) {
        const std::size_t n = std::min(kChunk, pts.size() - start);
        dl->AddPolyline(pts.data() + start, static_cast<int>(n), colour, ImDrawFlags_None, thickness);
    }
}

std::vector<double> niceTicks(double lo, double hi, int max_ticks) {
    std::vector<double> out;
    if (!(hi > lo) || max_ticks < 1) return out;
    const double raw = (hi - lo) / max_ticks;
    const double mag = std::pow(10.0, std::floor(std::log10(raw)));
    double step = mag;
    for (double m : {1.0, 2.0, 5.0, 10.0}) {
        step = m * mag;
        if (step >= raw) break;
    }
    for (double v = std::ceil(lo / step) * step; v <= hi + step * 1e-9; v += step)
        out.push_back(std::fabs(v) < step * 1e-9 ? 0.0 : v);
    return out;
}

std::string formatUtcTime(double t_s) {
    const auto day_s = static_cast<long long>(std::floor(t_s)) % 86400;
    const long long s = day_s < 0 ? day_s + 86400 : day_s;
    char buf[16];
    std::snprintf(buf, sizeof buf, "%02lld:%02lld:%02lld", s / 3600, (s / 60) % 60, s % 60);
    return buf;
}

void drawDashedLine(ImDrawList* dl, ImVec2 a, ImVec2 b, ImU32 colour, float thickness, float dash_px) {
    const float dx = b.x - a.x, dy = b.y - a.y;
    const float len = std::sqrt(dx * dx + dy * dy);
    if (len < 1e-3f || dash_px <= 0.0f) return;
    const int n = std::min(2000, static_cast<int>(len / dash_px));
    for (int i = 0; i < n; i += 2) {
        const float f0 = static_cast<float>(i) * dash_px / len;
        const float f1 = std::min(1.0f, static_cast<float>(i + 1) * dash_px / len);
        dl->AddLine({a.x + dx * f0, a.y + dy * f0}, {a.x + dx * f1, a.y + dy * f1}, colour, thickness);
    }
}

}  // namespace sg::ui
