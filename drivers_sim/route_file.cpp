// A route from a GeoJSON FeatureCollection; see route_file.hpp.
#include "drivers_sim/route_file.hpp"

#include <cmath>
#include <fstream>
#include <sstream>

#include <fmt/format.h>
#include <nlohmann/json.hpp>

#include "common/config_section.hpp"
#include "nav/survey_crs.hpp"

namespace sg::sim {

namespace {

using nlohmann::json;

[[noreturn]] void fail(const std::string& file, const std::string& what) {
    throw config::ConfigError(file + ": " + what);
}

std::string featureLabel(std::size_t i, const json& f) {
    const json* props = f.contains("properties") && f["properties"].is_object() ? &f["properties"] : nullptr;
    if (props != nullptr && props->contains("name") && (*props)["name"].is_string())
        return fmt::format("feature {} ('{}')", i + 1, (*props)["name"].get<std::string>());
    return fmt::format("feature {}", i + 1);
}

std::optional<double> optionalMetres(const std::string& file, const std::string& label,
                                     const json& props, const char* key) {
    if (!props.contains(key) || props[key].is_null()) return std::nullopt;
    const json& v = props[key];
    if (!v.is_number() || !std::isfinite(v.get<double>()) || v.get<double>() < 0.0 ||
        v.get<double>() > 5000.0)
        fail(file, fmt::format("{}: property '{}': expected metres from 0 to 5000, found {}", label,
                               key, v.dump()));
    return v.get<double>();
}

}  // namespace

std::vector<LineSpec> parseRouteGeoJson(const std::string& text, const std::string& name,
                                        const Scenario& sc) {
    json doc;
    try {
        doc = json::parse(text);
    } catch (const json::parse_error& e) {
        fail(name, fmt::format("not valid JSON: {}", e.what()));
    }
    if (!doc.is_object() || doc.value("type", "") != "FeatureCollection" ||
        !doc.contains("features") || !doc["features"].is_array())
        fail(name, "expected a GeoJSON FeatureCollection of LineString features");
    // RFC 7946 positions are WGS 84 longitude, latitude; an old-style "crs" member naming
    // anything else means the coordinates are not what this reader expects.
    if (doc.contains("crs")) {
        const std::string crs = doc["crs"].is_object() && doc["crs"].contains("properties")
                                    ? doc["crs"]["properties"].value("name", "")
                                    : "";
        if (crs != "urn:ogc:def:crs:OGC:1.3:CRS84" && crs != "EPSG:4326" &&
            crs != "urn:ogc:def:crs:EPSG::4326")
            fail(name, fmt::format("'crs' is '{}': a route must be in WGS 84 longitude, latitude "
                                   "(RFC 7946)", crs));
    }
    const json& features = doc["features"];
    if (features.empty()) fail(name, "the FeatureCollection has no features: no line to fly");

    const nav::SurveyCrs crs = sc.site.epsg != 0
                                   ? nav::SurveyCrs(sc.site.epsg)
                                   : nav::SurveyCrs::utmForLonLat(sc.site.origin_lon_deg,
                                                                  sc.site.origin_lat_deg);
    const nav::EastNorth origin = crs.forward(sc.site.origin_lon_deg, sc.site.origin_lat_deg);

    std::vector<LineSpec> lines;
    for (std::size_t i = 0; i < features.size(); ++i) {
        const json& f = features[i];
        const std::string label = featureLabel(i, f);
        if (!f.is_object() || !f.contains("geometry") || !f["geometry"].is_object())
            fail(name, label + ": expected a Feature with a geometry");
        const json& g = f["geometry"];
        const std::string type = g.value("type", "");
        if (type != "LineString")
            fail(name, fmt::format("{}: geometry '{}': the simulator flies LineString features "
                                   "(straight lines of 2 or more positions)",
                                   label, type));
        if (!g.contains("coordinates") || !g["coordinates"].is_array() || g["coordinates"].size() < 2)
            fail(name, label + ": a LineString needs at least 2 positions");
        std::vector<Vec2> pts;
        for (const json& pos : g["coordinates"]) {
            if (!pos.is_array() || pos.size() < 2 || !pos[0].is_number() || !pos[1].is_number())
                fail(name, label + ": a position is not [longitude, latitude]");
            const double lon = pos[0].get<double>(), lat = pos[1].get<double>();
            if (!(lon >= -180.0 && lon <= 180.0 && lat >= -90.0 && lat <= 90.0))
                fail(name, fmt::format("{}: position [{}, {}] is not a WGS 84 longitude, latitude "
                                       "(projected coordinates?)",
                                       label, lon, lat));
            const nav::EastNorth en = crs.forward(lon, lat);
            if (!std::isfinite(en.easting_m) || !std::isfinite(en.northing_m))
                fail(name, fmt::format("{}: position [{}, {}] cannot be projected to EPSG:{}", label,
                                       lon, lat, crs.epsg()));
            const Vec2 p{en.easting_m - origin.easting_m, en.northing_m - origin.northing_m};
            if (length(p) > kMaxRouteDistance_m)
                fail(name, fmt::format("{}: position [{}, {}] lies {:.1f} km from the site origin "
                                       "of {} (a route of another site?)",
                                       label, lon, lat, length(p) / 1000.0, sc.file));
            pts.push_back(p);
        }
        LineSpec l;
        l.start_m = pts.front();
        l.end_m = pts.back();
        const double len = length(l.end_m - l.start_m);
        if (len < 1.0) fail(name, label + ": the line is shorter than 1 m");
        // Straight lines only: the autopilot follows straight lines joined by turns.
        const Vec2 u = (1.0 / len) * (l.end_m - l.start_m);
        for (const Vec2& p : pts) {
            const double off = std::abs(dot(p - l.start_m, Vec2{u.n, -u.e}));
            if (off > 0.5)
                fail(name, fmt::format("{}: not a straight line (a vertex lies {:.1f} m off the "
                                       "chord); split it into one feature per straight leg",
                                       label, off));
        }
        const json props = f.contains("properties") && f["properties"].is_object() ? f["properties"]
                                                                                  : json::object();
        if (props.contains("name") && !props["name"].is_string())
            fail(name, label + ": property 'name' must be a string");
        l.name = props.value("name", fmt::format("R{:02d}", i + 1));
        for (const LineSpec& other : lines) {
            if (other.name == l.name) fail(name, fmt::format("{}: name '{}' is used twice", label, l.name));
        }
        l.run_in_m = optionalMetres(name, label, props, "run_in_m");
        l.run_out_m = optionalMetres(name, label, props, "run_out_m");
        if (props.contains("direction")) {
            const json& d = props["direction"];
            if (!d.is_string() || (d != "either" && d != "as_drawn"))
                fail(name, fmt::format("{}: property 'direction': expected \"either\" or "
                                       "\"as_drawn\", found {}",
                                       label, d.dump()));
            l.as_drawn = d == "as_drawn";
        }
        lines.push_back(std::move(l));
    }
    return lines;
}

void loadRoute(const std::string& path, Scenario& sc) {
    std::ifstream in(path, std::ios::binary);
    if (!in) throw config::ConfigError(path + ": cannot open the route file");
    std::ostringstream text;
    text << in.rdbuf();
    sc.route_lines = parseRouteGeoJson(text.str(), path, sc);
    sc.route_file = path;
}

}  // namespace sg::sim
