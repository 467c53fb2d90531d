// Pick list and verification strip outputs; see picks_summary.hpp.
#include "engine/picks_summary.hpp"

#include <cmath>

#include <fmt/format.h>

#include "coverage/exports.hpp"
#include "engine/survey_engine.hpp"

namespace sg::engine {

namespace {

nlohmann::json opt(const std::optional<double>& v) {
    return v ? nlohmann::json(*v) : nlohmann::json(nullptr);
}
std::string optText(const std::optional<double>& v, const char* f) {
    return v ? fmt::format(fmt::runtime(f), *v) : std::string();
}
std::string joinInts(const std::vector<int>& v) {
    std::string s;
    for (int x : v) s += (s.empty() ? "" : ";") + std::to_string(x);
    return s;
}

}  // namespace

PicksSummary summarisePicks(const SurveyEngine& engine) {
    PicksSummary p;
    p.enabled = engine.picksEnabled();
    p.settings = engine.pickSettings();
    auto now = engine.picksNow();
    p.picks = std::move(now.picks);
    p.peaks = now.peaks;
    p.verification = std::move(now.verification);
    if (engine.crs() != nullptr) {
        for (const auto& k : p.picks) {
            const auto ll = engine.crs()->inverse(k.easting_m, k.northing_m);
            p.lon_deg.push_back(ll.lon_deg);
            p.lat_deg.push_back(ll.lat_deg);
        }
    }
    if (engine.lines() != nullptr) {
        const auto& lines = engine.lines()->lines();
        for (const auto& r : engine.lines()->runs())
            p.run_lines.push_back(r.line >= 0 && static_cast<std::size_t>(r.line) < lines.size()
                                      ? lines[static_cast<std::size_t>(r.line)].name
                                      : std::string());
    }
    return p;
}

// Log file names of a pick's sessions ("" when a session's log is not known).
static std::vector<std::string> logsOf(const PicksSummary& p, const detect::AnomalyPick& k) {
    std::vector<std::string> out;
    for (int s : k.sessions)
        out.push_back(s >= 0 && static_cast<std::size_t>(s) < p.session_logs.size() ? p.session_logs[static_cast<std::size_t>(s)]
                                                                                    : std::string());
    return out;
}

nlohmann::json toJson(const PicksSummary& p) {
    nlohmann::json j;
    j["enabled"] = p.enabled;
    j["method"] = kPicksMethod;
    j["caution"] = kPicksCaution;
    j["trend_window_s"] = p.settings.trend_window_s;
    j["min_samples"] = p.settings.min_samples;
    j["peaks"] = p.peaks;
    j["count"] = p.picks.size();
    auto items = nlohmann::json::array();
    for (std::size_t i = 0; i < p.picks.size(); ++i) {
        const auto& k = p.picks[i];
        nlohmann::json o = {{"id", k.id},
                            {"easting_m", k.easting_m},
                            {"northing_m", k.northing_m},
                            {"peak_nT", k.peak_nT},
                            {"width_m", k.width_m},
                            {"altitude_m", k.altitude_m},
                            {"burial_m", opt(k.burial_m)},
                            {"depth_below_sensor_m", opt(k.depth_below_sensor_m)},
                            {"moment_Am2", opt(k.moment_Am2)},
                            {"angle_to_field_deg", opt(k.angle_to_field_deg)},
                            {"moment_model", k.moment_model},
                            {"mass_rule_kg", opt(k.mass_rule_kg)},
                            {"fit_r2", k.fit_r2},
                            {"snr", k.snr},
                            {"quality", k.quality},
                            {"runs", k.runs},
                            {"sensors", k.sensors},
                            {"observations", k.observations.size()},
                            {"first_ns", k.first_t_ns},
                            {"sessions", k.sessions},
                            {"logs", logsOf(p, k)}};
        if (i < p.lon_deg.size()) {
            o["lon_deg"] = p.lon_deg[i];
            o["lat_deg"] = p.lat_deg[i];
        }
        items.push_back(o);
    }
    j["items"] = items;
    return j;
}

nlohmann::json verificationJson(const PicksSummary& p) {
    nlohmann::json j;
    auto passes = nlohmann::json::array();
    for (const auto& v : p.verification.passes) {
        const std::string line = v.run >= 0 && static_cast<std::size_t>(v.run) < p.run_lines.size()
                                     ? p.run_lines[static_cast<std::size_t>(v.run)]
                                     : std::string();
        passes.push_back({{"item", v.item},
                          {"class", v.target_class},
                          {"run", v.run},
                          {"line", line},
                          {"sensor", v.sensor_slot},
                          {"t_ns", v.t_ns},
                          {"offset_m", v.offset_m},
                          {"altitude_m", v.altitude_m},
                          {"vertical_m", v.vertical_m},
                          {"heading_true_deg", v.heading_true_deg},
                          {"threshold_nT", v.threshold_nT},
                          {"predicted_nT", v.predicted_nT},
                          {"measured_nT", v.measured_nT},
                          {"ratio", v.ratio},
                          {"predicted_detected", v.predicted_detected},
                          {"detected", v.detected},
                          {"on_named_line", v.on_named_line},
                          {"session", v.session}});
    }
    auto verdicts = nlohmann::json::array();
    for (const auto& v : p.verification.verdicts)
        verdicts.push_back({{"class", v.target_class},
                            {"verdict", v.verdict},
                            {"median_ratio", v.median_ratio},
                            {"passes_used", v.passes_used},
                            {"passes_detected", v.passes_detected},
                            {"correction", v.correction},
                            {"corrected_moment_Am2", opt(v.corrected_moment_Am2)},
                            {"corrected_mass_kg", opt(v.corrected_mass_kg)},
                            {"text", v.text}});
    j["passes"] = passes;
    j["verdicts"] = verdicts;
    j["unplaced_items"] = p.verification.unplaced;
    j["notes"] = p.verification.notes;
    j["tolerance"] = detect::kVerificationTolerance;
    return j;
}

std::string picksCsv(const PicksSummary& p) {
    std::string s =
        "id,easting_m,northing_m,lon_deg,lat_deg,peak_nT,width_m,altitude_m,burial_m,depth_below_sensor_m,"
        "moment_Am2,angle_to_field_deg,moment_model,mass_rule_kg,fit_r2,snr,quality,runs,sensors,sessions,logs\n";
    for (std::size_t i = 0; i < p.picks.size(); ++i) {
        const auto& k = p.picks[i];
        std::string logs;
        for (const auto& l : logsOf(p, k)) logs += (logs.empty() ? "" : " ") + l;
        s += fmt::format("{},{:.2f},{:.2f},{},{},{:.2f},{:.2f},{:.2f},{},{},{},{},{},{},{:.3f},{:.2f},{},{},{},{},{}\n", k.id,
                         k.easting_m, k.northing_m,
                         i < p.lon_deg.size() ? fmt::format("{:.8f}", p.lon_deg[i]) : "",
                         i < p.lat_deg.size() ? fmt::format("{:.8f}", p.lat_deg[i]) : "", k.peak_nT,
                         k.width_m, k.altitude_m, optText(k.burial_m, "{:.2f}"),
                         optText(k.depth_below_sensor_m, "{:.2f}"), optText(k.moment_Am2, "{:.3g}"),
                         optText(k.angle_to_field_deg, "{:.0f}"), coverage::csvField(k.moment_model),
                         optText(k.mass_rule_kg, "{:.3g}"), k.fit_r2, k.snr, k.quality, joinInts(k.runs),
                         joinInts(k.sensors), joinInts(k.sessions), coverage::csvField(logs));
    }
    return s;
}

std::string picksGeoJson(const PicksSummary& p) {
    nlohmann::json fc;
    fc["type"] = "FeatureCollection";
    auto features = nlohmann::json::array();
    const auto all = toJson(p)["items"];
    for (std::size_t i = 0; i < p.picks.size() && i < p.lon_deg.size(); ++i) {
        nlohmann::json props = all[i];
        props.erase("lon_deg");
        props.erase("lat_deg");
        props["caution"] = kPicksCaution;
        features.push_back({{"type", "Feature"},
                            {"geometry", {{"type", "Point"}, {"coordinates", {p.lon_deg[i], p.lat_deg[i]}}}},
                            {"properties", props}});
    }
    fc["features"] = features;
    return fc.dump(1) + "\n";
}

std::string verificationCsv(const PicksSummary& p) {
    std::string s =
        "item,class,run,line,sensor,offset_m,altitude_m,vertical_m,heading_true_deg,threshold_nT,predicted_nT,"
        "measured_nT,ratio,predicted_detected,detected,on_named_line\n";
    for (const auto& v : p.verification.passes) {
        const std::string line = v.run >= 0 && static_cast<std::size_t>(v.run) < p.run_lines.size()
                                     ? p.run_lines[static_cast<std::size_t>(v.run)]
                                     : std::string();
        s += fmt::format("{},{},{},{},{},{:.2f},{:.2f},{:.2f},{:.1f},{:.3f},{:.3f},{:.3f},{:.3f},{},{},{}\n",
                         coverage::csvField(v.item), coverage::csvField(v.target_class), v.run,
                         coverage::csvField(line), v.sensor_slot, v.offset_m, v.altitude_m, v.vertical_m,
                         v.heading_true_deg, v.threshold_nT, v.predicted_nT, v.measured_nT, v.ratio,
                         v.predicted_detected ? 1 : 0, v.detected ? 1 : 0, v.on_named_line ? 1 : 0);
    }
    return s;
}

}  // namespace sg::engine
