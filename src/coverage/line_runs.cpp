// Line choice (acquisition, settling, keeping the line), cross-track deviation and run statistics; see
// line_runs.hpp.
#include "coverage/line_runs.hpp"

#include <algorithm>
#include <cmath>
#include <numbers>
#include <stdexcept>

namespace sg::coverage {

LineTracker::LineTracker(std::vector<PlanLine> lines, const LineTrackerOptions& options)
    : m_lines(std::move(lines)), m_opt(options) {
    if (m_opt.max_offset_m <= 0.0) m_opt.max_offset_m = m_opt.line_spacing_m;
    if (m_opt.hysteresis_m <= 0.0) m_opt.hysteresis_m = 0.25 * m_opt.line_spacing_m;
    if (m_opt.settle_m <= 0.0) m_opt.settle_m = m_opt.line_spacing_m;
    if (m_opt.turn_hold_m <= 0.0) m_opt.turn_hold_m = m_opt.line_spacing_m;
    // update() looks at every line at every epoch: the per-line constants are worked out once.
    m_cos_max_angle = std::cos(m_opt.max_angle_deg * std::numbers::pi / 180.0);
    for (const auto& l : m_lines) m_length_m.push_back(l.length_m());
    m_plan_count = static_cast<int>(m_lines.size());
}

double LineTracker::crossTrack(int index, Point pos, double dir_e, double dir_n) const {
    const PlanLine& l = m_lines[static_cast<std::size_t>(index)];
    const double len = m_length_m[static_cast<std::size_t>(index)];
    const double ue = (l.end.e_m - l.start.e_m) / len, un = (l.end.n_m - l.start.n_m) / len;
    // Starboard of the line direction is (un, -ue); flip when travelling the other way.
    double d = (pos.e_m - l.start.e_m) * un - (pos.n_m - l.start.n_m) * ue;
    if (dir_e * ue + dir_n * un < 0.0) d = -d;
    return d;
}

double LineTracker::alongTrack(int index, Point pos) const {
    const PlanLine& l = m_lines[static_cast<std::size_t>(index)];
    const double len = m_length_m[static_cast<std::size_t>(index)];
    return ((pos.e_m - l.start.e_m) * (l.end.e_m - l.start.e_m) +
            (pos.n_m - l.start.n_m) * (l.end.n_m - l.start.n_m)) / len;
}

bool LineTracker::directionMatches(int index, double dir_e, double dir_n, bool& reversed) const {
    const PlanLine& l = m_lines[static_cast<std::size_t>(index)];
    const double len = m_length_m[static_cast<std::size_t>(index)];
    const double c = (dir_e * (l.end.e_m - l.start.e_m) + dir_n * (l.end.n_m - l.start.n_m)) / len;
    reversed = c < 0.0;
    return std::abs(c) >= m_cos_max_angle;
}

void LineTracker::startRun(int line, bool reversed, std::int64_t t_ns, Point pos) {
    LineRun r;
    r.id = static_cast<int>(m_runs.size());
    r.session = m_session;
    r.line = line;
    r.reversed = reversed;
    r.start_t_ns = r.end_t_ns = t_ns;
    r.start_pos = r.end_pos = pos;
    r.along_min_m = r.along_max_m = alongTrack(line, pos);
    if (line >= m_plan_count) r.infill_line = m_lines[static_cast<std::size_t>(line)];
    if (line == m_target) m_target_run = r.id;
    m_runs.push_back(r);
    m_run_travel_m = 0.0;
    m_off_axis_m = 0.0;
    m_open_run = r.id;
    m_active_line = line;
}

void LineTracker::closeRun(std::int64_t t_ns) {
    if (m_open_run == kRunNone) return;
    LineRun& r = m_runs[static_cast<std::size_t>(m_open_run)];
    r.open = false;
    r.end_t_ns = std::max(r.end_t_ns, t_ns);
    if (m_target >= 0 && r.id == m_target_run) {
        // The pass along the infill line is over: steering returns to the planned lines.
        m_target_ended = r.id;
        m_target = -1;
        m_target_run = kRunNone;
    }
    m_open_run = kRunNone;
    m_active_line = -1;
}

int LineTracker::nearestLine(Point pos, double dir_e, double dir_n, bool& reversed, double& dist) const {
    int want = -1;
    dist = 1e300;
    // Steering to an infill line: only it can be acquired; otherwise only the plan's lines.
    const int first = m_target >= 0 ? m_target : 0;
    const int last = m_target >= 0 ? m_target + 1 : m_plan_count;
    for (int i = first; i < last; ++i) {
        bool rev = false;
        if (!directionMatches(i, dir_e, dir_n, rev)) continue;
        if (i >= m_plan_count && rev) continue;  // an infill line is flown start -> end
        const double a = alongTrack(i, pos);
        if (a < -m_opt.end_margin_m || a > m_length_m[static_cast<std::size_t>(i)] + m_opt.end_margin_m) continue;
        const double d = std::abs(crossTrack(i, pos, dir_e, dir_n));
        if (d > m_opt.max_offset_m) continue;
        if (d < dist) {
            dist = d;
            want = i;
            reversed = rev;
        }
    }
    return want;
}

bool LineTracker::keepsRun(Point pos, double dir_e, double dir_n, double step_m, std::int64_t gap_ns) {
    const LineRun& r = m_runs[static_cast<std::size_t>(m_open_run)];
    // A turn: the direction has left the line's axis (or reversed) for turn_hold_m of travel. A
    // shorter swing (a steering correction back from an excursion) keeps the line.
    bool rev = false;
    const bool along_axis = directionMatches(r.line, dir_e, dir_n, rev) && rev == r.reversed;
    m_off_axis_m = along_axis ? 0.0 : m_off_axis_m + step_m;
    if (m_off_axis_m > m_opt.turn_hold_m) return false;
    // Leaving the line's along-track extent (with the run's extra room) ends it.
    const double a = alongTrack(r.line, pos);
    const double room = m_opt.end_margin_m + m_opt.hysteresis_m;
    if (a < -room || a > m_length_m[static_cast<std::size_t>(r.line)] + room) return false;
    // After a break in the positions (a GNSS outage) the run goes on only where it could start.
    if (gap_ns > static_cast<std::int64_t>(m_opt.continuity_gap_s * 1e9) &&
        std::abs(crossTrack(r.line, pos, dir_e, dir_n)) > m_opt.max_offset_m)
        return false;
    return true;
}

int LineTracker::update(std::int64_t t_ns, Point pos, double dir_e, double dir_n,
                        std::optional<double> altitude_m) {
    const double step = m_have_last ? std::hypot(pos.e_m - m_last_pos.e_m, pos.n_m - m_last_pos.n_m) : 0.0;
    const std::int64_t gap_ns = m_have_last ? t_ns - m_last_t_ns : 0;
    m_have_last = true;
    m_last_pos = pos;
    m_last_t_ns = t_ns;

    if (m_forced >= 0) {
        bool rev = false;
        directionMatches(m_forced, dir_e, dir_n, rev);
        if (m_open_run != kRunNone) {
            const LineRun& r = m_runs[static_cast<std::size_t>(m_open_run)];
            if (m_forced != r.line || rev != r.reversed) closeRun(t_ns);
        }
        if (m_open_run == kRunNone) startRun(m_forced, rev, t_ns, pos);
    } else {
        if (m_open_run != kRunNone && (m_reacquire || !keepsRun(pos, dir_e, dir_n, step, gap_ns)))
            closeRun(t_ns);
        m_reacquire = false;
        if (m_open_run == kRunNone) {
            bool rev = false;
            double d = 0.0;
            const int want = nearestLine(pos, dir_e, dir_n, rev, d);
            if (want >= 0) startRun(want, rev, t_ns, pos);
        } else {
            m_run_travel_m += step;
            LineRun& r = m_runs[static_cast<std::size_t>(m_open_run)];
            if (m_run_travel_m <= m_opt.settle_m) {
                // Settling (run-in): a line nearer by more than the hysteresis takes the run over.
                bool rev = false;
                double d = 0.0;
                const int other = nearestLine(pos, dir_e, dir_n, rev, d);
                if (other >= 0 && other != r.line && other < m_plan_count && r.line < m_plan_count &&
                    d + m_opt.hysteresis_m < std::abs(crossTrack(r.line, pos, dir_e, dir_n))) {
                    r.line = other;
                    r.reversed = rev;
                    r.worst_deviation_m = 0.0;
                    r.along_min_m = r.along_max_m = alongTrack(other, pos);
                    m_active_line = other;
                }
            }
        }
    }
    if (m_open_run == kRunNone) return kRunNone;

    LineRun& r = m_runs[static_cast<std::size_t>(m_open_run)];
    r.end_t_ns = t_ns;
    r.end_pos = pos;
    ++r.samples;
    if (altitude_m && std::isfinite(*altitude_m)) {
        r.altitude_sum_m += *altitude_m;
        ++r.altitude_samples;
        r.worst_altitude_m = r.altitude_samples == 1 ? *altitude_m : std::max(r.worst_altitude_m, *altitude_m);
    } else {
        ++r.altitude_missing;
    }
    const double dev = crossTrack(r.line, pos, dir_e, dir_n);
    if (std::abs(dev) > std::abs(r.worst_deviation_m)) r.worst_deviation_m = dev;
    const double a = alongTrack(r.line, pos);
    r.along_min_m = std::min(r.along_min_m, a);
    r.along_max_m = std::max(r.along_max_m, a);
    return r.id;
}

void LineTracker::adoptEarlierRuns(std::vector<LineRun> runs, int session) {
    if (!m_runs.empty()) throw std::logic_error("line tracker: earlier runs after the first run");
    for (std::size_t i = 0; i < runs.size(); ++i) {
        if (runs[i].id != static_cast<int>(i)) throw std::logic_error("line tracker: earlier run ids must be 0..n-1");
        runs[i].open = false;
        // An earlier session's infill run: its line joins this tracker's lines (line index anew).
        if (runs[i].infill_line) runs[i].line = addLine(*runs[i].infill_line);
        else if (runs[i].line >= m_plan_count) runs[i].line = -1;
    }
    m_runs = std::move(runs);
    m_session = session;
}

int LineTracker::neighbourLine(int index, Point pos, double dir_e, double dir_n, bool starboard) const {
    if (index < 0 || index >= static_cast<int>(m_lines.size())) return -1;
    const PlanLine& l = m_lines[static_cast<std::size_t>(index)];
    const double len = m_length_m[static_cast<std::size_t>(index)];
    const double ue = (l.end.e_m - l.start.e_m) / len, un = (l.end.n_m - l.start.n_m) / len;
    int best = -1;
    double best_off = 1.5 * m_opt.line_spacing_m;
    for (int j = 0; j < m_plan_count; ++j) {
        if (j == index) continue;
        const PlanLine& o = m_lines[static_cast<std::size_t>(j)];
        const double olen = m_length_m[static_cast<std::size_t>(j)];
        const double oe = (o.end.e_m - o.start.e_m) / olen, on = (o.end.n_m - o.start.n_m) / olen;
        if (std::abs(ue * oe + un * on) < m_cos_max_angle) continue;  // not parallel
        const double a = alongTrack(j, pos);
        if (a < -m_opt.end_margin_m || a > olen + m_opt.end_margin_m) continue;
        // Offset of line j from line `index` where pos projects on j, starboard of travel positive.
        const Point q{o.start.e_m + a * oe, o.start.n_m + a * on};
        double off = crossTrack(index, q, dir_e, dir_n);
        if (!starboard) off = -off;
        if (off < 0.25 * m_opt.line_spacing_m) continue;  // the other side, or the same line
        if (off < best_off) {
            best_off = off;
            best = j;
        }
    }
    return best;
}

bool LineTracker::passedBy(int index, Point pos) const {
    const double a = alongTrack(index, pos);
    for (const auto& r : m_runs) {
        if (r.line != index || r.id == m_open_run) continue;
        if (a >= r.along_min_m && a <= r.along_max_m) return true;
    }
    return false;
}

LineTracker::PendingGround LineTracker::pendingGround(double planned_half_width_m, const Box& bounds,
                                                     bool final, const std::vector<Point>* track,
                                                     double track_step_m) const {
    PendingGround out;
    out.lines_total = m_plan_count;
    const double spacing = m_opt.line_spacing_m;
    const double tol = 0.5 * spacing;
    // Far enough to reach every corner of the area from any line.
    const double far = std::hypot(bounds.max_e - bounds.min_e, bounds.max_n - bounds.min_n) +
                       std::hypot(bounds.max_e - bounds.min_e, bounds.max_n - bounds.min_n) + spacing;
    const double w = std::max(0.0, planned_half_width_m);
    for (int li = 0; li < m_plan_count; ++li) {
        const PlanLine& l = m_lines[static_cast<std::size_t>(li)];
        const double len = m_length_m[static_cast<std::size_t>(li)];
        // Passed along-track intervals of every run of this line (the open one included), merged.
        std::vector<std::pair<double, double>> passed, closed;
        for (const auto& r : m_runs)
            if (r.line == li && r.along_max_m > r.along_min_m) {
                passed.emplace_back(r.along_min_m, r.along_max_m);
                if (final || r.id != m_open_run) closed.emplace_back(r.along_min_m, r.along_max_m);
            }
        // The vessel went by with unusable samples: gone by all the same (no run records it).
        if (track)
            for (const auto& p : *track) {
                const double a = alongTrack(li, p);
                if (a < -track_step_m || a > len + track_step_m) continue;
                if (std::abs(crossTrack(li, p, 1.0, 0.0)) > 0.5 * spacing) continue;
                passed.emplace_back(a - track_step_m, a + track_step_m);
                closed.emplace_back(a - track_step_m, a + track_step_m);
            }
        std::sort(closed.begin(), closed.end());
        double closed_m = 0.0, reach = 0.0;
        for (auto [a, b] : closed) {
            a = std::max({a, reach, 0.0});
            b = std::min(b, len);
            if (b > a) closed_m += b - a;
            reach = std::max(reach, b);
        }
        // Run: a pass went along it and left; what it did not cover is missed, not ahead.
        if (closed_m >= 0.5 * len) continue;
        std::sort(passed.begin(), passed.end());
        std::vector<std::pair<double, double>> pieces;  // unpassed stretches of [0, len]
        double cur = 0.0;
        for (const auto& [a, b] : passed) {
            if (a > cur) pieces.emplace_back(cur, std::min(a, len));
            cur = std::max(cur, b);
            if (cur >= len) break;
        }
        if (cur < len) pieces.emplace_back(cur, len);
        const double ue = (l.end.e_m - l.start.e_m) / len, un = (l.end.n_m - l.start.n_m) / len;
        const double se = un, sn = -ue;  // starboard of start -> end
        bool pending = false;
        for (auto [a0, a1] : pieces) {
            if (a1 - a0 < tol) continue;
            pending = true;
            const double mid = 0.5 * (a0 + a1);
            const Point m{l.start.e_m + mid * ue, l.start.n_m + mid * un};
            double claim[2] = {far, far};  // port, starboard
            for (int side = 0; side < 2; ++side) {
                const int nb = neighbourLine(li, m, ue, un, side == 1);
                if (nb < 0) continue;
                const PlanLine& o = m_lines[static_cast<std::size_t>(nb)];
                const double oa = alongTrack(nb, m);
                const double olen = m_length_m[static_cast<std::size_t>(nb)];
                const Point q{o.start.e_m + oa * (o.end.e_m - o.start.e_m) / olen,
                              o.start.n_m + oa * (o.end.n_m - o.start.n_m) / olen};
                const double d = std::abs(crossTrack(li, q, ue, un));
                claim[side] = std::min(d, std::max(0.5 * d, w));
            }
            const double u0 = a0 <= 0.0 ? -far : a0;
            const double u1 = a1 >= len ? len + far : a1;
            auto at = [&](double u, double v) { return Point{l.start.e_m + u * ue + v * se, l.start.n_m + u * un + v * sn}; };
            // Starboard is to the right of travel: (u, -port) .. (u, +starboard); corners in
            // counter-clockwise order.
            out.quads.push_back({at(u0, claim[1]), at(u1, claim[1]), at(u1, -claim[0]), at(u0, -claim[0])});
        }
        if (pending) out.lines_pending.push_back(li);
    }
    return out;
}

void LineTracker::choose(int index) {
    if (index < 0 || index >= static_cast<int>(m_lines.size())) return;
    m_forced = index;
    m_target = -1;
    m_target_run = kRunNone;
}

int LineTracker::addLine(const PlanLine& line) {
    for (int i = m_plan_count; i < static_cast<int>(m_lines.size()); ++i) {
        const auto& l = m_lines[static_cast<std::size_t>(i)];
        if (l.name == line.name && l.start.e_m == line.start.e_m && l.start.n_m == line.start.n_m &&
            l.end.e_m == line.end.e_m && l.end.n_m == line.end.n_m)
            return i;
    }
    m_lines.push_back(line);
    m_length_m.push_back(line.length_m());
    return static_cast<int>(m_lines.size()) - 1;
}

int LineTracker::steerTo(const PlanLine& line) {
    if (!(line.length_m() > 0.0)) return -1;
    const int idx = addLine(line);
    if (m_forced >= 0) {
        m_forced = -1;
        m_reacquire = true;  // the operator's forced run ends: the target is acquired afresh
    }
    m_target = idx;
    m_target_run = kRunNone;
    m_target_ended = kRunNone;
    return idx;
}

void LineTracker::steerPlanned() {
    if (m_target < 0) return;
    if (m_open_run != kRunNone && m_open_run == m_target_run) m_reacquire = true;
    m_target = -1;
    m_target_run = kRunNone;
}

void LineTracker::automatic() {
    // The operator's choice ends: the next position picks its line afresh.
    if (m_forced >= 0) m_reacquire = true;
    m_forced = -1;
}

void LineTracker::addAlarm(int run) {
    if (run >= 0 && run < static_cast<int>(m_runs.size())) ++m_runs[static_cast<std::size_t>(run)].alarms;
}

void LineTracker::addNoise(int run, double noise_nT) {
    if (run < 0 || run >= static_cast<int>(m_runs.size())) return;
    LineRun& r = m_runs[static_cast<std::size_t>(run)];
    r.noise_sum_nT += noise_nT;
    ++r.noise_samples;
    r.worst_noise_nT = std::max(r.worst_noise_nT, noise_nT);
}

void LineTracker::refreshRun(const CoverageRaster& raster, int run) {
    if (run < 0 || run >= static_cast<int>(m_runs.size())) return;
    LineRun& r = m_runs[static_cast<std::size_t>(run)];
    if (r.line < 0) return;
    r.corridor_covered_pct = corridorCoveragePercent(raster, m_lines[static_cast<std::size_t>(r.line)],
                                                     0.5 * m_opt.line_spacing_m);
}

void LineTracker::refreshCoverage(const CoverageRaster& raster) {
    // The corridor belongs to the line: one scan per line however many runs it had (a site of
    // many sessions has many runs per line).
    std::vector<double> pct(m_lines.size(), -1.0);
    for (auto& r : m_runs) {
        if (r.line < 0) continue;
        double& p = pct[static_cast<std::size_t>(r.line)];
        if (p < 0.0)
            p = corridorCoveragePercent(raster, m_lines[static_cast<std::size_t>(r.line)], 0.5 * m_opt.line_spacing_m);
        r.corridor_covered_pct = p;
    }
}

double corridorCoveragePercent(const CoverageRaster& raster, const PlanLine& line, double half_width_m) {
    const double len = line.length_m();
    if (!(len > 0.0)) return 0.0;
    const double ue = (line.end.e_m - line.start.e_m) / len, un = (line.end.n_m - line.start.n_m) / len;
    const double se = un, sn = -ue;
    const std::array<Point, 4> rect{
        Point{line.start.e_m - se * half_width_m, line.start.n_m - sn * half_width_m},
        Point{line.end.e_m - se * half_width_m, line.end.n_m - sn * half_width_m},
        Point{line.end.e_m + se * half_width_m, line.end.n_m + sn * half_width_m},
        Point{line.start.e_m + se * half_width_m, line.start.n_m + sn * half_width_m}};
    const MultiPolygon corridor{Polygon{Ring(rect.begin(), rect.end()), {}}};
    const Box b = bounds(corridor);
    std::vector<double> xs;
    std::int64_t total = 0, covered = 0;
    const double cell = raster.cellSize();
    const Point org = raster.origin();
    for (std::int64_t j = raster.cellY(b.min_n); j <= raster.cellY(b.max_n); ++j) {
        rowCrossings(corridor, org.n_m + (static_cast<double>(j) + 0.5) * cell, xs);
        for (std::size_t s = 0; s + 1 < xs.size(); s += 2) {
            const auto i0 = static_cast<std::int64_t>(std::ceil((xs[s] - org.e_m) / cell - 0.5));
            const auto i1 = static_cast<std::int64_t>(std::ceil((xs[s + 1] - org.e_m) / cell - 0.5));
            total += std::max<std::int64_t>(0, i1 - i0);
            // Walk the span piece by piece: an untouched piece is uncovered without looking at cells.
            raster.forEachRowPiece(j, i0, i1, [&](std::int64_t a, std::int64_t e, const std::uint8_t* codes) {
                if (codes == nullptr) return;
                for (std::int64_t k = a; k < e; ++k) covered += codes[k - a] >= kCoveredCode ? 1 : 0;
            });
        }
    }
    return total > 0 ? 100.0 * static_cast<double>(covered) / static_cast<double>(total) : 0.0;
}

}  // namespace sg::coverage
