// Exports: GeoJSON (RFC 7946: lon,lat order, exterior rings counter-clockwise, holes clockwise,
// no crs member), GPX 1.1 routes checked with xmllint (libxml2-utils), CSV round trips.
// No GPX 1.1 XSD is available offline on Debian, so the GPX check is well-formedness
// (xmllint --noout) plus the namespace, version and element structure via xmllint --xpath.
#include <array>
#include <cmath>
#include <cstdio>
#include <filesystem>
#include <memory>
#include <string>

#include <gtest/gtest.h>
#include <nlohmann/json.hpp>

#include "coverage/exports.hpp"
#include "coverage/gaps.hpp"
#include "coverage/infill.hpp"
#include "coverage/swath_painter.hpp"
#include "coverage/survey_plan.hpp"
#include "coverage_test_util.hpp"
#include "nav/survey_crs.hpp"

namespace sg::coverage {
namespace {

using nlohmann::json;

// Near lon 4.5, lat 52.0 in UTM 31N (BUILD-NOTES reference point): E 602972.982, N 5762100.490.
const Point kOrigin{602900.0, 5762000.0};
Point at(double e, double n) { return {kOrigin.e_m + e, kOrigin.n_m + n}; }

struct Fixture {
    nav::SurveyCrs crs{32631};
    MultiPolygon area{Polygon{{at(0, 0), at(120, 0), at(120, 100), at(0, 100)}, {}}};
    CoverageRaster raster{0.5, kOrigin};
    GapReport report;
    InfillPlan plan;
    Fixture() {
        SwathPainter p(raster);
        // Two lines leaving a 10 m strip uncovered, and a covered island inside the east gap
        // (so that one gap has a hole).
        for (const auto& s : test::samplesAlong({at(20, -10), at(20, 110)}, 1.0, 20.0, 20.0, 2.0F)) p.add(s);
        p.reset();
        for (const auto& s : test::samplesAlong({at(60, -10), at(60, 110)}, 1.0, 10.0, 10.0, 2.0F)) p.add(s);
        p.reset();
        for (const auto& s : test::samplesAlong({at(95, 40), at(95, 60)}, 1.0, 5.0, 5.0, 2.0F)) p.add(s);
        report = findGaps(raster, area, GapOptions{1.0, 0.0});
        InfillOptions o;
        o.half_width_m = 8.0;
        o.run_in_m = o.run_out_m = 20.0;
        plan = planInfill(report, o);
    }
};

std::string run(const std::string& cmd, int& status) {
    std::string out;
    std::unique_ptr<FILE, int (*)(FILE*)> pipe(popen(cmd.c_str(), "r"), pclose);
    std::array<char, 4096> buf{};
    while (pipe && fgets(buf.data(), static_cast<int>(buf.size()), pipe.get())) out += buf.data();
    status = pclose(pipe.release());
    return out;
}

// Shoelace in lon/lat degrees: the sign is the winding (RFC 7946 3.1.6 right-hand rule).
double lonLatSignedArea(const json& ring) {
    double s = 0.0;
    for (std::size_t i = 0; i + 1 < ring.size(); ++i) {
        s += ring[i][0].get<double>() * ring[i + 1][1].get<double>() -
             ring[i + 1][0].get<double>() * ring[i][1].get<double>();
    }
    return 0.5 * s;
}

TEST(Exports, GapsGeoJsonIsLonLatRightHandRuleWithoutCrs) {
    Fixture f;
    ASSERT_EQ(f.report.gaps.size(), 2U);
    const json doc = json::parse(gapsGeoJson(f.report, toLonLatWith(f.crs)));
    EXPECT_EQ(doc["type"], "FeatureCollection");
    EXPECT_FALSE(doc.contains("crs"));  // RFC 7946 section 4: no crs member
    ASSERT_EQ(doc["features"].size(), 2U);
    int holes = 0;
    for (const auto& feat : doc["features"]) {
        const json& geom = feat["geometry"];
        const json polys = geom["type"] == "Polygon" ? json::array({geom["coordinates"]}) : geom["coordinates"];
        for (const auto& poly : polys) {
            for (std::size_t r = 0; r < poly.size(); ++r) {
                const json& ring = poly[r];
                ASSERT_GE(ring.size(), 4U);
                EXPECT_EQ(ring.front(), ring.back());  // closed (RFC 7946 3.1.6)
                for (const auto& pos : ring) {
                    // lon first: near 4.5 E; lat second: near 52 N.
                    EXPECT_NEAR(pos[0].get<double>(), 4.5, 0.01);
                    EXPECT_NEAR(pos[1].get<double>(), 52.0, 0.01);
                }
                if (r == 0) {
                    EXPECT_GT(lonLatSignedArea(ring), 0.0) << "exterior must be counter-clockwise";
                } else {
                    EXPECT_LT(lonLatSignedArea(ring), 0.0) << "hole must be clockwise";
                    ++holes;
                }
            }
        }
        EXPECT_GT(feat["properties"]["area_m2"].get<double>(), 0.0);
    }
    EXPECT_EQ(holes, 1);
    // A vertex maps back through the survey CRS to the largest gap's outer corner (E 70, N 0 local).
    const json first_ring = doc["features"][0]["geometry"]["type"] == "Polygon"
                                ? doc["features"][0]["geometry"]["coordinates"][0]
                                : doc["features"][0]["geometry"]["coordinates"][0][0];
    bool found = false;
    for (const auto& pos : first_ring) {
        const auto en = f.crs.forward(pos[0].get<double>(), pos[1].get<double>());
        if (std::hypot(en.easting_m - at(70, 0).e_m, en.northing_m - at(70, 0).n_m) < 0.01) found = true;
    }
    EXPECT_TRUE(found) << "the east gap's south-west corner (E 70, N 0) is a vertex";
}

TEST(Exports, InfillGeoJsonAndGpxAgree) {
    Fixture f;
    ASSERT_FALSE(f.plan.lines.empty());
    const auto to_ll = toLonLatWith(f.crs);
    const json doc = json::parse(infillGeoJson(f.plan, to_ll));
    ASSERT_EQ(doc["features"].size(), f.plan.lines.size());
    const json& c = doc["features"][0]["geometry"]["coordinates"];
    const LonLat start = to_ll(f.plan.lines[0].start);
    EXPECT_NEAR(c[0][0].get<double>(), start.lon_deg, 1e-8);
    EXPECT_NEAR(c[0][1].get<double>(), start.lat_deg, 1e-8);
    EXPECT_EQ(doc["features"][0]["properties"]["name"], f.plan.lines[0].name);

    const auto dir = std::filesystem::path(SG_BINARY_DIR) / "test_coverage_exports";
    std::filesystem::create_directories(dir);
    const std::string gpx = (dir / "infill.gpx").string();
    writeTextFile(gpx, infillGpx(f.plan, to_ll));
    int status = -1;
    // Well-formed XML (xmllint, Debian libxml2-utils).
    run("xmllint --noout '" + gpx + "' 2>&1", status);
    EXPECT_EQ(status, 0);
    // GPX 1.1 structure: root gpx in the GPX 1.1 namespace, version 1.1, one rte per line, two
    // rtept per rte with lat and lon attributes (GPX 1.1 schema: rteType, wptType).
    const std::string ns = "namespace-uri()='http://www.topografix.com/GPX/1/1'";
    auto xpath = [&](const std::string& expr) {
        int st = -1;
        std::string out = run("xmllint --xpath \"" + expr + "\" '" + gpx + "' 2>&1", st);
        while (!out.empty() && (out.back() == '\n' || out.back() == ' ')) out.pop_back();
        EXPECT_EQ(st, 0) << expr << ": " << out;
        return out;
    };
    EXPECT_EQ(xpath("count(/*[local-name()='gpx' and " + ns + "])"), "1");
    EXPECT_EQ(xpath("string(/*[local-name()='gpx']/@version)"), "1.1");
    EXPECT_EQ(xpath("count(/*[local-name()='gpx']/*[local-name()='rte' and " + ns + "])"),
              std::to_string(f.plan.lines.size()));
    EXPECT_EQ(xpath("count(//*[local-name()='rte']/*[local-name()='rtept'][@lat and @lon])"),
              std::to_string(2 * f.plan.lines.size()));
    const double lat = std::stod(xpath("string(//*[local-name()='rtept'][1]/@lat)"));
    const double lon = std::stod(xpath("string(//*[local-name()='rtept'][1]/@lon)"));
    EXPECT_NEAR(lat, start.lat_deg, 1e-8);
    EXPECT_NEAR(lon, start.lon_deg, 1e-8);
    // A broken file is caught by the same check (so the check can fail).
    const std::string bad = (dir / "broken.gpx").string();
    writeTextFile(bad, "<gpx version=\"1.1\"><rte></gpx>\n");
    run("xmllint --noout '" + bad + "' 2>&1", status);
    EXPECT_NE(status, 0);
}

TEST(Exports, CsvRoundTrips) {
    Fixture f;
    // Infill CSV loads back as a planned-lines CSV (extra columns ignored).
    const auto lines = parseLinesCsv(infillCsv(f.plan), "infill.csv");
    ASSERT_EQ(lines.size(), f.plan.lines.size());
    for (std::size_t i = 0; i < lines.size(); ++i) {
        EXPECT_EQ(lines[i].name, f.plan.lines[i].name);
        EXPECT_NEAR(lines[i].start.e_m, f.plan.lines[i].start.e_m, 0.0005);
        EXPECT_NEAR(lines[i].start.n_m, f.plan.lines[i].start.n_m, 0.0005);
        EXPECT_NEAR(lines[i].end.e_m, f.plan.lines[i].end.e_m, 0.0005);
        EXPECT_NEAR(lines[i].end.n_m, f.plan.lines[i].end.n_m, 0.0005);
    }
    // Gap CSV: one row per gap, fields parse back to the report's values.
    const std::string csv = gapsCsv(f.report);
    std::size_t rows = 0, pos = csv.find('\n') + 1;
    while (pos < csv.size()) {
        const std::size_t nl = csv.find('\n', pos);
        const std::string row = csv.substr(pos, nl - pos);
        const Gap& g = f.report.gaps[rows];
        EXPECT_EQ(std::stoi(row.substr(0, row.find(','))), g.id);
        const std::size_t c2 = row.find(',', row.find(',') + 1);
        EXPECT_NEAR(std::stod(row.substr(c2 + 1)), g.area_m2, 0.0005);
        ++rows;
        pos = nl + 1;
    }
    EXPECT_EQ(rows, f.report.gaps.size());
}

}  // namespace
}  // namespace sg::coverage
