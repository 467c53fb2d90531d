// The simulator's own point-dipole anomaly and its truth list; see planted_field.hpp.
#include "drivers_sim/planted_field.hpp"

#include <cmath>

#include <fmt/format.h>

#include "drivers_sim/simulator.hpp"

namespace sg::sim {

namespace {
constexpr double kRadPerDeg = 3.14159265358979323846 / 180.0;
// mu0 / 4 pi = 1e-7 T m / A = 100 nT m / A (SI, exact to the precision used).
constexpr double kMu0Over4Pi_nTm_per_A = 100.0;
}  // namespace

DirectionCosines directionFromAngles(double inclination_deg, double declination_deg) {
    const double inc = inclination_deg * kRadPerDeg;
    const double dec = declination_deg * kRadPerDeg;
    return {std::cos(inc) * std::cos(dec), std::cos(inc) * std::sin(dec), std::sin(inc)};
}

double plantedDipoleAnomaly_nT(double north_m, double east_m, double down_m, double moment_Am2,
                               const DirectionCosines& moment_dir,
                               const DirectionCosines& field_dir) {
    const double r = std::sqrt(north_m * north_m + east_m * east_m + down_m * down_m);
    if (!(r > 0.0)) return 0.0;
    // Direction cosines of the item-to-sensor direction.
    const double un = north_m / r, ue = east_m / r, ud = down_m / r;
    const double cos_pu = moment_dir.north * un + moment_dir.east * ue + moment_dir.down * ud;
    const double cos_fu = field_dir.north * un + field_dir.east * ue + field_dir.down * ud;
    const double cos_pf = moment_dir.north * field_dir.north + moment_dir.east * field_dir.east +
                          moment_dir.down * field_dir.down;
    return kMu0Over4Pi_nTm_per_A * moment_Am2 / (r * r * r) * (3.0 * cos_pu * cos_fu - cos_pf);
}

std::vector<PlantedItem> plantedItems(const Simulator& sim) {
    const Scenario& sc = sim.scenario();
    std::vector<PlantedItem> out;
    for (const TargetSpec& t : sc.targets) {
        PlantedItem it;
        it.name = t.name;
        it.easting_m = sim.origin_m().e + t.position_m.e;
        it.northing_m = sim.origin_m().n + t.position_m.n;
        it.seabed_depth_m = sim.seabed().depth_m(t.position_m);
        it.burial_m = t.burial_m;
        it.depth_m = it.seabed_depth_m + it.burial_m;
        it.moment_Am2 = t.moment_Am2;
        it.induced = !t.moment_inclination_deg.has_value();
        it.moment_inclination_deg = t.moment_inclination_deg.value_or(sc.geomag.inclination_deg);
        it.moment_declination_deg = t.moment_declination_deg.value_or(sc.geomag.declination_deg);
        out.push_back(std::move(it));
    }
    return out;
}

std::string plantedItemsCsv(const std::vector<PlantedItem>& items) {
    std::string s =
        "name,easting_m,northing_m,seabed_depth_m,burial_m,depth_m,moment_Am2,induced,"
        "moment_inclination_deg,moment_declination_deg\n";
    for (const PlantedItem& it : items)
        s += fmt::format("\"{}\",{:.3f},{:.3f},{:.3f},{:.3f},{:.3f},{:.4g},{},{:.2f},{:.2f}\n", it.name,
                         it.easting_m, it.northing_m, it.seabed_depth_m, it.burial_m, it.depth_m,
                         it.moment_Am2, it.induced ? 1 : 0, it.moment_inclination_deg,
                         it.moment_declination_deg);
    return s;
}

}  // namespace sg::sim
