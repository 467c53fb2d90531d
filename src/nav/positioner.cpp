// Sensor positioning along the travelled path; see positioner.hpp.
#include "nav/positioner.hpp"

#include <algorithm>
#include <cmath>
#include <limits>

namespace sg::nav {

namespace {

constexpr double kPi = 3.14159265358979323846;
constexpr double kDegToRad = kPi / 180.0;
constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();
constexpr std::int64_t kNsPerS = 1'000'000'000;
constexpr std::size_t kMaxPathPoints = 200'000;  // hard bound whatever the speed

std::int64_t seconds(double s) { return static_cast<std::int64_t>(s * 1e9); }
std::int64_t millis(double ms) { return static_cast<std::int64_t>(ms * 1e6); }

double wrapPi(double a) {
    a = std::fmod(a + kPi, 2.0 * kPi);
    if (a < 0) a += 2.0 * kPi;
    return a - kPi;
}
double wrapTwoPi(double a) {
    if (a >= 0.0 && a < 2.0 * kPi) return a;  // the usual case, without fmod
    if (a < 0.0 && a >= -2.0 * kPi) return a + 2.0 * kPi;
    if (a >= 2.0 * kPi && a < 4.0 * kPi) return a - 2.0 * kPi;
    a = std::fmod(a, 2.0 * kPi);
    return a < 0 ? a + 2.0 * kPi : a;
}

}  // namespace

// ---------------------------------------------------------------------------------------------

bool TimedSeries::add(std::int64_t t_ns, double v) {
    if (!std::isfinite(v) || (!m_v.empty() && t_ns < m_v.back().t_ns)) {
        ++m_rejected;
        return false;
    }
    m_v.push_back({t_ns, v});
    while (m_v.size() > 2 && m_v.back().t_ns - m_v.front().t_ns > m_keep_ns) m_v.pop_front();
    return true;
}

std::optional<double> TimedSeries::at(std::int64_t t_ns, std::int64_t max_age_ns) const {
    if (m_v.empty()) return std::nullopt;
    // Queries are nearly always at or after the newest value (data arrive in time order): no
    // search then (upper_bound would return end() too).
    auto next = t_ns >= m_v.back().t_ns
                    ? m_v.end()
                    : std::upper_bound(m_v.begin(), m_v.end(), t_ns,
                                       [](std::int64_t t, const Item& it) { return t < it.t_ns; });
    const bool has_next = next != m_v.end();
    const bool has_prev = next != m_v.begin();
    const std::int64_t age_prev = has_prev ? t_ns - std::prev(next)->t_ns : 0;
    const std::int64_t age_next = has_next ? next->t_ns - t_ns : 0;
    const bool prev_ok = has_prev && age_prev <= max_age_ns;
    const bool next_ok = has_next && age_next <= max_age_ns;
    if (prev_ok && next_ok) {
        const Item& a = *std::prev(next);
        const Item& b = *next;
        const double w = static_cast<double>(t_ns - a.t_ns) / static_cast<double>(b.t_ns - a.t_ns);
        return a.v + w * (b.v - a.v);
    }
    if (prev_ok) return std::prev(next)->v;
    if (next_ok) return next->v;
    return std::nullopt;
}

// ---------------------------------------------------------------------------------------------

double waterDepthBelowSurface_m(double depth_below_transducer_m,
                                std::optional<double> dpt_offset_m, const VesselConfig& vessel) {
    if (dpt_offset_m && *dpt_offset_m > 0.0) return depth_below_transducer_m + *dpt_offset_m;
    if (dpt_offset_m && *dpt_offset_m < 0.0) {
        // depth + offset is the depth below the keel; the keel is draft_m below the waterline.
        return depth_below_transducer_m + *dpt_offset_m + vessel.draft_m;
    }
    return depth_below_transducer_m + vessel.transducer_depth_m;
}

// ---------------------------------------------------------------------------------------------

Positioner::Positioner(NavConfig config, const SurveyCrs* crs)
    : m_cfg(std::move(config)), m_crs(crs),
      m_heading_true(seconds(std::max(10.0, 4.0 * m_cfg.vessel.heading_max_age_s))),
      m_cable(seconds(std::max(60.0, 4.0 * m_cfg.tow.cable_max_age_s))),
      m_depth(seconds(std::max(60.0, 4.0 * m_cfg.tow.depth_max_age_s))),
      m_altitude(seconds(std::max(60.0, 4.0 * m_cfg.tow.altitude_max_age_s))),
      // Water depth is looked up where the fish is now, i.e. when the vessel was there: keep long.
      m_water_depth(seconds(1800.0)) {
    if (m_cfg.sensors.empty()) m_cfg.sensors.push_back(SensorOffset{});
}

EastNorth Positioner::addFix(std::int64_t t_ns, double lon_deg, double lat_deg, int quality) {
    if (m_crs == nullptr) {
        ++m_rejected_fixes;
        return {kNaN, kNaN};
    }
    const EastNorth en = m_crs->forward(lon_deg, lat_deg);
    if (!std::isfinite(en.easting_m)) {
        ++m_rejected_fixes;
        return en;
    }
    addFixProjected(t_ns, en.easting_m, en.northing_m, quality,
                    m_crs->convergence_deg(lon_deg, lat_deg) * kDegToRad);
    return en;
}

std::optional<double> Positioner::vesselHeadingGrid(std::int64_t t_ns, double convergence,
                                                    std::uint32_t& flags) const {
    const HeadingSource src = m_cfg.vessel.heading_source;
    if (src != HeadingSource::Cmg) {
        if (auto h = m_heading_true.at(t_ns, seconds(m_cfg.vessel.heading_max_age_s))) {
            return *h - convergence;  // grid bearing = true bearing - convergence
        }
    }
    if (src != HeadingSource::Hdt && m_fixes.size() >= 2) {
        const Fix& cur = m_fixes.back();
        const std::int64_t from = cur.t_ns - seconds(m_cfg.vessel.cmg_window_s);
        auto it = std::lower_bound(m_fixes.begin(), m_fixes.end(), from,
                                   [](const Fix& f, std::int64_t t) { return f.t_ns < t; });
        if (it != m_fixes.end() && it->t_ns < cur.t_ns) {
            const double de = cur.e - it->e;
            const double dn = cur.n - it->n;
            const double dt = static_cast<double>(cur.t_ns - it->t_ns) / 1e9;
            if (std::hypot(de, dn) / dt >= m_cfg.vessel.cmg_min_speed_mps &&
                std::hypot(de, dn) > 0.0) {
                flags |= kHeadingFromCmg;
                return std::atan2(de, dn);
            }
        }
    }
    flags |= kNoHeading;
    return std::nullopt;
}

void Positioner::addFixProjected(std::int64_t t_ns, double e, double n, int quality,
                                 double convergence_rad) {
    t_ns -= millis(m_cfg.vessel.gnss_latency_ms);
    if (quality <= 0 || !std::isfinite(e) || !std::isfinite(n) ||
        (!m_fixes.empty() && t_ns <= m_fixes.back().t_ns)) {
        ++m_rejected_fixes;
        return;
    }
    m_fixes.push_back({t_ns, e, n});
    const std::int64_t keep = seconds(m_cfg.vessel.cmg_window_s + 1.0);
    while (m_fixes.size() > 2 && m_fixes.back().t_ns - m_fixes[1].t_ns > keep) m_fixes.pop_front();

    std::uint32_t flags = 0;
    const auto heading = vesselHeadingGrid(t_ns, convergence_rad, flags);
    // With the tow point straight below the antenna no heading is needed for the offset.
    if (m_cfg.vessel.tow_point_m[0] == m_cfg.vessel.antenna_m[0] &&
        m_cfg.vessel.tow_point_m[1] == m_cfg.vessel.antenna_m[1]) {
        flags &= ~static_cast<std::uint32_t>(kNoHeading);
    }
    double te = e;
    double tn = n;
    if (heading) {
        // Vessel frame -> grid: forward = (sin h, cos h), starboard = (cos h, -sin h) in (E, N).
        const double df = m_cfg.vessel.tow_point_m[0] - m_cfg.vessel.antenna_m[0];
        const double ds = m_cfg.vessel.tow_point_m[1] - m_cfg.vessel.antenna_m[1];
        const double sh = std::sin(*heading);
        const double ch = std::cos(*heading);
        te += df * sh + ds * ch;
        tn += df * ch - ds * sh;
    }
    double s = 0.0;
    if (!m_path.empty()) s = m_path.back().s + std::hypot(te - m_path.back().e, tn - m_path.back().n);
    m_path.push_back({t_ns, te, tn, s, heading ? *heading : kNaN, convergence_rad, flags});
    while (m_path.size() > 2 &&
           (m_path.back().s - m_path[1].s > m_cfg.tow.history_length_m ||
            m_path.size() > kMaxPathPoints)) {
        m_path.pop_front();
    }
}

void Positioner::addHeading(std::int64_t t_ns, double true_heading_deg) {
    if (!std::isfinite(true_heading_deg)) return;
    // Stored unwrapped so that interpolation across north is continuous.
    double h = true_heading_deg * kDegToRad;
    if (m_have_heading) h = m_last_heading_rad + wrapPi(h - m_last_heading_rad);
    if (m_heading_true.add(t_ns - millis(m_cfg.vessel.heading_latency_ms), h)) {
        m_last_heading_rad = h;
        m_have_heading = true;
    }
}

void Positioner::addCableOut(std::int64_t t_ns, double cable_out_m) {
    m_cable.add(t_ns - millis(m_cfg.tow.cable_latency_ms), cable_out_m);
}
void Positioner::addSensorDepth(std::int64_t t_ns, double depth_m) {
    m_depth.add(t_ns - millis(m_cfg.tow.depth_latency_ms), depth_m);
}
void Positioner::addAltitude(std::int64_t t_ns, double altitude_m) {
    m_altitude.add(t_ns - millis(m_cfg.tow.altimeter_latency_ms), altitude_m);
}
void Positioner::addWaterDepth(std::int64_t t_ns, double depth_below_surface_m) {
    m_water_depth.add(t_ns - millis(m_cfg.vessel.sounder_latency_ms), depth_below_surface_m);
}

// Point of the travelled path at cumulative length s. Before the first kept point the path is
// extended straight back along its first segment (the caller flags that case).
Positioner::PathPos Positioner::pointAtLength(double s) const {
    const PathPoint& first = m_path.front();
    if (s <= first.s) {
        double de = 0.0;
        double dn = 0.0;
        for (std::size_t i = 1; i < m_path.size(); ++i) {
            const double d = m_path[i].s - first.s;
            if (d > 1e-6) {
                de = (m_path[i].e - first.e) / d;
                dn = (m_path[i].n - first.n) / d;
                break;
            }
        }
        const double back = s - first.s;  // <= 0
        return {first.e + back * de, first.n + back * dn, static_cast<double>(first.t_ns),
                first.heading_grid, first.convergence, first.flags};
    }
    const PathPoint& last = m_path.back();
    if (s >= last.s) {
        return {last.e, last.n, static_cast<double>(last.t_ns), last.heading_grid,
                last.convergence, last.flags};
    }
    // Queries move slowly along the path: try around the previous answer before searching.
    std::size_t h = m_length_hint;
    auto brackets = [&](std::size_t i) {
        return i >= 1 && i < m_path.size() && m_path[i - 1].s < s && m_path[i].s >= s;
    };
    if (!brackets(h)) {
        if (brackets(h + 1)) {
            h += 1;
        } else if (h >= 1 && brackets(h - 1)) {
            h -= 1;
        } else {
            h = lowerBoundNear(s, h);
        }
    }
    m_length_hint = h;
    const PathPoint& b = m_path[h];
    const PathPoint& a = m_path[h - 1];
    const double w = (s - a.s) / (b.s - a.s);
    return {a.e + w * (b.e - a.e), a.n + w * (b.n - a.n),
            static_cast<double>(a.t_ns) + w * static_cast<double>(b.t_ns - a.t_ns),
            w < 0.5 ? a.heading_grid : b.heading_grid, a.convergence, a.flags | b.flags};
}

// First path index with s_m <= its length, for first.s < s_m <= last.s (so 1 <= index < size).
// The queries of one pose (fish, sensor, the two ends of the direction baseline) lie a few metres
// apart: searching outward from the previous answer (doubling steps, then a binary search in the
// bracket) costs a few steps where a search of the whole history costs about log2(size). Path
// lengths never decrease, so the answer is the same as std::lower_bound's.
std::size_t Positioner::lowerBoundNear(double s_m, std::size_t hint) const {
    const std::size_t n = m_path.size();
    hint = std::clamp<std::size_t>(hint, 1, n - 1);
    std::size_t lo = 0;      // m_path[lo].s < s_m
    std::size_t hi = n - 1;  // m_path[hi].s >= s_m
    std::size_t step = 1;
    if (m_path[hint].s < s_m) {
        lo = hint;
        while (lo + step < n - 1 && m_path[lo + step].s < s_m) {
            lo += step;
            step *= 2;
        }
        hi = std::min(lo + step, n - 1);
    } else {
        hi = hint;
        while (hi > step && m_path[hi - step].s >= s_m) {
            hi -= step;
            step *= 2;
        }
        lo = hi > step ? hi - step : 0;
    }
    const auto first = m_path.begin() + static_cast<std::ptrdiff_t>(lo + 1);
    const auto last = m_path.begin() + static_cast<std::ptrdiff_t>(hi);
    return static_cast<std::size_t>(
        std::lower_bound(first, last, s_m, [](const PathPoint& p, double v) { return p.s < v; }) -
        m_path.begin());
}

// Direction (grid, rad) of the travelled path around length s, from the chord over the configured
// baseline. When the path barely moved (vessel stopped) the fallback (vessel heading) is used.
double Positioner::directionAtLength(double s, double fallback) const {
    const double half = 0.5 * m_cfg.tow.path_direction_baseline_m;
    const double s0 = std::max(s - half, m_path.front().s);
    const double s1 = std::min(s + half, m_path.back().s);
    if (s1 - s0 < 0.1 * half) return fallback;
    const PathPos p0 = pointAtLength(s0);
    const PathPos p1 = pointAtLength(s1);
    const double de = p1.e - p0.e;
    const double dn = p1.n - p0.n;
    if (std::hypot(de, dn) < 0.05 * half) return fallback;
    return std::atan2(de, dn);
}

SensorPose Positioner::fishReference(std::int64_t t_ns, double& s_fish, PathPos& fish) const {
    SensorPose pose;
    if (m_path.empty()) {
        pose.flags |= kNoFix | kNoAltitude;
        pose.easting_m = pose.northing_m = kNaN;
        pose.heading_grid_rad = pose.heading_true_rad = kNaN;
        pose.layback_m = pose.cable_out_m = pose.sensor_depth_m = pose.altitude_m = kNaN;
        return pose;
    }
    // Tow point at time t: interpolated on the path; past the last fix (flagged) it is held there,
    // or carried on along the last segment for at most [vessel] extrapolation_s (default 0: no
    // position, hence no coverage, beyond what the last fix supports).
    double s_tow = 0.0;
    double extra_head = 0.0;  // length travelled past the last fix (extrapolation)
    double head_dir = 0.0;
    const PathPoint& last = m_path.back();
    const std::int64_t max_age = seconds(m_cfg.vessel.fix_max_age_s);
    if (t_ns >= last.t_ns) {
        const std::int64_t dt = t_ns - last.t_ns;
        if (dt > max_age) pose.flags |= kStaleFix;
        if (dt > 0 && m_path.size() >= 2) {
            pose.flags |= kExtrapolated;
            const PathPoint& prev = m_path[m_path.size() - 2];
            const double seg_t = static_cast<double>(last.t_ns - prev.t_ns) / 1e9;
            const double speed = (last.s - prev.s) / seg_t;
            const std::int64_t ahead = std::min({dt, max_age, seconds(m_cfg.vessel.extrapolation_s)});
            extra_head = speed * static_cast<double>(ahead) / 1e9;
            head_dir = std::atan2(last.e - prev.e, last.n - prev.n);
        }
        s_tow = last.s + extra_head;
    } else if (t_ns < m_path.front().t_ns) {
        pose.flags |= kBeforeHistory;
        s_tow = m_path.front().s;
    } else {
        std::size_t h = m_time_hint;
        auto brackets = [&](std::size_t i) {
            return i >= 1 && i < m_path.size() && m_path[i - 1].t_ns <= t_ns &&
                   m_path[i].t_ns > t_ns;
        };
        if (!brackets(h)) {
            if (brackets(h + 1)) {
                h += 1;
            } else {
                h = static_cast<std::size_t>(
                    std::upper_bound(m_path.begin(), m_path.end(), t_ns,
                                     [](std::int64_t t, const PathPoint& p) { return t < p.t_ns; }) -
                    m_path.begin());
            }
        }
        m_time_hint = h;
        const PathPoint& b = m_path[h];
        const PathPoint& a = m_path[h - 1];
        const double w =
            static_cast<double>(t_ns - a.t_ns) / static_cast<double>(b.t_ns - a.t_ns);
        s_tow = a.s + w * (b.s - a.s);
        if (b.t_ns - a.t_ns > 2 * max_age) pose.flags |= kStaleFix;  // a hole in the fixes
    }

    // Cable out and sensor depth -> horizontal layback (straight cable).
    double cable = 0.0;
    const bool at_antenna = m_cfg.tow.sensor_at_antenna;
    if (at_antenna) {
        // No tow: the sensor is at the antenna (tow point = antenna, see parseVesselConfig).
    } else if (auto c = m_cable.at(t_ns, seconds(m_cfg.tow.cable_max_age_s))) {
        cable = *c;
    } else if (m_cfg.tow.cable_out_m) {
        cable = *m_cfg.tow.cable_out_m;
        pose.flags |= kFixedCableOut;
    } else {
        pose.flags |= kNoCableOut;
    }
    double depth = 0.0;
    bool have_depth = true;
    if (auto d = m_depth.at(t_ns, seconds(m_cfg.tow.depth_max_age_s))) {
        depth = *d;
    } else if (m_cfg.tow.sensor_depth_m) {
        depth = *m_cfg.tow.sensor_depth_m;
        pose.flags |= kFixedSensorDepth;
    } else if (at_antenna) {
        depth = 0.0;  // at the antenna: at (or above) the surface
    } else {
        pose.flags |= kNoSensorDepth;
        have_depth = false;
    }
    const double drop = depth + m_cfg.vessel.tow_point_m[2];
    double horizontal = 0.0;
    if (at_antenna) {
        horizontal = 0.0;
    } else if (cable >= std::fabs(drop)) {
        horizontal = std::sqrt(cable * cable - drop * drop);
    } else if (!(pose.flags & kNoCableOut)) {
        pose.flags |= kCableShorterThanDrop;
    }
    const double layback = std::max(0.0, horizontal + m_cfg.tow.extra_layback_m);
    pose.layback_m = layback;
    pose.cable_out_m = cable;
    pose.sensor_depth_m = have_depth ? depth : kNaN;

    // Walk back along the travelled path.
    s_fish = s_tow - layback;
    if (s_fish > last.s) {
        // Still inside the extrapolated stretch past the last fix.
        const double a = s_fish - last.s;
        fish = {last.e + a * std::sin(head_dir), last.n + a * std::cos(head_dir),
                static_cast<double>(t_ns), last.heading_grid, last.convergence, last.flags};
    } else {
        if (s_fish < m_path.front().s) pose.flags |= kLaybackBeyondHistory;
        fish = pointAtLength(s_fish);
    }
    pose.flags |= fish.flags & (kNoHeading | kHeadingFromCmg);

    // Altitude: altimeter, else water depth where the fish is (sounded when the vessel passed
    // there) minus sensor depth.
    if (auto a = m_altitude.at(t_ns, seconds(m_cfg.tow.altitude_max_age_s))) {
        pose.altitude_m = *a;
        pose.altitude_source = AltitudeSource::Altimeter;
    } else if (have_depth) {
        const auto when = static_cast<std::int64_t>(fish.t_ns);
        if (auto wd = m_water_depth.at(when, seconds(m_cfg.vessel.sounder_max_age_s))) {
            pose.altitude_m = *wd - depth;
            pose.altitude_source = AltitudeSource::WaterDepthMinusSensorDepth;
        }
    }
    if (pose.altitude_source == AltitudeSource::None) {
        pose.altitude_m = kNaN;
        pose.flags |= kNoAltitude;
    }
    return pose;
}

void Positioner::placeSensor(const SensorOffset& o, const SensorPose& ref, double s_fish,
                             SensorPose& out) const {
    out = ref;
    const double s = s_fish + o.along_m;
    // Sensors with the same along-track offset share the path point and its direction.
    if (m_place_cache.valid && m_place_cache.s == s) {
        applyCross(o, m_place_cache.p, m_place_cache.dir, m_place_cache.no_heading, out);
        return;
    }
    PathPos p;
    if (s > m_path.back().s) {
        // Ahead of the last fix (extrapolation): straight on along the last direction.
        const PathPoint& last = m_path.back();
        const double dir = m_path.size() >= 2
                               ? std::atan2(last.e - m_path[m_path.size() - 2].e,
                                            last.n - m_path[m_path.size() - 2].n)
                               : (std::isfinite(last.heading_grid) ? last.heading_grid : 0.0);
        const double a = s - last.s;
        p = {last.e + a * std::sin(dir), last.n + a * std::cos(dir), 0.0, dir, last.convergence,
             last.flags};
    } else {
        p = pointAtLength(s);
    }
    double dir = directionAtLength(std::min(s, m_path.back().s), p.heading_grid);
    // Without a direction from the path (vessel stopped) and without a heading, the sensor's
    // cross/along offsets cannot be oriented.
    const bool no_heading = !std::isfinite(dir);
    if (no_heading) dir = 0.0;
    m_place_cache = {true, s, p, dir, no_heading};
    applyCross(o, p, dir, no_heading, out);
}

void Positioner::applyCross(const SensorOffset& o, const PathPos& p, double dir, bool no_heading,
                            SensorPose& out) {
    if (no_heading) out.flags |= kNoHeading;
    out.easting_m = p.e + o.cross_m * std::cos(dir);
    out.northing_m = p.n - o.cross_m * std::sin(dir);
    out.heading_grid_rad = wrapTwoPi(dir);
    out.heading_true_rad = wrapTwoPi(dir + p.convergence);
}

bool Positioner::hasFixAtOrAfter(std::int64_t mag_t_ns) const {
    return !m_path.empty() && m_path.back().t_ns >= mag_t_ns - millis(m_cfg.tow.mag_latency_ms);
}

SensorPose Positioner::poseAt(std::int64_t t_ns, int sensor_index) const {
    const auto it = std::find_if(m_cfg.sensors.begin(), m_cfg.sensors.end(),
                                 [&](const SensorOffset& o) { return o.index == sensor_index; });
    t_ns -= millis(m_cfg.tow.mag_latency_ms);
    double s_fish = 0.0;
    PathPos fish{};
    m_place_cache.valid = false;
    SensorPose ref = fishReference(t_ns, s_fish, fish);
    if (it == m_cfg.sensors.end()) {
        ref.flags |= kUnknownSensor;
        return ref;
    }
    if (ref.flags & kNoFix) return ref;
    SensorPose out;
    placeSensor(*it, ref, s_fish, out);
    return out;
}

void Positioner::posesAt(std::int64_t t_ns, std::vector<SensorPose>& out) const {
    t_ns -= millis(m_cfg.tow.mag_latency_ms);
    double s_fish = 0.0;
    PathPos fish{};
    m_place_cache.valid = false;
    const SensorPose ref = fishReference(t_ns, s_fish, fish);
    out.resize(m_cfg.sensors.size());
    for (std::size_t i = 0; i < m_cfg.sensors.size(); ++i) {
        if (ref.flags & kNoFix) {
            out[i] = ref;
        } else {
            placeSensor(m_cfg.sensors[i], ref, s_fish, out[i]);
        }
    }
}

}  // namespace sg::nav
