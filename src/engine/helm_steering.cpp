// The helm's view of the survey; see helm_steering.hpp.
#include "engine/helm_steering.hpp"

#include <cmath>
#include <set>

#include <fmt/format.h>

#include <GeographicLib/Geodesic.hpp>

#include "engine/survey_engine.hpp"
#include "nav/survey_crs.hpp"

namespace sg::engine {

helm::SteeringFix steeringFixFor(const LegGeometry& leg, const nav::SurveyCrs& crs, double arrival_radius_m) {
    helm::SteeringFix fix;
    const double de = leg.dest.e_m - leg.origin.e_m, dn = leg.dest.n_m - leg.origin.n_m;
    const double length = std::hypot(de, dn);
    if (!(length > 0.0)) return fix;
    const double ue = de / length, un = dn / length;
    const double pe = leg.pos.e_m - leg.origin.e_m, pn = leg.pos.n_m - leg.origin.n_m;
    // Right-hand normal of the track (un, -ue): positive to starboard of travel origin -> dest.
    fix.xte_m = pe * un - pn * ue;
    const double along = pe * ue + pn * un;
    fix.perpendicular_passed = along >= length;
    fix.arrival_circle_entered =
        std::hypot(leg.dest.e_m - leg.pos.e_m, leg.dest.n_m - leg.pos.n_m) <= arrival_radius_m;

    const auto o = crs.inverse(leg.origin.e_m, leg.origin.n_m);
    const auto d = crs.inverse(leg.dest.e_m, leg.dest.n_m);
    const auto p = crs.inverse(leg.pos.e_m, leg.pos.n_m);
    const auto& g = GeographicLib::Geodesic::WGS84();
    double s12 = 0, azi1 = 0, azi2 = 0;
    g.Inverse(o.lat_deg, o.lon_deg, d.lat_deg, d.lon_deg, s12, azi1, azi2);
    fix.bearing_origin_dest_deg = azi1 < 0 ? azi1 + 360.0 : azi1;
    g.Inverse(p.lat_deg, p.lon_deg, d.lat_deg, d.lon_deg, s12, azi1, azi2);
    fix.bearing_to_dest_deg = azi1 < 0 ? azi1 + 360.0 : azi1;
    fix.range_to_dest_m = s12;
    fix.dest = {d.lat_deg, d.lon_deg};
    fix.valid = std::isfinite(fix.xte_m) && std::isfinite(s12);
    return fix;
}

helm::SteeringFix steeringFix(const SurveyEngine& engine, const helm::OutputConfig& output) {
    const auto* lines = engine.lines();
    const auto* crs = engine.crs();
    if (lines == nullptr || crs == nullptr) return {};
    const auto pos = output.reference == "antenna" ? engine.vesselPosition() : engine.arrayReference();
    if (!pos) return {};
    // The crew's infill line while it is the target (flown start -> end), else the active line.
    const int target = engine.steerTarget();
    const int line = target >= 0 ? target : lines->activeLine();
    if (line < 0 || line >= static_cast<int>(lines->lines().size())) return {};
    bool reversed = false;
    const int run = lines->activeRun();
    if (target < 0 && run >= 0 && run < static_cast<int>(lines->runs().size()))
        reversed = lines->runs()[static_cast<std::size_t>(run)].reversed;
    const auto& pl = lines->lines()[static_cast<std::size_t>(line)];
    LegGeometry leg{reversed ? pl.end : pl.start, reversed ? pl.start : pl.end, *pos};
    auto fix = steeringFixFor(leg, *crs, output.arrival_radius_m);
    fix.origin_id = helm::lineEndId(pl.name, reversed);
    fix.dest_id = helm::lineEndId(pl.name, !reversed);
    return fix;
}

std::vector<helm::Waypoint> routeWaypoints(const std::vector<RouteLine>& lines, const nav::SurveyCrs& crs) {
    std::vector<helm::Waypoint> out;
    for (const auto& l : lines) {
        for (const bool at_end : {false, true}) {
            const auto& pt = at_end ? l.end : l.start;
            const auto ll = crs.inverse(pt.e_m, pt.n_m);
            out.push_back({helm::lineEndId(l.name, at_end), {ll.lat_deg, ll.lon_deg}});
        }
    }
    // Identifiers must name one waypoint each: on any repeat, number them all ("W01A", ...).
    std::set<std::string> seen;
    bool repeated = false;
    for (const auto& w : out) repeated = repeated || !seen.insert(w.id).second;
    if (repeated)
        for (std::size_t k = 0; k < out.size(); ++k)
            out[k].id = fmt::format("W{:02d}{}", k / 2 + 1, k % 2 ? 'B' : 'A');
    return out;
}

}  // namespace sg::engine
