// Least-squares fit of a point dipole to total-field anomaly samples (profiles of one or more
// sensors over one source): the source position and depth by Levenberg-Marquardt, the moment,
// for each trial position, by linear least squares (the anomaly is linear in the moment vector).
//
// Sources: the point-dipole total-field anomaly of Blakely (1995), Potential Theory in Gravity
// and Magnetic Applications (see dipole.hpp); the split into a non-linear search over position
// and a linear solve for the moment as in Billings, S. D. (2004), "Discrimination and
// classification of buried unexploded ordnance using magnetometry", IEEE Transactions on
// Geoscience and Remote Sensing 42(6), 1241-1251; the damped Gauss-Newton iteration of
// Marquardt, D. W. (1963), "An algorithm for least-squares estimation of nonlinear parameters",
// SIAM Journal on Applied Mathematics 11(2), 431-441.
#pragma once

#include <optional>
#include <vector>

#include "detect/dipole.hpp"

namespace sg::detect {

// One anomaly sample: sensor position in the survey grid (metres), its height above the seabed
// (metres, > 0), and the anomaly with the ambient trend removed (nT).
struct FitSample {
    double easting_m = 0.0;
    double northing_m = 0.0;
    double altitude_m = 0.0;
    double anomaly_nT = 0.0;
};

enum class MomentModel {
    Induced,  // moment along the ambient field (one unknown: its size)
    Free,     // any direction (three unknowns)
};

struct DipoleFit {
    double easting_m = 0.0;   // source position, survey grid
    double northing_m = 0.0;
    double burial_m = 0.0;    // below the seabed (negative: above it)
    double moment_Am2 = 0.0;  // magnitude
    Vec3 moment_grid_Am2;     // the moment vector (grid north, grid east, down)
    // Angle between the fitted moment and the ambient field (degrees; 0 for an induced fit, 180
    // for a moment against the field).
    double angle_to_field_deg = 0.0;
    MomentModel model = MomentModel::Induced;
    double r2 = 0.0;          // 1 - misfit / sum of squared anomalies (1: perfect), may be < 0
    double rms_nT = 0.0;      // root-mean-square misfit
    int iterations = 0;
};

// Field direction in the GRID frame: `field_unit_grid` is the ambient unit vector with x = grid
// north, y = grid east, z = down (declination minus the grid convergence).
// `start_*`: first guesses (grid metres; burial metres below the seabed). Several starts are
// tried (the guess and offsets of +-`spread_m` across `across_e/n`, a unit vector), the best kept.
// Returns nullopt with fewer samples than 3 x the unknowns or when every start fails.
std::optional<DipoleFit> fitDipole(const std::vector<FitSample>& samples, Vec3 field_unit_grid,
                                   MomentModel model, double start_e_m, double start_n_m,
                                   double across_e, double across_n, double spread_m);

// The model's anomaly of a fitted dipole at one sample (for tests and the fit's residuals).
double fittedAnomaly_nT(const DipoleFit& fit, const FitSample& at, Vec3 field_unit_grid);

}  // namespace sg::detect
