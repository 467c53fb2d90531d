// Scenario TOML reader; see scenario.hpp and docs/simulator.md for every key.
#include "drivers_sim/scenario.hpp"

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <ctime>
#include <stdexcept>

#include <fmt/format.h>

#include "common/config_section.hpp"

namespace sg::sim {

double length(Vec2 a) { return std::hypot(a.e, a.n); }
Vec2 bearingUnit(double bearing_rad) { return {std::sin(bearing_rad), std::cos(bearing_rad)}; }
double bearingOf(Vec2 v) {
    double b = std::atan2(v.e, v.n);
    if (b < 0.0) b += 2.0 * M_PI;
    return b;
}

const char* faultKindName(FaultKind k) {
    switch (k) {
    case FaultKind::MagDropout: return "mag_dropout";
    case FaultKind::GnssLoss: return "gnss_loss";
    case FaultKind::DegradedFix: return "degraded_fix";
    case FaultKind::BadChecksum: return "bad_checksum";
    case FaultKind::Garbage: return "garbage";
    case FaultKind::CableJump: return "cable_jump";
    case FaultKind::AltitudeExcursion: return "altitude_excursion";
    case FaultKind::NoiseBurst: return "noise_burst";
    case FaultKind::PortClose: return "port_close";
    }
    return "?";
}

namespace {

using config::Section;

std::string faultKindChoice(const Section& f) {
    return f.choice("kind", {"mag_dropout", "gnss_loss", "degraded_fix", "bad_checksum", "garbage",
                             "cable_jump", "altitude_excursion", "noise_burst", "port_close"});
}

std::string channelChoice(const Section& f) {
    return f.choice("channel", {"gnss", "gyro", "sounder", "mag", "altimeter", "cable"});
}

FaultKind kindFromName(const std::string& s) {
    for (FaultKind k : {FaultKind::MagDropout, FaultKind::GnssLoss, FaultKind::DegradedFix,
                        FaultKind::BadChecksum, FaultKind::Garbage, FaultKind::CableJump,
                        FaultKind::AltitudeExcursion, FaultKind::NoiseBurst, FaultKind::PortClose}) {
        if (s == faultKindName(k)) return k;
    }
    throw std::logic_error("unknown fault kind " + s);  // choice() has checked it already
}

Vec2 point(const Section& s, std::string_view key) {
    const auto v = s.numbers(key, 2);
    return {v[0], v[1]};
}

// [[e, n], [e, n], ...] (the Section helper has no nested arrays: walk toml++ directly).
std::vector<Vec2> pointList(const toml::table& root, const Section& plan, std::string_view key) {
    std::vector<Vec2> out;
    const toml::array* arr = root["plan"][key].as_array();
    if (arr == nullptr) plan.fail(key, "an array of [east, north] pairs (metres)");
    for (const toml::node& item : *arr) {
        const toml::array* pair = item.as_array();
        if (pair == nullptr || pair->size() != 2) plan.fail(key, "an array of [east, north] pairs");
        const auto e = (*pair)[0].value<double>();
        const auto n = (*pair)[1].value<double>();
        if (!e || !n || !std::isfinite(*e) || !std::isfinite(*n))
            plan.fail(key, "an array of [east, north] number pairs");
        out.push_back({*e, *n});
    }
    return out;
}

void parseSite(const Section& root, Scenario& sc) {
    const Section s = root.table("site");
    s.allowOnly({"name", "vessel", "origin_lon_deg", "origin_lat_deg", "epsg", "start_utc"});
    sc.site.name = s.string("name");
    sc.site.vessel = s.string("vessel");
    sc.site.origin_lon_deg = s.number("origin_lon_deg", -180.0, 180.0);
    sc.site.origin_lat_deg = s.number("origin_lat_deg", -80.0, 84.0);
    sc.site.epsg = static_cast<int>(s.integer("epsg", 0, 999999, 0));
    const std::string start = s.string("start_utc", "2026-06-14T08:00:00Z");
    try {
        sc.site.start_utc_ns = parseUtc(start);
    } catch (const std::invalid_argument&) {
        s.fail("start_utc", "a UTC time such as \"2026-06-14T08:00:00Z\"");
    }
}

void parseSeabed(const Section& root, Scenario& sc) {
    const auto opt = root.optionalTable("seabed");
    if (!opt) return;
    const Section& s = *opt;
    s.allowOnly({"base_depth_m", "gradient", "ramp", "channel", "sand_waves"});
    auto& b = sc.seabed;
    b.base_depth_m = s.number("base_depth_m", 1.0, 11000.0, b.base_depth_m);
    if (auto g = s.optionalNumbers("gradient", 2)) b.gradient = {(*g)[0], (*g)[1]};
    for (const Section& r : s.tables("ramp")) {
        r.allowOnly({"point_m", "azimuth_deg", "drop_m", "width_m"});
        b.ramps.push_back({point(r, "point_m"), r.number("azimuth_deg", -360.0, 360.0),
                           r.number("drop_m", -1000.0, 1000.0), r.number("width_m", 0.1, 1e5)});
    }
    for (const Section& c : s.tables("channel")) {
        c.allowOnly({"point_m", "azimuth_deg", "width_m", "depth_m"});
        b.channels.push_back({point(c, "point_m"), c.number("azimuth_deg", -360.0, 360.0),
                              c.number("width_m", 0.1, 1e5), c.number("depth_m", -1000.0, 1000.0)});
    }
    if (auto w = s.optionalTable("sand_waves")) {
        w->allowOnly({"wavelength_m", "height_m", "crest_azimuth_deg"});
        b.sand_waves = SandWaveSpec{w->number("wavelength_m", 0.5, 1e4),
                                    w->number("height_m", 0.0, 100.0),
                                    w->number("crest_azimuth_deg", -360.0, 360.0)};
    }
}

void parseGeomag(const Section& root, Scenario& sc) {
    const Section s = root.table("geomagnetic");
    s.allowOnly({"inclination_deg", "declination_deg", "intensity_nT", "diurnal_amplitude_nT",
                 "diurnal_peak_utc_h", "heading_error_nT", "heading_error_phase_deg"});
    auto& g = sc.geomag;
    g.inclination_deg = s.number("inclination_deg", -90.0, 90.0);
    g.declination_deg = s.number("declination_deg", -180.0, 180.0);
    g.intensity_nT = s.number("intensity_nT", 20000.0, 70000.0);
    g.diurnal_amplitude_nT = s.number("diurnal_amplitude_nT", 0.0, 500.0, 0.0);
    g.diurnal_peak_utc_h = s.number("diurnal_peak_utc_h", 0.0, 24.0, 12.0);
    g.heading_error_nT = s.number("heading_error_nT", 0.0, 50.0, 0.0);
    g.heading_error_phase_deg = s.number("heading_error_phase_deg", -360.0, 360.0, 0.0);
}

void parseTargets(const Section& root, Scenario& sc) {
    for (const Section& t : root.tables("target")) {
        t.allowOnly({"name", "position_m", "burial_m", "moment_Am2", "moment_inclination_deg",
                     "moment_declination_deg"});
        TargetSpec spec;
        spec.name = t.string("name");
        spec.position_m = point(t, "position_m");
        spec.burial_m = t.number("burial_m", 0.0, 100.0, 0.0);
        spec.moment_Am2 = t.number("moment_Am2", 0.0, 1e7);
        spec.moment_inclination_deg = t.optionalNumber("moment_inclination_deg", -90.0, 90.0);
        spec.moment_declination_deg = t.optionalNumber("moment_declination_deg", -360.0, 360.0);
        if (spec.moment_inclination_deg.has_value() != spec.moment_declination_deg.has_value())
            t.fail(spec.moment_inclination_deg ? "moment_declination_deg" : "moment_inclination_deg",
                   "both moment_inclination_deg and moment_declination_deg, or neither (induced)");
        sc.targets.push_back(spec);
    }
}

void parsePlan(const toml::table& tbl, const Section& root, Scenario& sc) {
    const Section s = root.table("plan");
    s.allowOnly({"line", "first_start_m", "first_end_m", "line_count", "line_spacing_m", "offset_side",
                 "line_prefix", "order", "area_m", "area_margin_m", "run_in_m", "run_out_m",
                 "turn_radius_m", "area_file", "lines_file"});
    auto& p = sc.plan;
    p.run_in_m = s.number("run_in_m", 0.0, 5000.0, p.run_in_m);
    p.run_out_m = s.number("run_out_m", 0.0, 5000.0, p.run_out_m);
    p.turn_radius_m = s.number("turn_radius_m", 1.0, 5000.0, p.turn_radius_m);
    p.area_file = s.string("area_file", p.area_file);
    p.lines_file = s.string("lines_file", p.lines_file);
    const auto explicit_lines = s.tables("line");
    if (!explicit_lines.empty()) {
        if (s.has("first_start_m")) s.fail("first_start_m", "either [[plan.line]] or first_start_m");
        for (const Section& l : explicit_lines) {
            l.allowOnly({"name", "start_m", "end_m"});
            LineSpec spec;
            spec.name = l.string("name");
            spec.start_m = point(l, "start_m");
            spec.end_m = point(l, "end_m");
            p.lines.push_back(spec);
        }
        p.line_spacing_m = s.number("line_spacing_m", 0.1, 1e4, 0.0);
    } else {

        const auto count = s.integer("line_count", 1, 1000);
        p.line_spacing_m = s.number("line_spacing_m", 0.1, 1e4);
        const std::string side = s.choice("offset_side", {"port", "starboard"}, "starboard");
        const std::string prefix = s.string("line_prefix", "L");
        const Vec2 a = point(s, "first_start_m");
        const Vec2 b = point(s, "first_end_m");
        const Vec2 dir = b - a;
        if (length(dir) < 1.0) s.fail("first_end_m", "a point at least 1 m from first_start_m");
        const Vec2 u = (1.0 / length(dir)) * dir;
        const Vec2 starboard{u.n, -u.e};
        const Vec2 step = (side == "starboard" ? 1.0 : -1.0) * p.line_spacing_m * starboard;
        for (std::int64_t i = 0; i < count; ++i) {
            const Vec2 off = static_cast<double>(i) * step;
            LineSpec spec;
            spec.name = fmt::format("{}{:02d}", prefix, i + 1);
            spec.start_m = a + off;
            spec.end_m = b + off;
            p.lines.push_back(spec);
        }
    }
    for (std::size_t i = 0; i < p.lines.size(); ++i) {
        if (length(p.lines[i].end_m - p.lines[i].start_m) < 1.0)
            s.fail("line", fmt::format("line {} at least 1 m long", p.lines[i].name));
    }
    if (const toml::array* order = tbl["plan"]["order"].as_array()) {
        for (const toml::node& n : *order) {
            const auto v = n.value<std::int64_t>();
            if (!v || *v < 1 || *v > static_cast<std::int64_t>(p.lines.size()))
                s.fail("order", fmt::format("line numbers from 1 to {}", p.lines.size()));
            p.order.push_back(static_cast<int>(*v - 1));
        }
        if (p.order.empty()) s.fail("order", "at least one line number");
    } else if (s.has("order")) {
        s.fail("order", "an array of line numbers (1 = first line)");
    } else {
        for (std::size_t i = 0; i < p.lines.size(); ++i) p.order.push_back(static_cast<int>(i));
    }
    if (s.has("area_m")) {
        p.area_m = pointList(tbl, s, "area_m");
        if (p.area_m.size() < 3) s.fail("area_m", "at least 3 vertices");
    } else {
        // Default area: the block of the lines, in the frame of the first line (u along it,
        // v to its left), widened across by half a line spacing (or the margin) and ending at the
        // line ends, so a slanted block gets a slanted area (not its bounding box).
        const double margin = s.number("area_margin_m", 0.0, 1e4, p.line_spacing_m / 2.0);
        const Vec2 o = p.lines.front().start_m;
        const double dx = p.lines.front().end_m.e - o.e, dy = p.lines.front().end_m.n - o.n;
        const double len = std::hypot(dx, dy);
        const double ue = dx / len, un = dy / len;  // along
        const double ve = -un, vn = ue;             // across, to the left: (u, v) right-handed
        double a0 = 1e300, a1 = -1e300, c0 = 1e300, c1 = -1e300;
        for (const auto& l : p.lines) {
            for (Vec2 q : {l.start_m, l.end_m}) {
                const double a = (q.e - o.e) * ue + (q.n - o.n) * un;
                const double c = (q.e - o.e) * ve + (q.n - o.n) * vn;
                a0 = std::min(a0, a); a1 = std::max(a1, a);
                c0 = std::min(c0, c); c1 = std::max(c1, c);
            }
        }
        c0 -= margin; c1 += margin;
        const auto at = [&](double a, double c) {
            return Vec2{o.e + a * ue + c * ve, o.n + a * un + c * vn};
        };
        p.area_m = {at(a0, c0), at(a1, c0), at(a1, c1), at(a0, c1)};  // counter-clockwise
    }
}

void parseVessel(const Section& root, Scenario& sc) {
    const auto opt = root.optionalTable("vessel");
    if (!opt) return;
    const Section& s = *opt;
    s.allowOnly({"speed_kn", "speed_std_mps", "speed_tau_s", "heading_tau_s", "max_turn_rate_dps",
                 "lookahead_m", "integral_dps_per_m", "gust_std_dps", "gust_tau_s", "swell_yaw_deg",
                 "swell_period_s", "swell_heave_m", "current_set_deg", "current_drift_mps",
                 "antenna_height_m", "tow_point_m", "sounder_m", "sounder_draft_m"});
    auto& v = sc.vessel;
    v.speed_mps = s.number("speed_kn", 0.5, 20.0, v.speed_mps / 0.514444) * 0.514444;
    v.speed_std_mps = s.number("speed_std_mps", 0.0, 5.0, v.speed_std_mps);
    v.speed_tau_s = s.number("speed_tau_s", 0.1, 3600.0, v.speed_tau_s);
    v.heading_tau_s = s.number("heading_tau_s", 0.1, 600.0, v.heading_tau_s);
    v.max_turn_rate_dps = s.number("max_turn_rate_dps", 0.1, 30.0, v.max_turn_rate_dps);
    v.lookahead_m = s.number("lookahead_m", 1.0, 1000.0, v.lookahead_m);
    v.integral_dps_per_m = s.number("integral_dps_per_m", 0.0, 10.0, v.integral_dps_per_m);
    v.gust_std_dps = s.number("gust_std_dps", 0.0, 10.0, v.gust_std_dps);
    v.gust_tau_s = s.number("gust_tau_s", 0.1, 600.0, v.gust_tau_s);
    v.swell_yaw_deg = s.number("swell_yaw_deg", 0.0, 20.0, v.swell_yaw_deg);
    v.swell_period_s = s.number("swell_period_s", 1.0, 30.0, v.swell_period_s);
    v.swell_heave_m = s.number("swell_heave_m", 0.0, 10.0, v.swell_heave_m);
    v.current_set_deg = s.number("current_set_deg", -360.0, 360.0, v.current_set_deg);
    v.current_drift_mps = s.number("current_drift_mps", 0.0, 5.0, v.current_drift_mps);
    v.antenna_height_m = s.number("antenna_height_m", -10.0, 100.0, v.antenna_height_m);
    if (auto t = s.optionalNumbers("tow_point_m", 2)) v.tow_point_m = {(*t)[0], (*t)[1]};
    if (auto t = s.optionalNumbers("sounder_m", 2)) v.sounder_m = {(*t)[0], (*t)[1]};
    v.sounder_draft_m = s.number("sounder_draft_m", 0.0, 20.0, v.sounder_draft_m);
}

void parseTow(const Section& root, Scenario& sc) {
    const auto opt = root.optionalTable("tow");
    if (!opt) return;
    const Section& s = *opt;
    s.allowOnly({"cable_out_m", "tow_point_height_m", "altitude_m", "fish_tau_s",
                 "max_vertical_rate_mps", "min_depth_m"});
    auto& t = sc.tow;
    t.cable_out_m = s.number("cable_out_m", 1.0, 5000.0, t.cable_out_m);
    t.tow_point_height_m = s.number("tow_point_height_m", -10.0, 50.0, t.tow_point_height_m);
    t.altitude_m = s.number("altitude_m", 0.5, 500.0, t.altitude_m);
    t.fish_tau_s = s.number("fish_tau_s", 0.1, 600.0, t.fish_tau_s);
    t.max_vertical_rate_mps = s.number("max_vertical_rate_mps", 0.01, 10.0, t.max_vertical_rate_mps);
    t.min_depth_m = s.number("min_depth_m", 0.0, 100.0, t.min_depth_m);
}

void parseInstruments(const Section& root, Scenario& sc) {
    if (auto s = root.optionalTable("gnss")) {
        s->allowOnly({"talker", "rate_hz", "gst_rate_hz", "zda_rate_hz", "fix_quality",
                      "satellites", "hdop", "position_std_m", "geoid_separation_m"});
        auto& g = sc.gnss;
        g.talker = s->choice("talker", {"GN", "GP", "GL", "GA"}, g.talker);
        g.rate_hz = s->number("rate_hz", 0.1, 100.0, g.rate_hz);
        g.gst_rate_hz = s->number("gst_rate_hz", 0.1, 100.0, g.gst_rate_hz);
        g.zda_rate_hz = s->number("zda_rate_hz", 0.1, 100.0, g.zda_rate_hz);
        g.fix_quality = static_cast<int>(s->integer("fix_quality", 1, 5, g.fix_quality));
        g.satellites = static_cast<int>(s->integer("satellites", 4, 60, g.satellites));
        g.hdop = s->number("hdop", 0.3, 50.0, g.hdop);
        g.position_std_m = s->number("position_std_m", 0.0, 100.0, g.position_std_m);
        g.geoid_separation_m = s->number("geoid_separation_m", -120.0, 120.0, g.geoid_separation_m);
    }
    if (auto s = root.optionalTable("gyro")) {
        s->allowOnly({"talker", "rate_hz", "std_deg"});
        sc.gyro.talker = s->choice("talker", {"HE", "HC", "GP", "IN"}, sc.gyro.talker);
        sc.gyro.rate_hz = s->number("rate_hz", 0.1, 100.0, sc.gyro.rate_hz);
        sc.gyro.std_deg = s->number("std_deg", 0.0, 10.0, sc.gyro.std_deg);
    }
    if (auto s = root.optionalTable("sounder")) {
        s->allowOnly({"talker", "rate_hz", "std_m", "range_m"});
        sc.sounder.talker = s->choice("talker", {"SD", "YX"}, sc.sounder.talker);
        sc.sounder.rate_hz = s->number("rate_hz", 0.1, 100.0, sc.sounder.rate_hz);
        sc.sounder.std_m = s->number("std_m", 0.0, 10.0, sc.sounder.std_m);
        sc.sounder.range_m = s->number("range_m", 1.0, 12000.0, sc.sounder.range_m);
    }
    {
        const Section s = root.table("magnetometer");
        s.allowOnly({"rate_hz", "noise_nT", "quality", "send_altitude", "depth_std_m",
                     "altitude_std_m", "sensor"});
        auto& m = sc.mag;
        const auto rate = s.integer("rate_hz", 10, 20, 10);
        if (rate != 10 && rate != 20) s.fail("rate_hz", "10 or 20 (Hz)");
        m.rate_hz = static_cast<double>(rate);
        m.noise_nT = s.number("noise_nT", 0.0, 100.0, m.noise_nT);
        m.quality = static_cast<int>(s.integer("quality", 0, 99, m.quality));
        m.send_altitude = s.boolean("send_altitude", m.send_altitude);
        m.depth_std_m = s.number("depth_std_m", 0.0, 10.0, m.depth_std_m);
        m.altitude_std_m = s.number("altitude_std_m", 0.0, 10.0, m.altitude_std_m);
        for (const Section& t : s.tables("sensor")) {
            t.allowOnly({"cross_m", "along_m"});
            m.sensors.push_back({t.number("cross_m", -100.0, 100.0), t.number("along_m", -100.0, 100.0, 0.0)});
        }
        if (m.sensors.empty() || m.sensors.size() > 8)
            s.fail("sensor", "1 to 8 [[magnetometer.sensor]] tables");
    }
    if (auto s = root.optionalTable("altimeter")) {
        s->allowOnly({"rate_hz", "std_m"});
        sc.altimeter.rate_hz = s->number("rate_hz", 0.1, 100.0, sc.altimeter.rate_hz);
        sc.altimeter.std_m = s->number("std_m", 0.0, 10.0, sc.altimeter.std_m);
    }
    if (auto s = root.optionalTable("cable")) {
        s->allowOnly({"rate_hz", "std_m"});
        sc.cable.rate_hz = s->number("rate_hz", 0.1, 100.0, sc.cable.rate_hz);
        sc.cable.std_m = s->number("std_m", 0.0, 10.0, sc.cable.std_m);
    }
}

void parseFaults(const Section& root, Scenario& sc) {
    for (const Section& f : root.tables("fault")) {
        FaultSpec spec;
        const std::string kind = faultKindChoice(f);
        spec.kind = kindFromName(kind);
        spec.start_s = f.number("start_s", 0.0, 1e7);
        spec.duration_s = f.number("duration_s", 0.0, 1e7);
        switch (spec.kind) {
        case FaultKind::MagDropout:
            f.allowOnly({"kind", "start_s", "duration_s", "sensor"});
            break;
        case FaultKind::GnssLoss:
            f.allowOnly({"kind", "start_s", "duration_s", "no_fix"});
            spec.no_fix = f.boolean("no_fix", false);
            break;
        case FaultKind::DegradedFix:
            f.allowOnly({"kind", "start_s", "duration_s", "sigma_m"});
            spec.sigma_m = f.number("sigma_m", 0.0, 1000.0, 2.5);
            break;
        case FaultKind::BadChecksum:
            f.allowOnly({"kind", "start_s", "duration_s", "channel", "probability"});
            spec.channel = channelChoice(f);
            spec.probability = f.number("probability", 0.0, 1.0, 0.5);
            break;
        case FaultKind::Garbage:
            f.allowOnly({"kind", "start_s", "duration_s", "channel", "bytes", "per_s"});
            spec.channel = channelChoice(f);
            spec.bytes = static_cast<int>(f.integer("bytes", 1, 4096, 16));
            spec.per_s = f.number("per_s", 0.01, 100.0, 1.0);
            break;
        case FaultKind::CableJump:
            f.allowOnly({"kind", "start_s", "duration_s", "delta_m", "real"});
            spec.delta_m = f.number("delta_m", -1000.0, 1000.0, 15.0);
            spec.real = f.boolean("real", false);
            break;
        case FaultKind::AltitudeExcursion:
            f.allowOnly({"kind", "start_s", "duration_s", "delta_m"});
            spec.delta_m = f.number("delta_m", -100.0, 500.0, 8.0);
            break;
        case FaultKind::NoiseBurst:
            f.allowOnly({"kind", "start_s", "duration_s", "sensor", "noise_nT"});
            spec.noise_nT = f.number("noise_nT", 0.0, 1000.0, 2.0);
            break;
        case FaultKind::PortClose:
            f.allowOnly({"kind", "start_s", "duration_s", "channel"});
            spec.channel = channelChoice(f);
            break;
        }
        if (spec.kind == FaultKind::MagDropout || spec.kind == FaultKind::NoiseBurst) {
            spec.sensor = static_cast<int>(
                f.integer("sensor", -1, static_cast<std::int64_t>(sc.mag.sensors.size()) - 1, -1));
        }
        sc.faults.push_back(spec);
    }
    if (auto r = root.optionalTable("random_faults")) {
        r->allowOnly({"per_hour", "mean_duration_s", "kinds"});
        sc.random_faults.per_hour = r->number("per_hour", 0.0, 3600.0, 0.0);
        sc.random_faults.mean_duration_s = r->number("mean_duration_s", 0.1, 3600.0, 20.0);
        sc.random_faults.kinds = {FaultKind::MagDropout, FaultKind::GnssLoss,
                                  FaultKind::DegradedFix, FaultKind::BadChecksum,
                                  FaultKind::Garbage, FaultKind::NoiseBurst};
    }
}

Scenario parseTable(const toml::table& tbl, const std::string& name) {
    const Section root(tbl, name);
    root.allowOnly({"site", "seabed", "geomagnetic", "target", "plan", "vessel", "tow", "gnss",
                    "gyro", "sounder", "magnetometer", "altimeter", "cable", "fault",
                    "random_faults", "run"});
    Scenario sc;
    sc.file = name;
    parseSite(root, sc);
    parseSeabed(root, sc);
    parseGeomag(root, sc);
    parseTargets(root, sc);
    parsePlan(tbl, root, sc);
    parseVessel(root, sc);
    parseTow(root, sc);
    parseInstruments(root, sc);
    parseFaults(root, sc);
    if (auto r = root.optionalTable("run")) {
        r->allowOnly({"duration_s", "lines"});
        sc.duration_s = r->optionalNumber("duration_s", 1.0, 1e7);
        if (r->has("lines")) {
            const toml::array* names = tbl["run"]["lines"].as_array();
            if (names == nullptr || names->empty()) r->fail("lines", "an array of plan line names");
            for (const toml::node& n : *names) {
                const auto v = n.value<std::string>();
                if (!v) r->fail("lines", "an array of plan line names (strings)");
                sc.run_lines.push_back(*v);
            }
            try {
                (void)flightPlan(sc);
            } catch (const config::ConfigError& e) {
                throw config::ConfigError(fmt::format("{}: key 'run.lines': {}", name, e.what()));
            }
        }
    }
    return sc;
}

}  // namespace

PlanSpec flightPlan(const Scenario& sc) {
    PlanSpec p = sc.plan;
    if (!sc.route_lines.empty()) {
        p.lines = sc.route_lines;
        p.order.clear();
        for (std::size_t i = 0; i < p.lines.size(); ++i) p.order.push_back(static_cast<int>(i));
    }
    if (sc.run_lines.empty()) return p;
    std::string names;
    for (const LineSpec& l : p.lines) names += (names.empty() ? "" : ", ") + l.name;
    std::vector<int> order;
    for (const std::string& want : sc.run_lines) {
        int found = -1;
        for (std::size_t i = 0; i < p.lines.size(); ++i) {
            if (p.lines[i].name == want) found = static_cast<int>(i);
        }
        if (found < 0) {
            throw config::ConfigError(fmt::format("line '{}' is not in the {} (lines: {})", want,
                                                  sc.route_lines.empty() ? "plan" : "route", names));
        }
        if (std::find(order.begin(), order.end(), found) != order.end())
            throw config::ConfigError(fmt::format("line '{}' is listed twice", want));
        order.push_back(found);
    }
    p.order = order;
    return p;
}

Scenario loadScenario(const std::string& path) { return parseTable(config::parseFile(path), path); }

Scenario parseScenario(const std::string& text, const std::string& name) {
    return parseTable(config::parseText(text, name), name);
}

TimeNs parseUtc(const std::string& iso) {
    int y = 0, mo = 0, d = 0, h = 0, mi = 0;
    double sec = 0.0;
    char z = 0;
    if (std::sscanf(iso.c_str(), "%4d-%2d-%2dT%2d:%2d:%lf%c", &y, &mo, &d, &h, &mi, &sec, &z) != 7 ||
        z != 'Z' || mo < 1 || mo > 12 || d < 1 || d > 31 || h > 23 || mi > 59 || sec < 0.0 ||
        sec >= 61.0)
        throw std::invalid_argument("not a UTC time like 2026-06-14T08:00:00Z: " + iso);
    std::tm tm{};
    tm.tm_year = y - 1900;
    tm.tm_mon = mo - 1;
    tm.tm_mday = d;
    tm.tm_hour = h;
    tm.tm_min = mi;
    const std::time_t t = timegm(&tm);
    return static_cast<TimeNs>(t) * kNsPerSecond + static_cast<TimeNs>(std::llround(sec * 1e9));
}

std::string formatUtc(TimeNs t) {
    const std::time_t s = static_cast<std::time_t>(t / kNsPerSecond);
    std::tm tm{};
    gmtime_r(&s, &tm);
    return fmt::format("{:04d}-{:02d}-{:02d}T{:02d}:{:02d}:{:02d}.{:03d}Z", tm.tm_year + 1900,
                       tm.tm_mon + 1, tm.tm_mday, tm.tm_hour, tm.tm_min, tm.tm_sec,
                       static_cast<int>((t % kNsPerSecond) / 1'000'000));
}

}  // namespace sg::sim
