// `swathguard inspect CAPTURE [--config FILE] [--as nmea|NAME]`: decodes every line of a capture
// file and prints one JSON object per line (line number, source type, sentence or layout, decoded
// fields or the reason it failed), then one summary object with counts per type and per reason.
// Lines starting with '$' or '!' are NMEA; others are tried against the field maps (the
// [fieldmap.NAME] tables of --config, else the default SGM/SGA/SGC layouts). Output format:
// docs/formats.md, "swathguard inspect".
#include <cstdio>
#include <fstream>
#include <map>
#include <optional>
#include <stdexcept>
#include <string>
#include <vector>

#include <CLI/CLI.hpp>
#include <nlohmann/json.hpp>

#include "app/commands.hpp"
#include "common/config_section.hpp"
#include "common/line_framer.hpp"
#include "common/received_line.hpp"
#include "decode/field_map.hpp"
#include "decode/instrument_clock.hpp"
#include "decode/nmea.hpp"

namespace sg::app {

namespace {

using json = nlohmann::ordered_json;
using namespace sg::decode;

constexpr std::size_t kFramerMaxBytes = 4096;

template <typename T>
json opt(const std::optional<T>& v) {
    return v ? json(*v) : json(nullptr);
}

json letter(char c) { return c ? json(std::string(1, c)) : json(nullptr); }

json dateJson(const std::optional<Date>& d) {
    if (!d) return nullptr;
    char buf[16];
    std::snprintf(buf, sizeof buf, "%04d-%02d-%02d", d->year, d->month, d->day);
    return buf;
}

json nmeaFields(const NmeaData& data) {
    json j = json::object();
    if (const auto* g = std::get_if<Gga>(&data)) {
        j = {{"tod_s", opt(g->tod_s)},       {"lat_deg", opt(g->lat_deg)},
             {"lon_deg", opt(g->lon_deg)},   {"quality", g->quality},
             {"satellites", opt(g->satellites)}, {"hdop", opt(g->hdop)},
             {"alt_m", opt(g->alt_m)},       {"geoid_sep_m", opt(g->geoid_sep_m)},
             {"dgps_age_s", opt(g->dgps_age_s)}, {"dgps_station", opt(g->dgps_station)}};
    } else if (const auto* r = std::get_if<Rmc>(&data)) {
        j = {{"tod_s", opt(r->tod_s)},     {"valid", r->valid},
             {"lat_deg", opt(r->lat_deg)}, {"lon_deg", opt(r->lon_deg)},
             {"sog_mps", opt(r->sog_mps)}, {"cog_deg", opt(r->cog_deg)},
             {"date", dateJson(r->date)},  {"mag_var_deg", opt(r->mag_var_deg)},
             {"mode", letter(r->mode)}};
    } else if (const auto* v = std::get_if<Vtg>(&data)) {
        j = {{"cog_true_deg", opt(v->cog_true_deg)}, {"cog_mag_deg", opt(v->cog_mag_deg)},
             {"sog_mps", opt(v->sog_mps)}, {"mode", letter(v->mode)}};
    } else if (const auto* h = std::get_if<Hdt>(&data)) {
        j = {{"heading_deg", h->heading_deg}};
    } else if (const auto* z = std::get_if<Zda>(&data)) {
        j = {{"tod_s", z->tod_s}, {"date", dateJson(z->date)},
             {"zone_hours", opt(z->zone_hours)}, {"zone_minutes", opt(z->zone_minutes)}};
    } else if (const auto* s = std::get_if<Gst>(&data)) {
        j = {{"tod_s", opt(s->tod_s)},
             {"rms_m", opt(s->rms_m)},
             {"sigma_major_m", opt(s->sigma_major_m)},
             {"sigma_minor_m", opt(s->sigma_minor_m)},
             {"orient_deg", opt(s->orient_deg)},
             {"sigma_lat_m", opt(s->sigma_lat_m)},
             {"sigma_lon_m", opt(s->sigma_lon_m)},
             {"sigma_alt_m", opt(s->sigma_alt_m)}};
    } else if (const auto* n = std::get_if<Gns>(&data)) {
        j = {{"tod_s", opt(n->tod_s)},       {"lat_deg", opt(n->lat_deg)},
             {"lon_deg", opt(n->lon_deg)},   {"mode", n->mode},
             {"satellites", opt(n->satellites)}, {"hdop", opt(n->hdop)},
             {"alt_m", opt(n->alt_m)},       {"geoid_sep_m", opt(n->geoid_sep_m)},
             {"dgps_age_s", opt(n->dgps_age_s)}, {"dgps_station", opt(n->dgps_station)},
             {"nav_status", letter(n->nav_status)}};
    } else if (const auto* l = std::get_if<Gll>(&data)) {
        j = {{"lat_deg", opt(l->lat_deg)}, {"lon_deg", opt(l->lon_deg)},
             {"tod_s", opt(l->tod_s)},     {"valid", l->valid},
             {"mode", letter(l->mode)}};
    } else if (const auto* p = std::get_if<Dpt>(&data)) {
        j = {{"depth_m", p->depth_m}, {"offset_m", opt(p->offset_m)},
             {"max_range_m", opt(p->max_range_m)}};
    } else if (const auto* b = std::get_if<Dbt>(&data)) {
        j = {{"depth_m", b->depth_m}};
    }
    return j;
}

json recordFields(const FieldRecord& r, const FieldMap& map) {
    json j = json::object();
    if (map.time) {
        j["tod_s"] = opt(r.tod_s);
        if (carriesDate(map.time_format)) j["utc_ns"] = opt(r.utc_ns);
    }
    if (map.sensor) j["sensor"] = r.sensor;
    if (map.field_nT) j["field_nT"] = opt(r.field_nT);
    if (map.quality) j["quality"] = opt(r.quality);
    if (map.depth_m) j["depth_m"] = opt(r.depth_m);
    if (map.altitude_m) j["altitude_m"] = opt(r.altitude_m);
    if (map.cable_out_m) j["cable_out_m"] = opt(r.cable_out_m);
    return j;
}

struct Options {
    std::string capture;
    std::string config;
    std::string as;
};

class Inspector {
public:
    Inspector(std::vector<FieldMap> maps, std::string as) : m_maps(std::move(maps)) {
        if (as.empty() || as == "nmea") {
            m_mode = as.empty() ? Mode::Auto : Mode::Nmea;
            return;
        }
        for (std::size_t i = 0; i < m_maps.size(); ++i) {
            if (m_maps[i].name == as) m_only = static_cast<int>(i);
        }
        if (m_only < 0) {
            std::string names = "nmea";
            for (const auto& m : m_maps) names += ", " + m.name;
            throw std::runtime_error("--as " + as + ": no such layout (known: " + names + ")");
        }
        m_mode = Mode::Map;
    }

