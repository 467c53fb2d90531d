// Picks and verification passes of a session summary in JSON; see session_picks.hpp.
#include "site/session_picks.hpp"

namespace sg::site {

namespace {

using nlohmann::json;

json opt(const std::optional<double>& v) { return v ? json(*v) : json(nullptr); }
std::optional<double> getOpt(const json& j) {
    return j.is_null() ? std::nullopt : std::optional<double>(j.get<double>());
}

json fitJson(const detect::DipoleFit& f) {
    return {{"e", f.easting_m}, {"n", f.northing_m}, {"burial_m", f.burial_m}, {"moment_Am2", f.moment_Am2},
            {"moment_grid_Am2", {f.moment_grid_Am2.x, f.moment_grid_Am2.y, f.moment_grid_Am2.z}},
            {"angle_to_field_deg", f.angle_to_field_deg},
            {"model", f.model == detect::MomentModel::Free ? "free" : "induced"},
            {"r2", f.r2}, {"rms_nT", f.rms_nT}, {"iterations", f.iterations}};
}
detect::DipoleFit fitFrom(const json& j) {
    detect::DipoleFit f;
    f.easting_m = j.at("e");
    f.northing_m = j.at("n");
    f.burial_m = j.at("burial_m");
    f.moment_Am2 = j.at("moment_Am2");
    f.moment_grid_Am2 = {j.at("moment_grid_Am2").at(0), j.at("moment_grid_Am2").at(1), j.at("moment_grid_Am2").at(2)};
    f.angle_to_field_deg = j.at("angle_to_field_deg");
    f.model = j.at("model") == "free" ? detect::MomentModel::Free : detect::MomentModel::Induced;
    f.r2 = j.at("r2");
    f.rms_nT = j.at("rms_nT");
    f.iterations = j.at("iterations");
    return f;
}

json observationJson(const detect::PickObservation& o) {
    return {{"run", o.run}, {"t_ns", o.t_ns}, {"peak_nT", o.peak_nT}, {"snr", o.snr}, {"width_m", o.width_m},
            {"altitude_m", o.altitude_m}, {"sensors", o.sensors}, {"fit", o.fit ? fitJson(*o.fit) : json(nullptr)},
            {"e", o.easting_m}, {"n", o.northing_m}};
}
detect::PickObservation observationFrom(const json& j) {
    detect::PickObservation o;
    o.run = j.at("run");
    o.t_ns = j.at("t_ns");
    o.peak_nT = j.at("peak_nT");
    o.snr = j.at("snr");
    o.width_m = j.at("width_m");
    o.altitude_m = j.at("altitude_m");
    o.sensors = j.at("sensors").get<std::vector<int>>();
    if (!j.at("fit").is_null()) o.fit = fitFrom(j.at("fit"));
    o.easting_m = j.at("e");
    o.northing_m = j.at("n");
    return o;
}

}  // namespace

json picksToJson(const std::vector<detect::AnomalyPick>& picks) {
    json out = json::array();
    for (const auto& k : picks) {
        json obs = json::array();
        for (const auto& o : k.observations) obs.push_back(observationJson(o));
        out.push_back({{"id", k.id}, {"e", k.easting_m}, {"n", k.northing_m}, {"peak_nT", k.peak_nT},
                       {"width_m", k.width_m}, {"altitude_m", k.altitude_m}, {"burial_m", opt(k.burial_m)},
                       {"depth_below_sensor_m", opt(k.depth_below_sensor_m)}, {"moment_Am2", opt(k.moment_Am2)},
                       {"angle_to_field_deg", opt(k.angle_to_field_deg)}, {"moment_model", k.moment_model},
                       {"mass_rule_kg", opt(k.mass_rule_kg)}, {"fit_r2", k.fit_r2}, {"snr", k.snr},
                       {"quality", k.quality}, {"runs", k.runs}, {"sensors", k.sensors},
                       {"first_t_ns", k.first_t_ns}, {"observations", std::move(obs)}});
    }
    return out;
}

std::vector<detect::AnomalyPick> picksFromJson(const json& j) {
    std::vector<detect::AnomalyPick> out;
    for (const auto& x : j) {
        detect::AnomalyPick k;
        k.id = x.at("id");
        k.easting_m = x.at("e");
        k.northing_m = x.at("n");
        k.peak_nT = x.at("peak_nT");
        k.width_m = x.at("width_m");
        k.altitude_m = x.at("altitude_m");
        k.burial_m = getOpt(x.at("burial_m"));
        k.depth_below_sensor_m = getOpt(x.at("depth_below_sensor_m"));
        k.moment_Am2 = getOpt(x.at("moment_Am2"));
        k.angle_to_field_deg = getOpt(x.at("angle_to_field_deg"));
        k.moment_model = x.at("moment_model");
        k.mass_rule_kg = getOpt(x.at("mass_rule_kg"));
        k.fit_r2 = x.at("fit_r2");
        k.snr = x.at("snr");
        k.quality = x.at("quality");
        k.runs = x.at("runs").get<std::vector<int>>();
        k.sensors = x.at("sensors").get<std::vector<int>>();
        k.first_t_ns = x.at("first_t_ns");
        for (const auto& o : x.at("observations")) k.observations.push_back(observationFrom(o));
        k.sessions = {0};
        out.push_back(std::move(k));
    }
    return out;
}

json passesToJson(const std::vector<detect::VerificationPass>& passes) {
    json out = json::array();
    for (const auto& p : passes)
        out.push_back({{"item", p.item}, {"class", p.target_class}, {"run", p.run}, {"sensor", p.sensor_slot},
                       {"t_ns", p.t_ns}, {"offset_m", p.offset_m}, {"altitude_m", p.altitude_m},
                       {"vertical_m", p.vertical_m}, {"heading_true_deg", p.heading_true_deg},
                       {"threshold_nT", p.threshold_nT}, {"predicted_nT", p.predicted_nT},
                       {"measured_nT", p.measured_nT}, {"ratio", p.ratio},
                       {"predicted_detected", p.predicted_detected}, {"detected", p.detected}, {"line", p.line},
                       {"on_named_line", p.on_named_line}});
    return out;
}

std::vector<detect::VerificationPass> passesFromJson(const json& j) {
    std::vector<detect::VerificationPass> out;
    for (const auto& x : j) {
        detect::VerificationPass p;
        p.item = x.at("item");
        p.target_class = x.at("class");
        p.run = x.at("run");
        p.sensor_slot = x.at("sensor");
        p.t_ns = x.at("t_ns");
        p.offset_m = x.at("offset_m");
        p.altitude_m = x.at("altitude_m");
        p.vertical_m = x.at("vertical_m");
        p.heading_true_deg = x.at("heading_true_deg");
        p.threshold_nT = x.at("threshold_nT");
        p.predicted_nT = x.at("predicted_nT");
        p.measured_nT = x.at("measured_nT");
        p.ratio = x.at("ratio");
        p.predicted_detected = x.at("predicted_detected");
        p.detected = x.at("detected");
        p.line = x.at("line");
        p.on_named_line = x.at("on_named_line");
        out.push_back(std::move(p));
    }
    return out;
}

}  // namespace sg::site
