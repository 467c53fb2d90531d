// Target classes and their detection models: the empirical mass rule, an induced or worst-case
// oriented point dipole, and an induced sphere. Each model answers, for a sensor at a vertical
// distance above the target on a straight pass of a given heading, the PEAK total-field anomaly
// along the pass at a cross-track offset, and the largest offsets to port and starboard at which
// that peak still reaches a threshold (the detectable half-widths).
//
// Sources: Blakely (1995) for the dipole and the sphere (see dipole.hpp); the mass rule is common
// practice in the trade (about 1 nT at 100 ft for one short ton of steel).
//
// Scale-free tables: a dipole's anomaly is (mu0/4pi) m G / rho^3 with G depending only on the
// directions, so with the "detection scale" R_T = (K / T)^(1/3) (K = 100 nT m^3 per A m^2 times m,
// T the threshold) the half-width divided by R_T depends only on h / R_T, the pass heading relative
// to magnetic north and the side. That table (one per field direction and orientation rule) is
// built once and interpolated per sample; see docs/detection-model.md for its error.
#pragma once

#include <cstdint>
#include <memory>
#include <string>
#include <vector>

#include "detect/dipole.hpp"

namespace sg::config {
class Section;
}

namespace sg::detect {

// Mass-rule constant C (nT m^3 / kg) such that one short ton (907.18474 kg) gives 1 nT at 100 ft
// (30.48 m): C = 30.48^3 / 907.18474 = 31.214 nT m^3/kg (common practice).
inline constexpr double kShortTon_kg = 907.18474;
inline constexpr double kHundredFeet_m = 30.48;
inline constexpr double kMassRuleC_nTm3_per_kg =
    kHundredFeet_m * kHundredFeet_m * kHundredFeet_m / kShortTon_kg;

enum class ModelKind { MassRule, Dipole, Sphere };
// Direction rule of a dipole's or sphere's moment:
// - Induced: the moment along the ambient field, magnitude as configured.
// - InducedRemanent (the default): the induced moment plus a remanent moment of at most
//   `remanence_ratio` times its size in ANY direction; per pass geometry the remanent direction
//   that makes the peak smallest is taken (a bound on the remanent/induced ratio, the
//   Koenigsberger ratio Q; see docs/detection-model.md for the value and its sources).
// - Worst: a moment of the configured magnitude in any direction, the direction that makes the
//   peak smallest (blind straight below a magnetic north-south line).
enum class Orientation { Induced, Worst, InducedRemanent };

// Default bound on the remanent / induced moment ratio for InducedRemanent (a stated assumption,
// see docs/detection-model.md "Default orientation rule"); valid range [0, kMaxRemanenceRatio].
inline constexpr double kDefaultRemanenceRatio = 0.5;
// Above 1 the remanent moment can cancel the induced one and nothing is ever detectable; the
// config refuses ratios above this value and points to "worst" instead.
inline constexpr double kMaxRemanenceRatio = 0.9;

struct GeomagneticField {
    double inclination_deg = 65.0;  // positive down, [-90, 90]
    double declination_deg = 0.0;   // positive east of true north, [-180, 180]
    double intensity_nT = 50000.0;  // ambient field strength, (0, 100000]
};

struct TargetClass {
    std::string name;
    ModelKind model = ModelKind::MassRule;
    double mass_kg = 0.0;        // mass rule
    double moment_Am2 = 0.0;     // dipole
    double radius_m = 0.0;       // sphere
    double susceptibility = 0.0; // sphere, SI volume susceptibility
    double burial_m = 0.0;       // depth of the target below the seabed
    Orientation orientation = Orientation::InducedRemanent;  // dipole and sphere
    double remanence_ratio = kDefaultRemanenceRatio;  // InducedRemanent: remanent <= ratio x induced
};

struct DetectionSettings {
    double k = 3.0;               // threshold = max(min_anomaly_nT, k * noise)
    double min_anomaly_nT = 1.0;
    int noise_window = 200;       // samples of the fourth-difference noise window
    double mass_rule_C = kMassRuleC_nTm3_per_kg;  // nT m^3 / kg
};

struct DetectionConfig {
    GeomagneticField field;
    bool field_given = false;  // [geomagnetic] was in the config (only dipole/sphere need it)
    DetectionSettings detection;
    std::vector<TargetClass> targets;
};

// True when some target class uses the ambient field (a dipole or a sphere); a survey whose
// classes all use the mass rule needs none, and reports state "mass rule: no field needed"
// rather than print a field that nothing used.
bool usesAmbientField(const DetectionConfig& cfg);
inline constexpr const char* kNoFieldNeeded = "mass rule: no field needed";

// Parses [geomagnetic], [detection] and [[target]] from the root table. Unknown keys, missing or
// out-of-range values throw config::ConfigError naming the file and key. At least one [[target]].
DetectionConfig parseDetectionConfig(const config::Section& root);

struct HalfWidths {
    double port_m = 0.0;       // detectable half-width to the left of the pass (>= 0)
    double starboard_m = 0.0;  // to the right (>= 0)
};

// Exact (slow) peak of |total-field anomaly| along an infinite straight pass, per unit of
// K = (mu0/4pi) m in nT m^3, times rho^3: the dimensionless "peak factor" g. The target is at the
// origin; the sensor passes at vertical distance rho sin(depr) above it and horizontal distance
// rho cos(depr), with the target to STARBOARD of the pass. heading_mag_rad: pass heading clockwise
// from magnetic north. inclination_rad: of the ambient field. Induced: moment along the field;
// Worst: the moment direction that makes this peak smallest (min over directions of max over the
// pass). InducedRemanent: the same minimum over remanent moments of at most remanence_ratio
// times the induced one, added to it. depression_rad in [0, pi/2].
double peakFactorDirect(Orientation orientation, double inclination_rad, double depression_rad,
                        double heading_mag_rad, double remanence_ratio = 0.0);

// Interpolation table of the peak factor g(depression, heading) and of the normalised half-width
// for one field inclination and one orientation rule. Immutable once built; share it.
class PeakTable {
public:
    PeakTable(Orientation orientation, double inclination_rad, double remanence_ratio = 0.0);

