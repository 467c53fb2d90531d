// `swathguard swath`: the planning aid. For each target class of a survey configuration, the
// detection range, the left/right detectable half-widths of the array at a planned altitude and
// line heading, the line spacing that keeps adjacent swaths overlapping, and the highest altitude
// at which the configured spacing still overlaps. Every number comes from the direct solve (root
// finding on the model's anomaly, no interpolation table); the live path's table half-widths are
// shown beside it in the JSON. A model's estimate: see docs/detection-model.md.
#include <cmath>
#include <cstdio>
#include <optional>
#include <stdexcept>
#include <string>
#include <vector>

#include <CLI/CLI.hpp>
#include <fmt/format.h>
#include <nlohmann/json.hpp>

#include "app/commands.hpp"
#include "common/config_section.hpp"
#include "detect/fourth_difference_noise.hpp"
#include "detect/swath_plan.hpp"
#include "detect/target_model.hpp"
#include "nav/nav_config.hpp"

namespace sg::app {

namespace {

struct SwathOptions {
    std::string config;
    double altitude_m = 3.0;
    double noise_nT = 0.0;
    double heading_deg = 0.0;
    std::optional<double> spacing_m;
    bool json = false;
};

const char* note(const detect::ArraySwath& s) {
    if (s.contiguous) return "";
    if (s.port_m == 0.0 && s.starboard_m == 0.0) return "  (not detectable at this altitude)";
    return "  (array swath has holes)";
}

std::string fmtOpt(const std::optional<double>& v) {
    return v ? fmt::format("{:.2f}", *v) : std::string("none");
}

int runSwath(const SwathOptions& o) {
    const toml::table root_table = config::parseFile(o.config);
    const config::Section root(root_table, o.config);
    const detect::DetectionConfig det = detect::parseDetectionConfig(root);
    const nav::NavConfig nav = nav::parseVesselConfig(root);

    std::optional<double> spacing = o.spacing_m;
    if (!spacing) {
        // [plan] belongs to the planner: read only the key used here, leave the rest to it.
        if (auto plan = root.optionalTable("plan")) {
            spacing = plan->optionalNumber("line_spacing_m", 0.01, 10000.0);
        }
    }
    if (!spacing) {
        throw std::invalid_argument(
            "no line spacing: give --spacing or set [plan] line_spacing_m in " + o.config);
    }
    const double threshold =
        detect::detectionThreshold_nT(det.detection.min_anomaly_nT, det.detection.k, o.noise_nT);
    if (!(threshold > 0.0)) {
        throw std::invalid_argument(
            "the detection threshold is 0: give --noise or a positive [detection] min_anomaly_nT");
    }
    std::vector<double> cross;
    for (const nav::SensorOffset& s : nav.sensors) cross.push_back(s.cross_m);
    const double heading_rad = o.heading_deg * detect::kPi / 180.0;

    const auto models = detect::makeModels(det);
    std::vector<detect::ClassPlan> plans;
    for (const detect::TargetModel& m : models) {
        plans.push_back(detect::planClass(m, cross, o.altitude_m, heading_rad, threshold, *spacing,
                                          detect::Evaluation::Direct));
    }

    if (o.json) {
        nlohmann::json j;
        j["config"] = o.config;
        j["altitude_m"] = o.altitude_m;
        j["heading_true_deg"] = o.heading_deg;
        j["noise_nT"] = o.noise_nT;
        j["threshold_nT"] = threshold;
        j["line_spacing_m"] = *spacing;
        j["sensor_cross_m"] = cross;
        j["evaluation"] = "direct";
        if (detect::usesAmbientField(det))
            j["field"] = {{"inclination_deg", det.field.inclination_deg},
                          {"declination_deg", det.field.declination_deg},
                          {"intensity_nT", det.field.intensity_nT}};
        else
            j["field"] = detect::kNoFieldNeeded;
        j["classes"] = nlohmann::json::array();
        for (std::size_t i = 0; i < plans.size(); ++i) {
            const auto& p = plans[i];
            const auto& c = models[i].targetClass();
            nlohmann::json e;
            e["name"] = p.name;
            e["model"] = detect::modelName(c.model);
            if (c.model != detect::ModelKind::MassRule) {
                e["orientation"] = detect::orientationName(c.orientation);
                e["orientation_rule"] = detect::orientationRule(c);
                if (c.orientation == detect::Orientation::InducedRemanent) {
                    e["remanence_ratio"] = c.remanence_ratio;
                }
                e["moment_Am2"] = models[i].moment_Am2();
            }
            // What the live path's tables give for the same geometry (their error is bounded
            // against this direct solve, docs/detection-model.md).
            const detect::ArraySwath live = detect::arraySwathAt(
                models[i], cross, o.altitude_m, heading_rad, threshold, detect::Evaluation::Table);
            e["live_table"] = {{"port_m", live.port_m}, {"starboard_m", live.starboard_m}};
            e["burial_m"] = c.burial_m;
            e["detection_range_m"] = p.detection_range_m;
            e["max_altitude_m"] = p.max_altitude_m;
            e["port_m"] = p.swath.port_m;
            e["starboard_m"] = p.swath.starboard_m;
            e["swath_contiguous"] = p.swath.contiguous;
            e["centre_margin"] = p.centre_margin;
            e["spacing_needed_m"] = p.spacing_needed_m;
            e["max_altitude_for_spacing_m"] =
                p.max_altitude_for_spacing_m ? nlohmann::json(*p.max_altitude_for_spacing_m)
                                             : nlohmann::json(nullptr);
            j["classes"].push_back(e);
        }
        std::printf("%s\n", j.dump(2).c_str());
        return 0;
    }

    std::printf("%s", fmt::format("swath plan for {}\n", o.config).c_str());
    if (detect::usesAmbientField(det))
        std::printf("%s", fmt::format("  field: inclination {:.1f} deg, declination {:.1f} deg, {:.0f} nT\n",
                                      det.field.inclination_deg, det.field.declination_deg,
                                      det.field.intensity_nT).c_str());
    else
        std::printf("  field: %s\n", detect::kNoFieldNeeded);
    std::printf("%s", fmt::format("  line heading {:.1f} deg true, sensor altitude {:.2f} m, noise {:.3f} nT,"
                                  " threshold {:.3f} nT, {} sensor(s), line spacing {:.2f} m\n\n",
                                  o.heading_deg, o.altitude_m, o.noise_nT, threshold, cross.size(),
                                  *spacing).c_str());
    std::printf("%s", fmt::format("{:<18} {:<9} {:<16} {:>8} {:>8} {:>8} {:>8} {:>8} {:>9} {:>10}\n", "class",
                                  "model", "orient", "range_m", "maxalt_m", "port_m", "stbd_m",
                                  "margin", "spacing_m", "alt@spc_m").c_str());
    for (std::size_t i = 0; i < plans.size(); ++i) {
        const auto& p = plans[i];
        const auto& c = models[i].targetClass();
        const std::string orient =
            c.model == detect::ModelKind::MassRule ? "-" : detect::orientationName(c.orientation);
        std::printf("%s", fmt::format("{:<18} {:<9} {:<16} {:>8.2f} {:>8.2f} {:>8.2f} {:>8.2f} {:>8.2f} {:>9.2f} "
                                      "{:>10}{}\n",
                                      p.name.substr(0, 18), detect::modelName(c.model), orient,
                                      p.detection_range_m, p.max_altitude_m, p.swath.port_m,
                                      p.swath.starboard_m, p.centre_margin, p.spacing_needed_m,
                                      fmtOpt(p.max_altitude_for_spacing_m),
                                      note(p.swath)).c_str());
    }
    std::printf("\n  orientation rule in force (dipole and sphere classes):\n");
    for (const detect::TargetModel& m : models) {
        const std::string rule = detect::orientationRule(m.targetClass());
        if (!rule.empty()) {
            std::printf("%s", fmt::format("    {}: {}\n", m.targetClass().name, rule).c_str());
        }
    }
    std::printf("\n  All values by direct solve of the model (no lookup table).\n"
                "  range_m: largest sensor-to-target vertical distance; maxalt_m: range minus burial;\n"
                "  port_m/stbd_m: array half-widths at this altitude and heading; margin: peak/threshold\n"
                "  on the line; spacing_m: widest spacing with no gap whichever way the next line runs;\n"
                "  alt@spc_m: highest altitude at which lines at the given spacing still overlap.\n"
                "  Coverage is a model's estimate. UXO clearance follows local regulations and licensed\n"
                "  specialists.\n");
    return 0;
}

}  // namespace

void addSwathCommand(CLI::App& app) {
    auto opts = std::make_shared<SwathOptions>();
    CLI::App* cmd = app.add_subcommand(
        "swath", "Detection range, half-widths, line spacing and maximum altitude per target class");
    cmd->add_option("--config", opts->config, "Survey configuration (TOML)")->required();
    cmd->add_option("--altitude", opts->altitude_m, "Sensor altitude above the seabed (m)")
        ->check(CLI::Range(0.01, 10000.0))
        ->capture_default_str();
    cmd->add_option("--noise", opts->noise_nT, "Noise standard deviation (nT)")
        ->check(CLI::Range(0.0, 1e6))
        ->capture_default_str();
    cmd->add_option("--heading", opts->heading_deg, "Line heading (degrees from true north)")
        ->check(CLI::Range(-360.0, 360.0))
        ->capture_default_str();
    cmd->add_option("--spacing", opts->spacing_m,
                    "Line spacing (m); default [plan] line_spacing_m")
        ->check(CLI::Range(0.01, 10000.0));
    cmd->add_flag("--json", opts->json, "JSON output");
    cmd->callback([opts]() {
        const int rc = runSwath(*opts);
        if (rc != 0) throw CLI::RuntimeError(rc);
    });
}

}  // namespace sg::app