    void line(std::string_view bytes, std::uint8_t flags) {
        ++m_line_no;
        json j = {{"line", m_line_no}};
        if (flags & (kLineTruncated | kLineContinued)) {
            // The framer cut a line longer than it keeps; each piece is reported, none decoded.
            j["source"] = "none";
            finish(j, "none", Reason::TooLong,
                   (flags & kLineContinued) ? "continuation of a line longer than 4096 bytes"
                                            : "line longer than 4096 bytes, cut by the framer");
            return;
        }
        const bool looks_nmea = !bytes.empty() && (bytes[0] == '$' || bytes[0] == '!');
        if (m_mode == Mode::Nmea || (m_mode == Mode::Auto && looks_nmea)) {
            nmea(j, bytes);
        } else {
            fieldMap(j, bytes);
        }
    }

    void summary() {
        json s = {{"lines", m_line_no}, {"by_type", m_by_type}, {"by_reason", m_by_reason}};
        print(json{{"summary", s}});
    }

private:
    enum class Mode { Auto, Nmea, Map };

    void nmea(json& j, std::string_view bytes) {
        const NmeaSentence s = decodeNmea(bytes);
        m_clock.observe(s);
        j["source"] = "nmea";
        std::string type = "nmea";
        if (!s.type.empty()) {
            j["talker"] = s.talker;
            j["sentence"] = s.type;
            type += ":" + s.type;
        }
        if (isUsable(s.reason)) j["fields"] = nmeaFields(s.data);
        finish(j, type, s.reason, s.detail);
    }

