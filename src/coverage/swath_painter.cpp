// Swept-quadrilateral painting of swath samples; see swath_painter.hpp.
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

SwathPainter::SwathPainter(CoverageRaster& raster, double max_step_m)
    : m_raster(&raster), m_max_step_m(max_step_m) {
    if (!(max_step_m > 0.0)) throw std::invalid_argument("swath painter: max_step_m must be > 0");
}

// Port is to the left of travel: normal (-dir_n, dir_e); starboard (dir_n, -dir_e).
Point SwathPainter::portEdge(const SwathSample& s) {
    const double w = detecting(s) ? std::max(0.0, s.left_m) : 0.0;
    return {s.e_m - s.dir_n * w, s.n_m + s.dir_e * w};
}

Point SwathPainter::starboardEdge(const SwathSample& s) {
    const double w = detecting(s) ? std::max(0.0, s.right_m) : 0.0;
    return {s.e_m + s.dir_n * w, s.n_m - s.dir_e * w};
}

void SwathPainter::add(const SwathSample& s) {
    ++m_counters.samples;
    if (!s.valid || !std::isfinite(s.e_m) || !std::isfinite(s.n_m)) {
        ++m_counters.invalid;
        m_last.erase(s.sensor);
        return;
    }
    if (!detecting(s)) ++m_counters.not_detecting;
    auto it = m_last.find(s.sensor);
    if (it == m_last.end()) {
        m_last.emplace(s.sensor, s);
        return;
    }
    const SwathSample& p = it->second;
    if (s.t_ns < p.t_ns) {
        ++m_counters.backwards;
        it->second = s;
        return;
    }
    const double step = std::hypot(s.e_m - p.e_m, s.n_m - p.n_m);
    if (step > m_max_step_m) {
        ++m_counters.long_steps;
        it->second = s;
        return;
    }
    if (detecting(p) || detecting(s)) {
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
        // Conservative: the weaker of the two samples that detect.
        double m0 = 1e30;
        if (detecting(p)) m0 = std::min(m0, static_cast<double>(p.centre_margin));
        if (detecting(s)) m0 = std::min(m0, static_cast<double>(s.centre_margin));
        prof.centre_margin = m0;
        // Outline: port0 -> port1 -> starboard1 -> starboard0.
        const std::array<Point, 4> quad{portEdge(p), portEdge(s), starboardEdge(s), starboardEdge(p)};
        m_raster->paintQuad(quad, prof, s.run);
        ++m_counters.quads;
    }
    it->second = s;
}

}  // namespace sg::coverage
