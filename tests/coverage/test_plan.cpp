// Survey plan input: GeoJSON (RFC 7946) through the survey CRS, CSV in the survey CRS, the [plan]
// config table, and every bad-plan case with its message naming the file and the feature.
#include <cmath>
#include <filesystem>
#include <fstream>
#include <string>

#include <gmock/gmock.h>
#include <gtest/gtest.h>

#include "common/config_section.hpp"
#include "coverage/survey_plan.hpp"
#include "nav/survey_crs.hpp"

namespace sg::coverage {
namespace {

using ::testing::AllOf;
using ::testing::HasSubstr;

// Identity "CRS" for tests that only exercise structure: lon/lat degrees scaled to metres.
Point scaled(LonLat ll) { return {ll.lon_deg * 1000.0, ll.lat_deg * 1000.0}; }

std::string planError(const std::function<void()>& f) {
    try {
        f();
    } catch (const PlanError& e) {
        return e.what();
    }
    return "(no PlanError thrown)";
}

TEST(SurveyPlan, GeoJsonAreaIsProjectedWithTheSurveyCrs) {
    // Reference point (BUILD-NOTES: PROJ, GeographicLib and GeoConvert agree): lon 4.5, lat 52.0
    // -> UTM 31N E 602972.982, N 5762100.490.
    const nav::SurveyCrs crs(32631);
    const std::string text = R"({"type":"FeatureCollection","features":[{"type":"Feature",
      "properties":{"name":"site"},"geometry":{"type":"Polygon","coordinates":
      [[[4.5,52.0],[4.51,52.0],[4.51,52.01],[4.5,52.01],[4.5,52.0]]]}}]})";
    const MultiPolygon mp = parseAreaGeoJson(text, "area.geojson", toGridWith(crs));
    ASSERT_EQ(mp.size(), 1U);
    ASSERT_EQ(mp[0].exterior.size(), 4U);  // stored open
    EXPECT_NEAR(mp[0].exterior[0].e_m, 602972.982, 0.001);
    EXPECT_NEAR(mp[0].exterior[0].n_m, 5762100.490, 0.001);
    EXPECT_GT(signedArea(mp[0].exterior), 0.0);  // counter-clockwise
    // 0.01 deg x 0.01 deg at 52 N: about 687 m x 1113 m (spherical estimate, within 1 %).
    EXPECT_NEAR(area(mp), 687.0 * 1113.0, 0.01 * 687.0 * 1113.0);
}

TEST(SurveyPlan, ClockwiseRingsAreReorientedAndHolesKept) {
    const std::string text = R"({"type":"Polygon","coordinates":[
      [[0,0],[0,1],[1,1],[1,0],[0,0]],
      [[0.2,0.2],[0.4,0.2],[0.4,0.4],[0.2,0.4],[0.2,0.2]]]})";
    const MultiPolygon mp = parseAreaGeoJson(text, "a.geojson", scaled);
    ASSERT_EQ(mp[0].holes.size(), 1U);
    EXPECT_GT(signedArea(mp[0].exterior), 0.0);
    EXPECT_LT(signedArea(mp[0].holes[0]), 0.0);
    EXPECT_NEAR(area(mp), 1e6 - 0.04e6, 1e-3);
    EXPECT_FALSE(contains(mp, {300.0, 300.0}));
    EXPECT_TRUE(contains(mp, {700.0, 700.0}));
}

TEST(SurveyPlan, GeoJsonLinesAndMeanHeading) {
    const std::string text = R"({"type":"FeatureCollection","features":[
      {"type":"Feature","properties":{"name":"L1"},"geometry":{"type":"LineString","coordinates":[[0,0],[0,1]]}},
      {"type":"Feature","properties":{"name":"L2"},"geometry":{"type":"LineString","coordinates":[[0.02,1],[0.02,0.5],[0.02,0]]}}]})";
    const auto lines = parseLinesGeoJson(text, "lines.geojson", scaled);
    ASSERT_EQ(lines.size(), 2U);
    EXPECT_EQ(lines[1].name, "L2");
    EXPECT_DOUBLE_EQ(lines[1].end.n_m, 0.0);
    // Reciprocal lines (0 and 180 degrees) share the axis 0 (doubled-angle mean).
    EXPECT_NEAR(meanLineAxisDeg(lines).value(), 0.0, 1e-9);
    const std::vector<PlanLine> diag{{"a", {0, 0}, {100, 100}}, {"b", {0, 0}, {-100, -100}}};
    EXPECT_NEAR(meanLineAxisDeg(diag).value(), 45.0, 1e-9);
}

