// Least-squares point-dipole fit; see dipole_fit.hpp for the method and its sources.
#include "detect/dipole_fit.hpp"

#include <algorithm>
#include <array>
#include <cmath>
#include <limits>

namespace sg::detect {

namespace {

// The source never sits above this height below the lowest sensor (m): a point dipole at the
// sensor is singular.
constexpr double kMinClearance_m = 0.3;
constexpr double kMaxBurial_m = 30.0;
constexpr int kMaxIterations = 40;

// From the source to the sensor, in the grid north-east-down frame.
Vec3 displacement(const FitSample& s, double e_m, double n_m, double burial_m) {
    return {s.northing_m - n_m, s.easting_m - e_m, -(s.altitude_m + burial_m)};
}

struct Solve {
    double ssr = std::numeric_limits<double>::infinity();
    Vec3 moment;
    bool ok = false;
};

// Solves A x = b for a symmetric 3x3 A by Gaussian elimination with partial pivoting.
bool solve3(std::array<std::array<double, 3>, 3> a, std::array<double, 3> b,
            std::array<double, 3>& x) {
    for (int c = 0; c < 3; ++c) {
        int piv = c;
        for (int r = c + 1; r < 3; ++r)
            if (std::abs(a[r][c]) > std::abs(a[piv][c])) piv = r;
        if (!(std::abs(a[piv][c]) > 0.0)) return false;
        std::swap(a[c], a[piv]);
        std::swap(b[c], b[piv]);
        for (int r = c + 1; r < 3; ++r) {
            const double f = a[r][c] / a[c][c];
            for (int k = c; k < 3; ++k) a[r][k] -= f * a[c][k];
            b[r] -= f * b[c];
        }
    }
    for (int c = 2; c >= 0; --c) {
        double v = b[c];
        for (int k = c + 1; k < 3; ++k) v -= a[c][k] * x[k];
        x[c] = v / a[c][c];
    }
    return true;
}

// For a trial position: the best moment (linear least squares) and the misfit; `residuals`
// (optional) receives data minus model.
Solve solveMoment(const std::vector<FitSample>& samples, Vec3 f, MomentModel model, double e_m,
                  double n_m, double burial_m, std::vector<double>* residuals) {
    Solve out;
    const Vec3 basis[3] = {{1, 0, 0}, {0, 1, 0}, {0, 0, 1}};
    std::array<std::array<double, 3>, 3> a{};
    std::array<double, 3> g{};
    double cc = 0.0, cd = 0.0;
    thread_local std::vector<std::array<double, 3>> cols;
    cols.resize(samples.size());
    for (std::size_t i = 0; i < samples.size(); ++i) {
        const Vec3 r = displacement(samples[i], e_m, n_m, burial_m);
        auto& c = cols[i];
        for (int k = 0; k < 3; ++k) c[k] = totalFieldAnomaly_nT(basis[k], r, f);
        const double d = samples[i].anomaly_nT;
        if (model == MomentModel::Free) {
            for (int j = 0; j < 3; ++j) {
                g[j] += c[j] * d;
                for (int k = 0; k < 3; ++k) a[j][k] += c[j] * c[k];
            }
        } else {
            const double ci = c[0] * f.x + c[1] * f.y + c[2] * f.z;
            cc += ci * ci;
            cd += ci * d;
        }
    }
    if (model == MomentModel::Free) {
        // A tiny ridge keeps a nearly singular system (one straight profile) solvable.
        const double ridge = 1e-12 * (a[0][0] + a[1][1] + a[2][2]);
        for (int j = 0; j < 3; ++j) a[j][j] += ridge;
        std::array<double, 3> x{};
        if (!solve3(a, g, x)) return out;
        out.moment = {x[0], x[1], x[2]};
    } else {
        if (!(cc > 0.0)) return out;
        out.moment = (cd / cc) * f;
    }
    double ssr = 0.0;
    if (residuals) residuals->resize(samples.size());
    for (std::size_t i = 0; i < samples.size(); ++i) {
        const auto& c = cols[i];
        const double m = c[0] * out.moment.x + c[1] * out.moment.y + c[2] * out.moment.z;
        const double res = samples[i].anomaly_nT - m;
        if (residuals) (*residuals)[i] = res;
        ssr += res * res;
    }
    out.ssr = ssr;
    out.ok = std::isfinite(ssr);
    return out;
}

}  // namespace

double fittedAnomaly_nT(const DipoleFit& fit, const FitSample& at, Vec3 field_unit_grid) {
    return totalFieldAnomaly_nT(fit.moment_grid_Am2,
                                displacement(at, fit.easting_m, fit.northing_m, fit.burial_m),
                                field_unit_grid);
}

std::optional<DipoleFit> fitDipole(const std::vector<FitSample>& samples, Vec3 f,
                                   MomentModel model, double start_e_m, double start_n_m,
                                   double across_e, double across_n, double spread_m) {
    const std::size_t unknowns = model == MomentModel::Free ? 6 : 4;
    if (samples.size() < 3 * unknowns) return std::nullopt;
    double min_alt = std::numeric_limits<double>::infinity();
    double sst = 0.0;
    for (const auto& s : samples) {
        min_alt = std::min(min_alt, s.altitude_m);
        sst += s.anomaly_nT * s.anomaly_nT;
    }
    if (!(sst > 0.0)) return std::nullopt;
    const double min_burial = -min_alt + kMinClearance_m;
    auto clampBurial = [&](double b) { return std::clamp(b, min_burial, kMaxBurial_m); };

    std::optional<DipoleFit> best;
    std::vector<double> r0, r1;
    const double offsets[] = {0.0, -spread_m, spread_m};
    const double burials[] = {0.5, 2.5};
    for (double off : offsets) {
        for (double b0 : burials) {
            std::array<double, 3> p = {start_e_m + off * across_e, start_n_m + off * across_n,
                                       clampBurial(b0)};
            Solve cur = solveMoment(samples, f, model, p[0], p[1], p[2], &r0);
            if (!cur.ok) continue;
            double lambda = 1e-2;
            int it = 0;
            for (; it < kMaxIterations; ++it) {
                // Jacobian of the residuals by forward differences (1 mm).
                constexpr double h = 1e-3;
                std::array<std::vector<double>, 3> jac;
                bool jac_ok = true;
                for (int k = 0; k < 3; ++k) {
                    auto q = p;
                    q[k] += h;
                    const Solve s = solveMoment(samples, f, model, q[0], q[1], q[2], &r1);
                    if (!s.ok) {
                        jac_ok = false;
                        break;
                    }
                    jac[k].resize(samples.size());
                    for (std::size_t i = 0; i < samples.size(); ++i) jac[k][i] = (r1[i] - r0[i]) / h;
                }
                if (!jac_ok) break;
                std::array<std::array<double, 3>, 3> jtj{};
                std::array<double, 3> jtr{};
                for (std::size_t i = 0; i < samples.size(); ++i)
                    for (int j = 0; j < 3; ++j) {
                        jtr[j] += jac[j][i] * r0[i];
                        for (int k = 0; k < 3; ++k) jtj[j][k] += jac[j][i] * jac[k][i];
                    }
                bool improved = false;
                double step = 0.0;
                for (int tries = 0; tries < 8 && !improved; ++tries) {
                    auto damped = jtj;
                    for (int j = 0; j < 3; ++j) damped[j][j] += lambda * std::max(jtj[j][j], 1e-9);
                    std::array<double, 3> neg{-jtr[0], -jtr[1], -jtr[2]};
                    std::array<double, 3> d{};
                    if (!solve3(damped, neg, d)) {
                        lambda *= 4.0;
                        continue;
                    }
                    std::array<double, 3> q = {p[0] + d[0], p[1] + d[1], clampBurial(p[2] + d[2])};
                    std::vector<double> rq;
                    const Solve s = solveMoment(samples, f, model, q[0], q[1], q[2], &rq);
                    if (s.ok && s.ssr < cur.ssr) {
                        step = std::hypot(q[0] - p[0], q[1] - p[1], q[2] - p[2]);
                        p = q;
                        cur = s;
                        r0 = std::move(rq);
                        lambda = std::max(lambda / 3.0, 1e-7);
                        improved = true;
                    } else {
                        lambda *= 4.0;
                    }
                }
                if (!improved || step < 1e-4) break;
            }
            if (!best || cur.ssr < (1.0 - best->r2) * sst) {
                DipoleFit fit;
                fit.easting_m = p[0];
                fit.northing_m = p[1];
                fit.burial_m = p[2];
                fit.moment_grid_Am2 = cur.moment;
                fit.moment_Am2 = norm(cur.moment);
                fit.model = model;
                const double c = fit.moment_Am2 > 0.0 ? dot(cur.moment, f) / fit.moment_Am2 : 1.0;
                fit.angle_to_field_deg = std::acos(std::clamp(c, -1.0, 1.0)) * 180.0 / kPi;
                fit.r2 = 1.0 - cur.ssr / sst;
                fit.rms_nT = std::sqrt(cur.ssr / static_cast<double>(samples.size()));
                fit.iterations = it;
                best = fit;
            }
        }
    }
    return best;
}

}  // namespace sg::detect
