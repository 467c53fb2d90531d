// The end-of-site report: everything the party chief signs off on, written into one folder from
// the ONE survey summary (engine::summarise, the same numbers `swathguard gaps --json` prints):
//   report.pdf          a few pages: site and plan, headline figures, cautions and sign-off, the
//                       coverage map, gap details, per-line tables, alarms, gaps and infill,
//                       line profiles (report/pick_plots.hpp), data outages, the detection model
//                       and its assumptions, anomaly picks (table, verification, picks map)
//   coverage_map.png    the overview map; gap_G<id>.png one detail map per significant gap
//   coverage_margin.tif the margin raster as a GeoTIFF in the survey CRS (see geotiff.hpp)
//   summary.json        the summary itself (identical to `gaps --json`)
//   lines.csv runs.csv alarms.csv outages.csv gaps.csv infill.csv, and the GeoJSON/GPX exports
#pragma once

#include <functional>
#include <string>
#include <vector>

#include "engine/survey_engine.hpp"
#include "engine/survey_summary.hpp"
#include "report/geotiff.hpp"

namespace sg::report {

// Called as each part starts: a short name and the fraction of the report done (0..1).
using Progress = std::function<void(const std::string& step, double fraction)>;

struct ReportResult {
    std::vector<std::string> files;  // every file written
    int pdf_pages = 0;
    GeoTiffInfo geotiff;
};

// Detail maps are drawn for at most this many significant gaps (largest first); the rest are in
// the tables and the overview map.
inline constexpr std::size_t kMaxGapMaps = 24;

ReportResult writeSiteReport(const engine::SurveySummary& summary, const engine::SurveyEngine& engine,
                             const std::string& dir, const Progress& progress = {});

// Tables as CSV text (RFC 4180 quoting), one row per item, header first.
std::string linesCsv(const engine::SurveySummary& s);
std::string runsCsv(const engine::SurveySummary& s);
std::string alarmsCsv(const engine::SurveySummary& s);
std::string outagesCsv(const engine::SurveySummary& s);

// "2026-12-02 04:05:06" (UTC) and "04:05:06".
std::string utcDateTime(TimeNs t);
std::string utcClock(TimeNs t);

}  // namespace sg::report
