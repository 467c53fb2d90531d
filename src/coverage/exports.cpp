// GeoJSON, GPX 1.1 and CSV exports of gaps and infill lines; see exports.hpp.
#include "coverage/exports.hpp"

#include <cmath>
#include <fstream>
#include <stdexcept>

#include <fmt/format.h>
#include <nlohmann/json.hpp>

namespace sg::coverage {

using nlohmann::json;

namespace {

// Rounds to 1e-8 degree (about 1 mm), enough for a survey and RFC 7946 section 11.2's advice.
double round8(double v) { return std::round(v * 1e8) / 1e8; }

json position(const GridToLonLat& f, Point p) {
    const LonLat ll = f(p);
    return json::array({round8(ll.lon_deg), round8(ll.lat_deg)});
}

json ringJson(const GridToLonLat& f, const Ring& r) {
    json a = json::array();
    for (const Point& p : r) a.push_back(position(f, p));
    a.push_back(position(f, r.front()));  // RFC 7946 3.1.6: first and last positions equal
    return a;
}

std::string joinIds(const std::vector<int>& ids, char sep) {
    std::string s;
    for (std::size_t i = 0; i < ids.size(); ++i) {
        if (i) s += sep;
        s += std::to_string(ids[i]);
    }
    return s;
}

std::string xmlEscape(const std::string& s) {
    std::string o;
    for (char c : s) {
        switch (c) {
        case '&': o += "&amp;"; break;
        case '<': o += "&lt;"; break;
        case '>': o += "&gt;"; break;
        case '"': o += "&quot;"; break;
        case '\'': o += "&apos;"; break;
        default: o += c;
        }
    }
    return o;
}

}  // namespace

std::string csvField(const std::string& s) {
    if (s.find_first_of(",\"\n\r") == std::string::npos) return s;
    std::string o = "\"";
    for (char c : s) {
        if (c == '"') o += '"';
        o += c;
    }
    return o + "\"";
}

std::string gapsGeoJson(const GapReport& report, const GridToLonLat& to_lonlat) {
    json fc = {{"type", "FeatureCollection"}, {"features", json::array()}};
    const std::vector<MultiPolygon> outlines = gapOutlines(report);
    for (std::size_t g = 0; g < report.gaps.size(); ++g) {
        const Gap& gap = report.gaps[g];
        const MultiPolygon& outline = outlines[g];
        json polys = json::array();
        for (const auto& poly : outline) {
            json rings = json::array({ringJson(to_lonlat, poly.exterior)});
            for (const auto& h : poly.holes) rings.push_back(ringJson(to_lonlat, h));
            polys.push_back(rings);
        }
        json geom = polys.size() == 1
                        ? json{{"type", "Polygon"}, {"coordinates", polys[0]}}
                        : json{{"type", "MultiPolygon"}, {"coordinates", polys}};
        fc["features"].push_back(
            {{"type", "Feature"},
             {"geometry", geom},
             {"properties",
              {{"id", gap.id},
               {"name", "G" + std::to_string(gap.id)},
               {"kind", gap.small ? "small" : "gap"},
               {"area_m2", gap.area_m2},
               {"along_length_m", gap.along_length_m},
               {"width_m", gap.width_m},
               {"across_width_m", gap.across_width_m},
               {"centroid_e", gap.centroid.e_m},
               {"centroid_n", gap.centroid.n_m}}}});
    }
    return fc.dump(1) + "\n";
}

std::string infillGeoJson(const InfillPlan& plan, const GridToLonLat& to_lonlat) {
    json fc = {{"type", "FeatureCollection"}, {"features", json::array()}};
    for (const auto& l : plan.lines) {
        fc["features"].push_back(
            {{"type", "Feature"},
             {"geometry",
              {{"type", "LineString"},
               {"coordinates", json::array({position(to_lonlat, l.start), position(to_lonlat, l.end)})}}},
             {"properties",
              {{"name", l.name},
               {"rank", l.rank},
               {"length_m", l.length_m},
               {"area_closed_m2", l.area_closed_m2},
               {"area_per_km", l.area_per_km},
               {"gap_ids", l.gap_ids},
               {"closes_ids", l.closes_ids}}}});
    }
    return fc.dump(1) + "\n";
}

std::string infillGpx(const InfillPlan& plan, const GridToLonLat& to_lonlat) {
    std::string out =
        "<?xml version=\"1.0\" encoding=\"UTF-8\"?>\n"
        "<gpx version=\"1.1\" creator=\"swathguard\" xmlns=\"http://www.topografix.com/GPX/1/1\">\n"
        "  <metadata><name>infill lines</name><desc>Proposed infill lines (coverage model "
        "estimate)</desc></metadata>\n";
    for (const auto& l : plan.lines) {
        out += fmt::format("  <rte>\n    <name>{}</name>\n    <desc>rank {}, {:.0f} m, gaps {}</desc>\n",
                           xmlEscape(l.name), l.rank, l.length_m, joinIds(l.gap_ids, ' '));
        for (const Point& p : {l.start, l.end}) {
            const LonLat ll = to_lonlat(p);
            out += fmt::format("    <rtept lat=\"{:.8f}\" lon=\"{:.8f}\"/>\n", ll.lat_deg, ll.lon_deg);
        }
        out += "  </rte>\n";
    }
    out += "</gpx>\n";
    return out;
}

std::string infillCsv(const InfillPlan& plan) {
    std::string out = "name,start_e,start_n,end_e,end_n,length_m,area_closed_m2,rank,gap_ids\n";
    for (const auto& l : plan.lines) {
        out += fmt::format("{},{:.3f},{:.3f},{:.3f},{:.3f},{:.3f},{:.3f},{},{}\n", csvField(l.name),
                           l.start.e_m, l.start.n_m, l.end.e_m, l.end.n_m, l.length_m,
                           l.area_closed_m2, l.rank, joinIds(l.gap_ids, ';'));
    }
    return out;
}

std::string gapsCsv(const GapReport& report) {
    std::string out =
        "id,kind,area_m2,centroid_e,centroid_n,min_e,min_n,max_e,max_n,along_length_m,width_m,"
        "across_width_m\n";
    for (const auto& g : report.gaps) {
        out += fmt::format("{},{},{:.3f},{:.3f},{:.3f},{:.3f},{:.3f},{:.3f},{:.3f},{:.3f},{:.3f},{:.3f}\n",
                           g.id, g.small ? "small" : "gap", g.area_m2, g.centroid.e_m, g.centroid.n_m,
                           g.bbox.min_e, g.bbox.min_n, g.bbox.max_e, g.bbox.max_n, g.along_length_m,
                           g.width_m, g.across_width_m);
    }
    return out;
}

void writeTextFile(const std::string& path, const std::string& text) {
    std::ofstream out(path, std::ios::binary);
    if (!out) throw std::runtime_error(fmt::format("{}: cannot open for writing", path));
    out << text;
    if (!out) throw std::runtime_error(fmt::format("{}: write failed", path));
}

}  // namespace sg::coverage
