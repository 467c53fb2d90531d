// The route the autopilot steers: each planned line in the run order (run-in before, run-out
// after, alternate lines reversed so the vessel runs them back and forth) joined by turns of a
// given radius. A polyline with cumulative distance; the guidance projects onto it locally.
#pragma once

#include <vector>

#include "drivers_sim/scenario.hpp"

namespace sg::sim {

struct RouteVertex {
    Vec2 p;           // metres from the origin
    double s_m = 0.0; // distance along the route
    int line = -1;    // plan line index of the segment starting here (-1: run-in/out or turn)
};

class Route {
public:
    explicit Route(const PlanSpec& plan);

    double length_m() const { return m_vertices.back().s_m; }
    const std::vector<RouteVertex>& vertices() const { return m_vertices; }
    // Point at distance s (clamped to the route).
    Vec2 at(double s_m) const;
    // Unit direction of the route at distance s.
    Vec2 direction(double s_m) const;
    // Plan line being run at distance s (-1 on run-ins, run-outs and turns).
    int lineAt(double s_m) const;
    // Distance along the route of the point nearest to p, searched only in [lo_m, hi_m]
    // (local search: a hairpin turn passes close to itself).
    double project(Vec2 p, double lo_m, double hi_m) const;
    // Whether line `index` is run from its end to its start.
    bool reversed(int index) const;

private:
    std::size_t segmentAt(double s_m) const;
    void add(Vec2 p, int line);

    std::vector<RouteVertex> m_vertices;
    std::vector<int> m_reversed;  // per plan line
};

}  // namespace sg::sim
