// The simulated seabed; see seabed.hpp.
#include "drivers_sim/seabed.hpp"

#include <cmath>

namespace sg::sim {

namespace {
constexpr double kDeg = M_PI / 180.0;
}

double Seabed::depth_m(Vec2 p) const {
    double d = m_spec.base_depth_m + dot(m_spec.gradient, p);
    for (const RampSpec& r : m_spec.ramps) {
        const double along = dot(p - r.point_m, bearingUnit(r.azimuth_deg * kDeg));
        d += 0.5 * r.drop_m * (1.0 + std::tanh(along / (0.5 * r.width_m)));
    }
    for (const ChannelSpec& c : m_spec.channels) {
        // Distance across the axis: component along the axis' normal.
        const double across = dot(p - c.point_m, bearingUnit((c.azimuth_deg + 90.0) * kDeg));
        if (std::abs(across) < 0.5 * c.width_m) {
            const double k = std::cos(M_PI * across / c.width_m);
            d += c.depth_m * k * k;
        }
    }
    if (m_spec.sand_waves) {
        const SandWaveSpec& w = *m_spec.sand_waves;
        const double across = dot(p, bearingUnit((w.crest_azimuth_deg + 90.0) * kDeg));
        d += 0.5 * w.height_m * std::sin(2.0 * M_PI * across / w.wavelength_m);
    }
    return d;
}

}  // namespace sg::sim
