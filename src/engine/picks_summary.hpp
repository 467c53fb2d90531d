// The pick list and the verification strip at the end of a survey (or now), for `gaps --json`,
// `swathguard picks`, the report and the exports: GeoJSON (RFC 7946: WGS 84 longitude, latitude,
// no `crs` member) and CSV in the survey CRS. Every figure comes from SurveyEngine::picksNow(), so
// the outputs cannot disagree.
#pragma once

#include <string>
#include <vector>

#include <nlohmann/json.hpp>

#include "detect/anomaly_picker.hpp"
#include "detect/verification_strip.hpp"

namespace sg::engine {

class SurveyEngine;

// The caution printed with every pick list (docs/picks.md).
inline constexpr const char* kPicksCaution =
    "a pick list is not a clearance; the project's risk assessment, local regulations and licensed "
    "specialists decide";
// The method in words (docs/picks.md names the sources).
inline constexpr const char* kPicksMethod =
    "running-median trend removed per sensor; peaks over the live threshold; least-squares point-dipole "
    "fit of each pass (Blakely 1995 dipole; position by Levenberg-Marquardt, moment by linear least "
    "squares as in Billings 2004); passes merged within a distance gate";

struct PicksSummary {
    bool enabled = false;
    detect::PickSettings settings;
    std::vector<detect::AnomalyPick> picks;
    std::vector<double> lon_deg, lat_deg;  // per pick (empty without a CRS)
    std::uint64_t peaks = 0;               // single-sensor peaks found
    detect::VerificationResult verification;
    std::vector<std::string> run_lines;    // plan line name of each run id ("" off plan)
    // Log file name of each session (by SessionInfo::index; one entry for one log alone): the
    // `logs` of each pick (docs/picks.md "A site").
    std::vector<std::string> session_logs;
};

PicksSummary summarisePicks(const SurveyEngine& engine);
nlohmann::json toJson(const PicksSummary& p);
// Passes (predicted and measured peaks) and the verdict per class.
nlohmann::json verificationJson(const PicksSummary& p);
// id,easting_m,northing_m,lon_deg,lat_deg,peak_nT,width_m,altitude_m,burial_m,depth_below_sensor_m,
// moment_Am2,angle_to_field_deg,moment_model,mass_rule_kg,fit_r2,snr,quality,runs,sensors,sessions,logs
std::string picksCsv(const PicksSummary& p);
// FeatureCollection of Points with the same properties.
std::string picksGeoJson(const PicksSummary& p);
// item,class,run,sensor,offset_m,altitude_m,vertical_m,heading_true_deg,threshold_nT,
// predicted_nT,measured_nT,ratio,predicted_detected,detected
std::string verificationCsv(const PicksSummary& p);

}  // namespace sg::engine
