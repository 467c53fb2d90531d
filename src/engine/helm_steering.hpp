// The helm's view of the survey: the leg being run (active line, in the direction it is flown),
// the reference position's cross-track distance and the bearings and range to the line's end,
// ready for the NMEA 0183 builders in src/helm. Also the infill plan as route waypoints.
#pragma once

#include <vector>

#include "coverage/geometry.hpp"
#include "nav/survey_crs.hpp"
#include "helm/helm_config.hpp"
#include "helm/steering_sentences.hpp"

namespace sg::engine {

class SurveyEngine;

// The leg from origin to destination (survey CRS, metres) with the reference position `pos`.
// Cross-track and along-track are planar on the survey grid (the engine's own geometry, the
// deviation the screen shows); bearings (true) and the range are geodesics on WGS84
// (GeographicLib, Karney 2013) between the points converted with `crs`.
struct LegGeometry {
    coverage::Point origin, dest, pos;
};
helm::SteeringFix steeringFixFor(const LegGeometry& leg, const nav::SurveyCrs& crs, double arrival_radius_m);

// The engine's active line as a steering fix: invalid (void) when no line is active, the CRS is
// not known yet or the reference position is missing. The line is steered in the direction the
// open run flies it (its destination is the planned end, or the start when flown reversed).
// While the crew steers to an infill line (SurveyEngine::steerTarget), that line is the leg,
// start -> end, from the moment of the choice (before the vessel reaches it).
helm::SteeringFix steeringFix(const SurveyEngine& engine, const helm::OutputConfig& output);

// Waypoints of a list of lines flown start -> end, each line's start then its end, identifiers
// from helm::lineEndId (numbered W01A, W01B, ... when two lines would share one).
struct RouteLine {
    std::string name;
    coverage::Point start, end;
};
std::vector<helm::Waypoint> routeWaypoints(const std::vector<RouteLine>& lines, const nav::SurveyCrs& crs);

}  // namespace sg::engine
