// Plane geometry in the survey CRS; see geometry.hpp.
#include "coverage/geometry.hpp"

#include <algorithm>
#include <cmath>

#include <fmt/format.h>

namespace sg::coverage {

namespace {

double cross(Point o, Point a, Point b) {
    return (a.e_m - o.e_m) * (b.n_m - o.n_m) - (a.n_m - o.n_m) * (b.e_m - o.e_m);
}

bool onSegment(Point a, Point b, Point p) {
    return std::min(a.e_m, b.e_m) <= p.e_m && p.e_m <= std::max(a.e_m, b.e_m) &&
           std::min(a.n_m, b.n_m) <= p.n_m && p.n_m <= std::max(a.n_m, b.n_m);
}

int sign(double v) { return v > 0.0 ? 1 : (v < 0.0 ? -1 : 0); }

}  // namespace

double signedArea(const Ring& ring) {
    double sum = 0.0;
    const std::size_t n = ring.size();
    for (std::size_t i = 0; i < n; ++i) {
        const Point& a = ring[i];
        const Point& b = ring[(i + 1) % n];
        sum += a.e_m * b.n_m - b.e_m * a.n_m;
    }
    return 0.5 * sum;
}

double area(const MultiPolygon& mp) {
    double total = 0.0;
    for (const auto& poly : mp) {
        total += std::abs(signedArea(poly.exterior));
        for (const auto& hole : poly.holes) total -= std::abs(signedArea(hole));
    }
    return total;
}

Box bounds(const MultiPolygon& mp) {
    Box b{1e300, 1e300, -1e300, -1e300};
    for (const auto& poly : mp) {
        for (const Point& p : poly.exterior) {
            b.min_e = std::min(b.min_e, p.e_m);
            b.max_e = std::max(b.max_e, p.e_m);
            b.min_n = std::min(b.min_n, p.n_m);
            b.max_n = std::max(b.max_n, p.n_m);
        }
    }
    return b;
}

bool segmentsIntersect(Point a, Point b, Point c, Point d) {
    const int d1 = sign(cross(c, d, a));
    const int d2 = sign(cross(c, d, b));
    const int d3 = sign(cross(a, b, c));
    const int d4 = sign(cross(a, b, d));
    if (d1 != d2 && d3 != d4 && d1 != 0 && d2 != 0 && d3 != 0 && d4 != 0) return true;
    if (d1 == 0 && onSegment(c, d, a)) return true;
    if (d2 == 0 && onSegment(c, d, b)) return true;
    if (d3 == 0 && onSegment(a, b, c)) return true;
    if (d4 == 0 && onSegment(a, b, d)) return true;
    return false;
}

std::optional<std::string> findSelfIntersection(const MultiPolygon& mp) {
    struct Edge {
        Point a, b;
        std::size_t ring;  // global ring number
        std::size_t index; // edge index in its ring
        std::size_t ring_size;
        std::string where;
    };
    std::vector<Edge> edges;
    std::size_t ring_no = 0;
    for (std::size_t p = 0; p < mp.size(); ++p) {
        std::vector<const Ring*> rings{&mp[p].exterior};
        for (const auto& h : mp[p].holes) rings.push_back(&h);
        for (std::size_t r = 0; r < rings.size(); ++r, ++ring_no) {
            const Ring& ring = *rings[r];
            const std::string where = r == 0 ? fmt::format("polygon {} exterior ring", p)
                                             : fmt::format("polygon {} hole {}", p, r - 1);
            for (std::size_t i = 0; i < ring.size(); ++i) {
                edges.push_back({ring[i], ring[(i + 1) % ring.size()], ring_no, i, ring.size(), where});
            }
        }
    }
    for (std::size_t i = 0; i < edges.size(); ++i) {
        const Edge& x = edges[i];
        if (x.a.e_m == x.b.e_m && x.a.n_m == x.b.n_m) {
            return fmt::format("{}: vertex {} is repeated (zero-length edge)", x.where, x.index);
        }
        for (std::size_t j = i + 1; j < edges.size(); ++j) {
            const Edge& y = edges[j];
            if (x.ring == y.ring) {
                const bool adjacent = (y.index == x.index + 1) ||
                                      (x.index == 0 && y.index + 1 == x.ring_size);
                if (adjacent) {
                    // Adjacent edges share one vertex; they are bad only when they fold back
                    // onto each other (collinear and overlapping beyond the shared vertex).
                    const Point shared = (y.index == x.index + 1) ? x.b : x.a;
                    const Point xo = (y.index == x.index + 1) ? x.a : x.b;
                    const Point yo = (y.index == x.index + 1) ? y.b : y.a;
                    if (cross(shared, xo, yo) == 0.0 &&
                        (xo.e_m - shared.e_m) * (yo.e_m - shared.e_m) +
                                (xo.n_m - shared.n_m) * (yo.n_m - shared.n_m) > 0.0) {
                        return fmt::format("{}: edges {} and {} fold back onto each other",
                                           x.where, x.index, y.index);
                    }
                    continue;
                }
            }
            if (segmentsIntersect(x.a, x.b, y.a, y.b)) {
                if (x.ring == y.ring) {
                    return fmt::format("{}: edge {} crosses edge {} near E {:.3f} N {:.3f}",
                                       x.where, x.index, y.index, x.a.e_m, x.a.n_m);
                }
                return fmt::format("{} edge {} crosses {} edge {} near E {:.3f} N {:.3f}", x.where,
                                   x.index, y.where, y.index, x.a.e_m, x.a.n_m);
            }
        }
    }
    return std::nullopt;
}

bool contains(const Ring& ring, Point p) {
    bool inside = false;
    const std::size_t n = ring.size();
    for (std::size_t i = 0, j = n - 1; i < n; j = i++) {
        const Point& a = ring[i];
        const Point& b = ring[j];
        if ((a.n_m > p.n_m) != (b.n_m > p.n_m)) {
            const double e = a.e_m + (p.n_m - a.n_m) * (b.e_m - a.e_m) / (b.n_m - a.n_m);
            if (p.e_m < e) inside = !inside;
        }
    }
    return inside;
}

bool contains(const MultiPolygon& mp, Point p) {
    bool inside = false;
    for (const auto& poly : mp) {
        if (contains(poly.exterior, p)) inside = !inside;
        for (const auto& h : poly.holes) {
            if (contains(h, p)) inside = !inside;
        }
    }
    return inside;
}

void rowCrossings(const MultiPolygon& mp, double n_m, std::vector<double>& out_e) {
    out_e.clear();
    auto ring = [&](const Ring& r) {
        const std::size_t n = r.size();
        for (std::size_t i = 0; i < n; ++i) {
            Point a = r[i];
            Point b = r[(i + 1) % n];
            if (a.n_m > b.n_m) std::swap(a, b);
            if (a.n_m <= n_m && n_m < b.n_m) {
                out_e.push_back(a.e_m + (n_m - a.n_m) * (b.e_m - a.e_m) / (b.n_m - a.n_m));
            }
        }
    };
    for (const auto& poly : mp) {
        ring(poly.exterior);
        for (const auto& h : poly.holes) ring(h);
    }
    std::sort(out_e.begin(), out_e.end());
}

bool segmentTouchesArea(const MultiPolygon& mp, Point a, Point b) {
    if (contains(mp, a) || contains(mp, b)) return true;
    for (const auto& poly : mp) {
        std::vector<const Ring*> rings{&poly.exterior};
        for (const auto& h : poly.holes) rings.push_back(&h);
        for (const Ring* r : rings) {
            for (std::size_t i = 0; i < r->size(); ++i) {
                if (segmentsIntersect(a, b, (*r)[i], (*r)[(i + 1) % r->size()])) return true;
            }
        }
    }
    return false;
}

}  // namespace sg::coverage