TEST(SurveyPlan, CsvAreaAndLines) {
    const auto mp = parseAreaCsv("# area in UTM 31N\ne,n\n0,0\n100,0\n100,50\n0,50\n", "area.csv");
    EXPECT_NEAR(area(mp), 5000.0, 1e-9);
    const auto lines = parseLinesCsv(
        "name,start_e,start_n,end_e,end_n,extra\nA,10,0,10,50,x\n\"B, west\",20,50,20,0,y\n", "lines.csv");
    ASSERT_EQ(lines.size(), 2U);
    EXPECT_EQ(lines[1].name, "B, west");
    EXPECT_DOUBLE_EQ(lines[1].bearing_deg(), 180.0);
    // Without a header the columns are positional.
    EXPECT_EQ(parseLinesCsv("C,1,2,3,4\n", "l.csv")[0].end.n_m, 4.0);
}

TEST(SurveyPlan, BadPlansNameFileAndFeature) {
    // Self-intersecting polygon (a bow-tie).
    EXPECT_THAT(planError([] {
                    parseAreaGeoJson(R"({"type":"FeatureCollection","features":[{"type":"Feature",
          "properties":{"name":"bowtie"},"geometry":{"type":"Polygon",
          "coordinates":[[[0,0],[1,1],[1,0],[0,1],[0,0]]]}}]})",
                                     "area.geojson", scaled);
                }),
                AllOf(HasSubstr("area.geojson"), HasSubstr("feature 0 ('bowtie')"),
                      HasSubstr("self-intersecting")));
    // Self-intersecting CSV polygon.
    EXPECT_THAT(planError([] { parseAreaCsv("0,0\n10,10\n10,0\n0,10\n", "area.csv"); }),
                AllOf(HasSubstr("area.csv"), HasSubstr("self-intersecting")));
    // Zero-length line.
    EXPECT_THAT(planError([] {
                    parseLinesGeoJson(R"({"type":"FeatureCollection","features":[{"type":"Feature",
          "properties":{"name":"L7"},"geometry":{"type":"LineString","coordinates":[[4.5,52],[4.5,52]]}}]})",
                                      "lines.geojson", scaled);
                }),
                AllOf(HasSubstr("lines.geojson"), HasSubstr("feature 0 ('L7')"), HasSubstr("zero length")));
    EXPECT_THAT(planError([] { parseLinesCsv("name,start_e,start_n,end_e,end_n\nX,5,5,5,5\n", "l.csv"); }),
                AllOf(HasSubstr("l.csv"), HasSubstr("line 2"), HasSubstr("zero length")));
    // Wrong CRS: projected coordinates in a GeoJSON file.
    EXPECT_THAT(planError([] {
                    parseAreaGeoJson(R"({"type":"Polygon","coordinates":[[[602972,5762100],[603972,5762100],
          [603972,5763100],[602972,5762100]]]})",
                                     "utm.geojson", scaled);
                }),
                AllOf(HasSubstr("utm.geojson"), HasSubstr("wrong CRS"), HasSubstr("outside longitude")));
    // Wrong CRS: a crs member naming a projected CRS (GeoJSON 2008 style).
    EXPECT_THAT(planError([] {
                    parseLinesGeoJson(R"({"type":"FeatureCollection","crs":{"type":"name","properties":
          {"name":"urn:ogc:def:crs:EPSG::32631"}},"features":[]})",
                                      "old.geojson", scaled);
                }),
                AllOf(HasSubstr("old.geojson"), HasSubstr("wrong CRS"), HasSubstr("EPSG::32631")));
    // A crs member naming WGS84 is accepted.
    EXPECT_NO_THROW(parseLinesGeoJson(R"({"type":"FeatureCollection","crs":{"type":"name","properties":
          {"name":"urn:ogc:def:crs:OGC:1.3:CRS84"}},"features":[]})",
                                      "ok.geojson", scaled));
    // Lines outside the area.
    const MultiPolygon area{Polygon{{{0, 0}, {100, 0}, {100, 100}, {0, 100}}, {}}};
    EXPECT_THAT(planError([&] {
                    checkLinesAgainstArea(area, {{"in", {50, -10}, {50, 110}}, {"far", {500, 0}, {500, 100}}},
                                          "lines.csv");
                }),
                AllOf(HasSubstr("lines.csv"), HasSubstr("line 1 ('far')"), HasSubstr("outside the survey area")));
    EXPECT_NO_THROW(checkLinesAgainstArea(area, {{"crossing", {-50, 50}, {150, 50}}}, "lines.csv"));
    // Ring not closed, no name, duplicate names, not straight, not a number, not JSON, wrong type.
    EXPECT_THAT(planError([] {
                    parseAreaGeoJson(R"({"type":"Polygon","coordinates":[[[0,0],[1,0],[1,1],[0,1]]]})", "o.geojson",
                                     scaled);
                }),
                HasSubstr("not closed"));
    EXPECT_THAT(planError([] {
                    parseLinesGeoJson(R"({"type":"FeatureCollection","features":[{"type":"Feature","properties":{},
          "geometry":{"type":"LineString","coordinates":[[0,0],[0,1]]}}]})",
                                      "n.geojson", scaled);
                }),
                AllOf(HasSubstr("feature 0"), HasSubstr("no 'name'")));
    EXPECT_THAT(planError([] { parseLinesCsv("A,0,0,0,10\nA,5,0,5,10\n", "d.csv"); }), HasSubstr("used twice"));
    EXPECT_THAT(planError([] {
                    parseLinesGeoJson(R"({"type":"Feature","properties":{"name":"bent"},
          "geometry":{"type":"LineString","coordinates":[[0,0],[0.01,0.5],[0,1]]}})",
                                      "b.geojson", scaled);
                }),
                AllOf(HasSubstr("'bent'"), HasSubstr("not straight")));
    EXPECT_THAT(planError([] { parseLinesCsv("name,start_e,start_n,end_e,end_n\nA,0,zero,0,10\n", "x.csv"); }),
                AllOf(HasSubstr("x.csv:2"), HasSubstr("start_n"), HasSubstr("\"zero\"")));
    EXPECT_THAT(planError([] { parseAreaGeoJson("{\"type\": ", "j.geojson", scaled); }),
                AllOf(HasSubstr("j.geojson"), HasSubstr("not valid JSON")));
    EXPECT_THAT(planError([] {
                    parseAreaGeoJson(R"({"type":"LineString","coordinates":[[0,0],[0,1]]})", "t.geojson", scaled);
                }),
                AllOf(HasSubstr("Polygon or MultiPolygon"), HasSubstr("'LineString'")));
    EXPECT_THAT(planError([] { loadArea("plan.kml", scaled); }), HasSubstr("unknown plan file type"));
}

