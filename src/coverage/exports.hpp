// Exports of gaps and infill lines: GeoJSON (RFC 7946: WGS84 longitude, latitude; exterior rings
// counter-clockwise, holes clockwise; no `crs` member), GPX 1.1 routes (one <rte> per infill
// line) and CSV in the survey CRS (the infill CSV has the planned-lines CSV columns first, so it
// loads back as a plan).
#pragma once

#include <string>

#include "coverage/gaps.hpp"
#include "coverage/infill.hpp"
#include "coverage/survey_plan.hpp"

namespace sg::coverage {

// FeatureCollection of gap outlines (Polygon or MultiPolygon), properties: id, area_m2,
// along_length_m, width_m, across_width_m, centroid_e, centroid_n, small.
std::string gapsGeoJson(const GapReport& report, const GridToLonLat& to_lonlat);
// FeatureCollection of infill LineStrings, properties: name, rank, length_m, area_closed_m2,
// area_per_km, gap_ids, closes_ids.
std::string infillGeoJson(const InfillPlan& plan, const GridToLonLat& to_lonlat);
// GPX 1.1: one <rte> per infill line (name, desc, start and end <rtept>).
std::string infillGpx(const InfillPlan& plan, const GridToLonLat& to_lonlat);
// name,start_e,start_n,end_e,end_n,length_m,area_closed_m2,rank,gap_ids ("1;4").
std::string infillCsv(const InfillPlan& plan);
// id,kind,area_m2,centroid_e,centroid_n,min_e,min_n,max_e,max_n,along_length_m,width_m,across_width_m
std::string gapsCsv(const GapReport& report);

// Writes text to a file; throws std::runtime_error naming the file on failure.
void writeTextFile(const std::string& path, const std::string& text);
// One CSV field (RFC 4180): quoted when it holds a comma, quote or line break, quotes doubled.
std::string csvField(const std::string& s);

}  // namespace sg::coverage