    void fieldMap(json& j, std::string_view bytes) {
        MatchedRecord m;
        if (m_mode == Mode::Map) {
            m.map_index = m_only;
            m.record = decodeFieldMap(m_maps[static_cast<std::size_t>(m_only)], bytes);
        } else {
            m = decodeWithMaps(m_maps, bytes);
        }
        if (m.map_index < 0) {
            j["source"] = "none";
            finish(j, "none", m.record.reason, m.record.detail);
            return;
        }
        const FieldMap& map = m_maps[static_cast<std::size_t>(m.map_index)];
        j["source"] = "fieldmap";
        j["layout"] = map.name;
        if (isUsable(m.record.reason)) {
            json f = recordFields(m.record, map);
            // Full UTC from the latest NMEA date, when the layout gives only a time of day.
            if (m.record.tod_s) f["utc_ns"] = opt(m_clock.toUtc(*m.record.tod_s));
            j["fields"] = std::move(f);
        }
        finish(j, "fieldmap:" + map.name, m.record.reason, m.record.detail);
    }

    void finish(json& j, const std::string& type, Reason r, const std::string& detail) {
        j["reason"] = reasonName(r);
        if (!detail.empty()) j["detail"] = detail;
        ++m_by_type[type];
        ++m_by_reason[std::string(reasonName(r))];
        print(j);
    }

    static void print(const json& j) {
        // Replace invalid UTF-8 (binary bytes echoed in a detail) instead of throwing.
        const std::string s = j.dump(-1, ' ', false, json::error_handler_t::replace);
        std::fwrite(s.data(), 1, s.size(), stdout);
        std::fputc('\n', stdout);
    }

    std::vector<FieldMap> m_maps;
    Mode m_mode = Mode::Auto;
    int m_only = -1;
    InstrumentClock m_clock;
    std::size_t m_line_no = 0;
    std::map<std::string, std::size_t> m_by_type;
    std::map<std::string, std::size_t> m_by_reason;
};

void runInspect(const Options& o) {
    std::vector<FieldMap> maps = defaultFieldMaps();
    if (!o.config.empty()) {
        const toml::table root = config::parseFile(o.config);
        std::vector<FieldMap> configured = parseFieldMaps(config::Section(root, o.config));
        if (!configured.empty()) maps = std::move(configured);
    }
    std::ifstream in(o.capture, std::ios::binary);
    if (!in) throw std::runtime_error("cannot open capture " + o.capture);

    Inspector inspector(std::move(maps), o.as);
    LineFramer framer([&](std::string_view bytes, std::uint8_t flags) { inspector.line(bytes, flags); },
                      kFramerMaxBytes);
    std::vector<char> buf(1 << 16);
    while (in) {
        in.read(buf.data(), static_cast<std::streamsize>(buf.size()));
        const auto got = static_cast<std::size_t>(in.gcount());
        if (got == 0) break;
        framer.feed(std::string_view(buf.data(), got));
    }
    framer.flush();
    inspector.summary();
    std::fflush(stdout);
}

}  // namespace

void addInspectCommand(CLI::App& app) {
    auto opts = std::make_shared<Options>();
    CLI::App* cmd = app.add_subcommand(
        "inspect", "Decode every line of a capture file and print one JSON object per line");
    cmd->add_option("capture", opts->capture, "Capture file (raw instrument lines)")
        ->required()
        ->check(CLI::ExistingFile);
    cmd->add_option("--config", opts->config,
                    "Survey config whose [fieldmap.NAME] tables replace the default layouts")
        ->check(CLI::ExistingFile);
    cmd->add_option("--as", opts->as,
                    "Decode every line as this format: nmea, or a layout name (default layouts: "
                    "mag, alt, cable)");
    cmd->callback([opts] { runInspect(*opts); });
}

}  // namespace sg::app
