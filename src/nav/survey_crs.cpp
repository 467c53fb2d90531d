// PROJ-backed survey CRS; see survey_crs.hpp.
#include "nav/survey_crs.hpp"

#include <proj.h>

#include <algorithm>
#include <cmath>
#include <limits>
#include <stdexcept>
#include <string>
#include <utility>

namespace sg::nav {

namespace {

constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();
constexpr double kDegToRad = 3.14159265358979323846 / 180.0;
constexpr double kRadToDeg = 180.0 / 3.14159265358979323846;

}  // namespace

SurveyCrs::SurveyCrs(int epsg) : m_epsg(epsg) {
    m_ctx = proj_context_create();
    if (m_ctx == nullptr) throw std::runtime_error("PROJ: cannot create a context");
    // Errors are reported through exceptions below; keep PROJ quiet on stderr.
    proj_log_level(m_ctx, PJ_LOG_NONE);
    const std::string target = "EPSG:" + std::to_string(epsg);
    m_projected = proj_create(m_ctx, target.c_str());
    if (m_projected == nullptr) {
        release();
        throw std::invalid_argument("survey CRS: EPSG code " + std::to_string(epsg) +
                                    " is unknown to PROJ");
    }
    if (proj_get_type(m_projected) != PJ_TYPE_PROJECTED_CRS) {
        release();
        throw std::invalid_argument("survey CRS: EPSG:" + std::to_string(epsg) +
                                    " is not a projected CRS (eastings/northings in metres)");
    }
    if (const char* n = proj_get_name(m_projected)) m_name = n;
    {
        double w = 0, so = 0, e = 0, n = 0;
        const char* area = nullptr;
        // PROJ gives -1000 for bounds it does not know.
        if (proj_get_area_of_use(m_ctx, m_projected, &w, &so, &e, &n, &area) && w > -1000.0)
            m_area = AreaOfUse{w, so, e, n, area ? std::string(area) : std::string()};
    }
    PJ* raw = proj_create_crs_to_crs(m_ctx, "EPSG:4326", target.c_str(), nullptr);
    if (raw == nullptr) {
        release();
        throw std::invalid_argument("survey CRS: no transformation from WGS 84 to " + target);
    }
    // EPSG:4326 is latitude, longitude and some projected CRSs are northing, easting: normalise
    // both ends to longitude/latitude and easting/northing (BUILD-NOTES pitfall 10).
    m_transform = proj_normalize_for_visualization(m_ctx, raw);
    proj_destroy(raw);
    if (m_transform == nullptr) {
        release();
        throw std::runtime_error("survey CRS: PROJ could not normalise the axis order");
    }
}

SurveyCrs::~SurveyCrs() { release(); }

SurveyCrs::SurveyCrs(SurveyCrs&& other) noexcept
    : m_epsg(other.m_epsg), m_name(std::move(other.m_name)), m_area(std::move(other.m_area)),
      m_ctx(std::exchange(other.m_ctx, nullptr)),
      m_transform(std::exchange(other.m_transform, nullptr)),
      m_projected(std::exchange(other.m_projected, nullptr)) {}

SurveyCrs& SurveyCrs::operator=(SurveyCrs&& other) noexcept {
    if (this != &other) {
        release();
        m_epsg = other.m_epsg;
        m_name = std::move(other.m_name);
        m_area = std::move(other.m_area);
        m_ctx = std::exchange(other.m_ctx, nullptr);
        m_transform = std::exchange(other.m_transform, nullptr);
        m_projected = std::exchange(other.m_projected, nullptr);
    }
    return *this;
}

void SurveyCrs::release() noexcept {
    if (m_transform != nullptr) proj_destroy(m_transform);
    if (m_projected != nullptr) proj_destroy(m_projected);
    if (m_ctx != nullptr) proj_context_destroy(m_ctx);
    m_transform = nullptr;
    m_projected = nullptr;
    m_ctx = nullptr;
}

int SurveyCrs::utmEpsgForLonLat(double lon_deg, double lat_deg) {
    double lon = std::fmod(lon_deg + 180.0, 360.0);
    if (lon < 0) lon += 360.0;
    int zone = static_cast<int>(std::floor(lon / 6.0)) + 1;
    if (zone > 60) zone = 60;
    // The standard grid's exceptions (UTM grid zone designations 32V and 31X-37X).
    if (lat_deg >= 56.0 && lat_deg < 64.0 && lon_deg >= 3.0 && lon_deg < 12.0) zone = 32;
    if (lat_deg >= 72.0 && lat_deg <= 84.0 && lon_deg >= 0.0 && lon_deg < 42.0) {
        if (lon_deg < 9.0) zone = 31;
        else if (lon_deg < 21.0) zone = 33;
        else if (lon_deg < 33.0) zone = 35;
        else zone = 37;
    }
    return (lat_deg >= 0.0 ? 32600 : 32700) + zone;
}

SurveyCrs SurveyCrs::utmForLonLat(double lon_deg, double lat_deg) {
    return SurveyCrs(utmEpsgForLonLat(lon_deg, lat_deg));
}

EastNorth SurveyCrs::forward(double lon_deg, double lat_deg) const {
    PJ_COORD in = proj_coord(lon_deg, lat_deg, 0.0, 0.0);
    PJ_COORD out = proj_trans(m_transform, PJ_FWD, in);
    if (!std::isfinite(out.xy.x) || !std::isfinite(out.xy.y) || out.xy.x == HUGE_VAL) {
        proj_errno_reset(m_transform);
        return {kNaN, kNaN};
    }
    return {out.xy.x, out.xy.y};
}

LonLat SurveyCrs::inverse(double easting_m, double northing_m) const {
    PJ_COORD in = proj_coord(easting_m, northing_m, 0.0, 0.0);
    PJ_COORD out = proj_trans(m_transform, PJ_INV, in);
    if (!std::isfinite(out.xy.x) || !std::isfinite(out.xy.y) || out.xy.x == HUGE_VAL) {
        proj_errno_reset(m_transform);
        return {kNaN, kNaN};
    }
    return {out.xy.x, out.xy.y};
}

double SurveyCrs::convergence_deg(double lon_deg, double lat_deg) const {
    // The grid bearing of true north, from a short central difference along the meridian through
    // the point: two forward transforms (proj_factors builds a new operation on every call, some
    // 50 ms each, far too slow for every fix). True north then has grid bearing -convergence.
    // The step of 1e-6 degrees (about 0.1 m) keeps the truncation error far below 1e-9 degrees.
    constexpr double kStepDeg = 1e-6;
    const auto a = forward(lon_deg, lat_deg - kStepDeg);
    const auto b = forward(lon_deg, lat_deg + kStepDeg);
    if (!std::isfinite(a.easting_m) || !std::isfinite(b.easting_m)) return kNaN;
    return -std::atan2(b.easting_m - a.easting_m, b.northing_m - a.northing_m) * kRadToDeg;
}

std::optional<SurveyCrs::AreaOfUse> SurveyCrs::areaOfUse() const { return m_area; }

double SurveyCrs::degreesOutsideAreaOfUse(double lon_deg, double lat_deg) const {
    const auto& a = m_area;
    if (!a) return 0.0;
    double dlat = 0.0;
    if (lat_deg < a->south_deg) dlat = a->south_deg - lat_deg;
    if (lat_deg > a->north_deg) dlat = lat_deg - a->north_deg;
    // Longitude distance to the [west, east] span, on the circle (the span may cross 180).
    const auto wrap = [](double d) { return std::fmod(std::fmod(d, 360.0) + 360.0, 360.0); };
    const double raw = a->east_deg - a->west_deg;
    const double span = raw < 0.0 ? raw + 360.0 : raw;
    const double from_west = wrap(lon_deg - a->west_deg);
    double dlon = 0.0;
    if (span < 360.0 && from_west > span) dlon = std::min(from_west - span, 360.0 - from_west);
    return std::max(dlat, dlon);
}

}  // namespace sg::nav