TEST(SurveyPlan, ConfigTableResolvesPathsRelativeToTheConfigFile) {
    const auto dir = std::filesystem::path(SG_BINARY_DIR) / "test_coverage_plan";
    std::filesystem::create_directories(dir / "plan");
    std::ofstream(dir / "plan" / "area.csv") << "e,n\n0,0\n200,0\n200,100\n0,100\n";
    std::ofstream(dir / "plan" / "lines.csv") << "name,start_e,start_n,end_e,end_n\nA,10,-5,10,105\nB,30,105,30,-5\n";
    const std::string cfg_path = (dir / "survey.toml").string();
    std::ofstream(cfg_path) << "[plan]\narea = \"plan/area.csv\"\nlines = \"plan/lines.csv\"\n"
                               "line_spacing_m = 20\nplanned_altitude_m = 3.5\n";
    const toml::table root = config::parseFile(cfg_path);
    const config::Section plan_sec = config::Section(root, cfg_path).table("plan");
    const SurveyPlan plan = loadPlan(plan_sec, scaled);
    EXPECT_EQ(plan.lines.size(), 2U);
    EXPECT_DOUBLE_EQ(plan.line_spacing_m, 20.0);
    EXPECT_NEAR(plan.surveyHeadingDeg(), 0.0, 1e-9);
    EXPECT_NEAR(area(plan.area), 20000.0, 1e-9);

    // A bad key is named with the file.
    std::ofstream(cfg_path) << "[plan]\narea = \"plan/area.csv\"\nline_spacing_m = -1\nplanned_altitude_m = 3\n";
    const toml::table bad = config::parseFile(cfg_path);
    try {
        loadPlan(config::Section(bad, cfg_path).table("plan"), scaled);
        FAIL() << "no ConfigError";
    } catch (const config::ConfigError& e) {
        EXPECT_THAT(e.what(), AllOf(HasSubstr("survey.toml"), HasSubstr("plan.line_spacing_m")));
    }
}

}  // namespace
}  // namespace sg::coverage
