// Array swath union and line planning; see swath_plan.hpp.
#include "detect/swath_plan.hpp"

#include <algorithm>
#include <cmath>

namespace sg::detect {

std::vector<SwathInterval> unionOfSwaths(std::span<const SensorSwath> sensors) {
    std::vector<SwathInterval> v;
    v.reserve(sensors.size());
    for (const SensorSwath& s : sensors) {
        if (s.half_widths.port_m <= 0.0 && s.half_widths.starboard_m <= 0.0) continue;
        v.push_back({s.cross_m - s.half_widths.port_m, s.cross_m + s.half_widths.starboard_m});
    }
    std::sort(v.begin(), v.end(),
              [](const SwathInterval& a, const SwathInterval& b) { return a.from_m < b.from_m; });
    std::vector<SwathInterval> out;
    for (const SwathInterval& i : v) {
        if (!out.empty() && i.from_m <= out.back().to_m) {
            out.back().to_m = std::max(out.back().to_m, i.to_m);
        } else {
            out.push_back(i);
        }
    }
    return out;
}

ArraySwath arraySwath(std::span<const SensorSwath> sensors) {
    const auto u = unionOfSwaths(sensors);
    if (u.empty()) return {};
    return {-u.front().from_m, u.back().to_m, u.size() == 1};
}

ArraySwath arraySwathAt(const TargetModel& model, std::span<const double> sensor_cross_m,
                        double altitude_m, double heading_true_rad, double threshold_nT,
                        Evaluation eval) {
    std::vector<SensorSwath> s;
    s.reserve(sensor_cross_m.size());
    const double vertical = altitude_m + model.targetClass().burial_m;
    // All sensors fly at the same altitude and heading: one pair of half-widths serves them all.
    const HalfWidths w = eval == Evaluation::Direct
                             ? model.halfWidthsDirect(vertical, heading_true_rad, threshold_nT)
                             : model.halfWidths(vertical, heading_true_rad, threshold_nT);
    for (double c : sensor_cross_m) s.push_back({c, w});
    return arraySwath(s);
}

namespace {

double spacingNeeded(const TargetModel& model, std::span<const double> cross, double altitude_m,
                     double heading, double threshold, Evaluation eval) {
    ArraySwath a;
    ArraySwath b;
    if (eval == Evaluation::Direct) {
        // The pass is an infinite straight line: on the reciprocal heading the port side sees
        // exactly what the starboard side saw (the same geometry), so one solve serves both.
        const double vertical = altitude_m + model.targetClass().burial_m;
        const HalfWidths w = model.halfWidthsDirect(vertical, heading, threshold);
        std::vector<SensorSwath> sa;
        std::vector<SensorSwath> sb;
        for (double c : cross) {
            sa.push_back({c, w});
            sb.push_back({c, {w.starboard_m, w.port_m}});
        }
        a = arraySwath(sa);
        b = arraySwath(sb);
    } else {
        a = arraySwathAt(model, cross, altitude_m, heading, threshold, eval);
        b = arraySwathAt(model, cross, altitude_m, heading + kPi, threshold, eval);
    }
    if (!a.contiguous || !b.contiguous) return 0.0;
    const double same = a.port_m + a.starboard_m;
    const double to_starboard = a.starboard_m + b.starboard_m;
    const double to_port = a.port_m + b.port_m;
    return std::max(0.0, std::min({same, to_starboard, to_port}));
}

}  // namespace

ClassPlan planClass(const TargetModel& model, std::span<const double> cross, double altitude_m,
                    double heading_true_rad, double threshold_nT, double spacing_m,
                    Evaluation eval) {
    const bool direct = eval == Evaluation::Direct;
    ClassPlan p;
    p.name = model.targetClass().name;
    p.threshold_nT = threshold_nT;
    p.detection_range_m = direct ? model.detectionRangeDirect_m(heading_true_rad, threshold_nT)
                                 : model.detectionRange_m(heading_true_rad, threshold_nT);
    p.max_altitude_m = p.detection_range_m - model.targetClass().burial_m;
    p.swath = arraySwathAt(model, cross, altitude_m, heading_true_rad, threshold_nT, eval);
    const double vertical = altitude_m + model.targetClass().burial_m;
    for (double c : cross) {
        const double m = direct ? model.marginDirect(vertical, -c, heading_true_rad, threshold_nT)
                                : model.margin(vertical, -c, heading_true_rad, threshold_nT);
        p.centre_margin = std::max(p.centre_margin, m);
    }
    p.spacing_needed_m =
        spacingNeeded(model, cross, altitude_m, heading_true_rad, threshold_nT, eval);

    // Scan upward from the lowest altitude in small steps, then bisect the first failure: the
    // answer is the top of the altitude band, starting at the bottom, in which lines overlap.
    // The direct solve costs milliseconds per altitude, so it scans in 200 steps, not 2000.
    auto overlaps = [&](double a) {
        return spacingNeeded(model, cross, a, heading_true_rad, threshold_nT, eval) >= spacing_m;
    };
    if (!overlaps(kMinPlanAltitude_m)) return p;
    const double top = std::max(p.max_altitude_m, kMinPlanAltitude_m) + 1.0;
    const double step = std::max(0.01, (top - kMinPlanAltitude_m) / (direct ? 200.0 : 2000.0));
    double lo = kMinPlanAltitude_m;
    double hi = -1.0;
    for (double a = kMinPlanAltitude_m + step; a <= top; a += step) {
        if (!overlaps(a)) {
            hi = a;
            break;
        }
        lo = a;
    }
    if (hi > 0) {
        for (int i = 0; i < 30; ++i) {
            const double mid = 0.5 * (lo + hi);
            (overlaps(mid) ? lo : hi) = mid;
        }
    }
    p.max_altitude_for_spacing_m = lo;
    return p;
}

}  // namespace sg::detect
