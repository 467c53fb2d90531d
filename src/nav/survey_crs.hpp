// The survey's projected coordinate reference system (PROJ): geographic WGS 84 longitude/latitude
// in degrees <-> projected easting/northing in metres, plus grid convergence. Distances, the
// coverage raster and all navigation geometry live in this CRS.
#pragma once

#include <optional>
#include <string>

struct pj_ctx;
struct PJconsts;

namespace sg::nav {

struct EastNorth {
    double easting_m = 0.0;
    double northing_m = 0.0;
};

struct LonLat {
    double lon_deg = 0.0;
    double lat_deg = 0.0;
};

// One PROJ context and one transformation per object: an object may be used from one thread at a
// time. Non-copyable (PROJ objects are not), movable.
class SurveyCrs {
public:
    // `epsg`: code of a projected CRS in metres (e.g. 32631 = WGS 84 / UTM zone 31N). The source
    // is always WGS 84 geographic (EPSG:4326). Throws std::invalid_argument when the code is
    // unknown to PROJ or is not a projected CRS.
    explicit SurveyCrs(int epsg);
    ~SurveyCrs();
    SurveyCrs(const SurveyCrs&) = delete;
    SurveyCrs& operator=(const SurveyCrs&) = delete;
    SurveyCrs(SurveyCrs&& other) noexcept;
    SurveyCrs& operator=(SurveyCrs&& other) noexcept;

    // The WGS 84 UTM CRS of the standard zone holding the point (Norway and Svalbard exceptions
    // included): EPSG 326zz north of the equator, 327zz south of it.
    // lon_deg in [-180, 180], lat_deg in [-80, 84] (outside, the nearest zone row is used).
    static SurveyCrs utmForLonLat(double lon_deg, double lat_deg);
    // The EPSG code utmForLonLat would use.
    static int utmEpsgForLonLat(double lon_deg, double lat_deg);

    int epsg() const { return m_epsg; }
    // PROJ's name of the CRS, e.g. "WGS 84 / UTM zone 31N".
    const std::string& name() const { return m_name; }

    // Longitude, latitude (degrees, WGS 84) -> easting, northing (metres). Both NaN when PROJ
    // cannot transform the point (never a silent zero).
    EastNorth forward(double lon_deg, double lat_deg) const;
    // Easting, northing (metres) -> longitude, latitude (degrees). Both NaN on failure.
    LonLat inverse(double easting_m, double northing_m) const;
    // Grid convergence at the point (degrees): the angle from true north clockwise to grid north
    // (same sign as GeographicLib's gamma). grid_bearing = true_bearing - convergence.
    // NaN on failure.
    double convergence_deg(double lon_deg, double lat_deg) const;

    // The CRS's area of use from the EPSG registry (degrees, WGS 84: west, south, east, north;
    // west > east when it crosses the antimeridian), when PROJ knows one.
    struct AreaOfUse {
        double west_deg, south_deg, east_deg, north_deg;
        std::string name;
    };
    std::optional<AreaOfUse> areaOfUse() const;
    // How far (degrees of longitude or latitude, whichever is larger) the point lies outside the
    // area of use; 0 inside it or when no area is known.
    double degreesOutsideAreaOfUse(double lon_deg, double lat_deg) const;

private:
    void release() noexcept;

    int m_epsg = 0;
    std::string m_name;
    std::optional<AreaOfUse> m_area;
    pj_ctx* m_ctx = nullptr;
    PJconsts* m_transform = nullptr;  // EPSG:4326 -> target, normalised to lon/lat, E/N order
    PJconsts* m_projected = nullptr;  // the target CRS itself, for proj_factors
};

}  // namespace sg::nav
