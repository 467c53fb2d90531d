// Planted items: the simulator's own model of the magnetic anomaly of the objects it buries, and
// the truth list (where each item is, how deep, how strong) that tests compare the detector with.
//
// This is deliberately a second, independent code path: the core's detection model
// (src/detect/dipole.hpp) and the anomaly picker must be checked against a world they did not
// compute. The formula is the same physics written another way, from the direction cosines:
// the total-field anomaly of a point dipole of moment m (A m^2) seen at distance r (m) along unit
// vector u (from the item to the sensor), with ambient-field unit vector f and moment unit
// vector p, is
//   dT = (mu0 / 4 pi) * m / r^3 * (3 cos(p,u) cos(f,u) - cos(p,f))      [nT with mu0/4pi in nT]
// Source: Blakely, R. J. (1995), Potential Theory in Gravity and Magnetic Applications, Cambridge
// University Press, ch. 4 (field of a dipole as the gradient of its scalar potential) and ch. 8
// (total-field anomaly as the projection on the ambient field direction, valid when the anomaly
// is much smaller than the ambient field).
#pragma once

#include <string>
#include <vector>

namespace sg::sim {

class Simulator;

// Direction cosines of a unit vector given by inclination (positive down) and declination
// (positive east of true north), both in degrees, in the frame north, east, down.
struct DirectionCosines {
    double north = 0.0, east = 0.0, down = 0.0;
};
DirectionCosines directionFromAngles(double inclination_deg, double declination_deg);

// Total-field anomaly (nT) of a point dipole. north_m, east_m, down_m: displacement from the item
// to the sensor in a true north-east-down frame (metres, not all zero); moment_Am2 >= 0 along
// `moment_dir`; `field_dir` the ambient field direction. Returns 0 at zero distance.
double plantedDipoleAnomaly_nT(double north_m, double east_m, double down_m, double moment_Am2,
                               const DirectionCosines& moment_dir,
                               const DirectionCosines& field_dir);

// One planted item as the simulator places it (the truth list).
struct PlantedItem {
    std::string name;
    double easting_m = 0.0;        // absolute, survey CRS grid
    double northing_m = 0.0;
    double seabed_depth_m = 0.0;   // water depth at the item (below the sea surface)
    double burial_m = 0.0;         // below the seabed
    double depth_m = 0.0;          // below the sea surface: seabed_depth_m + burial_m
    double moment_Am2 = 0.0;
    bool induced = true;           // moment along the ambient field
    double moment_inclination_deg = 0.0;  // the moment's direction (the field's when induced)
    double moment_declination_deg = 0.0;
};

// Every planted item of the simulator's scenario, in scenario order.
std::vector<PlantedItem> plantedItems(const Simulator& sim);

// Writes the truth list as CSV (header name,easting_m,northing_m,seabed_depth_m,burial_m,depth_m,
// moment_Am2,induced,moment_inclination_deg,moment_declination_deg).
std::string plantedItemsCsv(const std::vector<PlantedItem>& items);

}  // namespace sg::sim
