// Parser of the navigation configuration; see nav_config.hpp.
#include "nav/nav_config.hpp"

#include <set>

#include "common/config_section.hpp"

namespace sg::nav {

namespace {

std::array<double, 3> triple(const config::Section& s, std::string_view key) {
    std::array<double, 3> out{0.0, 0.0, 0.0};
    if (auto v = s.optionalNumbers(key, 3)) {
        for (std::size_t i = 0; i < 3; ++i) {
            if ((*v)[i] < -500.0 || (*v)[i] > 500.0) {
                s.fail(key, "[forward, starboard, up] in metres, each within +-500");
            }
            out[i] = (*v)[i];
        }
    }
    return out;
}

}  // namespace

NavConfig parseVesselConfig(const config::Section& root) {
    NavConfig cfg;
    if (auto v = root.optionalTable("vessel")) {
        v->allowOnly({"name", "antenna_m", "tow_point_m", "heading_source", "heading_max_age_s",
                      "cmg_min_speed_mps", "cmg_window_s", "fix_max_age_s", "extrapolation_s", "draft_m",
                      "transducer_depth_m", "sounder_max_age_s", "gnss_latency_ms",
                      "heading_latency_ms", "sounder_latency_ms"});
        VesselConfig& c = cfg.vessel;
        c.name = v->string("name", "");
        c.antenna_m = triple(*v, "antenna_m");
        c.tow_point_m = triple(*v, "tow_point_m");
        const std::string src = v->choice("heading_source", {"auto", "hdt", "cmg"}, "auto");
        c.heading_source = src == "hdt"   ? HeadingSource::Hdt
                           : src == "cmg" ? HeadingSource::Cmg
                                          : HeadingSource::Auto;
        c.heading_max_age_s = v->number("heading_max_age_s", 0.01, 60.0, c.heading_max_age_s);
        c.cmg_min_speed_mps = v->number("cmg_min_speed_mps", 0.0, 50.0, c.cmg_min_speed_mps);
        c.cmg_window_s = v->number("cmg_window_s", 0.1, 120.0, c.cmg_window_s);
        c.fix_max_age_s = v->number("fix_max_age_s", 0.01, 60.0, c.fix_max_age_s);
        c.extrapolation_s = v->number("extrapolation_s", 0.0, 60.0, c.extrapolation_s);
        if (c.extrapolation_s > c.fix_max_age_s)
            v->fail("extrapolation_s", "at most fix_max_age_s (past it a position is stale anyway)");
        c.draft_m = v->number("draft_m", 0.0, 30.0, c.draft_m);
        c.transducer_depth_m = v->number("transducer_depth_m", 0.0, 30.0, c.transducer_depth_m);
        c.sounder_max_age_s = v->number("sounder_max_age_s", 0.01, 600.0, c.sounder_max_age_s);
        c.gnss_latency_ms = v->number("gnss_latency_ms", 0.0, 10000.0, 0.0);
        c.heading_latency_ms = v->number("heading_latency_ms", 0.0, 10000.0, 0.0);
        c.sounder_latency_ms = v->number("sounder_latency_ms", 0.0, 10000.0, 0.0);
    }
    if (auto t = root.optionalTable("tow")) {
        t->allowOnly({"extra_layback_m", "cable_out_m", "sensor_depth_m", "cable_max_age_s",
                      "depth_max_age_s", "altitude_max_age_s", "path_direction_baseline_m",
                      "history_length_m", "mag_latency_ms", "altimeter_latency_ms",
                      "cable_latency_ms", "depth_latency_ms", "sensor_at_antenna"});
        TowConfig& c = cfg.tow;
        c.extra_layback_m = t->number("extra_layback_m", -100.0, 1000.0, 0.0);
        c.cable_out_m = t->optionalNumber("cable_out_m", 0.0, 10000.0);
        c.sensor_depth_m = t->optionalNumber("sensor_depth_m", 0.0, 11000.0);
        c.cable_max_age_s = t->number("cable_max_age_s", 0.01, 3600.0, c.cable_max_age_s);
        c.depth_max_age_s = t->number("depth_max_age_s", 0.01, 600.0, c.depth_max_age_s);
        c.altitude_max_age_s = t->number("altitude_max_age_s", 0.01, 600.0, c.altitude_max_age_s);
        c.path_direction_baseline_m =
            t->number("path_direction_baseline_m", 0.1, 200.0, c.path_direction_baseline_m);
        c.history_length_m = t->number("history_length_m", 10.0, 100000.0, c.history_length_m);
        c.mag_latency_ms = t->number("mag_latency_ms", 0.0, 10000.0, 0.0);
        c.altimeter_latency_ms = t->number("altimeter_latency_ms", 0.0, 10000.0, 0.0);
        c.cable_latency_ms = t->number("cable_latency_ms", 0.0, 10000.0, 0.0);
        c.depth_latency_ms = t->number("depth_latency_ms", 0.0, 10000.0, 0.0);
        c.sensor_at_antenna = t->boolean("sensor_at_antenna", false);
        if (c.sensor_at_antenna) {
            // A tow geometry beside it would be silently ignored: refuse the contradiction.
            for (std::string_view k : {"cable_out_m", "extra_layback_m"})
                if (t->has(k))
                    t->fail(k, "no tow key with sensor_at_antenna = true (the sensor is at the "
                               "antenna: no cable, no layback)");
        }
    }
    if (cfg.tow.sensor_at_antenna) {
        if (auto v = root.optionalTable("vessel"); v && v->has("tow_point_m"))
            v->fail("tow_point_m", "no tow point with [tow] sensor_at_antenna = true (the sensor "
                                   "is placed at antenna_m)");
        cfg.vessel.tow_point_m = cfg.vessel.antenna_m;
    }
    std::set<std::int64_t> seen;
    for (const config::Section& s : root.tables("sensor")) {
        s.allowOnly({"index", "cross_m", "along_m"});
        SensorOffset o;
        const std::int64_t index = s.integer("index", 0, 255);
        if (!seen.insert(index).second) s.fail("index", "an index not used by another [[sensor]]");
        o.index = static_cast<int>(index);
        o.cross_m = s.number("cross_m", -200.0, 200.0, 0.0);
        o.along_m = s.number("along_m", -200.0, 200.0, 0.0);
        cfg.sensors.push_back(o);
    }
    if (cfg.sensors.empty()) cfg.sensors.push_back(SensorOffset{});
    return cfg;
}

}  // namespace sg::nav
