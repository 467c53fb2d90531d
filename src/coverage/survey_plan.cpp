// Survey plan input (GeoJSON RFC 7946 or CSV in the survey CRS) and its checks; see survey_plan.hpp.
#include "coverage/survey_plan.hpp"

#include <algorithm>
#include <charconv>
#include <cmath>
#include <filesystem>
#include <fstream>
#include <map>
#include <numbers>
#include <sstream>

#include <fmt/format.h>
#include <nlohmann/json.hpp>

#include "nav/survey_crs.hpp"

namespace sg::coverage {

using nlohmann::json;

namespace {

std::string readFile(const std::string& path) {
    std::ifstream in(path, std::ios::binary);
    if (!in) throw PlanError(fmt::format("{}: cannot open plan file", path));
    std::ostringstream ss;
    ss << in.rdbuf();
    return ss.str();
}

json parseJson(std::string_view text, const std::string& name) {
    try {
        return json::parse(text.begin(), text.end());
    } catch (const json::parse_error& e) {
        throw PlanError(fmt::format("{}: not valid JSON (byte {}): {}", name, e.byte, e.what()));
    }
}

// RFC 7946 section 4: GeoJSON is WGS84 longitude, latitude; the old (2008) `crs` member may only
// name WGS84 here.
void checkCrsMember(const json& obj, const std::string& name, const std::string& where) {
    if (!obj.is_object() || !obj.contains("crs")) return;
    const json& crs = obj["crs"];
    std::string crs_name;
    if (crs.is_object() && crs.contains("properties") && crs["properties"].is_object() &&
        crs["properties"].contains("name") && crs["properties"]["name"].is_string()) {
        crs_name = crs["properties"]["name"].get<std::string>();
    }
    static const char* kAccepted[] = {"urn:ogc:def:crs:OGC:1.3:CRS84", "urn:ogc:def:crs:OGC::CRS84",
                                      "CRS84", "EPSG:4326", "urn:ogc:def:crs:EPSG::4326"};
    for (const char* ok : kAccepted) {
        if (crs_name == ok) return;
    }
    throw PlanError(fmt::format(
        "{}: {}: wrong CRS: the 'crs' member names '{}'; GeoJSON (RFC 7946) must be WGS84 "
        "longitude, latitude: reproject the file to WGS84 or give it as CSV in the survey CRS",
        name, where, crs_name.empty() ? crs.dump() : crs_name));
}

Point position(const json& pos, const std::string& name, const std::string& where,
               const LonLatToGrid& to_grid) {
    if (!pos.is_array() || pos.size() < 2 || !pos[0].is_number() || !pos[1].is_number()) {
        throw PlanError(fmt::format("{}: {}: a position must be an array [longitude, latitude]",
                                    name, where));
    }
    const double lon = pos[0].get<double>();
    const double lat = pos[1].get<double>();
    if (!(lon >= -180.0 && lon <= 180.0 && lat >= -90.0 && lat <= 90.0)) {
        throw PlanError(fmt::format(
            "{}: {}: wrong CRS: position ({}, {}) is outside longitude -180..180 / latitude "
            "-90..90; GeoJSON (RFC 7946) must be WGS84 longitude, latitude (projected "
            "coordinates belong in a CSV plan)",
            name, where, lon, lat));
    }
    const Point p = to_grid(LonLat{lon, lat});
    if (!std::isfinite(p.e_m) || !std::isfinite(p.n_m)) {
        throw PlanError(fmt::format("{}: {}: position ({}, {}) cannot be projected to the survey CRS",
                                    name, where, lon, lat));
    }
    return p;
}

Ring ring(const json& coords, const std::string& name, const std::string& where,
          const LonLatToGrid& to_grid) {
    if (!coords.is_array() || coords.size() < 4) {
        throw PlanError(fmt::format("{}: {}: a linear ring needs at least 4 positions (RFC 7946 "
                                    "3.1.6), found {}",
                                    name, where, coords.is_array() ? coords.size() : 0));
    }
    if (coords.front() != coords.back()) {
        throw PlanError(fmt::format("{}: {}: ring is not closed (first and last positions differ; "
                                    "RFC 7946 3.1.6)",
                                    name, where));
    }
    Ring r;
    for (std::size_t i = 0; i + 1 < coords.size(); ++i) {
        r.push_back(position(coords[i], name, fmt::format("{} position {}", where, i), to_grid));
    }
    return r;
}

Polygon polygon(const json& coords, const std::string& name, const std::string& where,
                const LonLatToGrid& to_grid) {
    if (!coords.is_array() || coords.empty()) {
        throw PlanError(fmt::format("{}: {}: polygon has no rings", name, where));
    }
    Polygon p;
    for (std::size_t r = 0; r < coords.size(); ++r) {
        Ring rg = ring(coords[r], name,
                       r == 0 ? where + " exterior ring" : fmt::format("{} hole {}", where, r - 1),
                       to_grid);
        // Store exteriors counter-clockwise and holes clockwise whatever the file's winding
        // (RFC 7946 3.1.6 asks parsers not to reject the other winding).
        const bool ccw = signedArea(rg) > 0.0;
        if ((r == 0) != ccw) std::reverse(rg.begin(), rg.end());
        if (r == 0) {
            p.exterior = std::move(rg);
        } else {
            p.holes.push_back(std::move(rg));
        }
    }
    return p;
}

std::string featureLabel(const json& feature, std::size_t index) {
    if (feature.is_object() && feature.contains("properties") && feature["properties"].is_object()) {
        const json& props = feature["properties"];
        if (props.contains("name") && props["name"].is_string()) {
            return fmt::format("feature {} ('{}')", index, props["name"].get<std::string>());
        }
    }
    return fmt::format("feature {}", index);
}

// Flattens FeatureCollection / Feature / bare geometry into (label, geometry) pairs.
std::vector<std::pair<std::string, const json*>> geometries(const json& doc, const std::string& name) {
    std::vector<std::pair<std::string, const json*>> out;
    if (!doc.is_object() || !doc.contains("type") || !doc["type"].is_string()) {
        throw PlanError(fmt::format("{}: not a GeoJSON object (no 'type' member)", name));
    }
    checkCrsMember(doc, name, "top level");
    const std::string type = doc["type"].get<std::string>();
    if (type == "FeatureCollection") {
        if (!doc.contains("features") || !doc["features"].is_array()) {
            throw PlanError(fmt::format("{}: FeatureCollection without a 'features' array", name));
        }
        const json& feats = doc["features"];
        for (std::size_t i = 0; i < feats.size(); ++i) {
            const std::string label = featureLabel(feats[i], i);
            checkCrsMember(feats[i], name, label);
            if (!feats[i].is_object() || !feats[i].contains("geometry") ||
                !feats[i]["geometry"].is_object()) {
                throw PlanError(fmt::format("{}: {}: feature has no geometry", name, label));
            }
            out.emplace_back(label, &feats[i]["geometry"]);
        }
    } else if (type == "Feature") {
        if (!doc.contains("geometry") || !doc["geometry"].is_object()) {
            throw PlanError(fmt::format("{}: feature 0: feature has no geometry", name));
        }
        out.emplace_back(featureLabel(doc, 0), &doc["geometry"]);
    } else {
        out.emplace_back("geometry", &doc);
    }
    return out;
}

std::string geometryType(const json& g) {
    return g.contains("type") && g["type"].is_string() ? g["type"].get<std::string>() : "";
}

// ---- CSV ----------------------------------------------------------------------------------

std::string trim(std::string_view s) {
    std::size_t a = 0, b = s.size();
    while (a < b && (s[a] == ' ' || s[a] == '\t' || s[a] == '\r')) ++a;
    while (b > a && (s[b - 1] == ' ' || s[b - 1] == '\t' || s[b - 1] == '\r')) --b;
    return std::string(s.substr(a, b - a));
}

// Splits one CSV record (comma separated, fields may be "quoted" with "" for a quote).
std::vector<std::string> splitCsv(std::string_view line) {
    std::vector<std::string> fields;
    std::string cur;
    bool quoted = false;
    for (std::size_t i = 0; i < line.size(); ++i) {
        const char ch = line[i];
        if (quoted) {
            if (ch == '"' && i + 1 < line.size() && line[i + 1] == '"') {
                cur += '"';
                ++i;
            } else if (ch == '"') {
                quoted = false;
            } else {
                cur += ch;
            }
        } else if (ch == '"') {
            quoted = true;
        } else if (ch == ',') {
            fields.push_back(trim(cur));
            cur.clear();
        } else {
            cur += ch;
        }
    }
    fields.push_back(trim(cur));
    return fields;
}

std::optional<double> toNumber(const std::string& s) {
    double v = 0.0;
    const auto* end = s.data() + s.size();
    auto [p, ec] = std::from_chars(s.data(), end, v);
    if (ec != std::errc() || p != end || !std::isfinite(v)) return std::nullopt;
    return v;
}

struct CsvRecord {
    std::size_t line_no;
    std::vector<std::string> fields;
};

// Records of a CSV text, skipping blank lines and '#' comments; a first record whose fields are
// not all numbers (apart from a name column) is the header.
std::vector<CsvRecord> csvRecords(std::string_view text) {
    std::vector<CsvRecord> recs;
    std::size_t line_no = 0;
    std::size_t pos = 0;
    while (pos <= text.size()) {
        const std::size_t nl = text.find('\n', pos);
        const std::string_view line =
            text.substr(pos, nl == std::string_view::npos ? std::string_view::npos : nl - pos);
        ++line_no;
        const std::string t = trim(line);
        if (!t.empty() && t[0] != '#') recs.push_back({line_no, splitCsv(t)});
        if (nl == std::string_view::npos) break;
        pos = nl + 1;
    }
    return recs;
}

std::string lower(std::string s) {
    std::transform(s.begin(), s.end(), s.begin(),
                   [](unsigned char c) { return static_cast<char>(std::tolower(c)); });
    return s;
}

double csvNumber(const CsvRecord& r, std::size_t col, const std::string& name, const char* what) {
    if (col >= r.fields.size()) {
        throw PlanError(fmt::format("{}:{}: missing column '{}'", name, r.line_no, what));
    }
    auto v = toNumber(r.fields[col]);
    if (!v) {
        throw PlanError(fmt::format("{}:{}: column '{}': expected a number, found \"{}\"", name,
                                    r.line_no, what, r.fields[col]));
    }
    return *v;
}

void checkLine(const PlanLine& l, const std::string& name, const std::string& where) {
    if (!(l.length_m() >= 0.01)) {
        throw PlanError(fmt::format("{}: {}: line '{}' has zero length (start and end are the same "
                                    "point)",
                                    name, where, l.name));
    }
}

void checkUniqueNames(const std::vector<PlanLine>& lines, const std::string& name) {
    std::map<std::string, std::size_t> seen;
    for (std::size_t i = 0; i < lines.size(); ++i) {
        auto [it, fresh] = seen.emplace(lines[i].name, i);
        if (!fresh) {
            throw PlanError(fmt::format("{}: line name '{}' is used twice (lines {} and {})", name,
                                        lines[i].name, it->second, i));
        }
    }
}

void checkPolygons(const MultiPolygon& mp, const std::string& name, const std::string& where) {
    if (auto problem = findSelfIntersection(mp)) {
        throw PlanError(fmt::format("{}: {}: self-intersecting polygon: {}", name, where, *problem));
    }
}

std::string extension(const std::string& path) {
    return lower(std::filesystem::path(path).extension().string());
}

}  // namespace

LonLatToGrid toGridWith(const nav::SurveyCrs& crs) {
    return [&crs](LonLat ll) {
        const nav::EastNorth en = crs.forward(ll.lon_deg, ll.lat_deg);
        return Point{en.easting_m, en.northing_m};
    };
}

GridToLonLat toLonLatWith(const nav::SurveyCrs& crs) {
    return [&crs](Point p) {
        const nav::LonLat ll = crs.inverse(p.e_m, p.n_m);
        return LonLat{ll.lon_deg, ll.lat_deg};
    };
}

double PlanLine::length_m() const { return std::hypot(end.e_m - start.e_m, end.n_m - start.n_m); }

double PlanLine::bearing_deg() const {
    double b = std::atan2(end.e_m - start.e_m, end.n_m - start.n_m) * 180.0 / std::numbers::pi;
    if (b < 0.0) b += 360.0;
    return b;
}

std::optional<double> meanLineAxisDeg(const std::vector<PlanLine>& lines) {
    double c = 0.0, s = 0.0;
    for (const auto& l : lines) {
        const double a2 = 2.0 * l.bearing_deg() * std::numbers::pi / 180.0;
        c += l.length_m() * std::cos(a2);
        s += l.length_m() * std::sin(a2);
    }
    if (lines.empty() || std::hypot(c, s) < 1e-9) return std::nullopt;
    double deg = 0.5 * std::atan2(s, c) * 180.0 / std::numbers::pi;
    if (deg < 0.0) deg += 180.0;
    if (deg > 180.0 - 1e-9) deg = 0.0;  // -0 and rounding just below 0 mean the same axis
    return deg;
}

double SurveyPlan::surveyHeadingDeg() const {
    if (survey_heading_deg) return std::fmod(*survey_heading_deg, 180.0);
    return meanLineAxisDeg(lines).value_or(0.0);
}

MultiPolygon parseAreaGeoJson(std::string_view text, const std::string& name,
                              const LonLatToGrid& to_grid) {
    const json doc = parseJson(text, name);
    MultiPolygon mp;
    for (const auto& [label, g] : geometries(doc, name)) {
        const std::string type = geometryType(*g);
        if (!g->contains("coordinates")) {
            throw PlanError(fmt::format("{}: {}: geometry has no coordinates", name, label));
        }
        const json& coords = (*g)["coordinates"];
        MultiPolygon part;
        if (type == "Polygon") {
            part.push_back(polygon(coords, name, label, to_grid));
        } else if (type == "MultiPolygon") {
            if (!coords.is_array()) {
                throw PlanError(fmt::format("{}: {}: MultiPolygon coordinates must be an array",
                                            name, label));
            }
            for (std::size_t i = 0; i < coords.size(); ++i) {
                part.push_back(polygon(coords[i], name, fmt::format("{} polygon {}", label, i), to_grid));
            }
        } else {
            throw PlanError(fmt::format("{}: {}: the area must be a Polygon or MultiPolygon, found "
                                        "'{}'",
                                        name, label, type));
        }
        checkPolygons(part, name, label);
        mp.insert(mp.end(), part.begin(), part.end());
    }
    if (mp.empty()) throw PlanError(fmt::format("{}: no polygon in the area file", name));
    checkPolygons(mp, name, "area (all features together)");
    return mp;
}

MultiPolygon parseAreaCsv(std::string_view text, const std::string& name) {
    auto recs = csvRecords(text);
    std::size_t ce = 0, cn = 1;
    if (!recs.empty() && !toNumber(recs.front().fields[0])) {
        const auto& h = recs.front().fields;
        ce = cn = h.size();
        for (std::size_t i = 0; i < h.size(); ++i) {
            const std::string k = lower(h[i]);
            if (k == "e" || k == "e_m" || k == "easting" || k == "x") ce = i;
            if (k == "n" || k == "n_m" || k == "northing" || k == "y") cn = i;
        }
        if (ce == h.size() || cn == h.size()) {
            throw PlanError(fmt::format("{}:{}: header must name the columns e and n (easting, "
                                        "northing in the survey CRS)",
                                        name, recs.front().line_no));
        }
        recs.erase(recs.begin());
    }
    Ring r;
    for (const auto& rec : recs) {
        r.push_back({csvNumber(rec, ce, name, "e"), csvNumber(rec, cn, name, "n")});
    }
    if (r.size() >= 2 && r.front().e_m == r.back().e_m && r.front().n_m == r.back().n_m) r.pop_back();
    if (r.size() < 3) {
        throw PlanError(fmt::format("{}: the area needs at least 3 distinct vertices, found {}",
                                    name, r.size()));
    }
    if (signedArea(r) < 0.0) std::reverse(r.begin(), r.end());
    MultiPolygon mp{Polygon{r, {}}};
    checkPolygons(mp, name, "area polygon");
    return mp;
}

std::vector<PlanLine> parseLinesGeoJson(std::string_view text, const std::string& name,
                                        const LonLatToGrid& to_grid) {
    const json doc = parseJson(text, name);
    std::vector<PlanLine> lines;
    const json* feats = nullptr;
    if (doc.is_object() && doc.value("type", "") == "FeatureCollection" && doc.contains("features")) {
        feats = &doc["features"];
    }
    const auto geoms = geometries(doc, name);
    for (std::size_t i = 0; i < geoms.size(); ++i) {
        const auto& [label, g] = geoms[i];
        const json* feature = feats != nullptr ? &(*feats)[i] : &doc;
        if (geometryType(*g) != "LineString") {
            throw PlanError(fmt::format("{}: {}: a planned line must be a LineString, found '{}'",
                                        name, label, geometryType(*g)));
        }
        PlanLine l;
        if (feature->contains("properties") && (*feature)["properties"].is_object() &&
            (*feature)["properties"].contains("name")) {
            const json& n = (*feature)["properties"]["name"];
            if (n.is_string()) l.name = n.get<std::string>();
            if (n.is_number_integer()) l.name = std::to_string(n.get<long long>());
        }
        if (l.name.empty()) {
            throw PlanError(fmt::format("{}: {}: the line has no 'name' property", name, label));
        }
        const json& coords = g->contains("coordinates") ? (*g)["coordinates"] : json();
        if (!coords.is_array() || coords.size() < 2) {
            throw PlanError(fmt::format("{}: {}: a LineString needs at least 2 positions", name, label));
        }
        std::vector<Point> pts;
        for (std::size_t k = 0; k < coords.size(); ++k) {
            pts.push_back(position(coords[k], name, fmt::format("{} position {}", label, k), to_grid));
        }
        l.start = pts.front();
        l.end = pts.back();
        checkLine(l, name, label);
        // Planned lines are straight: interior vertices must lie on the chord (0.5 m).
        const double len = l.length_m();
        for (std::size_t k = 1; k + 1 < pts.size(); ++k) {
            const double off = std::abs((pts[k].e_m - l.start.e_m) * (l.end.n_m - l.start.n_m) -
                                        (pts[k].n_m - l.start.n_m) * (l.end.e_m - l.start.e_m)) / len;
            if (off > 0.5) {
                throw PlanError(fmt::format("{}: {}: line '{}' is not straight (vertex {} is {:.1f} m "
                                            "off the chord); split it into straight lines",
                                            name, label, l.name, k, off));
            }
        }
        lines.push_back(std::move(l));
    }
    checkUniqueNames(lines, name);
    return lines;
}

std::vector<PlanLine> parseLinesCsv(std::string_view text, const std::string& name) {
    auto recs = csvRecords(text);
    std::array<std::size_t, 5> col{0, 1, 2, 3, 4};
    static const char* kCols[] = {"name", "start_e", "start_n", "end_e", "end_n"};
    if (!recs.empty() && recs.front().fields.size() >= 2 && !toNumber(recs.front().fields[1])) {
        const auto& h = recs.front().fields;
        for (std::size_t c = 0; c < 5; ++c) {
            col[c] = h.size();
            for (std::size_t i = 0; i < h.size(); ++i) {
                if (lower(h[i]) == kCols[c]) col[c] = i;
            }
            if (col[c] == h.size()) {
                throw PlanError(fmt::format("{}:{}: header has no column '{}' (expected name, "
                                            "start_e, start_n, end_e, end_n)",
                                            name, recs.front().line_no, kCols[c]));
            }
        }
        recs.erase(recs.begin());
    }
    std::vector<PlanLine> lines;
    for (const auto& rec : recs) {
        PlanLine l;
        if (col[0] >= rec.fields.size() || rec.fields[col[0]].empty()) {
            throw PlanError(fmt::format("{}:{}: the line has no name", name, rec.line_no));
        }
        l.name = rec.fields[col[0]];
        l.start = {csvNumber(rec, col[1], name, "start_e"), csvNumber(rec, col[2], name, "start_n")};
        l.end = {csvNumber(rec, col[3], name, "end_e"), csvNumber(rec, col[4], name, "end_n")};
        checkLine(l, name, fmt::format("line {}", rec.line_no));
        lines.push_back(std::move(l));
    }
    checkUniqueNames(lines, name);
    return lines;
}

MultiPolygon loadArea(const std::string& path, const LonLatToGrid& to_grid) {
    const std::string ext = extension(path);
    if (ext == ".geojson" || ext == ".json") return parseAreaGeoJson(readFile(path), path, to_grid);
    if (ext == ".csv") return parseAreaCsv(readFile(path), path);
    throw PlanError(fmt::format("{}: unknown plan file type '{}' (use .geojson, .json or .csv)", path, ext));
}

std::vector<PlanLine> loadLines(const std::string& path, const LonLatToGrid& to_grid) {
    const std::string ext = extension(path);
    if (ext == ".geojson" || ext == ".json") return parseLinesGeoJson(readFile(path), path, to_grid);
    if (ext == ".csv") return parseLinesCsv(readFile(path), path);
    throw PlanError(fmt::format("{}: unknown plan file type '{}' (use .geojson, .json or .csv)", path, ext));
}

void checkLinesAgainstArea(const MultiPolygon& area, const std::vector<PlanLine>& lines,
                           const std::string& lines_file) {
    for (std::size_t i = 0; i < lines.size(); ++i) {
        if (!segmentTouchesArea(area, lines[i].start, lines[i].end)) {
            throw PlanError(fmt::format("{}: line {} ('{}') lies entirely outside the survey area",
                                        lines_file, i, lines[i].name));
        }
    }
}

SurveyPlan loadPlan(const config::Section& plan, const LonLatToGrid& to_grid) {
    plan.allowOnly({"area", "lines", "line_spacing_m", "planned_altitude_m", "survey_heading_deg"});
    const std::filesystem::path dir = std::filesystem::path(plan.file()).parent_path();
    auto resolve = [&](const std::string& p) {
        const std::filesystem::path fp(p);
        return (fp.is_absolute() ? fp : dir / fp).lexically_normal().string();
    };
    SurveyPlan sp;
    sp.line_spacing_m = plan.number("line_spacing_m", 0.1, 10000.0);
    sp.planned_altitude_m = plan.number("planned_altitude_m", 0.1, 5000.0);
    sp.survey_heading_deg = plan.optionalNumber("survey_heading_deg", 0.0, 360.0);
    sp.area_file = resolve(plan.string("area"));
    sp.area = loadArea(sp.area_file, to_grid);
    if (auto lines = plan.optionalString("lines")) {
        sp.lines_file = resolve(*lines);
        sp.lines = loadLines(sp.lines_file, to_grid);
        checkLinesAgainstArea(sp.area, sp.lines, sp.lines_file);
    }
    return sp;
}

}  // namespace sg::coverage
