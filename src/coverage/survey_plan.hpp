// The survey plan: the area of interest (a polygon set in the survey CRS) and the planned lines,
// read from GeoJSON (RFC 7946: WGS84 longitude, latitude, converted with the survey CRS) or from
// CSV in the survey CRS, and the [plan] config keys. Every problem with a plan file throws a
// PlanError naming the file and the feature (or CSV line).
#pragma once

#include <functional>
#include <optional>
#include <stdexcept>
#include <string>
#include <string_view>
#include <vector>

#include "common/config_section.hpp"
#include "coverage/geometry.hpp"

namespace sg::nav {
class SurveyCrs;
}

namespace sg::coverage {

class PlanError : public std::runtime_error {
public:
    using std::runtime_error::runtime_error;
};

struct LonLat {
    double lon_deg = 0.0;  // -180..180
    double lat_deg = 0.0;  // -90..90
};
// Conversions between WGS84 longitude/latitude and the survey CRS (e.g. from nav::SurveyCrs).
using LonLatToGrid = std::function<Point(LonLat)>;
using GridToLonLat = std::function<LonLat(Point)>;
// The same through nav::SurveyCrs (which must outlive the returned functions).
LonLatToGrid toGridWith(const nav::SurveyCrs& crs);
GridToLonLat toLonLatWith(const nav::SurveyCrs& crs);

struct PlanLine {
    std::string name;
    Point start, end;  // survey CRS (m)
    double length_m() const;
    // Grid bearing of start -> end, degrees clockwise from grid north, 0..360.
    double bearing_deg() const;
};

struct SurveyPlan {
    MultiPolygon area;              // survey CRS, exteriors counter-clockwise, holes clockwise
    std::vector<PlanLine> lines;
    double line_spacing_m = 0.0;
    double planned_altitude_m = 0.0;
    std::optional<double> survey_heading_deg;  // configured; else derived from the lines
    std::string area_file, lines_file;

    // The main survey direction (grid bearing, 0..180 degrees: lines are flown both ways): the
    // configured heading, else the length-weighted mean axis of the planned lines (angles doubled
    // so that 10 and 190 degrees agree), else 0 when there are no lines.
    double surveyHeadingDeg() const;
};

// Mean axis of lines (degrees 0..180, length weighted, doubled-angle mean); nullopt if no lines.
std::optional<double> meanLineAxisDeg(const std::vector<PlanLine>& lines);

// Parsers. `name` is the file name used in messages.
MultiPolygon parseAreaGeoJson(std::string_view text, const std::string& name, const LonLatToGrid& to_grid);
MultiPolygon parseAreaCsv(std::string_view text, const std::string& name);
std::vector<PlanLine> parseLinesGeoJson(std::string_view text, const std::string& name,
                                        const LonLatToGrid& to_grid);
std::vector<PlanLine> parseLinesCsv(std::string_view text, const std::string& name);

// By extension: .geojson / .json -> GeoJSON, .csv -> CSV; anything else is a PlanError.
MultiPolygon loadArea(const std::string& path, const LonLatToGrid& to_grid);
std::vector<PlanLine> loadLines(const std::string& path, const LonLatToGrid& to_grid);

// Checks that lines and area agree: every line must touch the area.
void checkLinesAgainstArea(const MultiPolygon& area, const std::vector<PlanLine>& lines,
                           const std::string& lines_file);

// Reads the [plan] table: area = "path", lines = "path" (optional), line_spacing_m (0.1..10000),
// planned_altitude_m (0.1..5000), survey_heading_deg (optional, 0..360). Paths are relative to
// the directory of the config file (`plan.file()`).
SurveyPlan loadPlan(const config::Section& plan, const LonLatToGrid& to_grid);

}  // namespace sg::coverage
