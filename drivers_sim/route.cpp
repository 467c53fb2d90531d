// Route through the planned lines; see route.hpp.
#include "drivers_sim/route.hpp"

#include <algorithm>
#include <cmath>
#include <stdexcept>

namespace sg::sim {

namespace {

constexpr double kArcStep_m = 4.0;

// Appends points of an arc of radius r around `c` from angle a0 sweeping `sweep` (radians,
// mathematical angles in the local frame), mapped by `map`.
template <class Map>
void arc(std::vector<Vec2>& out, Vec2 c, double r, double a0, double sweep, Map map) {
    const int n = std::max(2, static_cast<int>(std::ceil(std::abs(sweep) * r / kArcStep_m)));
    for (int i = 1; i <= n; ++i) {
        const double a = a0 + sweep * i / n;
        out.push_back(map(Vec2{c.e + r * std::cos(a), c.n + r * std::sin(a)}));
    }
}

double wrapPositive(double a) {
    while (a <= 0.0) a += 2.0 * M_PI;
    while (a > 2.0 * M_PI) a -= 2.0 * M_PI;
    return a;
}

// Turn from P (heading along unit f) to Q (heading roughly -f), radius r. Local frame: x along f,
// y towards Q's side. Returns points after P up to and including Q.
std::vector<Vec2> turnBetween(Vec2 p, Vec2 f, Vec2 q, double r) {
    std::vector<Vec2> out;
    const Vec2 right{f.n, -f.e};
    const double side_sign = dot(q - p, right) >= 0.0 ? 1.0 : -1.0;
    const Vec2 y_axis = side_sign * right;
    double xq = dot(q - p, f);
    const double d = std::abs(dot(q - p, right));
    // Start the turn where both ends are level: extend P forward, or Q backward (beyond Q).
    const double x0 = std::max(0.0, xq);
    const Vec2 p0 = p + x0 * f;
    if (x0 > 0.0) out.push_back(p0);
    auto map = [&](Vec2 l) { return p0 + l.e * f + l.n * y_axis; };
    xq -= x0;  // <= 0: Q lies behind the turn's end, reached by a straight leg afterwards
    if (d >= 2.0 * r) {
        // Quarter arc, straight across, quarter arc.
        arc(out, {0.0, r}, r, -M_PI / 2, M_PI / 2, map);
        arc(out, {0.0, d - r}, r, 0.0, M_PI / 2, map);
    } else {
        // Bulb turn: away from Q, the long way round towards Q, then away again onto Q's line.
        const Vec2 c1{0.0, -r};
        const Vec2 c3{0.0, d + r};
        const double half = 0.5 * d + r;
        const Vec2 c2{std::sqrt(std::max(0.0, 4.0 * r * r - half * half)), 0.5 * d};
        const double a1 = std::atan2(c2.n - c1.n, c2.e - c1.e);
        arc(out, c1, r, M_PI / 2, a1 - M_PI / 2, map);
        const double b0 = std::atan2(c1.n - c2.n, c1.e - c2.e);
        const double b1 = std::atan2(c3.n - c2.n, c3.e - c2.e);
        arc(out, c2, r, b0, wrapPositive(b1 - b0), map);
        const double g0 = std::atan2(c2.n - c3.n, c2.e - c3.e);
        arc(out, c3, r, g0, -M_PI / 2 - g0, map);
    }
    if (xq < -0.01) out.push_back(q);
    else out.back() = q;
    return out;
}

}  // namespace

Route::Route(const PlanSpec& plan) {
    if (plan.order.empty()) throw std::invalid_argument("plan has no lines to run");
    m_reversed.assign(plan.lines.size(), 0);
    Vec2 prev_dir{};
    Vec2 prev_end{};
    bool first = true;
    for (int idx : plan.order) {
        const LineSpec& l = plan.lines.at(static_cast<std::size_t>(idx));
        Vec2 a = l.start_m;
        Vec2 b = l.end_m;
        Vec2 u = (1.0 / length(b - a)) * (b - a);
        // Back and forth: run each line against the previous one's direction.
        if (!first && !l.as_drawn && dot(u, prev_dir) > 0.0) {
            std::swap(a, b);
            u = -1.0 * u;
            m_reversed[static_cast<std::size_t>(idx)] = 1;
        }
        const Vec2 run_in = a - l.run_in_m.value_or(plan.run_in_m) * u;
        if (first) {
            add(run_in, -1);
        } else if (dot(u, prev_dir) < -0.99) {
            for (Vec2 q : turnBetween(prev_end, prev_dir, run_in, plan.turn_radius_m)) add(q, -1);
        } else {
            add(run_in, -1);  // lines not antiparallel: straight connection, the autopilot copes
        }
        add(a, idx);
        add(b, -1);
        prev_end = b + l.run_out_m.value_or(plan.run_out_m) * u;
        add(prev_end, -1);
        prev_dir = u;
        first = false;
    }
}

void Route::add(Vec2 p, int line) {
    if (!m_vertices.empty()) {
        const double ds = length(p - m_vertices.back().p);
        if (ds < 1e-6) {
            if (line >= 0) m_vertices.back().line = line;
            return;
        }
        m_vertices.push_back({p, m_vertices.back().s_m + ds, line});
    } else {
        m_vertices.push_back({p, 0.0, line});
    }
}

std::size_t Route::segmentAt(double s_m) const {
    // Last vertex with s <= s_m, never the final vertex.
    auto it = std::upper_bound(m_vertices.begin(), m_vertices.end(), s_m,
                               [](double s, const RouteVertex& v) { return s < v.s_m; });
    std::size_t i = it == m_vertices.begin() ? 0 : static_cast<std::size_t>(it - m_vertices.begin()) - 1;
    return std::min(i, m_vertices.size() - 2);
}

Vec2 Route::at(double s_m) const {
    const std::size_t i = segmentAt(s_m);
    const RouteVertex& a = m_vertices[i];
    const RouteVertex& b = m_vertices[i + 1];
    const double t = std::clamp((s_m - a.s_m) / (b.s_m - a.s_m), 0.0, 1.0);
    return a.p + t * (b.p - a.p);
}

Vec2 Route::direction(double s_m) const {
    const std::size_t i = segmentAt(s_m);
    const Vec2 d = m_vertices[i + 1].p - m_vertices[i].p;
    return (1.0 / length(d)) * d;
}

int Route::lineAt(double s_m) const {
    if (s_m < 0.0 || s_m > length_m()) return -1;
    return m_vertices[segmentAt(s_m)].line;
}

bool Route::reversed(int index) const { return m_reversed.at(static_cast<std::size_t>(index)) != 0; }

double Route::project(Vec2 p, double lo_m, double hi_m) const {
    lo_m = std::max(0.0, lo_m);
    hi_m = std::min(length_m(), hi_m);
    double best_s = lo_m;
    double best_d = 1e300;
    for (std::size_t i = segmentAt(lo_m); i + 1 < m_vertices.size(); ++i) {
        const RouteVertex& a = m_vertices[i];
        const RouteVertex& b = m_vertices[i + 1];
        if (a.s_m > hi_m) break;
        const Vec2 ab = b.p - a.p;
        const double len = b.s_m - a.s_m;
        double s = a.s_m + std::clamp(dot(p - a.p, ab) / (len * len), 0.0, 1.0) * len;
        s = std::clamp(s, lo_m, hi_m);
        const double dist = length(p - at(s));
        if (dist < best_d) {
            best_d = dist;
            best_s = s;
        }
    }
    return best_s;
}

}  // namespace sg::sim
