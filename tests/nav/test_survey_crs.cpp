// Survey CRS (PROJ) checked against GeographicLib, an independent implementation of the
// transverse Mercator projection (Karney 2011), and against the reference points of BUILD-NOTES.
#include <gtest/gtest.h>

#include <GeographicLib/Constants.hpp>
#include <GeographicLib/TransverseMercator.hpp>
#include <GeographicLib/UTMUPS.hpp>

#include <cmath>
#include <stdexcept>
#include <vector>

#include "nav/survey_crs.hpp"

namespace {

using sg::nav::SurveyCrs;

struct Point {
    double lon, lat;
};

// Points across UTM zones and both hemispheres, including the Norway (32V) and Svalbard (33X)
// exceptions and both sides of the antimeridian.
const std::vector<Point> kPoints = {
    {4.5, 52.0},     {1.7, 51.3},    {-0.1, 51.5},    {-70.6, -33.4},  {151.2, -33.9},
    {-122.4, 37.8},  {139.7, 35.7},  {18.4, -33.9},   {-43.2, -22.9},  {5.3, 60.4},
    {15.6, 78.2},    {179.9, -16.5}, {-179.9, 65.0},  {10.0, 0.5},     {-3.0, -0.5},
    {-157.9, 21.3},  {55.3, -21.1},  {-58.4, -51.7},
};

TEST(SurveyCrs, UtmMatchesGeographicLibToMillimetres) {
    for (const Point& p : kPoints) {
        SurveyCrs crs = SurveyCrs::utmForLonLat(p.lon, p.lat);
        int zone = 0;
        bool north = false;
        double x = 0, y = 0, gamma = 0, k = 0;
        // GeographicLib UTMUPS::Forward with the standard zone (its own zone rules).
        GeographicLib::UTMUPS::Forward(p.lat, p.lon, zone, north, x, y, gamma, k);
        EXPECT_EQ(crs.epsg(), (north ? 32600 : 32700) + zone) << p.lon << " " << p.lat;
        const auto en = crs.forward(p.lon, p.lat);
        EXPECT_NEAR(en.easting_m, x, 1e-3) << p.lon << " " << p.lat;
        EXPECT_NEAR(en.northing_m, y, 1e-3) << p.lon << " " << p.lat;
        // Grid convergence: PROJ proj_factors vs GeographicLib's gamma (same sign convention).
        EXPECT_NEAR(crs.convergence_deg(p.lon, p.lat), gamma, 1e-7) << p.lon << " " << p.lat;
        // Round trip.
        const auto ll = crs.inverse(en.easting_m, en.northing_m);
        EXPECT_NEAR(ll.lon_deg, p.lon, 1e-9);
        EXPECT_NEAR(ll.lat_deg, p.lat, 1e-9);
    }
}

TEST(SurveyCrs, BuildNotesReferencePoints) {
    // BUILD-NOTES pitfall 11: PROJ, GeographicLib and GeoConvert agreed on these.
    SurveyCrs crs(32631);
    auto a = crs.forward(4.5, 52.0);
    EXPECT_NEAR(a.easting_m, 602972.982, 1e-3);
    EXPECT_NEAR(a.northing_m, 5762100.490, 1e-3);
    auto b = crs.forward(1.7, 51.3);
    EXPECT_NEAR(b.easting_m, 409370.723, 1e-3);
    EXPECT_NEAR(b.northing_m, 5683989.348, 1e-3);
    EXPECT_EQ(crs.name(), "WGS 84 / UTM zone 31N");
}

TEST(SurveyCrs, NorthingEastingAxisOrderIsNormalised) {
    // EPSG:3006 (SWEREF99 TM) is declared northing, easting; after normalisation forward() must
    // still return easting first. SWEREF99 TM: transverse Mercator, central meridian 15 E,
    // k0 = 0.9996, false easting 500000 m, GRS 80 (EPSG registry). Check with GeographicLib.
    SurveyCrs crs(3006);
    const GeographicLib::TransverseMercator tm(GeographicLib::Constants::GRS80_a(),
                                               1.0 / 298.257222101, 0.9996);  // GRS 80 flattening (Moritz 1980)
    for (const Point& p : std::vector<Point>{{15.0, 60.0}, {12.5, 56.1}, {20.3, 67.9}}) {
        double x = 0, y = 0;
        tm.Forward(15.0, p.lat, p.lon, x, y);
        const auto en = crs.forward(p.lon, p.lat);
        EXPECT_NEAR(en.easting_m, x + 500000.0, 1e-3);
        EXPECT_NEAR(en.northing_m, y, 1e-3);
    }
}

TEST(SurveyCrs, RejectsUnknownAndGeographicCodes) {
    EXPECT_THROW(SurveyCrs(4326), std::invalid_argument);    // geographic, not projected
    EXPECT_THROW(SurveyCrs(999999), std::invalid_argument);  // no such code
}

TEST(SurveyCrs, MovesKeepTheTransformation) {
    SurveyCrs a(32631);
    SurveyCrs b = std::move(a);
    EXPECT_NEAR(b.forward(4.5, 52.0).easting_m, 602972.982, 1e-3);
    SurveyCrs c(32630);
    c = std::move(b);
    EXPECT_EQ(c.epsg(), 32631);
    EXPECT_NEAR(c.forward(4.5, 52.0).northing_m, 5762100.490, 1e-3);
}

TEST(SurveyCrs, UntransformablePointIsNaNNotZero) {
    SurveyCrs crs(32631);
    const auto en = crs.forward(4.5, 95.0);  // latitude out of range
    EXPECT_TRUE(std::isnan(en.easting_m));
    EXPECT_TRUE(std::isnan(en.northing_m));
}

}  // namespace
