// Line selection with hysteresis, cross-track deviation and run statistics; see line_runs.hpp.
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
    // update() looks at every line at every epoch: the per-line constants are worked out once.
    m_cos_max_angle = std::cos(m_opt.max_angle_deg * std::numbers::pi / 180.0);
    for (const auto& l : m_lines) m_length_m.push_back(l.length_m());
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
    m_runs.push_back(r);
    m_open_run = r.id;
    m_active_line = line;
}

void LineTracker::closeRun(std::int64_t t_ns) {
    if (m_open_run == kRunNone) return;
    LineRun& r = m_runs[static_cast<std::size_t>(m_open_run)];
    r.open = false;
    r.end_t_ns = std::max(r.end_t_ns, t_ns);
    m_open_run = kRunNone;
    m_active_line = -1;
}

int LineTracker::update(std::int64_t t_ns, Point pos, double dir_e, double dir_n,
                        std::optional<double> altitude_m) {
    int want = -1;
    bool want_rev = false;
    if (m_forced >= 0) {
        want = m_forced;
        directionMatches(want, dir_e, dir_n, want_rev);
    } else {
        // Candidates: direction within max_angle of the axis, inside the line's along-track span
        // and within max_offset (the current line gets the hysteresis as extra room).
        double best = 1e300;
        double cur_dist = 1e300;
        bool cur_rev = false;
        for (int i = 0; i < static_cast<int>(m_lines.size()); ++i) {
            bool rev = false;
            if (!directionMatches(i, dir_e, dir_n, rev)) continue;
            const double room = (i == m_active_line) ? m_opt.hysteresis_m : 0.0;
            const double a = alongTrack(i, pos);
            if (a < -m_opt.end_margin_m - room || a > m_length_m[static_cast<std::size_t>(i)] + m_opt.end_margin_m + room) {
                continue;
            }
            const double d = std::abs(crossTrack(i, pos, dir_e, dir_n));
            if (d > m_opt.max_offset_m + room) continue;
            if (i == m_active_line) {
                cur_dist = d;
                cur_rev = rev;
            }
            if (d < best) {
                best = d;
                want = i;
                want_rev = rev;
            }
        }
        // Hysteresis: keep the current line unless another is nearer by more than hysteresis_m.
        if (cur_dist < 1e300 && want != m_active_line && best + m_opt.hysteresis_m >= cur_dist) {
            want = m_active_line;
            want_rev = cur_rev;
        }
    }
    if (m_open_run != kRunNone) {
        const LineRun& r = m_runs[static_cast<std::size_t>(m_open_run)];
        if (want != r.line || want_rev != r.reversed) closeRun(t_ns);
    }
    if (want >= 0 && m_open_run == kRunNone) startRun(want, want_rev, t_ns, pos);
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
    return r.id;
}

void LineTracker::adoptEarlierRuns(std::vector<LineRun> runs, int session) {
    if (!m_runs.empty()) throw std::logic_error("line tracker: earlier runs after the first run");
    for (std::size_t i = 0; i < runs.size(); ++i) {
        if (runs[i].id != static_cast<int>(i)) throw std::logic_error("line tracker: earlier run ids must be 0..n-1");
        runs[i].open = false;
    }
    m_runs = std::move(runs);
    m_session = session;
}

void LineTracker::choose(int index) {
    if (index < 0 || index >= static_cast<int>(m_lines.size())) return;
    m_forced = index;
}

void LineTracker::automatic() { m_forced = -1; }

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
    r.corridor_covered_pct = corridorCoveragePercent(raster, m_lines[static_cast<std::size_t>(r.line)],
                                                     0.5 * m_opt.line_spacing_m);
}

void LineTracker::refreshCoverage(const CoverageRaster& raster) {
    // The corridor belongs to the line: one scan per line however many runs it had (a site of
    // many sessions has many runs per line).
    std::vector<double> pct(m_lines.size(), -1.0);
    for (auto& r : m_runs) {
        double& p = pct[static_cast<std::size_t>(r.line)];
        if (p < 0.0)
            p = corridorCoveragePercent(raster, m_lines[static_cast<std::size_t>(r.line)], 0.5 * m_opt.line_spacing_m);
        r.corridor_covered_pct = p;
    }
}

double corridorCoveragePercent(const CoverageRaster& raster, const PlanLine& line, double half_width_m) {
    const double len = line.length_m();
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
