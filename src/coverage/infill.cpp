// Infill planning by greedy across-track interval cover, and its proof by synthetic flight;
// see infill.hpp and docs/coverage.md.
#include "coverage/infill.hpp"

#include <algorithm>
#include <cmath>
#include <map>
#include <numbers>
#include <stdexcept>

#include <fmt/format.h>

#include "coverage/swath_painter.hpp"

namespace sg::coverage {

namespace {

struct CellUV {
    double u, v;  // along, across (m, relative to the raster origin)
    int gap;      // index into report.gaps
};

struct GapSpan {
    int gap;
    double umin, umax;
};

}  // namespace

double InfillPlan::totalLength_m() const {
    double s = 0.0;
    for (const auto& l : lines) s += l.length_m;
    return s;
}

InfillOptions loadInfillOptions(const config::Section& infill, double survey_heading_deg,
                                double half_width_m) {
    infill.allowOnly({"run_in_m", "run_out_m", "heading_deg", "include_small_gaps"});
    InfillOptions o;
    o.half_width_m = half_width_m;
    o.run_in_m = infill.number("run_in_m", 0.0, 10000.0, 50.0);
    o.run_out_m = infill.number("run_out_m", 0.0, 10000.0, 50.0);
    o.heading_deg = infill.optionalNumber("heading_deg", 0.0, 360.0).value_or(survey_heading_deg);
    o.include_small_gaps = infill.boolean("include_small_gaps", false);
    return o;
}

InfillPlan planInfill(const GapReport& report, const InfillOptions& options) {
    InfillPlan plan;
    plan.options = options;
    const double cell = report.cell_size_m;
    // Cell centres must fall strictly inside the flown swath: keep half a cell in hand.
    const double w = options.half_width_m - 0.5 * cell;
    if (!(w > 0.0)) {
        throw std::invalid_argument(fmt::format(
            "infill: half-width {:.2f} m is not larger than half a raster cell ({:.2f} m)",
            options.half_width_m, 0.5 * cell));
    }
    const double th = options.heading_deg * std::numbers::pi / 180.0;
    const double ae = std::sin(th), an = std::cos(th);  // along
    const double ce = an, cn = -ae;                     // across (starboard)
    const double join = options.run_in_m + options.run_out_m;

    std::vector<char> planned(report.gaps.size(), 0);
    for (std::size_t g = 0; g < report.gaps.size(); ++g) {
        planned[g] = (!report.gaps[g].small || options.include_small_gaps) ? 1 : 0;
        if (planned[g]) plan.planned_gap_ids.push_back(report.gaps[g].id);
    }
    std::int64_t total_cells = 0;
    for (const auto& r : report.runs) {
        if (planned[static_cast<std::size_t>(r.gap)]) total_cells += r.i1 - r.i0;
    }
    if (total_cells > options.max_cells) {
        throw std::runtime_error(fmt::format(
            "infill: the gaps hold {:.3f} km^2 uncovered ({} cells, limit {}): this is an "
            "unsurveyed block, not a gap; survey it with planned lines first",
            static_cast<double>(total_cells) * cell * cell / 1e6, total_cells, options.max_cells));
    }
    std::vector<CellUV> cells;
    cells.reserve(static_cast<std::size_t>(total_cells));
    std::vector<GapSpan> spans(report.gaps.size());
    std::vector<std::int64_t> gap_cells(report.gaps.size(), 0);
    for (std::size_t g = 0; g < spans.size(); ++g) spans[g] = {static_cast<int>(g), 1e300, -1e300};
    for (const auto& r : report.runs) {
        if (!planned[static_cast<std::size_t>(r.gap)]) continue;
        const double y = (static_cast<double>(r.row) + 0.5) * cell;
        for (std::int64_t i = r.i0; i < r.i1; ++i) {
            const double x = (static_cast<double>(i) + 0.5) * cell;
            const CellUV c{x * ae + y * an, x * ce + y * cn, r.gap};
            cells.push_back(c);
            auto& s = spans[static_cast<std::size_t>(r.gap)];
            s.umin = std::min(s.umin, c.u);
            s.umax = std::max(s.umax, c.u);
            ++gap_cells[static_cast<std::size_t>(r.gap)];
        }
    }
    // Cluster gaps whose along-track extents come within run-in + run-out of each other.
    std::vector<GapSpan> order;
    for (const auto& s : spans) {
        if (planned[static_cast<std::size_t>(s.gap)] && s.umax >= s.umin) order.push_back(s);
    }
    std::sort(order.begin(), order.end(), [](const GapSpan& a, const GapSpan& b) { return a.umin < b.umin; });
    std::vector<int> cluster_of(report.gaps.size(), -1);
    int clusters = 0;
    double cur_max = -1e300;
    for (const auto& s : order) {
        if (clusters == 0 || s.umin > cur_max + join) {
            ++clusters;
            cur_max = s.umax;
        } else {
            cur_max = std::max(cur_max, s.umax);
        }
        cluster_of[static_cast<std::size_t>(s.gap)] = clusters - 1;
    }
    std::vector<std::vector<CellUV>> by_cluster(static_cast<std::size_t>(clusters));
    for (const auto& c : cells) by_cluster[static_cast<std::size_t>(cluster_of[static_cast<std::size_t>(c.gap)])].push_back(c);

    const Point org = report.origin;
    for (auto& cl : by_cluster) {
        std::sort(cl.begin(), cl.end(), [](const CellUV& a, const CellUV& b) {
            return a.v != b.v ? a.v < b.v : a.u < b.u;
        });
        std::size_t i = 0;
        while (i < cl.size()) {
            // Greedy interval cover across track: the swath [v0, v0 + 2w] starts at the first
            // uncovered cell; then the line is centred on the cells it actually takes.
            const double v0 = cl[i].v;
            std::size_t k = i;
            while (k < cl.size() && cl[k].v <= v0 + 2.0 * w) ++k;
            const double vc = 0.5 * (v0 + cl[k - 1].v);
            std::vector<CellUV> group(cl.begin() + static_cast<std::ptrdiff_t>(i),
                                      cl.begin() + static_cast<std::ptrdiff_t>(k));
            std::sort(group.begin(), group.end(), [](const CellUV& a, const CellUV& b) { return a.u < b.u; });
            std::size_t s = 0;
            while (s < group.size()) {
                std::size_t e = s + 1;
                while (e < group.size() && group[e].u - group[e - 1].u <= join) ++e;
                InfillLine line;
                const double u0 = group[s].u - std::max(options.run_in_m, cell);
                const double u1 = group[e - 1].u + std::max(options.run_out_m, cell);
                line.start = {org.e_m + u0 * ae + vc * ce, org.n_m + u0 * an + vc * cn};
                line.end = {org.e_m + u1 * ae + vc * ce, org.n_m + u1 * an + vc * cn};
                line.length_m = u1 - u0;
                std::map<int, std::int64_t> per_gap;
                for (std::size_t q = s; q < e; ++q) ++per_gap[group[q].gap];
                std::int64_t most = -1;
                for (const auto& [g, n] : per_gap) {
                    const int id = report.gaps[static_cast<std::size_t>(g)].id;
                    if (n > most || (n == most && id < line.main_gap_id)) {
                        most = n;
                        line.main_gap_id = id;
                    }
                }
                for (const auto& [g, n] : per_gap) {
                    line.gap_ids.push_back(report.gaps[static_cast<std::size_t>(g)].id);
                    if (n == gap_cells[static_cast<std::size_t>(g)]) {
                        line.closes_ids.push_back(report.gaps[static_cast<std::size_t>(g)].id);
                    }
                }
                std::sort(line.gap_ids.begin(), line.gap_ids.end());
                std::sort(line.closes_ids.begin(), line.closes_ids.end());
                line.area_closed_m2 = static_cast<double>(e - s) * cell * cell;
                line.area_per_km = line.area_closed_m2 / (line.length_m / 1000.0);
                plan.lines.push_back(std::move(line));
                s = e;
            }
            i = k;
        }
    }
    // Names follow the main gap's stable number, suffixes in the order the lines were made
    // (clusters by along-track position, lines across track), not in rank order: a line keeps its
    // name while the ranking changes.
    std::map<int, int> seen;
    for (auto& l : plan.lines) {
        const int n = seen[l.main_gap_id]++;
        l.name = fmt::format("{}{}", options.name_prefix, l.main_gap_id);
        if (n > 0) l.name += static_cast<char>('a' + std::min(n, 25));
    }
    std::stable_sort(plan.lines.begin(), plan.lines.end(), [](const InfillLine& a, const InfillLine& b) {
        return a.area_per_km > b.area_per_km;
    });
    for (std::size_t r = 0; r < plan.lines.size(); ++r) plan.lines[r].rank = static_cast<int>(r) + 1;
    return plan;
}

InfillCheck flyInfill(const CoverageRaster& raster, const MultiPolygon& area, const InfillPlan& plan,
                      const GapOptions& gap_options, double centre_margin, double sample_step_m,
                      const std::vector<GroundQuad>* not_run_yet) {
    InfillCheck check{raster, {}};
    SwathPainter painter(check.raster, 2.0 * sample_step_m + 1.0);
    for (const auto& line : plan.lines) {
        painter.reset();
        const double len = std::hypot(line.end.e_m - line.start.e_m, line.end.n_m - line.start.n_m);
        const int steps = std::max(1, static_cast<int>(std::ceil(len / sample_step_m)));
        const double de = (line.end.e_m - line.start.e_m) / len;
        const double dn = (line.end.n_m - line.start.n_m) / len;
        for (int k = 0; k <= steps; ++k) {
            const double f = static_cast<double>(k) / steps;
            SwathSample s;
            s.t_ns = static_cast<std::int64_t>(k) * 100'000'000;
            s.e_m = line.start.e_m + f * (line.end.e_m - line.start.e_m);
            s.n_m = line.start.n_m + f * (line.end.n_m - line.start.n_m);
            s.dir_e = de;
            s.dir_n = dn;
            s.left_m = s.right_m = plan.options.half_width_m;
            s.centre_margin = static_cast<float>(centre_margin);
            s.valid = true;
            s.run = kRunNone;
            painter.add(s);
        }
    }
    check.after = findGaps(check.raster, area, gap_options, not_run_yet);
    return check;
}

}  // namespace sg::coverage