    Orientation orientation() const { return m_orientation; }
    double inclination_rad() const { return m_inclination_rad; }
    double remanence_ratio() const { return m_remanence_ratio; }
    // Share of the (height x heading) cells next to a jump (solved at the point, or for the worst
    // rule read on the lower branch), [0, 1].
    double lowerBranchShare() const { return m_flagged_share; }

    // g at (depression, heading), target to starboard; port = starboard at heading + pi.
    double peakFactor(double depression_rad, double heading_mag_rad, bool starboard) const;
    // Normalised half-width d/R_T at normalised vertical distance h/R_T (>= 0).
    double normalisedHalfWidth(double h_norm, double heading_mag_rad, bool starboard) const;
    // Largest h/R_T at which the target is detectable directly below or beside the pass.
    double maxNormalisedHeight(double heading_mag_rad) const;
    double maxNormalisedHeightDirect(double heading_mag_rad) const;

    // Exact normalised half-width from peakFactorDirect (slow; for tests and the table build).
    double normalisedHalfWidthDirect(double h_norm, double heading_mag_rad, bool starboard) const;

private:
    static constexpr int kDeprSteps = 90;      // 1 degree
    static constexpr int kHeadingSteps = 144;  // 2.5 degrees, periodic
    static constexpr int kHeightSteps = 560;   // 0 .. kMaxHeightNorm, steps of 0.0025
    static constexpr double kMaxHeightNorm = 1.4;  // > 2^(1/3): g <= 2 for any geometry
    static constexpr double kJumpWidth2 = 0.02;    // step between nodes marking a jump, (d/R_T)^2
    static constexpr int kJumpGuard = 1;           // cells around a jump read on the lower branch
    static constexpr double kKinkWidth2 = 0.004;   // second difference in heading marking a kink

    static constexpr double kTableScanStep = 0.004;  // offset scan of the root solve, R_T
    // The same scan when solving between nodes, per lookup: the direct solve's step (every sampled
    // dip below 1.5 is still searched for its minimum, see firstCrossing).
    static constexpr double kBetweenScanStep = 0.01;
    // Next to a jump or a bend, the half-width is solved from g read between the table's nodes
    // by lowerRead (below the curve where it bends upward, the chord where it bends downward),
    // lowered by this share: the margin for the pieces' own curvature, measured against the
    // direct solve (0.2 % still let two points of 5,800 read a branch wider; 0.5 %: none).
    static constexpr double kBetweenSafety = 0.005;

    double halfWidthSquaredFromG(double h_norm, int heading_index) const;
    double halfWidthSquaredBetween(double h_norm, int j0, int j1, double wj) const;
    static double cubicInDepression(const double* column, double depression_rad);
    template <typename G>
    static double halfWidthSquared(double h_norm, const G& g_at, double g_below, double scan_step);

