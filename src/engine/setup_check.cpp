// Setup validation; see setup_check.hpp.
#include "engine/setup_check.hpp"

#include <filesystem>
#include <memory>
#include <set>

#include <fmt/format.h>

#include "coverage/coverage_config.hpp"
#include "coverage/infill.hpp"
#include "coverage/survey_plan.hpp"
#include "engine/pipeline.hpp"
#include "engine/section_or_empty.hpp"
#include "engine/survey_summary.hpp"
#include "nav/survey_crs.hpp"

namespace sg::engine {

namespace {

const decode::FieldMap* mapOf(const SurveyConfig& cfg, const config::InputConfig& in) {
    if (in.kind != config::InputKind::FieldMap) return nullptr;
    for (const auto& m : cfg.fieldmaps)
        if (m.name == in.fieldmap) return &m;
    return nullptr;
}

bool hasRole(const SurveyConfig& cfg, std::string_view role) {
    for (const auto& in : cfg.inputs)
        if (in.role == role) return true;
    return false;
}

// Some input's field map has the field (`member` of decode::FieldMap).
bool anyFieldMapHas(const SurveyConfig& cfg, std::optional<int> decode::FieldMap::*member,
                    std::string* input_name = nullptr) {
    for (const auto& in : cfg.inputs)
        if (const auto* m = mapOf(cfg, in); m && (m->*member).has_value()) {
            if (input_name) *input_name = in.name;
            return true;
        }
    return false;
}

std::string fromConfigDir(const SurveyConfig& cfg, const std::string& p) {
    if (p.empty() || std::filesystem::path(p).is_absolute()) return p;
    return (std::filesystem::path(cfg.dir) / p).lexically_normal().string();
}

void checkPose(const SurveyConfig& cfg, SetupReport& out) {
    const auto& f = cfg.file;
    const auto& tow = cfg.nav.tow;
    const auto& vessel = cfg.nav.vessel;
    if (!hasRole(cfg, "mag")) {
        // Logging only (e.g. a GNSS stream alone): nothing to place, so nothing the position
        // needs is demanded; said as a warning, since no coverage can come of it.
        out.warning(f, "[[input]] role",
                    "no [[input]] has role = \"mag\": the lines are logged, but no coverage can be computed",
                    "add the magnetometer as an [[input]] with role = \"mag\" and its field map");
        return;
    }
    if (!hasRole(cfg, "gnss"))
        out.error(f, "[[input]] role", "no [[input]] has role = \"gnss\": the samples can never be placed",
                  "add the GNSS receiver as an [[input]] with role = \"gnss\"");
    if (vessel.heading_source == nav::HeadingSource::Hdt && !hasRole(cfg, "heading"))
        out.error(f, "[vessel] heading_source",
                  "heading_source = \"hdt\" but no [[input]] has role = \"heading\"",
                  "add the gyro as an [[input]] with role = \"heading\", or set heading_source = \"auto\"");
    if (!tow.sensor_at_antenna) {
        if (!tow.cable_out_m && !anyFieldMapHas(cfg, &decode::FieldMap::cable_out_m))
            out.error(f, "[tow] cable_out_m",
                      "no cable out: neither [tow] cable_out_m nor an input whose field map has "
                      "cable_out_m; the layback (and so every sensor position) is unknown",
                      "set [tow] cable_out_m = <metres paid out>, add a cable counter input, or set "
                      "[tow] sensor_at_antenna = true if the sensor rides at the antenna");
        if (!tow.sensor_depth_m && !anyFieldMapHas(cfg, &decode::FieldMap::depth_m))
            out.error(f, "[tow] sensor_depth_m",
                      "no sensor depth: neither [tow] sensor_depth_m nor a depth_m field in a field map",
                      "set [tow] sensor_depth_m = <metres below the surface>, or map the fish's depth "
                      "field (depth_m) in its [fieldmap.NAME]");
        const auto root = cfg.root();
        const auto v = root.optionalTable("vessel");
        if (!v || !v->has("tow_point_m"))
            out.warning(f, "[vessel] tow_point_m",
                        "no tow point offset: the cable is taken to leave the vessel at the reference "
                        "point [0, 0, 0]",
                        "set [vessel] tow_point_m = [forward, starboard, up] in metres");
        if (!v || !v->has("antenna_m"))
            out.warning(f, "[vessel] antenna_m",
                        "no antenna offset: the GNSS antenna is taken to be at the reference point",
                        "set [vessel] antenna_m = [forward, starboard, up] in metres");
    }
    const bool altimeter = anyFieldMapHas(cfg, &decode::FieldMap::altitude_m);
    if (!altimeter && !hasRole(cfg, "depth"))
        out.error(f, "[[input]] role",
                  "no sensor altitude source: no field map has altitude_m and no [[input]] has "
                  "role = \"depth\" (echo sounder)",
                  "map the altimeter (altitude_m) in a [fieldmap.NAME], or add the echo sounder "
                  "(DPT/DBT) as an [[input]] with role = \"depth\"");
    // [[sensor]]: the strings' sensor field must meet a configured index (checked on data);
    // without any [[sensor]] one sensor index 0 is assumed.
    const auto root = cfg.root();
    std::string mag_input;
    if (root.tables("sensor").empty() && anyFieldMapHas(cfg, &decode::FieldMap::sensor, &mag_input))
        out.warning(f, "[[sensor]] index",
                    fmt::format("no [[sensor]] table, so one sensor with index 0 at the fish is assumed, "
                                "but the field map of input '{}' has a sensor field",
                                mag_input),
                    "add one [[sensor]] per sensor index the strings carry, with its cross_m and along_m");
}

void checkCrsAndPlan(const SurveyConfig& cfg, SetupReport& out) {
    const auto& f = cfg.file;
    std::unique_ptr<nav::SurveyCrs> crs;
    if (cfg.survey.epsg) {
        try {
            crs = std::make_unique<nav::SurveyCrs>(*cfg.survey.epsg);
        } catch (const std::exception& e) {
            out.error(f, "[survey] epsg", e.what(),
                      "give the EPSG code of a projected CRS in metres (e.g. 32631 for WGS 84 / UTM "
                      "zone 31N), or remove the key to use the UTM zone of the first fix");
            return;
        }
    }
    const auto root = cfg.root();
    const auto plan_sec = root.optionalTable("plan");
    if (!plan_sec) {
        out.warning(f, "[plan]", "no [plan] (area and lines): no coverage, gaps or infill can be computed",
                    "add [plan] with area, lines, line_spacing_m and planned_altitude_m");
        return;
    }
    for (const char* key : {"area", "lines"}) {
        if (!plan_sec->has(key)) continue;
        std::string p;
        try {
            p = plan_sec->string(key);
        } catch (const config::ConfigError&) {
            continue;  // reported by loadPlan below
        }
        const auto resolved = fromConfigDir(cfg, p);
        if (!std::filesystem::exists(resolved))
            out.error(f, std::string("[plan] ") + key, fmt::format("file '{}' does not exist", resolved),
                      "give the path of the plan file (relative paths start at the config's folder)");
    }
    // Load the plan exactly as the engine will, now: without [survey] epsg, in the UTM zone of the
    // plan's first position (the engine will use the first fix's zone; the checks are the same).
    std::unique_ptr<nav::SurveyCrs> provisional;
    const coverage::LonLatToGrid to_grid = [&](coverage::LonLat ll) {
        const nav::SurveyCrs* c = crs.get();
        if (c == nullptr) {
            if (!provisional)
                provisional = std::make_unique<nav::SurveyCrs>(nav::SurveyCrs::utmForLonLat(ll.lon_deg, ll.lat_deg));
            c = provisional.get();
        }
        const auto en = c->forward(ll.lon_deg, ll.lat_deg);
        return coverage::Point{en.easting_m, en.northing_m};
    };
    try {
        const auto plan = coverage::loadPlan(*plan_sec, to_grid);
        (void)coverage::loadCoverageOptions(sectionOrEmpty(root, "coverage"));
        (void)coverage::loadGapOptions(sectionOrEmpty(root, "gaps"), plan.surveyHeadingDeg());
        (void)coverage::loadInfillOptions(sectionOrEmpty(root, "infill"), plan.surveyHeadingDeg(), 1.0);
        if (crs) {
            // The plan's area must lie in the CRS's area of use (a wrong zone distorts it).
            const auto& area = plan.area;
            if (!area.empty() && !area.front().exterior.empty()) {
                const auto p0 = area.front().exterior.front();
                const auto ll = crs->inverse(p0.e_m, p0.n_m);
                const double outside = crs->degreesOutsideAreaOfUse(ll.lon_deg, ll.lat_deg);
                if (outside > 3.0)
                    out.error(f, "[survey] epsg",
                              fmt::format("the plan area lies {:.1f} deg outside the area of use of EPSG:{}",
                                          outside, *cfg.survey.epsg),
                              "set [survey] epsg to the CRS of the survey area, or remove it to use the "
                              "UTM zone of the first fix");
            }
        }
    } catch (const config::ConfigError& e) {
        out.error(f, "[plan]", e.what(), "correct the key named in the message");
    } catch (const coverage::PlanError& e) {
        out.error(f, "[plan] area/lines", e.what(), "correct the plan file named in the message");
    } catch (const std::exception& e) {
        out.error(f, "[plan]", e.what(), "correct the [plan] table or its files");
    }
}

void checkPaths(const SurveyConfig& cfg, SetupUse use, SetupReport& out) {
    if (use != SetupUse::kRecord) return;
    for (const auto& in : cfg.inputs) {
        if (!in.transport_given) {
            out.error(cfg.file, fmt::format("[[input]] '{}' transport", in.name),
                      "no transport: record does not know where to read this input",
                      "set transport = \"serial\", \"udp\", \"tcp\" or \"file\" with its keys");
            continue;
        }
        if (in.transport != config::Transport::File) continue;
        const auto p = fromConfigDir(cfg, in.path);
        if (!in.follow && !std::filesystem::exists(p))
            out.error(cfg.file, fmt::format("[[input]] '{}' path", in.name),
                      fmt::format("file '{}' does not exist", p),
                      "give the capture file's path (relative paths start at the config's folder), or "
                      "set follow = true to wait for it");
    }
    if (!cfg.log.path.empty()) {
        const auto dir = std::filesystem::path(fromConfigDir(cfg, cfg.log.path)).parent_path();
        if (!dir.empty() && !std::filesystem::is_directory(dir))
            out.error(cfg.file, "[log] path", fmt::format("folder '{}' does not exist", dir.string()),
                      "create the folder or give another [log] path (or --log FILE)");
    }
}

}  // namespace

std::string SetupProblem::text() const {
    std::string t = fmt::format("{}: {}", error ? "error" : "warning", file);
    if (!key.empty()) t += ": " + key;
    t += ": " + what;
    if (!fix.empty()) t += "; fix: " + fix;
    return t;
}

std::size_t SetupReport::errors() const {
    std::size_t n = 0;
    for (const auto& p : problems) n += p.error ? 1 : 0;
    return n;
}

void SetupReport::error(std::string file, std::string key, std::string what, std::string fix) {
    problems.push_back({true, std::move(file), std::move(key), std::move(what), std::move(fix)});
}

void SetupReport::warning(std::string file, std::string key, std::string what, std::string fix) {
    problems.push_back({false, std::move(file), std::move(key), std::move(what), std::move(fix)});
}

SetupReport checkConfigFile(const std::string& path, SetupUse use, SurveyConfig* cfg_out) {
    SetupReport out;
    try {
        auto cfg = loadSurveyConfig(path, config::InputUse::Offline);
        checkConfig(cfg, use, out);
        if (cfg_out) *cfg_out = std::move(cfg);
    } catch (const config::ConfigError& e) {
        // The message names the file, the key and the line already.
        out.error(path, "", e.what(), "correct the key named in the message (docs/config.md)");
    }
    return out;
}

void checkConfig(const SurveyConfig& cfg, SetupUse use, SetupReport& out) {
    checkPose(cfg, out);
    checkCrsAndPlan(cfg, out);
    checkPaths(cfg, use, out);
}

void checkData(const SurveyConfig& cfg, const std::vector<ReceivedLine>& lines,
               const std::string& data_name, const DataCheckOptions& options, SetupReport& out) {
    if (lines.empty()) {
        out.error(data_name, "", "no data lines", "give capture files (or a log) that hold data");
        return;
    }
    std::int64_t next_id = 1;
    Pipeline pipeline(cfg, [&next_id] { return next_id++; });
    pipeline.decoder().setLogRows(false);
    const TimeNs t0 = lines.front().utc_ns;
    const auto window_ns = static_cast<TimeNs>(options.window_s * 1e9);
    TimeNs last = t0;
    for (const auto& l : lines) {
        if (!options.whole && l.utc_ns - t0 > window_ns) break;
        pipeline.feed(l);
        last = std::max(last, l.utc_ns);
    }
    auto& eng = pipeline.engine();
    if (options.whole)
        if (const auto problem = nothingCoveredProblem(eng))
            out.error(data_name, "", *problem, "correct the setup named above and run again");
    const double span_s = toSeconds(last - t0);
    const std::string where = options.whole ? data_name : fmt::format("{} (first {:.0f} s)", data_name, span_s);
    const auto& f = cfg.file;
    std::string configured;
    for (const auto& o : cfg.nav.sensors) configured += (configured.empty() ? "" : ", ") + std::to_string(o.index);

    // Magnetometer strings that did not decode: say why (the most frequent reasons).
    std::uint64_t mag_lines = 0, mag_ok = 0;
    std::string reasons;
    for (const auto& in : cfg.inputs) {
        if (in.role != "mag") continue;
        const auto it = pipeline.decoder().counters().find(in.name);
        if (it == pipeline.decoder().counters().end()) continue;
        mag_lines += it->second.lines;
        mag_ok += it->second.ok;
        for (const auto& [r, n] : it->second.by_reason)
            if (r != "ok") reasons += fmt::format("{}{} {}", reasons.empty() ? "" : ", ", r, n);
    }
    if (eng.fieldSamples() == 0) {
        const std::string what =
            mag_lines == 0 ? "no magnetometer line arrived (no line from an input with role = \"mag\")"
                           : fmt::format("{} magnetometer lines arrived, {} decoded, none with a total field{}",
                                         mag_lines, mag_ok, reasons.empty() ? "" : " (" + reasons + ")");
        const std::string fix = "check the [[input]] names and role, the [fieldmap.NAME] layout (field_nT, "
                                "time, time_format) and the input's clock";
        if (options.require_samples) out.error(where, "[fieldmap] / [[input]]", what, fix);
        else out.warning(where, "[fieldmap] / [[input]]", what, fix);
        return;
    }
    for (const auto& [index, n] : eng.unknownSensorSamples())
        out.error(f, "[[sensor]] index",
                  fmt::format("{}: {} magnetometer samples carry sensor index {}, which matches no "
                              "[[sensor]] (configured: {}); they cannot be placed and cover nothing",
                              where, n, index, configured),
                  fmt::format("add [[sensor]] index = {} with its cross_m and along_m, or correct the "
                              "sensor field of the magnetometer's [fieldmap.NAME]",
                              index));
    for (const auto& s : eng.sensors())
        if (s.samples == 0)
            out.error(f, "[[sensor]] index",
                      fmt::format("{}: configured sensor {} sent no sample", where, s.index),
                      "remove the [[sensor]] that is not towed, or check the sensor field of the "
                      "magnetometer strings");
    if (!eng.crsProblem().empty())
        out.error(f, "[survey] epsg", where + ": " + eng.crsProblem(), "");

    // A value the position needs that is missing on EVERY sample of the configured sensors.
    std::uint64_t known = 0;
    for (const auto& s : eng.sensors()) known += s.samples;
    const auto& c = eng.invalidCounts();
    const auto all = [known](std::uint64_t n) { return known >= 10 && n >= known; };
    if (all(c.pose_no_cable_out))
        out.error(f, "[tow] cable_out_m",
                  fmt::format("{}: no cable out on any of {} samples", where, known),
                  "set [tow] cable_out_m, check the cable counter input, or set [tow] sensor_at_antenna = true");
    if (all(c.pose_no_sensor_depth))
        out.error(f, "[tow] sensor_depth_m",
                  fmt::format("{}: no sensor depth on any of {} samples", where, known),
                  "set [tow] sensor_depth_m, or check the depth_m field of the magnetometer's field map");
    if (all(c.pose_no_fix) && eng.crsProblem().empty())
        out.error(f, "[[input]] role = \"gnss\"",
                  fmt::format("{}: no position fix reached any of {} samples", where, known),
                  "check the GNSS input (GGA/GNS/RMC), its clock setting, and that it overlaps the "
                  "magnetometer data in time");
    if (all(c.pose_no_heading))
        out.error(f, "[vessel] heading_source",
                  fmt::format("{}: no heading on any of {} samples", where, known),
                  "check the heading input (HDT), or set heading_source = \"auto\" (course made good)");
    if (all(c.no_altitude) && !all(c.pose_no_fix) && !all(c.pose_no_sensor_depth))
        out.error(f, "[[input]] altimeter / depth",
                  fmt::format("{}: no sensor altitude on any of {} samples", where, known),
                  "map the altimeter (altitude_m), or add an echo sounder input (role = \"depth\")");
}

}  // namespace sg::engine
