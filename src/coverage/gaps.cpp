// Gap finding by run-length union-find, and cell-edge outline tracing; see gaps.hpp.
#include "coverage/gaps.hpp"

#include <algorithm>
#include <cmath>
#include <map>
#include <numbers>
#include <numeric>
#include <unordered_map>

namespace sg::coverage {

namespace {

struct UnionFind {
    std::vector<int> parent;
    int add() {
        parent.push_back(static_cast<int>(parent.size()));
        return parent.back();
    }
    int find(int x) {
        while (parent[static_cast<std::size_t>(x)] != x) {
            parent[static_cast<std::size_t>(x)] =
                parent[static_cast<std::size_t>(parent[static_cast<std::size_t>(x)])];
            x = parent[static_cast<std::size_t>(x)];
        }
        return x;
    }
    void unite(int a, int b) {
        a = find(a);
        b = find(b);
        if (a != b) parent[static_cast<std::size_t>(std::max(a, b))] = std::min(a, b);
    }
};

struct Stats {
    std::int64_t cells = 0;
    double sum_x = 0.0, sum_y = 0.0;  // cell centres relative to the origin (m)
    std::int64_t min_i = INT64_MAX, max_i = INT64_MIN, min_j = INT64_MAX, max_j = INT64_MIN;
    double min_u = 1e300, max_u = -1e300, min_v = 1e300, max_v = -1e300;
};

}  // namespace

std::string GapReport::notRunMessage() const {
    if (lines_not_run.empty()) return {};
    return std::to_string(lines_not_run.size()) + " of " + std::to_string(lines_total) +
           " planned lines not run yet: their ground is not counted as missed";
}

namespace {

// The x-interval [lo, hi] where the horizontal line y crosses a convex quadrilateral; false when
// it does not.
bool quadRow(const GroundQuad& q, double y, double& lo, double& hi) {
    lo = 1e300;
    hi = -1e300;
    for (std::size_t k = 0; k < 4; ++k) {
        const Point a = q[k], b = q[(k + 1) % 4];
        if ((a.n_m <= y && b.n_m >= y) || (b.n_m <= y && a.n_m >= y)) {
            if (a.n_m == b.n_m) {
                lo = std::min({lo, a.e_m, b.e_m});
                hi = std::max({hi, a.e_m, b.e_m});
            } else {
                const double x = a.e_m + (y - a.n_m) / (b.n_m - a.n_m) * (b.e_m - a.e_m);
                lo = std::min(lo, x);
                hi = std::max(hi, x);
            }
        }
    }
    return hi >= lo;
}

}  // namespace

std::size_t GapReport::significantCount() const {
    return static_cast<std::size_t>(
        std::count_if(gaps.begin(), gaps.end(), [](const Gap& g) { return !g.small; }));
}

GapReport findGaps(const CoverageRaster& raster, const MultiPolygon& area, const GapOptions& options,
                   const std::vector<GroundQuad>* not_run_yet) {
    GapReport rep;
    const double cell = raster.cellSize();
    const Point org = raster.origin();
    rep.cell_size_m = cell;
    rep.origin = org;
    rep.survey_heading_deg = options.survey_heading_deg;
    rep.min_width_m = options.min_width_m;
    if (area.empty()) return rep;
    const Box b = bounds(area);
    const std::int64_t j_lo = raster.cellY(b.min_n) - 1;
    const std::int64_t j_hi = raster.cellY(b.max_n) + 1;
    const double th = options.survey_heading_deg * std::numbers::pi / 180.0;
    const double ae = std::sin(th), an = std::cos(th);  // along-survey unit vector

    std::vector<GapRun> runs;
    UnionFind uf;
    std::vector<double> xs;
    std::size_t prev_begin = 0, prev_end = 0;  // runs of the previous row
    std::vector<std::pair<std::int64_t, std::int64_t>> skip;  // cells [a, e) of ground not run yet
    for (std::int64_t j = j_lo; j <= j_hi; ++j) {
        const std::size_t row_begin = runs.size();
        const double yc = org.n_m + (static_cast<double>(j) + 0.5) * cell;
        rowCrossings(area, yc, xs);
        skip.clear();
        if (not_run_yet) {
            for (const auto& q : *not_run_yet) {
                double lo = 0.0, hi = 0.0;
                if (!quadRow(q, yc, lo, hi)) continue;
                const auto a = static_cast<std::int64_t>(std::ceil((lo - org.e_m) / cell - 0.5));
                const auto e = static_cast<std::int64_t>(std::ceil((hi - org.e_m) / cell - 0.5));
                if (e > a) skip.emplace_back(a, e);
            }
            std::sort(skip.begin(), skip.end());
            std::size_t m = 0;  // merge overlapping intervals
            for (std::size_t k = 0; k < skip.size(); ++k) {
                if (m > 0 && skip[k].first <= skip[m - 1].second) {
                    skip[m - 1].second = std::max(skip[m - 1].second, skip[k].second);
                } else {
                    skip[m++] = skip[k];
                }
            }
            skip.resize(m);
        }
        std::size_t sk = 0;  // first skip interval that may still matter (calls come in order)
        auto emitRun = [&](std::int64_t a, std::int64_t e) {
            if (runs.size() > row_begin && runs.back().i1 == a) {
                runs.back().i1 = e;
            } else {
                runs.push_back({j, a, e, uf.add()});
            }
        };
        // Uncovered cells [a, e): those on ground not run yet are counted apart, the rest emitted.
        auto emit = [&](std::int64_t a, std::int64_t e) {
            while (sk < skip.size() && skip[sk].second <= a) ++sk;
            for (std::size_t k = sk; k < skip.size() && a < e; ++k) {
                if (skip[k].first >= e) break;
                if (skip[k].first > a) emitRun(a, skip[k].first);
                const std::int64_t s0 = std::max(a, skip[k].first), s1 = std::min(e, skip[k].second);
                rep.not_run_cells += s1 - s0;
                a = s1;
            }
            if (a < e) emitRun(a, e);
        };
        for (std::size_t s = 0; s + 1 < xs.size(); s += 2) {
            std::int64_t i = static_cast<std::int64_t>(std::ceil((xs[s] - org.e_m) / cell - 0.5));
            const std::int64_t i_end =
                static_cast<std::int64_t>(std::ceil((xs[s + 1] - org.e_m) / cell - 0.5));
            rep.area_cells += std::max<std::int64_t>(0, i_end - i);
            // Piece by piece: a piece no swath touched is one uncovered run without looking at cells.
            raster.forEachRowPiece(j, i, i_end, [&](std::int64_t a, std::int64_t e, const std::uint8_t* codes) {
                if (codes == nullptr) {
                    emit(a, e);
                    return;
                }
                for (std::int64_t c = a; c < e; ++c) {
                    if (codes[c - a] >= kCoveredCode) {
                        ++rep.covered_cells;
                    } else {
                        emit(c, c + 1);
                    }
                }
            });
        }
        // 8-connectivity with the previous row: [a0,a1) and [b0,b1) touch when a0 <= b1 && b0 <= a1.
        std::size_t p = prev_begin;
        for (std::size_t c = row_begin; c < runs.size(); ++c) {
            while (p < prev_end && runs[p].i1 < runs[c].i0) ++p;
            for (std::size_t q = p; q < prev_end && runs[q].i0 <= runs[c].i1; ++q) {
                uf.unite(runs[q].gap, runs[c].gap);
            }
        }
        prev_begin = row_begin;
        prev_end = runs.size();
    }

    // Accumulate per root.
    std::unordered_map<int, Stats> stats;
    for (auto& r : runs) {
        r.gap = uf.find(r.gap);
        Stats& s = stats[r.gap];
        const std::int64_t n = r.i1 - r.i0;
        s.cells += n;
        const double y = (static_cast<double>(r.row) + 0.5) * cell;
        const double x0 = (static_cast<double>(r.i0) + 0.5) * cell;
        const double x1 = (static_cast<double>(r.i1) - 0.5) * cell;
        s.sum_x += static_cast<double>(n) * 0.5 * (x0 + x1);
        s.sum_y += static_cast<double>(n) * y;
        s.min_i = std::min(s.min_i, r.i0);
        s.max_i = std::max(s.max_i, r.i1 - 1);
        s.min_j = std::min(s.min_j, r.row);
        s.max_j = std::max(s.max_j, r.row);
        for (double x : {x0, x1}) {
            const double u = x * ae + y * an;
            const double v = x * an - y * ae;
            s.min_u = std::min(s.min_u, u);
            s.max_u = std::max(s.max_u, u);
            s.min_v = std::min(s.min_v, v);
            s.max_v = std::max(s.max_v, v);
        }
    }
    std::vector<std::pair<int, Gap>> found;
    for (const auto& [root, s] : stats) {
        Gap g;
        g.cells = s.cells;
        g.area_m2 = static_cast<double>(s.cells) * cell * cell;
        g.bbox = {org.e_m + static_cast<double>(s.min_i) * cell, org.n_m + static_cast<double>(s.min_j) * cell,
                  org.e_m + static_cast<double>(s.max_i + 1) * cell,
                  org.n_m + static_cast<double>(s.max_j + 1) * cell};
        g.centroid = {org.e_m + s.sum_x / static_cast<double>(s.cells),
                      org.n_m + s.sum_y / static_cast<double>(s.cells)};
        g.along_length_m = s.max_u - s.min_u + cell;
        g.across_width_m = s.max_v - s.min_v + cell;
        g.width_m = std::min(g.along_length_m, g.area_m2 / g.along_length_m);
        g.small = g.width_m < options.min_width_m;
        found.emplace_back(root, g);
    }
    std::sort(found.begin(), found.end(), [](const auto& x, const auto& y) {
        const Gap& g = x.second;
        const Gap& h = y.second;
        if (g.small != h.small) return !g.small;
        if (g.cells != h.cells) return g.cells > h.cells;
        if (g.bbox.min_n != h.bbox.min_n) return g.bbox.min_n < h.bbox.min_n;
        return g.bbox.min_e < h.bbox.min_e;
    });
    std::unordered_map<int, int> index_of;
    for (std::size_t k = 0; k < found.size(); ++k) {
        found[k].second.id = static_cast<int>(k) + 1;
        index_of[found[k].first] = static_cast<int>(k);
        rep.gaps.push_back(found[k].second);
    }
    for (auto& r : runs) r.gap = index_of[r.gap];
    rep.runs = std::move(runs);
    return rep;
}

namespace {

using Interval = std::pair<std::int64_t, std::int64_t>;

// a \ b for sorted, disjoint interval lists.
std::vector<Interval> difference(const std::vector<Interval>& a, const std::vector<Interval>& b) {
    std::vector<Interval> out;
    std::size_t k = 0;
    for (auto [s, e] : a) {
        std::int64_t cur = s;
        while (k < b.size() && b[k].second <= cur) ++k;
        std::size_t m = k;
        while (cur < e) {
            if (m >= b.size() || b[m].first >= e) {
                out.emplace_back(cur, e);
                break;
            }
            if (b[m].first > cur) out.emplace_back(cur, b[m].first);
            cur = std::max(cur, b[m].second);
            ++m;
        }
    }
    return out;
}

struct Edge {
    std::int64_t x0, y0, x1, y1;
    int dir;  // 0 E, 1 N, 2 W, 3 S
};

}  // namespace

namespace {

// Traces the outline of one gap from its rows of cell intervals (rows sorted, intervals sorted).
MultiPolygon traceOutline(const std::map<std::int64_t, std::vector<Interval>>& rows, double cell, Point org) {
    static const std::vector<Interval> kEmpty;
    auto rowOf = [&](std::int64_t j) -> const std::vector<Interval>& {
        auto it = rows.find(j);
        return it == rows.end() ? kEmpty : it->second;
    };
    std::vector<Edge> edges;
    for (const auto& [j, ivs] : rows) {
        for (auto [a, e] : difference(ivs, rowOf(j - 1))) edges.push_back({a, j, e, j, 0});
        for (auto [a, e] : difference(ivs, rowOf(j + 1))) edges.push_back({e, j + 1, a, j + 1, 2});
        for (auto [a, e] : ivs) {
            edges.push_back({a, j + 1, a, j, 3});
            edges.push_back({e, j, e, j + 1, 1});
        }
    }
    auto key = [](std::int64_t x, std::int64_t y) {
        return (static_cast<std::uint64_t>(x) << 32) ^ static_cast<std::uint64_t>(y & 0xFFFFFFFF);
    };
    std::unordered_map<std::uint64_t, std::vector<int>> out_of;
    for (std::size_t k = 0; k < edges.size(); ++k) {
        out_of[key(edges[k].x0, edges[k].y0)].push_back(static_cast<int>(k));
    }
    std::vector<char> used(edges.size(), 0);
    std::vector<std::vector<std::pair<std::int64_t, std::int64_t>>> rings;
    for (std::size_t start = 0; start < edges.size(); ++start) {
        if (used[start]) continue;
        std::vector<std::pair<std::int64_t, std::int64_t>> ring;
        int cur = static_cast<int>(start);
        int prev_dir = -1;
        while (true) {
            const Edge& e = edges[static_cast<std::size_t>(cur)];
            used[static_cast<std::size_t>(cur)] = 1;
            if (e.dir != prev_dir) ring.emplace_back(e.x0, e.y0);  // drop collinear vertices
            prev_dir = e.dir;
            const auto& cand = out_of[key(e.x1, e.y1)];
            int next = -1;
            for (int c : cand) {
                if (edges[static_cast<std::size_t>(c)].dir == (e.dir + 1) % 4) next = c;  // left turn
            }
            if (next < 0) {
                for (int c : cand) {
                    if (!used[static_cast<std::size_t>(c)] || c == static_cast<int>(start)) next = c;
                }
            }
            if (next < 0 || next == static_cast<int>(start) || used[static_cast<std::size_t>(next)]) {
                if (next == static_cast<int>(start) && edges[start].dir == e.dir && ring.size() > 1) {
                    ring.erase(ring.begin());  // the start vertex was collinear
                }
                break;
            }
            cur = next;
        }
        rings.push_back(std::move(ring));
    }
    auto toRing = [&](const std::vector<std::pair<std::int64_t, std::int64_t>>& r) {
        Ring out;
        for (auto [x, y] : r) {
            out.push_back({org.e_m + static_cast<double>(x) * cell, org.n_m + static_cast<double>(y) * cell});
        }
        return out;
    };
    MultiPolygon mp;
    std::vector<std::size_t> hole_rings;
    std::vector<double> ext_area;
    for (std::size_t k = 0; k < rings.size(); ++k) {
        Ring r = toRing(rings[k]);
        if (r.size() < 3) continue;
        const double a = signedArea(r);
        if (a > 0.0) {
            mp.push_back(Polygon{std::move(r), {}});
            ext_area.push_back(a);
        } else {
            hole_rings.push_back(k);
        }
    }
    for (std::size_t k : hole_rings) {
        // A test point: the centre of the gap cell beside the hole's first edge (left of it).
        const auto& r = rings[k];
        const auto [x0, y0] = r[0];
        const auto [x1, y1] = r[1];
        const double dx = static_cast<double>((x1 > x0) - (x1 < x0));
        const double dy = static_cast<double>((y1 > y0) - (y1 < y0));
        const Point test{org.e_m + (static_cast<double>(x0) + 0.5 * dx - 0.5 * dy) * cell,
                         org.n_m + (static_cast<double>(y0) + 0.5 * dy + 0.5 * dx) * cell};
        std::size_t best = mp.size();
        for (std::size_t p = 0; p < mp.size(); ++p) {
            if (contains(mp[p].exterior, test) && (best == mp.size() || ext_area[p] < ext_area[best])) {
                best = p;
            }
        }
        if (best < mp.size()) mp[best].holes.push_back(toRing(r));
    }
    return mp;
}

}  // namespace

MultiPolygon gapOutline(const GapReport& report, int gap_index) {
    std::map<std::int64_t, std::vector<Interval>> rows;
    for (const auto& r : report.runs) {
        if (r.gap == gap_index) rows[r.row].emplace_back(r.i0, r.i1);
    }
    return traceOutline(rows, report.cell_size_m, report.origin);
}

std::vector<MultiPolygon> gapOutlines(const GapReport& report) {
    std::vector<std::map<std::int64_t, std::vector<Interval>>> rows(report.gaps.size());
    for (const auto& r : report.runs) rows[static_cast<std::size_t>(r.gap)][r.row].emplace_back(r.i0, r.i1);
    std::vector<MultiPolygon> out;
    out.reserve(rows.size());
    for (const auto& g : rows) out.push_back(traceOutline(g, report.cell_size_m, report.origin));
    return out;
}

}  // namespace sg::coverage
