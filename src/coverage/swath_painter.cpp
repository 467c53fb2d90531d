// Swept-quadrilateral painting of swath samples, with merging of collinear samples; see
// swath_painter.hpp.
#include "coverage/swath_painter.hpp"

#include <algorithm>
#include <cmath>
#include <stdexcept>

namespace sg::coverage {

namespace {

bool detecting(const SwathSample& s) {
    return s.centre_margin >= 1.0F && (s.left_m > 0.0 || s.right_m > 0.0);
}

}  // namespace

SwathPainter::SwathPainter(CoverageRaster& raster, double max_step_m, double max_merge_m)
    : m_raster(&raster), m_max_step_m(max_step_m), m_max_merge_m(max_merge_m) {
    if (!(max_step_m > 0.0)) throw std::invalid_argument("swath painter: max_step_m must be > 0");
    if (!(max_merge_m >= 0.0)) throw std::invalid_argument("swath painter: max_merge_m must be >= 0");
}

SwathPainter::~SwathPainter() { flush(); }

// Port is to the left of travel: normal (-dir_n, dir_e); starboard (dir_n, -dir_e).
Point SwathPainter::portEdge(const SwathSample& s) {
    const double w = detecting(s) ? std::max(0.0, s.left_m) : 0.0;
    return {s.e_m - s.dir_n * w, s.n_m + s.dir_e * w};
}

Point SwathPainter::starboardEdge(const SwathSample& s) {
    const double w = detecting(s) ? std::max(0.0, s.right_m) : 0.0;
    return {s.e_m + s.dir_n * w, s.n_m - s.dir_e * w};
}

void SwathPainter::paint(const SwathSample& p, const SwathSample& s) {
    if (!detecting(p) && !detecting(s)) return;
    QuadProfile prof;
    prof.centre0 = {p.e_m, p.n_m};
    prof.centre1 = {s.e_m, s.n_m};
    double de = p.dir_e + s.dir_e;
    double dn = p.dir_n + s.dir_n;
    const double len = std::hypot(de, dn);
    if (len > 1e-9) {
        de /= len;
        dn /= len;
    } else {
        de = s.dir_e;
        dn = s.dir_n;
    }
    prof.dir_e = de;
    prof.dir_n = dn;
    const double lp = detecting(p) ? p.left_m : 0.0, ls = detecting(s) ? s.left_m : 0.0;
    const double rp = detecting(p) ? p.right_m : 0.0, rs = detecting(s) ? s.right_m : 0.0;
    prof.left_m = 0.5 * (lp + ls);
    prof.right_m = 0.5 * (rp + rs);
    // Conservative: the weaker of the samples that detect.
    double m0 = 1e30;
    if (detecting(p)) m0 = std::min(m0, static_cast<double>(p.centre_margin));
    if (detecting(s)) m0 = std::min(m0, static_cast<double>(s.centre_margin));
    prof.centre_margin = m0;
    // Outline: port0 -> port1 -> starboard1 -> starboard0.
    const std::array<Point, 4> quad{portEdge(p), portEdge(s), starboardEdge(s), starboardEdge(p)};
    m_raster->paintQuad(quad, prof, s.run);
    ++m_counters.quads;
}

void SwathPainter::flushChain(Chain& c) {
    if (!c.has_pending) return;
    paint(c.painted, c.pending);
    c.painted = c.pending;
    c.has_pending = false;
    c.skipped.clear();
}

void SwathPainter::flush() {
    for (auto& kv : m_chains) flushChain(kv.second);
}

void SwathPainter::reset() {
    flush();
    m_chains.clear();
}

bool SwathPainter::canMerge(const Chain& c, const SwathSample& s) const {
    const SwathSample& a = c.painted;
    const double tol = m_raster->cellSize() / 8.0;
    const double len = std::hypot(s.e_m - a.e_m, s.n_m - a.n_m);
    if (len > m_max_merge_m || len < 1e-9) return false;
    if (detecting(a) != detecting(s) || a.run != s.run) return false;
    if (detecting(s)) {
        if (std::abs(a.left_m - s.left_m) > tol || std::abs(a.right_m - s.right_m) > tol) return false;
        if (marginCode(a.centre_margin) != marginCode(s.centre_margin)) return false;
        const double w = std::max({1.0, s.left_m, s.right_m});
        if (std::abs(a.dir_e * s.dir_n - a.dir_n * s.dir_e) * w > tol ||
            a.dir_e * s.dir_e + a.dir_n * s.dir_n <= 0.0) {
            return false;
        }
    }
    // Every folded-in position (the pending one included) must lie on the chord a -> s.
    const double ue = (s.e_m - a.e_m) / len, un = (s.n_m - a.n_m) / len;
    auto off = [&](const SwathSample& q) { return std::abs((q.e_m - a.e_m) * un - (q.n_m - a.n_m) * ue); };
    if (c.has_pending && off(c.pending) > tol) return false;
    for (const Point& q : c.skipped) {
        if (std::abs((q.e_m - a.e_m) * un - (q.n_m - a.n_m) * ue) > tol) return false;
    }
    return true;
}

void SwathPainter::add(const SwathSample& s) {
    ++m_counters.samples;
    if (!s.valid || !std::isfinite(s.e_m) || !std::isfinite(s.n_m)) {
        ++m_counters.invalid;
        auto it = m_chains.find(s.sensor);
        if (it != m_chains.end()) {
            flushChain(it->second);
            m_chains.erase(it);
        }
        return;
    }
    if (!detecting(s)) ++m_counters.not_detecting;
    auto it = m_chains.find(s.sensor);
    if (it == m_chains.end()) {
        m_chains.emplace(s.sensor, Chain{s, false, {}, {}});
        return;
    }
    Chain& c = it->second;
    const SwathSample& last = c.has_pending ? c.pending : c.painted;
    if (s.t_ns < last.t_ns) {
        ++m_counters.backwards;
        flushChain(c);
        c = Chain{s, false, {}, {}};
        return;
    }
    if (std::hypot(s.e_m - last.e_m, s.n_m - last.n_m) > m_max_step_m) {
        ++m_counters.long_steps;
        flushChain(c);
        c = Chain{s, false, {}, {}};
        return;
    }
    if (m_max_merge_m > 0.0 && canMerge(c, s)) {
        if (c.has_pending) {
            c.skipped.push_back({c.pending.e_m, c.pending.n_m});
            ++m_counters.merged;
        }
        c.pending = s;
        c.has_pending = true;
        return;
    }
    // Cannot extend: paint what is pending, then try once more from the new start.
    flushChain(c);
    if (m_max_merge_m > 0.0 && canMerge(c, s)) {
        c.pending = s;
        c.has_pending = true;
        return;
    }
    paint(c.painted, s);
    c.painted = s;
}

}  // namespace sg::coverage