    Orientation m_orientation;
    double m_inclination_rad;
    double m_remanence_ratio;
    // Solve between nodes next to jumps and bends (induced, induced_remanent). Not for the worst
    // rule: its g is a minimum found by search, accurate to a few per cent next to its blind
    // spots (see docs/detection-model.md), so it keeps the lowest node around (safe side).
    bool m_solve_between;
    std::vector<double> m_g;       // (kDeprSteps + 1) x kHeadingSteps, starboard
    std::vector<double> m_width2;  // (kHeightSteps + 1) x kHeadingSteps, (d/R_T)^2, starboard
    // Same layout, during the build only: the normalised height of a jump in the cell [i, i+1]
    // of one heading column, 0 when none.
    std::vector<double> m_jump_h;
    // Same layout, per cell [i, i+1] x [j, j+1]: NaN (read bilinearly), or, within kJumpGuard
    // cells of a jump in h or heading, the smallest (d/R_T)^2 of the nodes around (read instead
    // by the worst rule; the others solve at the point).
    std::vector<double> m_cell_low;
    double m_flagged_share = 0.0;
    // Same layout: 1 where a kink in heading lies next to the cell (solved at the point; kinkRead
    // for the worst rule).
    std::vector<std::uint8_t> m_kink_cell;
};

// One target class ready for per-sample use.
class TargetModel {
public:
    // `tables` may be shared between models of one survey (see makeModels).
    TargetModel(TargetClass cls, const GeomagneticField& field, double mass_rule_C,
                std::shared_ptr<const PeakTable> table);

    const TargetClass& targetClass() const { return m_class; }
    // K (nT m^3): anomaly = K * g / rho^3. Mass rule: C W; dipole, sphere: (mu0/4pi) 1e9 m.
    double strength_nTm3() const { return m_strength; }
    double moment_Am2() const { return m_moment_Am2; }  // 0 for the mass rule

    // vertical_m: from the sensor down to the target (sensor altitude + burial), > 0.
    // heading_true_rad: pass heading clockwise from true north. threshold_nT > 0.
    HalfWidths halfWidths(double vertical_m, double heading_true_rad, double threshold_nT) const;
    // Same through the exact computation (slow; tests and planning checks).
    HalfWidths halfWidthsDirect(double vertical_m, double heading_true_rad,
                                double threshold_nT) const;
    // Peak |anomaly| (nT) along the pass for a target at signed cross-track offset (starboard
    // positive) from the pass, interpolated from the table.
    double peakAnomaly_nT(double vertical_m, double offset_m, double heading_true_rad) const;
    double peakAnomalyDirect_nT(double vertical_m, double offset_m,
                                double heading_true_rad) const;
    // Detection margin: peak anomaly / threshold (>= 1 means detectable).
    double margin(double vertical_m, double offset_m, double heading_true_rad,
                  double threshold_nT) const {
        return peakAnomaly_nT(vertical_m, offset_m, heading_true_rad) / threshold_nT;
    }
    // Largest sensor-to-target vertical distance (m) at which the target straight below the pass
    // of this heading is still detectable.
    double detectionRange_m(double heading_true_rad, double threshold_nT) const;
    double detectionRangeDirect_m(double heading_true_rad, double threshold_nT) const;
    double marginDirect(double vertical_m, double offset_m, double heading_true_rad,
                        double threshold_nT) const {
        return peakAnomalyDirect_nT(vertical_m, offset_m, heading_true_rad) / threshold_nT;
    }

private:
    double magHeading(double heading_true_rad) const;

    TargetClass m_class;
    double m_declination_rad;
    double m_inclination_rad;
    double m_strength = 0.0;
    double m_moment_Am2 = 0.0;
    double m_cbrt_strength = 0.0;
    std::shared_ptr<const PeakTable> m_table;  // null for the mass rule
};

// Builds one model per class of the config, sharing one table per orientation rule.
std::vector<TargetModel> makeModels(const DetectionConfig& cfg);

// Names used in the config file.
const char* modelName(ModelKind kind);
const char* orientationName(Orientation o);
// The orientation rule of a class in words, for `swath` and the report, e.g. "induced + remanent
// <= 0.5 x induced, any direction". Empty for the mass rule.
std::string orientationRule(const TargetClass& t);

}  // namespace sg::detect
