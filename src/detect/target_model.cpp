// Target models, their peak-factor tables and the config parser; see target_model.hpp.
#include "detect/target_model.hpp"

#include <algorithm>
#include <array>
#include <cmath>
#include <cstdio>
#include <limits>
#include <utility>

#include "common/config_section.hpp"

namespace sg::detect {

namespace {

constexpr double kTwoPi = 2.0 * kPi;
constexpr double kHalfPi = 0.5 * kPi;
constexpr double kDegToRad = kPi / 180.0;
// (mu0/4pi) in nT m^3 per A m^2: anomaly (nT) = kDipoleScale * m * G / r^3.
constexpr double kDipoleScale = kMu0Over4Pi * kTeslaToNanoTesla;
// |3 (f.r^)(m^.r^) - f.m^| <= 2 for unit vectors: no geometry gives a larger peak factor.
constexpr double kMaxPeakFactor = 2.0;

double wrapTwoPi(double a) {
    if (a >= 0.0 && a < kTwoPi) return a;  // the usual cases, without fmod
    if (a < 0.0 && a >= -kTwoPi) return a + kTwoPi;
    if (a >= kTwoPi && a < 2.0 * kTwoPi) return a - kTwoPi;
    a = std::fmod(a, kTwoPi);
    return a < 0 ? a + kTwoPi : a;
}

// Sensor positions (relative to the target, north-east-down in the MAGNETIC frame, rho = 1) along
// a straight pass, parametrised by the angle alpha seen from the closest point of approach:
// along-track s = tan(alpha). Target to starboard of the pass.
struct PassGeometry {
    Vec3 u;       // along-track unit vector
    Vec3 c;       // closest point of approach (|c| = 1)
    Vec3 f;       // ambient field unit vector

