// Magnetic field of a point dipole and its total-field anomaly, for the detection model and for
// the simulator's planted targets (both use exactly these functions).
//
// Frame: right-handed local frame x = north, y = east, z = down (NED), metres. Angles: inclination
// positive downward (northern hemisphere), declination positive east of true north. Field values in
// nanotesla (nT), moments in A*m^2.
//
// Source: Blakely, R. J. (1995), Potential Theory in Gravity and Magnetic Applications, Cambridge
// University Press: the field of a dipole, B = (mu0 / 4 pi) * (3 (m . r^) r^ - m) / r^3 (ch. 4), and
// the total-field anomaly as the projection of the anomalous field on the ambient field direction,
// valid when the anomaly is much smaller than the ambient field (ch. 8).
#pragma once

#include <cmath>

namespace sg::detect {

// A vector in the north-east-down frame.
struct Vec3 {
    double x = 0.0;  // north
    double y = 0.0;  // east
    double z = 0.0;  // down
};

inline constexpr double kPi = 3.14159265358979323846;
// mu0 / (4 pi) in T*m/A (SI; exact to the precision used here).
inline constexpr double kMu0Over4Pi = 1e-7;
inline constexpr double kMu0 = 4.0 * kPi * kMu0Over4Pi;
inline constexpr double kTeslaToNanoTesla = 1e9;

constexpr Vec3 operator+(Vec3 a, Vec3 b) { return {a.x + b.x, a.y + b.y, a.z + b.z}; }
constexpr Vec3 operator-(Vec3 a, Vec3 b) { return {a.x - b.x, a.y - b.y, a.z - b.z}; }
constexpr Vec3 operator*(double s, Vec3 a) { return {s * a.x, s * a.y, s * a.z}; }
constexpr double dot(Vec3 a, Vec3 b) { return a.x * b.x + a.y * b.y + a.z * b.z; }
inline double norm(Vec3 a) { return std::sqrt(dot(a, a)); }

// Unit vector of the ambient (main) field: (cos I cos D, cos I sin D, sin I) in north-east-down.
// inclination_rad in [-pi/2, pi/2] (positive down), declination_rad any (positive east).
inline Vec3 ambientFieldUnit(double inclination_rad, double declination_rad) {
    const double ci = std::cos(inclination_rad);
    return {ci * std::cos(declination_rad), ci * std::sin(declination_rad),
            std::sin(inclination_rad)};
}
inline Vec3 ambientFieldUnitDeg(double inclination_deg, double declination_deg) {
    return ambientFieldUnit(inclination_deg * kPi / 180.0, declination_deg * kPi / 180.0);
}

// Field of a point dipole of moment `moment_Am2` at displacement `r_m` FROM the dipole TO the
// observation point (metres), in nT: B = (mu0/4pi) (3 (m.r^) r^ - m) / r^3 (Blakely 1995).
// |r_m| must be > 0 (returns a zero vector at r = 0, where the point dipole is singular).
inline Vec3 dipoleField_nT(Vec3 moment_Am2, Vec3 r_m) {
    const double r2 = dot(r_m, r_m);
    if (r2 <= 0.0) return {};
    const double r = std::sqrt(r2);
    const double inv_r3 = 1.0 / (r2 * r);
    const double mr_over_r2 = dot(moment_Am2, r_m) / r2;
    const double s = kMu0Over4Pi * kTeslaToNanoTesla * inv_r3;
    return s * (3.0 * mr_over_r2 * r_m - moment_Am2);
}

// Total-field anomaly (nT) of a dipole with any moment vector: the projection of its field on the
// ambient field unit vector `field_unit` (Blakely 1995; valid for anomalies << ambient field).
inline double totalFieldAnomaly_nT(Vec3 moment_Am2, Vec3 r_m, Vec3 field_unit) {
    return dot(dipoleField_nT(moment_Am2, r_m), field_unit);
}

// Total-field anomaly (nT) of an induced dipole: moment of magnitude `moment_Am2` (>= 0) along the
// ambient field. Equals (mu0/4pi) m (3 cos^2(theta) - 1) / r^3 with theta the angle between the
// field and r.
inline double inducedTotalFieldAnomaly_nT(double moment_Am2, Vec3 r_m, Vec3 field_unit) {
    return totalFieldAnomaly_nT(moment_Am2 * field_unit, r_m, field_unit);
}

// Ambient field strength H0 (A/m) from its flux density B0 (nT): H0 = B0 / mu0.
inline double ambientH_Apm(double intensity_nT) { return intensity_nT / kTeslaToNanoTesla / kMu0; }

// Induced moment (A*m^2) of a uniformly magnetised sphere of radius `radius_m` (> 0) and volume
// susceptibility `susceptibility` (SI, >= 0) in an ambient field of `intensity_nT`. With the
// demagnetisation factor N = 1/3 of a sphere, M = chi / (1 + N chi) H0 = 3 chi / (3 + chi) H0, and
// the moment is M times the volume 4/3 pi a^3 (Blakely 1995, ch. 4, uniformly magnetised sphere;
// demagnetising factors as in standard magnetostatics). For chi -> infinity the moment tends to
// 4 pi a^3 H0.
inline double sphereInducedMoment_Am2(double radius_m, double susceptibility,
                                      double intensity_nT) {
    const double magnetisation_Apm =
        3.0 * susceptibility / (3.0 + susceptibility) * ambientH_Apm(intensity_nT);
    return magnetisation_Apm * (4.0 / 3.0) * kPi * radius_m * radius_m * radius_m;
}

}  // namespace sg::detect
