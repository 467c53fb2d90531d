// Plane geometry in the survey CRS (metres): points, rings, polygons with holes, boxes, and the
// few predicates the plan checks, the raster and the gap finder need.
#pragma once

#include <optional>
#include <string>
#include <vector>

namespace sg::coverage {

struct Point {
    double e_m = 0.0;  // easting (m)
    double n_m = 0.0;  // northing (m)
};

// A ring is stored open: the closing vertex (== first) is NOT repeated.
using Ring = std::vector<Point>;

struct Polygon {
    Ring exterior;
    std::vector<Ring> holes;
};
using MultiPolygon = std::vector<Polygon>;

struct Box {
    double min_e = 0.0, min_n = 0.0, max_e = 0.0, max_n = 0.0;
    bool empty() const { return !(max_e >= min_e && max_n >= min_n); }
};

// Shoelace area (m^2): positive for a counter-clockwise ring (E right, N up).
double signedArea(const Ring& ring);
// Area of the polygons (exteriors minus holes), m^2.
double area(const MultiPolygon& mp);
Box bounds(const MultiPolygon& mp);

// True when closed segments ab and cd share at least one point.
bool segmentsIntersect(Point a, Point b, Point c, Point d);

// Describes the first self-intersection of the polygon set (an edge crossing or touching a
// non-adjacent edge of any ring, or a repeated vertex), or nullopt when every ring is simple and
// no two rings cross. O(n^2) in the vertex count: plans have hundreds of vertices, not millions.
std::optional<std::string> findSelfIntersection(const MultiPolygon& mp);

// Even-odd point in polygon over all rings (a point exactly on an edge may go either way).
bool contains(const MultiPolygon& mp, Point p);
bool contains(const Ring& ring, Point p);

// Eastings where the horizontal line n = n_m crosses the rings' edges, sorted. Uses the half-open
// rule (an edge counts when min_n <= n < max_n), so pairs of crossings bound the inside spans.
void rowCrossings(const MultiPolygon& mp, double n_m, std::vector<double>& out_e);

// True when the segment ab has any point inside the area or crosses its boundary.
bool segmentTouchesArea(const MultiPolygon& mp, Point a, Point b);

}  // namespace sg::coverage