    PassGeometry(double inclination_rad, double depression_rad, double heading_mag_rad) {
        u = {std::cos(heading_mag_rad), std::sin(heading_mag_rad), 0.0};
        const Vec3 starboard{-std::sin(heading_mag_rad), std::cos(heading_mag_rad), 0.0};
        // The target is to starboard, so the sensor is to port of the target, and above it.
        c = (-std::cos(depression_rad)) * starboard + Vec3{0.0, 0.0, -std::sin(depression_rad)};
        f = ambientFieldUnit(inclination_rad, 0.0);
    }
    Vec3 at(double alpha) const { return c + std::tan(alpha) * u; }
    // a(s) such that the anomaly per unit K is m^ . a(s) (Blakely 1995: B = (3(m.r^)r^ - m)/r^3,
    // dT = f . B = m . (3 (f.r^) r^ - f) / r^3).
    Vec3 sensitivity(double alpha) const {
        const Vec3 r = at(alpha);
        const double r2 = dot(r, r);
        const double inv_r3 = 1.0 / (r2 * std::sqrt(r2));
        return inv_r3 * (3.0 * dot(f, r) / r2 * r - f);
    }
};

constexpr int kAlphaSamples = 89;  // alpha in [-88, 88] degrees, 2-degree steps
constexpr double kAlphaMax = 88.0 * kDegToRad;

double alphaAt(int i) { return -kAlphaMax + 2.0 * kAlphaMax * i / (kAlphaSamples - 1); }

double inducedPeak(const PassGeometry& g) {
    auto value = [&](double alpha) { return std::fabs(dot(g.f, g.sensitivity(alpha))); };
    int best = 0;
    double best_v = -1.0;
    for (int i = 0; i < kAlphaSamples; ++i) {
        const double v = value(alphaAt(i));
        if (v > best_v) {
            best_v = v;
            best = i;
        }
    }
    // Golden-section refinement on the bracket around the best sample.
    double a = alphaAt(std::max(best - 1, 0));
    double b = alphaAt(std::min(best + 1, kAlphaSamples - 1));
    constexpr double kInvPhi = 0.6180339887498949;
    double x1 = b - kInvPhi * (b - a);
    double x2 = a + kInvPhi * (b - a);
    double f1 = value(x1);
    double f2 = value(x2);
    for (int it = 0; it < 40; ++it) {
        if (f1 > f2) {
            b = x2;
            x2 = x1;
            f2 = f1;
            x1 = b - kInvPhi * (b - a);
            f1 = value(x1);
        } else {
            a = x1;
            x1 = x2;
            f1 = f2;
            x2 = a + kInvPhi * (b - a);
            f2 = value(x2);
        }
    }
    return std::max({best_v, f1, f2});
}

// min over unit moment directions m of max over the pass of |m . a(s)|: the orientation that
// hides the target best on this pass. The pass is sampled densely (the sampled maximum can only
// be lower than the true one, which errs on the safe side). Search: the best few of a Fibonacci
// hemisphere, each refined by a shrinking 8-direction pattern search, then polished exactly:
// {m : |m . a_i| <= 1} is a polytope and min over |m| = 1 of max |m . a_i| is 1 / (distance of
// its farthest vertex), a vertex being where three constraints are active.
double worstPeak(const PassGeometry& g) {
    constexpr int kPass = 121;
    std::array<Vec3, kPass> a{};
    for (int i = 0; i < kPass; ++i) {
        a[static_cast<std::size_t>(i)] =
            g.sensitivity(-kAlphaMax + 2.0 * kAlphaMax * i / (kPass - 1));
    }
    auto peak = [&](Vec3 m) {
        double v = 0.0;
        for (const Vec3& ai : a) v = std::max(v, std::fabs(dot(m, ai)));
        return v;
    };
    auto unit = [](Vec3 v) { return (1.0 / norm(v)) * v; };
    constexpr int kStarts = 160;
    constexpr int kKeep = 3;
    constexpr double kGolden = 2.399963229728653;  // pi (3 - sqrt 5)
    std::array<std::pair<double, Vec3>, kKeep> seeds;
    seeds.fill({1e300, Vec3{}});
    for (int i = 0; i < kStarts; ++i) {
        const double z = 1.0 - (i + 0.5) / kStarts;  // upper hemisphere: m and -m are alike
        const double rr = std::sqrt(1.0 - z * z);
        const double th = kGolden * i;
        const Vec3 m{rr * std::cos(th), rr * std::sin(th), z};
        const double v = peak(m);
        if (v < seeds.back().first) {
            seeds.back() = {v, m};
            std::sort(seeds.begin(), seeds.end(),
                      [](const auto& x, const auto& y) { return x.first < y.first; });
        }
    }
    double best_v = 1e300;
    Vec3 best{};
    for (auto [v, m] : seeds) {
        double step = 0.1;
        while (step > 2e-3) {
            Vec3 t1 = std::fabs(m.z) < 0.9 ? Vec3{-m.y, m.x, 0.0} : Vec3{0.0, -m.z, m.y};
            t1 = unit(t1);
            const Vec3 t2{m.y * t1.z - m.z * t1.y, m.z * t1.x - m.x * t1.z,
                          m.x * t1.y - m.y * t1.x};
            bool improved = false;
            for (int k = 0; k < 8; ++k) {
                const double ang = kPi / 4.0 * k;
                const Vec3 cand = unit(m + step * (std::cos(ang) * t1 + std::sin(ang) * t2));
                const double cv = peak(cand);
                if (cv < v) {
                    v = cv;
                    m = cand;
                    improved = true;
                }
            }
            if (!improved) step *= 0.5;
        }
        if (v < best_v) {
            best_v = v;
            best = m;
        }
    }
    // Vertex polish on the constraints nearly active at `best`.
    std::array<int, kPass> order{};
    for (int i = 0; i < kPass; ++i) order[static_cast<std::size_t>(i)] = i;
    std::partial_sort(order.begin(), order.begin() + 8, order.end(), [&](int x, int y) {
        return std::fabs(dot(best, a[static_cast<std::size_t>(x)])) >
               std::fabs(dot(best, a[static_cast<std::size_t>(y)]));
    });
    auto signedRow = [&](int i) {
        const Vec3& ai = a[static_cast<std::size_t>(i)];
        return dot(best, ai) >= 0.0 ? ai : -1.0 * ai;
    };
    for (int x = 0; x < 8; ++x) {
        for (int y = x + 1; y < 8; ++y) {
            for (int z = y + 1; z < 8; ++z) {
                const Vec3 r1 = signedRow(order[static_cast<std::size_t>(x)]);
                const Vec3 r2 = signedRow(order[static_cast<std::size_t>(y)]);
                const Vec3 r3 = signedRow(order[static_cast<std::size_t>(z)]);
                // Solve [r1; r2; r3] m = (1, 1, 1) by Cramer's rule.
                const Vec3 c23{r2.y * r3.z - r2.z * r3.y, r2.z * r3.x - r2.x * r3.z,
                               r2.x * r3.y - r2.y * r3.x};
                const double det = dot(r1, c23);
                if (std::fabs(det) < 1e-12) continue;
                const Vec3 c31{r3.y * r1.z - r3.z * r1.y, r3.z * r1.x - r3.x * r1.z,
                               r3.x * r1.y - r3.y * r1.x};
                const Vec3 c12{r1.y * r2.z - r1.z * r2.y, r1.z * r2.x - r1.x * r2.z,
                               r1.x * r2.y - r1.y * r2.x};
                const Vec3 m = (1.0 / det) * (c23 + c31 + c12);
                const double len = norm(m);
                if (!(len > 0.0)) continue;
                const double v = peak((1.0 / len) * m);  // feasibility: evaluate on all samples
                best_v = std::min(best_v, v);
            }
        }
    }
    return best_v;
}

// min over moments m = f + q v, |v| <= 1 (the induced moment plus a remanent one of at most q
// times its size, in any direction) of max over the pass of |m . a(s)|. The peak is a convex
// function of m (a maximum of absolute values of linear functions) and the ball is convex, so the
// problem has one minimum, found by the central-cut ellipsoid method (Shor 1977; Nemirovski and
// Yudin 1983; the central-cut update of Bland, Goldfarb and Todd 1981, Operations Research
// 29(6)): each step cuts the ellipsoid through its centre with a subgradient (the sensitivity
// row of the active sample) or, outside the ball, with the ball's gradient. In 3 dimensions the
// volume shrinks by 0.84 per step; 260 steps reduce the radius about 1e-6 times. The pass is
// sampled at 1-degree steps of alpha: a sampled maximum is never above the true one (safe side).
double remanentBoundedPeak(const PassGeometry& g, double q) {
    constexpr int kPass = 177;  // alpha in [-88, 88] degrees, 1-degree steps
    std::array<Vec3, kPass> a{};
    for (int i = 0; i < kPass; ++i) {
        a[static_cast<std::size_t>(i)] =
            g.sensitivity(-kAlphaMax + 2.0 * kAlphaMax * i / (kPass - 1));
    }
    auto peak = [&](Vec3 m, Vec3& sub) {
        double v = -1.0;
        for (const Vec3& ai : a) {
            const double d = dot(m, ai);
            if (std::fabs(d) > v) {
                v = std::fabs(d);
                sub = d >= 0.0 ? ai : -1.0 * ai;
            }
        }
        return v;
    };
    Vec3 sub{};
    double best = peak(g.f, sub);  // the induced moment alone is a candidate
    if (!(q > 0.0)) return best;
    // Ellipsoid {x : (x - c)^T P^-1 (x - c) <= 1}, P symmetric (row-major 3x3), starting as the ball.
    Vec3 c = g.f;
    std::array<double, 9> P{q * q, 0, 0, 0, q * q, 0, 0, 0, q * q};
    constexpr double kN = 3.0;
    for (int it = 0; it < 260; ++it) {
        const Vec3 d = c - g.f;
        Vec3 cut{};
        if (dot(d, d) > q * q) {
            cut = d;  // infeasible centre: cut toward the ball
        } else {
            best = std::min(best, peak(c, cut));
            if (best <= 0.0) return 0.0;
        }
        const Vec3 pg{P[0] * cut.x + P[1] * cut.y + P[2] * cut.z,
                      P[3] * cut.x + P[4] * cut.y + P[5] * cut.z,
                      P[6] * cut.x + P[7] * cut.y + P[8] * cut.z};
        const double gpg = dot(cut, pg);
        if (!(gpg > 1e-300)) break;
        const Vec3 b = (1.0 / std::sqrt(gpg)) * pg;
        c = c - (1.0 / (kN + 1.0)) * b;
        const double s = kN * kN / (kN * kN - 1.0);
        const double bb[3] = {b.x, b.y, b.z};
        for (int r = 0; r < 3; ++r) {
            for (int k = 0; k < 3; ++k) {
                P[static_cast<std::size_t>(3 * r + k)] =
                    s * (P[static_cast<std::size_t>(3 * r + k)] - 2.0 / (kN + 1.0) * bb[r] * bb[k]);
            }
        }
    }
    return best;
}

// The half-width as a root: the smallest offset d > 0 at which margin(d) = peak / threshold falls
// below 1, where margin(0) >= 1. The offset is scanned in steps of `step` up to `d_max`; a
// crossing between two samples is bisected (`halvings` times). A dip of the margin narrower than
// the step would pass between two samples, so at every sampled local minimum below kDipWatch the
// minimum is located by golden-section search, and a minimum below 1 is a crossing before it.
// Returns d_max when no crossing is found.
template <typename Margin>
double firstCrossing(const Margin& margin, double step, double d_max, int halvings) {
    constexpr double kDipWatch = 1.5;
    constexpr double kInvPhi = 0.6180339887498949;
    auto bisect = [&](double lo, double hi) {
        for (int it = 0; it < halvings; ++it) {
            const double mid = 0.5 * (lo + hi);
            (margin(mid) >= 1.0 ? lo : hi) = mid;
        }
        return lo;
    };
    double d_prev2 = 0.0, m_prev2 = margin(0.0);
    double d_prev = 0.0, m_prev = m_prev2;
    for (double d = step; d <= d_max + 0.5 * step; d += step) {
        const double m = margin(d);
        if (m < 1.0) return bisect(d_prev, d);
        if (d_prev > 0.0 && m_prev <= m_prev2 && m_prev <= m && m_prev < kDipWatch) {
            // Golden-section search of the minimum in [d_prev2, d].
            double a = d_prev2, b = d;
            double x1 = b - kInvPhi * (b - a), x2 = a + kInvPhi * (b - a);
            double f1 = margin(x1), f2 = margin(x2);
            for (int it = 0; it < 40 && f1 >= 1.0 && f2 >= 1.0; ++it) {
                if (f1 < f2) {
                    b = x2; x2 = x1; f2 = f1; x1 = b - kInvPhi * (b - a); f1 = margin(x1);
                } else {
                    a = x1; x1 = x2; f1 = f2; x2 = a + kInvPhi * (b - a); f2 = margin(x2);
                }
            }
            if (f1 < 1.0) return bisect(d_prev2, x1);
            if (f2 < 1.0) return bisect(d_prev2, x2);
        }
        d_prev2 = d_prev;
        m_prev2 = m_prev;
        d_prev = d;
        m_prev = m;
    }
    return d_max;
}

// Between nodes b (t = 0) and c (t = 1) of four equally spaced nodes a, b, c, d: a reading that
// does not exceed the curve through them where it bends upward (convex, or a V where two pieces
// meet): there the lines through a, b and through c, d, extended into the cell, lie below it,
// and so does the larger of them (exact where the pieces are straight); where it bends downward
// the chord b-c lies below it.
double lowerRead(double a, double b, double c, double d, double t) {
    const double chord = b + (c - b) * t;
    if (d - c <= b - a) return chord;
    const double left = b + (b - a) * t;
    const double right = c - (d - c) * (1.0 - t);
    return std::min(chord, std::max(left, right));
}

}  // namespace

double peakFactorDirect(Orientation orientation, double inclination_rad, double depression_rad,
                        double heading_mag_rad, double remanence_ratio) {
    const PassGeometry g(inclination_rad, depression_rad, heading_mag_rad);
    switch (orientation) {
    case Orientation::Induced: return inducedPeak(g);
    case Orientation::Worst: return worstPeak(g);
    case Orientation::InducedRemanent:
        return remanence_ratio > 0.0 ? remanentBoundedPeak(g, remanence_ratio) : inducedPeak(g);
    }
    return 0.0;
}

// ---------------------------------------------------------------------------------------------
// PeakTable

PeakTable::PeakTable(Orientation orientation, double inclination_rad, double remanence_ratio)
    : m_orientation(orientation), m_inclination_rad(inclination_rad),
      m_remanence_ratio(orientation == Orientation::InducedRemanent ? remanence_ratio : 0.0),
      m_solve_between(orientation != Orientation::Worst) {
    m_g.resize(static_cast<std::size_t>((kDeprSteps + 1) * kHeadingSteps));
    // East-west mirror symmetry (the field lies in the magnetic meridian plane): a target to
    // starboard of heading psi is seen exactly as one to port of heading -psi, i.e. to starboard
    // of heading pi - psi. Compute psi in [-90, 90] degrees and copy the rest.
    static_assert(kHeadingSteps % 4 == 0);
    const int quarter = kHeadingSteps / 4;
    auto mirrorOf = [&](int j) { return (2 * quarter - j + kHeadingSteps) % kHeadingSteps; };
    auto computed = [&](int j) { return j <= quarter || j >= 3 * quarter; };
    for (int j = 0; j < kHeadingSteps; ++j) {
        if (!computed(j)) continue;
        const double heading = kTwoPi * j / kHeadingSteps;
        for (int i = 0; i <= kDeprSteps; ++i) {
            const double depr = kHalfPi * i / kDeprSteps;
            m_g[static_cast<std::size_t>(j * (kDeprSteps + 1) + i)] =
                peakFactorDirect(orientation, inclination_rad, depr, heading, m_remanence_ratio);
        }
    }
    for (int j = 0; j < kHeadingSteps; ++j) {
        if (computed(j)) continue;
        std::copy_n(&m_g[static_cast<std::size_t>(mirrorOf(j) * (kDeprSteps + 1))], kDeprSteps + 1,
                    &m_g[static_cast<std::size_t>(j * (kDeprSteps + 1))]);
    }
    const auto rows = static_cast<std::size_t>(kHeightSteps + 1);
    m_width2.resize(rows * kHeadingSteps);
    m_jump_h.assign(rows * kHeadingSteps, 0.0);
    for (int j = 0; j < kHeadingSteps; ++j) {
        if (!computed(j)) continue;
        double* col = &m_width2[static_cast<std::size_t>(j) * rows];
        for (int i = 0; i <= kHeightSteps; ++i) {
            col[i] = halfWidthSquaredFromG(kMaxHeightNorm * i / kHeightSteps, j);
        }
    }
    for (int j = 0; j < kHeadingSteps; ++j) {
        double* col = &m_width2[static_cast<std::size_t>(j) * rows];
        if (!computed(j)) {
            std::copy_n(&m_width2[static_cast<std::size_t>(mirrorOf(j)) * rows], rows, col);
        }
    }
    // A cell across which the half-width jumps (a dip of the peak along the offset crossing the
    // threshold) holds the height of the jump, found by bisection: interpolating across it would
    // overstate the swath on one side of it.
    for (int j = 0; j < kHeadingSteps; ++j) {
        const double* col = &m_width2[static_cast<std::size_t>(j) * rows];
        const int src = computed(j) ? j : mirrorOf(j);
        double* jump = &m_jump_h[static_cast<std::size_t>(j) * rows];
        for (int i = 0; i < kHeightSteps; ++i) {
            if (std::fabs(col[i + 1] - col[i]) <= kJumpWidth2) continue;
            double lo = kMaxHeightNorm * i / kHeightSteps;
            double hi = kMaxHeightNorm * (i + 1) / kHeightSteps;
            for (int it = 0; it < 30; ++it) {
                const double mid = 0.5 * (lo + hi);
                const double v = halfWidthSquaredFromG(mid, src);
                (std::fabs(v - col[i]) < std::fabs(v - col[i + 1]) ? lo : hi) = mid;
            }
            // A steep but continuous stretch also steps by more than kJumpWidth2 between
            // nodes; only a step that stays when bisected is a jump.
            const double below = halfWidthSquaredFromG(lo, src);
            const double above = halfWidthSquaredFromG(hi, src);
            if (std::fabs(above - below) > 0.5 * kJumpWidth2) jump[i] = hi;
        }
    }
    // Cells where bilinear interpolation is not trusted, because the half-width jumps (or bends
    // sharply) next to them: in h (a jump found above in either heading column of the cell) or
    // in heading (a second difference of (d/R_T)^2 across the heading columns above kJumpWidth2
    // at one of the cell's corners: a step between columns, or a sharp kink, that a linear
    // reading would carry into the cell). The nodes place a jump only to within about a cell
    // (g is interpolated in depression), so the flag is widened by kJumpGuard cells every way;
    // a flagged cell is solved at the point itself (halfWidthSquaredBetween), or for the worst
    // rule read as the smallest node of the block of cells kJumpGuard around it: the lower
    // branch, the safe side. tests/detect/test_swath_direct.cpp states the band.
    auto w2At = [&](int j, int i) {
        return m_width2[static_cast<std::size_t>((j + kHeadingSteps) % kHeadingSteps) * rows +
                        static_cast<std::size_t>(std::clamp(i, 0, kHeightSteps))];
    };
    // A step between heading columns j and j + 1: the difference across the cell is large and
    // not between the differences across the cells either side (at a kink, where the slope
    // changes once, it lies between them; at a step or a narrow notch it does not).
    auto headingStep = [&](int j, int i) {
        const double dl = w2At(j, i) - w2At(j - 1, i);
        const double dm = w2At(j + 1, i) - w2At(j, i);
        const double dr = w2At(j + 2, i) - w2At(j + 1, i);
        const double slack = 0.25 * std::fabs(dm);
        return std::fabs(dm) > kJumpWidth2 &&
               (dm < std::min(dl, dr) - slack || dm > std::max(dl, dr) + slack);
    };
    // A kink in heading next to the cell: a second difference above kKinkWidth2 at one of its
    // columns. Read there as the two lines from the cells either side meeting (kinkRead).
    auto headingKink = [&](int j, int i) {
        return std::fabs(w2At(j - 1, i) - 2.0 * w2At(j, i) + w2At(j + 1, i)) > kKinkWidth2;
    };
    // The swath closing (the target straight below no longer detectable) between two nodes
    // while the open node is still wide: the half-width drops to 0 at once there, while the
    // stored negative continuation would interpolate it down gradually.
    auto closing = [&](double a, double b) {
        return (a <= 0.0 && b > 0.25 * kJumpWidth2) || (b <= 0.0 && a > 0.25 * kJumpWidth2);
    };
    auto closesInCell = [&](int j, int i) {
        return closing(w2At(j, i), w2At(j + 1, i)) || closing(w2At(j, i + 1), w2At(j + 1, i + 1)) ||
               closing(w2At(j, i), w2At(j, i + 1)) || closing(w2At(j + 1, i), w2At(j + 1, i + 1));
    };
    const auto at = [&](int jj, int ii) {
        return static_cast<std::size_t>((jj + kHeadingSteps) % kHeadingSteps) * rows +
               static_cast<std::size_t>(ii);
    };
    std::vector<std::uint8_t> jump_cell(rows * kHeadingSteps, 0);
    m_kink_cell.assign(rows * kHeadingSteps, 0);
    for (int j = 0; j < kHeadingSteps; ++j) {
        for (int i = 0; i < kHeightSteps; ++i) {
            jump_cell[at(j, i)] = m_jump_h[at(j, i)] > 0.0 || m_jump_h[at(j + 1, i)] > 0.0 ||
                                  headingStep(j, i) || headingStep(j, i + 1) ||
                                  closesInCell(j, i);
            m_kink_cell[at(j, i)] = headingKink(j, i) || headingKink(j + 1, i) ||
                                    headingKink(j, i + 1) || headingKink(j + 1, i + 1);
        }
    }
    m_cell_low.assign(rows * kHeadingSteps, std::numeric_limits<double>::quiet_NaN());
    m_flagged_share = 0.0;
    for (int j = 0; j < kHeadingSteps; ++j) {
        for (int i = 0; i < kHeightSteps; ++i) {
            bool near = false;
            for (int dj = -kJumpGuard; dj <= kJumpGuard && !near; ++dj) {
                for (int di = std::max(-kJumpGuard, -i); di <= kJumpGuard && i + di < kHeightSteps;
                     ++di) {
                    if (jump_cell[at(j + dj, i + di)]) {
                        near = true;
                        break;
                    }
                }
            }
            if (!near) continue;
            double low = std::numeric_limits<double>::infinity();
            for (int dj = -kJumpGuard; dj <= kJumpGuard + 1; ++dj) {
                for (int di = -kJumpGuard; di <= kJumpGuard + 1; ++di) {
                    low = std::min(low, w2At(j + dj, i + di));
                }
            }
            m_cell_low[at(j, i)] = low;
            m_flagged_share += 1.0;
        }
    }
    m_flagged_share /= static_cast<double>(kHeightSteps * kHeadingSteps);
    m_jump_h.clear();
    m_jump_h.shrink_to_fit();
}

double PeakTable::peakFactor(double depression_rad, double heading_mag_rad, bool starboard) const {
    double hp = wrapTwoPi(starboard ? heading_mag_rad : heading_mag_rad + kPi) / kTwoPi *
                kHeadingSteps;
    int j0 = static_cast<int>(hp);
    const double wj = hp - j0;
    j0 %= kHeadingSteps;
    const int j1 = (j0 + 1) % kHeadingSteps;
    double dp = std::clamp(depression_rad, 0.0, kHalfPi) / kHalfPi * kDeprSteps;
    int i0 = std::min(static_cast<int>(dp), kDeprSteps - 1);
    const double wi = dp - i0;
    const double* r0 = &m_g[static_cast<std::size_t>(j0 * (kDeprSteps + 1) + i0)];
    const double* r1 = &m_g[static_cast<std::size_t>(j1 * (kDeprSteps + 1) + i0)];
    return (1 - wj) * ((1 - wi) * r0[0] + wi * r0[1]) + wj * ((1 - wi) * r1[0] + wi * r1[1]);
}

// The largest normalised offset d such that every offset in [0, d] is detectable (peak factor /
// rho^3 >= 1), squared. When even the track centre is not detectable, a negative value
// g(centre)^(2/3) - h^2 is stored instead, so interpolation crosses zero where the swath closes.
// g between the 1-degree depression nodes: cubic (Catmull-Rom) interpolation, whose error falls
// with the fourth power of the step where g is smooth (linear interpolation: the square).
double PeakTable::halfWidthSquaredFromG(double h, int heading_index) const {
    const double* column = &m_g[static_cast<std::size_t>(heading_index * (kDeprSteps + 1))];
    return halfWidthSquared(h, [&](double depr) { return cubicInDepression(column, depr); },
                            column[kDeprSteps], kTableScanStep);
}

double PeakTable::cubicInDepression(const double* column, double depr) {
    const double dp = std::clamp(depr, 0.0, kHalfPi) / kHalfPi * kDeprSteps;
    const int i0 = std::min(static_cast<int>(dp), kDeprSteps - 1);
    const double t = dp - i0;
    const double p0 = column[std::max(i0 - 1, 0)];
    const double p1 = column[i0];
    const double p2 = column[i0 + 1];
    const double p3 = column[std::min(i0 + 2, kDeprSteps)];
    return p1 + 0.5 * t * (p2 - p0 + t * (2.0 * p0 - 5.0 * p1 + 4.0 * p2 - p3 +
                                          t * (3.0 * (p1 - p2) + p3 - p0)));
}

template <typename G>
double PeakTable::halfWidthSquared(double h, const G& gAt, double g_below, double scan_step) {
    auto margin = [&](double d) {
        const double rho2 = h * h + d * d;
        if (rho2 <= 1e-12) return 1e300;
        return gAt(std::atan2(h, d)) / (rho2 * std::sqrt(rho2));
    };
    if (margin(0.0) < 1.0) return std::min(std::cbrt(g_below * g_below) - h * h, 0.0);
    // No geometry gives a peak factor above 2: beyond 2^(1/3) nothing is detectable.
    const double d_max = std::cbrt(kMaxPeakFactor) + 0.01;
    const double d = firstCrossing(margin, scan_step, d_max, 30);
    return d * d;
}

// A cell next to a jump or a sharp bend: the root solve itself, on the g column at this heading
// (the two stored columns either side blended linearly in heading, each cubic in depression).
double PeakTable::halfWidthSquaredBetween(double h, int j0, int j1, double wj) const {
    constexpr auto kCol = static_cast<std::size_t>(kDeprSteps + 1);
    const std::array<const double*, 4> cols{
        &m_g[static_cast<std::size_t>((j0 + kHeadingSteps - 1) % kHeadingSteps) * kCol],
        &m_g[static_cast<std::size_t>(j0) * kCol], &m_g[static_cast<std::size_t>(j1) * kCol],
        &m_g[static_cast<std::size_t>((j1 + 1) % kHeadingSteps) * kCol]};
    auto gAt = [&](double depr) {
        const double dp = std::clamp(depr, 0.0, kHalfPi) / kHalfPi * kDeprSteps;
        const int i0 = std::min(static_cast<int>(dp), kDeprSteps - 1);
        const double t = dp - i0;
        const int im = std::max(i0 - 1, 0), i2 = std::min(i0 + 2, kDeprSteps);
        std::array<double, 4> g{};
        for (std::size_t k = 0; k < 4; ++k) {
            const double* c = cols[k];
            g[k] = lowerRead(c[im], c[i0], c[i0 + 1], c[i2], t);
        }
        return lowerRead(g[0], g[1], g[2], g[3], wj) * (1.0 - kBetweenSafety);
    };
    return halfWidthSquared(h, gAt, (1.0 - wj) * cols[1][kDeprSteps] + wj * cols[2][kDeprSteps],
                            kBetweenScanStep);
}

namespace {

// Reading between nodes b (t = 0) and c (t = 1) of four equally spaced nodes a, b, c, d across a
// kink: the line through a, b and the line through c, d, extended into the cell, meet at the
// kink. Where the slope rises across the cell (a V) the true curve is the larger of the two
// lines, where it falls (a peak) the smaller; each bounded by the straight line b-c, which is
// the right reading when the lines do not meet inside the cell.
double kinkRead(double a, double b, double c, double d, double t) {
    const double lin = b + (c - b) * t;
    const double left = b + (b - a) * t;
    const double right = c - (d - c) * (1.0 - t);
    if (d - c >= b - a) return std::min(lin, std::max(left, right));
    return std::max(lin, std::min(left, right));
}

}  // namespace

double PeakTable::normalisedHalfWidth(double h_norm, double heading_mag_rad, bool starboard) const {
    if (!(h_norm >= 0.0) || h_norm >= kMaxHeightNorm) return 0.0;
    double hp = wrapTwoPi(starboard ? heading_mag_rad : heading_mag_rad + kPi) / kTwoPi *
                kHeadingSteps;
    int j0 = static_cast<int>(hp);
    const double wj = hp - j0;
    j0 %= kHeadingSteps;
    const int j1 = (j0 + 1) % kHeadingSteps;
    const double ip = h_norm / kMaxHeightNorm * kHeightSteps;
    const int i0 = std::min(static_cast<int>(ip), kHeightSteps - 1);
    const double wi = ip - i0;
    constexpr auto rows = static_cast<std::size_t>(kHeightSteps + 1);
    const std::size_t b0 = static_cast<std::size_t>(j0) * rows;
    const std::size_t b1 = static_cast<std::size_t>(j1) * rows;
    const double* r0 = &m_width2[b0 + static_cast<std::size_t>(i0)];
    const double* r1 = &m_width2[b1 + static_cast<std::size_t>(i0)];
    double w2 = m_cell_low[b0 + static_cast<std::size_t>(i0)];
    const bool kink = m_kink_cell[b0 + static_cast<std::size_t>(i0)] != 0;
    if (m_solve_between && (kink || !std::isnan(w2))) {
        // next to a jump or a bend: the root solve on the g column at this heading
        w2 = halfWidthSquaredBetween(h_norm, j0, j1, wj);
    } else if (!std::isnan(w2)) {
        // worst rule next to a jump: the lowest node around (lower branch, safe side)
    } else if (!kink) {  // the usual case: bilinear
        w2 = (1 - wj) * ((1 - wi) * r0[0] + wi * r0[1]) + wj * ((1 - wi) * r1[0] + wi * r1[1]);
    } else {  // a kink in heading: per row, the lines of the columns either side meeting
        const double* rm = &m_width2[static_cast<std::size_t>((j0 + kHeadingSteps - 1) % kHeadingSteps) * rows +
                                     static_cast<std::size_t>(i0)];
        const double* r2 = &m_width2[static_cast<std::size_t>((j1 + 1) % kHeadingSteps) * rows +
                                     static_cast<std::size_t>(i0)];
        w2 = (1 - wi) * kinkRead(rm[0], r0[0], r1[0], r2[0], wj) +
             wi * kinkRead(rm[1], r0[1], r1[1], r2[1], wj);
    }
    return w2 > 0.0 ? std::sqrt(w2) : 0.0;
}

double PeakTable::maxNormalisedHeight(double heading_mag_rad) const {
    // Swaths are contiguous from the track: the target must be detectable directly below.
    return std::cbrt(peakFactor(kHalfPi, heading_mag_rad, true));
}

double PeakTable::maxNormalisedHeightDirect(double heading_mag_rad) const {
    return std::cbrt(peakFactorDirect(m_orientation, m_inclination_rad, kHalfPi, heading_mag_rad,
                                      m_remanence_ratio));
}

// Direct solve: root of peak / threshold = 1 in the offset (firstCrossing: a scan in steps of
// 0.01 R_T with every sampled dip searched for its minimum, then 30 halvings, 1e-11 R_T). The
// peak at each offset comes from peakFactorDirect, with no table.
double PeakTable::normalisedHalfWidthDirect(double h, double heading_mag_rad,
                                            bool starboard) const {
    const double heading = starboard ? heading_mag_rad : heading_mag_rad + kPi;
    auto margin = [&](double d) {
        const double rho2 = h * h + d * d;
        if (rho2 <= 1e-12) return 1e300;
        const double g = peakFactorDirect(m_orientation, m_inclination_rad, std::atan2(h, d),
                                          heading, m_remanence_ratio);
        return g / (rho2 * std::sqrt(rho2));
    };
    if (margin(0.0) < 1.0) return 0.0;
    return firstCrossing(margin, 0.01, std::cbrt(kMaxPeakFactor) + 0.01, 30);
}
// ---------------------------------------------------------------------------------------------
// TargetModel

TargetModel::TargetModel(TargetClass cls, const GeomagneticField& field, double mass_rule_C,
                         std::shared_ptr<const PeakTable> table)
    : m_class(std::move(cls)), m_declination_rad(field.declination_deg * kDegToRad),
      m_inclination_rad(field.inclination_deg * kDegToRad), m_table(std::move(table)) {
    switch (m_class.model) {
    case ModelKind::MassRule:
        m_strength = mass_rule_C * m_class.mass_kg;
        m_table.reset();
        break;
    case ModelKind::Dipole:
        m_moment_Am2 = m_class.moment_Am2;
        m_strength = kDipoleScale * m_moment_Am2;
        break;
    case ModelKind::Sphere:
        m_moment_Am2 =
            sphereInducedMoment_Am2(m_class.radius_m, m_class.susceptibility, field.intensity_nT);
        m_strength = kDipoleScale * m_moment_Am2;
        break;
    }
    m_cbrt_strength = std::cbrt(m_strength);
}

double TargetModel::magHeading(double heading_true_rad) const {
    return heading_true_rad - m_declination_rad;
}

HalfWidths TargetModel::halfWidths(double vertical_m, double heading_true_rad,
                                   double threshold_nT) const {
    if (!(vertical_m > 0.0) || !(threshold_nT > 0.0)) return {};
    const double range = m_cbrt_strength / std::cbrt(threshold_nT);  // R_T
    const double h = vertical_m / range;
    if (!m_table) {
        // Mass rule: isotropic, A = K / rho^3, so the half-width is sqrt(R_T^2 - h^2).
        const double w = h < 1.0 ? range * std::sqrt(1.0 - h * h) : 0.0;
        return {w, w};
    }
    const double psi = magHeading(heading_true_rad);
    return {range * m_table->normalisedHalfWidth(h, psi, false),
            range * m_table->normalisedHalfWidth(h, psi, true)};
}

HalfWidths TargetModel::halfWidthsDirect(double vertical_m, double heading_true_rad,
                                         double threshold_nT) const {
    if (!(vertical_m > 0.0) || !(threshold_nT > 0.0)) return {};
    const double range = std::cbrt(m_strength / threshold_nT);
    const double h = vertical_m / range;
    if (!m_table) {
        const double w = h < 1.0 ? range * std::sqrt(1.0 - h * h) : 0.0;
        return {w, w};
    }
    const double psi = magHeading(heading_true_rad);
    return {range * m_table->normalisedHalfWidthDirect(h, psi, false),
            range * m_table->normalisedHalfWidthDirect(h, psi, true)};
}

double TargetModel::peakAnomaly_nT(double vertical_m, double offset_m,
                                   double heading_true_rad) const {
    const double rho2 = vertical_m * vertical_m + offset_m * offset_m;
    if (!(rho2 > 0.0)) return 0.0;
    const double inv_rho3 = 1.0 / (rho2 * std::sqrt(rho2));
    if (!m_table) return m_strength * inv_rho3;
    const double g = m_table->peakFactor(std::atan2(vertical_m, std::fabs(offset_m)),
                                         magHeading(heading_true_rad), offset_m >= 0.0);
    return m_strength * g * inv_rho3;
}

double TargetModel::peakAnomalyDirect_nT(double vertical_m, double offset_m,
                                         double heading_true_rad) const {
    const double rho2 = vertical_m * vertical_m + offset_m * offset_m;
    if (!(rho2 > 0.0)) return 0.0;
    const double inv_rho3 = 1.0 / (rho2 * std::sqrt(rho2));
    if (!m_table) return m_strength * inv_rho3;
    const double psi = magHeading(heading_true_rad) + (offset_m >= 0.0 ? 0.0 : kPi);
    const double g = peakFactorDirect(m_table->orientation(), m_inclination_rad,
                                      std::atan2(vertical_m, std::fabs(offset_m)), psi,
                                      m_table->remanence_ratio());
    return m_strength * g * inv_rho3;
}

double TargetModel::detectionRange_m(double heading_true_rad, double threshold_nT) const {
    if (!(threshold_nT > 0.0)) return 0.0;
    const double range = m_cbrt_strength / std::cbrt(threshold_nT);
    if (!m_table) return range;
    return range * m_table->maxNormalisedHeight(magHeading(heading_true_rad));
}

double TargetModel::detectionRangeDirect_m(double heading_true_rad, double threshold_nT) const {
    if (!(threshold_nT > 0.0)) return 0.0;
    const double range = std::cbrt(m_strength / threshold_nT);
    if (!m_table) return range;
    return range * m_table->maxNormalisedHeightDirect(magHeading(heading_true_rad));
}

std::vector<TargetModel> makeModels(const DetectionConfig& cfg) {
    const double incl = cfg.field.inclination_deg * kDegToRad;
    // One table per orientation rule (and remanence bound), shared by the classes using it.
    std::vector<std::shared_ptr<const PeakTable>> tables;
    std::vector<TargetModel> out;
    out.reserve(cfg.targets.size());
    for (const TargetClass& t : cfg.targets) {
        std::shared_ptr<const PeakTable> table;
        if (t.model != ModelKind::MassRule) {
            const double ratio =
                t.orientation == Orientation::InducedRemanent ? t.remanence_ratio : 0.0;
            for (const auto& x : tables) {
                if (x->orientation() == t.orientation && x->remanence_ratio() == ratio) table = x;
            }
            if (!table) {
                table = std::make_shared<const PeakTable>(t.orientation, incl, ratio);
                tables.push_back(table);
            }
        }
        out.emplace_back(t, cfg.field, cfg.detection.mass_rule_C, table);
    }
    return out;
}

const char* modelName(ModelKind kind) {
    switch (kind) {
    case ModelKind::MassRule: return "mass_rule";
    case ModelKind::Dipole: return "dipole";
    case ModelKind::Sphere: return "sphere";
    }
    return "?";
}

const char* orientationName(Orientation o) {
    switch (o) {
    case Orientation::Induced: return "induced";
    case Orientation::Worst: return "worst";
    case Orientation::InducedRemanent: return "induced_remanent";
    }
    return "?";
}

std::string orientationRule(const TargetClass& t) {
    if (t.model == ModelKind::MassRule) return {};
    switch (t.orientation) {
    case Orientation::Induced: return "induced only (moment along the field)";
    case Orientation::Worst: return "worst direction of the whole moment (blind below magnetic N-S lines)";
    case Orientation::InducedRemanent: {
        char buf[160];
        std::snprintf(buf, sizeof buf,
                      "induced + remanent up to %.2g x induced in the worst direction (Koenigsberger ratio Q <= %.2g)",
                      t.remanence_ratio, t.remanence_ratio);
        return buf;
    }
    }
    return {};
}

// ---------------------------------------------------------------------------------------------
// Config

bool usesAmbientField(const DetectionConfig& cfg) {
    return std::any_of(cfg.targets.begin(), cfg.targets.end(),
                       [](const TargetClass& t) { return t.model != ModelKind::MassRule; });
}

DetectionConfig parseDetectionConfig(const config::Section& root) {
    DetectionConfig cfg;
    if (auto g = root.optionalTable("geomagnetic")) {
        g->allowOnly({"inclination_deg", "declination_deg", "intensity_nT"});
        cfg.field.inclination_deg = g->number("inclination_deg", -90.0, 90.0);
        cfg.field.declination_deg = g->number("declination_deg", -180.0, 180.0, 0.0);
        cfg.field.intensity_nT = g->number("intensity_nT", 1000.0, 100000.0);
        cfg.field_given = true;
    }
    if (auto d = root.optionalTable("detection")) {
        d->allowOnly({"k", "min_anomaly_nT", "noise_window", "mass_rule_C"});
        cfg.detection.k = d->number("k", 0.0, 100.0, cfg.detection.k);
        cfg.detection.min_anomaly_nT =
            d->number("min_anomaly_nT", 0.0, 1e6, cfg.detection.min_anomaly_nT);
        cfg.detection.noise_window =
            static_cast<int>(d->integer("noise_window", 8, 1000000, cfg.detection.noise_window));
        cfg.detection.mass_rule_C = d->number("mass_rule_C", 1e-6, 1e6, cfg.detection.mass_rule_C);
        if (cfg.detection.min_anomaly_nT <= 0.0 && cfg.detection.k <= 0.0) {
            d->fail("min_anomaly_nT", "a positive minimum anomaly when k is 0");
        }
    }
    const auto targets = root.tables("target");
    if (targets.empty()) root.fail("target", "at least one [[target]] table");
    for (const config::Section& t : targets) {
        t.allowOnly({"name", "model", "mass_kg", "moment_Am2", "radius_m", "susceptibility",
                     "burial_m", "orientation", "remanence_ratio"});
        TargetClass c;
        c.name = t.string("name");
        const std::string model = t.choice("model", {"mass_rule", "dipole", "sphere"});
        c.burial_m = t.number("burial_m", 0.0, 100.0, 0.0);
        auto reject = [&](std::initializer_list<std::string_view> keys, const char* why) {
            for (std::string_view k : keys) {
                if (t.has(k)) t.fail(k, why);
            }
        };
        if (model == "mass_rule") {
            c.model = ModelKind::MassRule;
            reject({"moment_Am2", "radius_m", "susceptibility", "orientation", "remanence_ratio"},
                   "no such key for model \"mass_rule\" (it uses mass_kg)");
            c.mass_kg = t.number("mass_kg", 1e-3, 1e7);
        } else {
            const std::string o = t.choice("orientation", {"induced_remanent", "induced", "worst"},
                                           "induced_remanent");
            c.orientation = o == "induced"  ? Orientation::Induced
                            : o == "worst" ? Orientation::Worst
                                           : Orientation::InducedRemanent;
            if (c.orientation == Orientation::InducedRemanent) {
                c.remanence_ratio = t.number("remanence_ratio", 0.0, kMaxRemanenceRatio,
                                             kDefaultRemanenceRatio);
            } else if (t.has("remanence_ratio")) {
                t.fail("remanence_ratio",
                       "no remanence_ratio unless orientation = \"induced_remanent\"");
            }
            if (model == "dipole") {
                c.model = ModelKind::Dipole;
                reject({"mass_kg", "radius_m", "susceptibility"},
                       "no such key for model \"dipole\" (it uses moment_Am2)");
                c.moment_Am2 = t.number("moment_Am2", 1e-6, 1e9);
            } else {
                c.model = ModelKind::Sphere;
                reject({"mass_kg", "moment_Am2"},
                       "no such key for model \"sphere\" (it uses radius_m and susceptibility)");
                c.radius_m = t.number("radius_m", 1e-3, 100.0);
                c.susceptibility = t.number("susceptibility", 1e-6, 1e7);
            }
        }
        // The dipole and the sphere need the ambient field; the mass rule does not (it is a
        // scalar rule of thumb), so [geomagnetic] is demanded only by them.
        if (c.model != ModelKind::MassRule && !cfg.field_given)
            root.fail("geomagnetic",
                      "a [geomagnetic] table (inclination_deg, intensity_nT): target '" + c.name +
                          "' uses model \"" + model + "\", which needs the ambient field");
        cfg.targets.push_back(std::move(c));
    }
    return cfg;
}

}  // namespace sg::detect
