// Helpers shared by the coverage tests: flying synthetic swath samples along a path, and thin
// RAII wrappers over the GEOS C API (the outside reference for areas).
#pragma once

#include <cmath>
#include <memory>
#include <vector>

#include <geos_c.h>

#include "coverage/coverage_raster.hpp"
#include "coverage/swath_painter.hpp"

namespace sg::coverage::test {

// Samples every `step_m` along the polyline `path`, direction = local tangent.
inline std::vector<SwathSample> samplesAlong(const std::vector<Point>& path, double step_m,
                                             double left_m, double right_m, float centre_margin,
                                             int sensor = 0, int run = 0) {
    std::vector<SwathSample> out;
    std::int64_t t = 0;
    for (std::size_t k = 0; k + 1 < path.size(); ++k) {
        const Point a = path[k], b = path[k + 1];
        const double len = std::hypot(b.e_m - a.e_m, b.n_m - a.n_m);
        const int n = std::max(1, static_cast<int>(std::ceil(len / step_m)));
        for (int i = 0; i < n + (k + 2 == path.size() ? 1 : 0); ++i) {
            const double f = static_cast<double>(i) / n;
            SwathSample s;
            s.t_ns = t;
            t += 100'000'000;
            s.e_m = a.e_m + f * (b.e_m - a.e_m);
            s.n_m = a.n_m + f * (b.n_m - a.n_m);
            s.dir_e = (b.e_m - a.e_m) / len;
            s.dir_n = (b.n_m - a.n_m) / len;
            s.left_m = left_m;
            s.right_m = right_m;
            s.centre_margin = centre_margin;
            s.valid = true;
            s.sensor = sensor;
            s.run = run;
            out.push_back(s);
        }
    }
    return out;
}

// A circular arc from angle a0 to a1 (radians, maths convention), `n` segments.
inline std::vector<Point> arc(Point c, double r, double a0, double a1, int n) {
    std::vector<Point> p;
    for (int i = 0; i <= n; ++i) {
        const double a = a0 + (a1 - a0) * i / n;
        p.push_back({c.e_m + r * std::cos(a), c.n_m + r * std::sin(a)});
    }
    return p;
}

struct Geos {
    GEOSContextHandle_t h = GEOS_init_r();
    ~Geos() { GEOS_finish_r(h); }
    Geos() = default;
    Geos(const Geos&) = delete;
    Geos& operator=(const Geos&) = delete;

    struct Deleter {
        GEOSContextHandle_t h;
        void operator()(GEOSGeometry* g) const { GEOSGeom_destroy_r(h, g); }
    };
    using Geom = std::unique_ptr<GEOSGeometry, Deleter>;

    Geom wrap(GEOSGeometry* g) const { return Geom(g, Deleter{h}); }

    GEOSCoordSequence* seq(const std::vector<Point>& pts, bool close) const {
        const auto n = static_cast<unsigned>(pts.size() + (close ? 1 : 0));
        GEOSCoordSequence* s = GEOSCoordSeq_create_r(h, n, 2);
        for (unsigned i = 0; i < n; ++i) {
            const Point& p = pts[i % pts.size()];
            GEOSCoordSeq_setXY_r(h, s, i, p.e_m, p.n_m);
        }
        return s;
    }
    Geom line(const std::vector<Point>& pts) const {
        return wrap(GEOSGeom_createLineString_r(h, seq(pts, false)));
    }
    Geom polygon(const Ring& exterior, const std::vector<Ring>& holes = {}) const {
        GEOSGeometry* shell = GEOSGeom_createLinearRing_r(h, seq(exterior, true));
        std::vector<GEOSGeometry*> hs;
        for (const auto& r : holes) hs.push_back(GEOSGeom_createLinearRing_r(h, seq(r, true)));
        return wrap(GEOSGeom_createPolygon_r(h, shell, hs.empty() ? nullptr : hs.data(),
                                             static_cast<unsigned>(hs.size())));
    }
    // Buffer with flat end caps and round joins (the swept swath of a towed sensor).
    Geom flatBuffer(const GEOSGeometry* g, double width) const {
        return wrap(GEOSBufferWithStyle_r(h, g, width, 32, GEOSBUF_CAP_FLAT, GEOSBUF_JOIN_ROUND, 5.0));
    }
    Geom unite(const GEOSGeometry* a, const GEOSGeometry* b) const { return wrap(GEOSUnion_r(h, a, b)); }
    Geom intersect(const GEOSGeometry* a, const GEOSGeometry* b) const {
        return wrap(GEOSIntersection_r(h, a, b));
    }
    double area(const GEOSGeometry* g) const {
        double a = 0.0;
        GEOSArea_r(h, g, &a);
        return a;
    }
    double length(const GEOSGeometry* g) const {
        double l = 0.0;
        GEOSLength_r(h, g, &l);
        return l;
    }
};

}  // namespace sg::coverage::test
