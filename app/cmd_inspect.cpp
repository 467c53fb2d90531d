// `swathguard inspect CAPTURE [--config FILE] [--as nmea|NAME] [--checksum-optional-talkers
// ID,...]`: decodes every line of a capture file and prints one JSON object per line (line number,
// source type, sentence or layout, decoded fields or the reason it failed), then one summary object
// with counts per type and per reason.
// Lines starting with '$' or '!' are NMEA; others are tried against the field maps (the
// [fieldmap.NAME] tables of --config, else the default SGM/SGA/SGC layouts). Output format:
// docs/formats.md, "swathguard inspect".
// The JSON is written directly into one reused buffer (no JSON document per line): building and
// freeing a document per line took most of the command's time (docs/formats.md, "Speed").
#include <array>
#include <cmath>
#include <cstdio>
#include <map>
#include <memory>
#include <optional>
#include <stdexcept>
#include <string>
#include <vector>

#include <CLI/CLI.hpp>
#include <fmt/compile.h>
#include <fmt/format.h>

#include "app/commands.hpp"
#include "common/config_section.hpp"
#include "common/line_framer.hpp"
#include "common/nmea_talker.hpp"
#include "common/received_line.hpp"
#include "decode/field_map.hpp"
#include "decode/instrument_clock.hpp"
#include "decode/nmea.hpp"

namespace sg::app {

namespace {

using namespace sg::decode;

constexpr std::size_t kFramerMaxBytes = 4096;
constexpr std::size_t kOutFlushBytes = 1 << 20;

// One JSON text being written: objects, keys and values appended in order into a buffer.
// Numbers and strings come out as nlohmann::json's dump() writes them (the format this command
// had before), so the output is unchanged: doubles shortest round-trip with ".0" on integral
// values, null for NaN/inf, control characters escaped, invalid UTF-8 replaced by U+FFFD.
class JsonOut {
public:
    explicit JsonOut(fmt::memory_buffer& b) : m_b(b) {}

    void open() {
        sep();
        m_b.push_back('{');
        m_first = true;
    }
    void close() {
        m_b.push_back('}');
        m_first = false;
    }
    // "key": then the value must follow (one of the value calls, or open()). `k` is one of this
    // file's key names (plain ASCII, nothing to escape); keyEscaped() for any other text.
    void key(std::string_view k) {
        sep();
        m_b.push_back('"');
        append(k);
        append("\":");
        m_first = true;  // the value needs no comma
    }
    void keyEscaped(std::string_view k) {
        sep();
        str(k);
        m_b.push_back(':');
        m_first = true;
    }
    void null() { raw("null"); }
    void boolean(bool v) { raw(v ? "true" : "false"); }
    void integer(std::int64_t v) {
        sep();
        const fmt::format_int f(v);
        m_b.append(f.data(), f.data() + f.size());
    }
    void number(double v) {
        sep();
        if (!std::isfinite(v)) {
            append("null");
            return;
        }
        char text[40];
        char* const end = fmt::format_to(text, FMT_COMPILE("{}"), v);
        bool plain = true;  // no '.', no exponent: nlohmann adds ".0"
        for (const char* p = text; p != end; ++p) {
            if (*p == '.' || *p == 'e') plain = false;
        }
        m_b.append(text, end);
        if (plain) append(".0");
    }
    void string(std::string_view s) {
        sep();
        str(s);
    }
    template <typename T>
    void opt(const std::optional<T>& v) {
        if (!v) {
            null();
        } else if constexpr (std::is_floating_point_v<T>) {
            number(*v);
        } else {
            integer(*v);
        }
    }
    void letter(char c) {
        if (c) {
            string(std::string_view(&c, 1));
        } else {
            null();
        }
    }
    void date(const std::optional<Date>& d) {
        if (!d) return null();
        sep();
        fmt::format_to(std::back_inserter(m_b), "\"{:04d}-{:02d}-{:02d}\"", d->year, d->month,
                       d->day);
    }
    void endLine() {
        m_b.push_back('\n');
        m_first = true;
    }

private:
    void sep() {
        if (!m_first) m_b.push_back(',');
        m_first = false;
    }
    void raw(std::string_view s) {
        sep();
        append(s);
    }
    void append(std::string_view s) { m_b.append(s.data(), s.data() + s.size()); }

    // A JSON string (RFC 8259, section 7) with nlohmann's escapes: \" \\ \b \f \n \r \t, other
    // bytes below 0x20 as \u00XX, valid UTF-8 as is, each invalid UTF-8 byte as U+FFFD.
    void str(std::string_view s) {
        m_b.push_back('"');
        std::size_t i = 0;
        const std::size_t n = s.size();
        while (i < n) {
            std::size_t j = i;
            while (j < n) {
                const auto c = static_cast<unsigned char>(s[j]);
                if (c < 0x20 || c == '"' || c == '\\' || c >= 0x80) break;
                ++j;
            }
            append(s.substr(i, j - i));
            if (j == n) break;
            const auto c = static_cast<unsigned char>(s[j]);
            if (c >= 0x80) {
                const std::size_t len = utf8Length(s, j);
                if (len == 0) {
                    append("\xEF\xBF\xBD");
                    i = j + 1;
                } else {
                    append(s.substr(j, len));
                    i = j + len;
                }
                continue;
            }
            switch (c) {
                case '"': append("\\\""); break;
                case '\\': append("\\\\"); break;
                case '\b': append("\\b"); break;
                case '\f': append("\\f"); break;
                case '\n': append("\\n"); break;
                case '\r': append("\\r"); break;
                case '\t': append("\\t"); break;
                default: fmt::format_to(std::back_inserter(m_b), "\\u{:04x}", c); break;
            }
            i = j + 1;
        }
        m_b.push_back('"');
    }
    // Length of the well-formed UTF-8 sequence at s[i] (Unicode Standard, table 3-7), 0 if none.
    static std::size_t utf8Length(std::string_view s, std::size_t i) {
        const auto b = [&](std::size_t k) {
            return i + k < s.size() ? static_cast<unsigned char>(s[i + k]) : 0u;
        };
        const unsigned c = b(0);
        const auto cont = [&](std::size_t k, unsigned lo = 0x80, unsigned hi = 0xBF) {
            return b(k) >= lo && b(k) <= hi;
        };
        if (c >= 0xC2 && c <= 0xDF) return cont(1) ? 2 : 0;
        if (c == 0xE0) return cont(1, 0xA0) && cont(2) ? 3 : 0;
        if ((c >= 0xE1 && c <= 0xEC) || c == 0xEE || c == 0xEF) return cont(1) && cont(2) ? 3 : 0;
        if (c == 0xED) return cont(1, 0x80, 0x9F) && cont(2) ? 3 : 0;
        if (c == 0xF0) return cont(1, 0x90) && cont(2) && cont(3) ? 4 : 0;
        if (c >= 0xF1 && c <= 0xF3) return cont(1) && cont(2) && cont(3) ? 4 : 0;
        if (c == 0xF4) return cont(1, 0x80, 0x8F) && cont(2) && cont(3) ? 4 : 0;
        return 0;
    }

    fmt::memory_buffer& m_b;
    bool m_first = true;
};

void nmeaFields(JsonOut& j, const NmeaData& data) {
    j.open();
    if (const auto* g = std::get_if<Gga>(&data)) {
        j.key("tod_s"), j.opt(g->tod_s);
        j.key("lat_deg"), j.opt(g->lat_deg);
        j.key("lon_deg"), j.opt(g->lon_deg);
        j.key("quality"), j.integer(g->quality);
        j.key("satellites"), j.opt(g->satellites);
        j.key("hdop"), j.opt(g->hdop);
        j.key("alt_m"), j.opt(g->alt_m);
        j.key("geoid_sep_m"), j.opt(g->geoid_sep_m);
        j.key("dgps_age_s"), j.opt(g->dgps_age_s);
        j.key("dgps_station"), j.opt(g->dgps_station);
    } else if (const auto* r = std::get_if<Rmc>(&data)) {
        j.key("tod_s"), j.opt(r->tod_s);
        j.key("valid"), j.boolean(r->valid);
        j.key("lat_deg"), j.opt(r->lat_deg);
        j.key("lon_deg"), j.opt(r->lon_deg);
        j.key("sog_mps"), j.opt(r->sog_mps);
        j.key("cog_deg"), j.opt(r->cog_deg);
        j.key("date"), j.date(r->date);
        j.key("mag_var_deg"), j.opt(r->mag_var_deg);
        j.key("mode"), j.letter(r->mode);
    } else if (const auto* v = std::get_if<Vtg>(&data)) {
        j.key("cog_true_deg"), j.opt(v->cog_true_deg);
        j.key("cog_mag_deg"), j.opt(v->cog_mag_deg);
        j.key("sog_mps"), j.opt(v->sog_mps);
        j.key("mode"), j.letter(v->mode);
    } else if (const auto* h = std::get_if<Hdt>(&data)) {
        j.key("heading_deg"), j.number(h->heading_deg);
    } else if (const auto* z = std::get_if<Zda>(&data)) {
        j.key("tod_s"), j.number(z->tod_s);
        j.key("date"), j.date(z->date);
        j.key("zone_hours"), j.opt(z->zone_hours);
        j.key("zone_minutes"), j.opt(z->zone_minutes);
    } else if (const auto* s = std::get_if<Gst>(&data)) {
        j.key("tod_s"), j.opt(s->tod_s);
        j.key("rms_m"), j.opt(s->rms_m);
        j.key("sigma_major_m"), j.opt(s->sigma_major_m);
        j.key("sigma_minor_m"), j.opt(s->sigma_minor_m);
        j.key("orient_deg"), j.opt(s->orient_deg);
        j.key("sigma_lat_m"), j.opt(s->sigma_lat_m);
        j.key("sigma_lon_m"), j.opt(s->sigma_lon_m);
        j.key("sigma_alt_m"), j.opt(s->sigma_alt_m);
    } else if (const auto* n = std::get_if<Gns>(&data)) {
        j.key("tod_s"), j.opt(n->tod_s);
        j.key("lat_deg"), j.opt(n->lat_deg);
        j.key("lon_deg"), j.opt(n->lon_deg);
        j.key("mode"), j.string(n->mode);
        j.key("satellites"), j.opt(n->satellites);
        j.key("hdop"), j.opt(n->hdop);
        j.key("alt_m"), j.opt(n->alt_m);
        j.key("geoid_sep_m"), j.opt(n->geoid_sep_m);
        j.key("dgps_age_s"), j.opt(n->dgps_age_s);
        j.key("dgps_station"), j.opt(n->dgps_station);
        j.key("nav_status"), j.letter(n->nav_status);
    } else if (const auto* l = std::get_if<Gll>(&data)) {
        j.key("lat_deg"), j.opt(l->lat_deg);
        j.key("lon_deg"), j.opt(l->lon_deg);
        j.key("tod_s"), j.opt(l->tod_s);
        j.key("valid"), j.boolean(l->valid);
        j.key("mode"), j.letter(l->mode);
    } else if (const auto* p = std::get_if<Dpt>(&data)) {
        j.key("depth_m"), j.number(p->depth_m);
        j.key("offset_m"), j.opt(p->offset_m);
        j.key("max_range_m"), j.opt(p->max_range_m);
    } else if (const auto* b = std::get_if<Dbt>(&data)) {
        j.key("depth_m"), j.number(b->depth_m);
    }
    j.close();
}

struct Options {
    std::string capture;
    std::string config;
    std::string as;
    std::vector<std::string> checksum_optional_talkers;  // as [[input]] checksum_optional_talkers
};

class Inspector {
public:
    Inspector(std::vector<FieldMap> maps, std::string as,
              std::vector<std::string> checksum_optional_talkers)
        : m_maps(std::move(maps)), m_nmea(std::move(checksum_optional_talkers)), m_json(m_out) {
        m_out.reserve(kOutFlushBytes + 8192);
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
        // The file's line number: continuation pieces of a line cut by the framer keep it.
        if (flags & kLineContinued) {
            ++m_piece;
        } else {
            ++m_line_no;
            m_piece = 1;
        }
        m_json.open();
        m_json.key("line"), m_json.integer(static_cast<std::int64_t>(m_line_no));
        if (m_piece > 1) m_json.key("piece"), m_json.integer(static_cast<std::int64_t>(m_piece));
        if (flags & (kLineTruncated | kLineContinued)) {
            // The framer cut a line longer than it keeps; each piece is reported, none decoded.
            m_json.key("source"), m_json.string("none");
            finish("none", Reason::TooLong,
                   (flags & kLineContinued) ? "continuation of a line longer than 4096 bytes"
                                            : "line longer than 4096 bytes, cut by the framer");
            return;
        }
        const bool looks_nmea = !bytes.empty() && (bytes[0] == '$' || bytes[0] == '!');
        if (m_mode == Mode::Nmea || (m_mode == Mode::Auto && looks_nmea)) {
            nmea(bytes);
        } else {
            fieldMap(bytes);
        }
    }

    void summary(bool bom_skipped) {
        m_json.open();
        m_json.key("summary"), m_json.open();
        m_json.key("lines"), m_json.integer(static_cast<std::int64_t>(m_line_no));
        m_json.key("records"), m_json.integer(static_cast<std::int64_t>(m_records));
        if (bom_skipped) m_json.key("bom_skipped"), m_json.boolean(true);
        m_json.key("by_type"), m_json.open();
        for (const auto& [k, v] : m_by_type)
            m_json.keyEscaped(k), m_json.integer(static_cast<std::int64_t>(v));
        m_json.close();
        // Reason names in alphabetical order, as the map-backed JSON object printed them.
        std::map<std::string_view, std::size_t> by_reason;
        for (int r = 0; r < kReasonCount; ++r) {
            if (m_by_reason[static_cast<std::size_t>(r)] > 0)
                by_reason[reasonName(static_cast<Reason>(r))] = m_by_reason[static_cast<std::size_t>(r)];
        }
        m_json.key("by_reason"), m_json.open();
        for (const auto& [k, v] : by_reason) m_json.key(k), m_json.integer(static_cast<std::int64_t>(v));
        m_json.close();
        m_json.close();
        m_json.close();
        m_json.endLine();
        flushOut();
    }

    void flushOut() {
        std::fwrite(m_out.data(), 1, m_out.size(), stdout);
        m_out.clear();
    }

private:
    enum class Mode { Auto, Nmea, Map };

    void nmea(std::string_view bytes) {
        const NmeaSentence s = m_nmea.decode(bytes);
        m_clock.observe(s);
        m_json.key("source"), m_json.string("nmea");
        char type[16] = "nmea";
        std::size_t type_len = 4;
        if (!s.type.empty()) {
            m_json.key("talker"), m_json.string(s.talker);
            m_json.key("sentence"), m_json.string(s.type);
            type[type_len++] = ':';
            const std::size_t n = std::min(s.type.size(), sizeof type - type_len);
            s.type.copy(type + type_len, n);
            type_len += n;
        }
        if (isUsable(s.reason)) {
            m_json.key("fields");
            nmeaFields(m_json, s.data);
        }
        finish(std::string_view(type, type_len), s.reason, s.detail);
    }

    void fieldMap(std::string_view bytes) {
        MatchedRecord m;
        if (m_mode == Mode::Map) {
            m.map_index = m_only;
            m.record = decodeFieldMap(m_maps[static_cast<std::size_t>(m_only)], bytes);
        } else {
            m = decodeWithMaps(m_maps, bytes);
        }
        if (m.map_index < 0) {
            m_json.key("source"), m_json.string("none");
            finish("none", m.record.reason, m.record.detail);
            return;
        }
        const FieldMap& map = m_maps[static_cast<std::size_t>(m.map_index)];
        m_json.key("source"), m_json.string("fieldmap");
        m_json.key("layout"), m_json.string(map.name);
        if (isUsable(m.record.reason)) {
            const FieldRecord& r = m.record;
            // Full UTC from the latest NMEA date, when the layout gives only a time of day.
            std::optional<TimeNs> clock_utc;
            if (r.tod_s) clock_utc = m_clock.toUtc(*r.tod_s);
            const bool unix_s = map.time && carriesDate(map.time_format);
            m_json.key("fields"), m_json.open();
            if (map.time) {
                m_json.key("tod_s"), m_json.opt(r.tod_s);
                if (unix_s) m_json.key("utc_ns"), m_json.opt(r.utc_ns ? r.utc_ns : clock_utc);
            }
            if (map.sensor) m_json.key("sensor"), m_json.integer(r.sensor);
            if (map.field_nT) m_json.key("field_nT"), m_json.opt(r.field_nT);
            if (map.quality) m_json.key("quality"), m_json.opt(r.quality);
            if (map.depth_m) m_json.key("depth_m"), m_json.opt(r.depth_m);
            if (map.altitude_m) m_json.key("altitude_m"), m_json.opt(r.altitude_m);
            if (map.cable_out_m) m_json.key("cable_out_m"), m_json.opt(r.cable_out_m);
            if (r.tod_s && !unix_s) m_json.key("utc_ns"), m_json.opt(clock_utc);
            m_json.close();
        }
        m_type.assign("fieldmap:");
        m_type += map.name;
        finish(m_type, m.record.reason, m.record.detail);
    }

    void finish(std::string_view type, Reason r, std::string_view detail) {
        m_json.key("reason"), m_json.string(reasonName(r));
        if (!detail.empty()) m_json.key("detail"), m_json.string(detail);
        m_json.close();
        m_json.endLine();
        auto it = m_by_type.find(type);
        if (it == m_by_type.end()) it = m_by_type.emplace(std::string(type), 0).first;
        ++it->second;
        ++m_by_reason[static_cast<std::size_t>(r)];
        ++m_records;
        if (m_out.size() >= kOutFlushBytes) flushOut();
    }

    std::vector<FieldMap> m_maps;
    Mode m_mode = Mode::Auto;
    int m_only = -1;
    InstrumentClock m_clock;
    NmeaStreamDecoder m_nmea;  // one capture file = one source (checksum rule per source,
                               // minus --checksum-optional-talkers)
    std::size_t m_line_no = 0;
    std::size_t m_piece = 0;
    std::size_t m_records = 0;
    std::map<std::string, std::size_t, std::less<>> m_by_type;
    std::array<std::size_t, kReasonCount> m_by_reason{};
    std::string m_type;
    fmt::memory_buffer m_out;
    JsonOut m_json;
};

void runInspect(const Options& o) {
    for (const auto& id : o.checksum_optional_talkers) {
        if (!isTalkerId(id))
            throw std::runtime_error(
                fmt::format("--checksum-optional-talkers {}: expected NMEA talker ids, each {}", id,
                            kTalkerIdWords));
    }
    std::vector<FieldMap> maps = defaultFieldMaps();
    if (!o.config.empty()) {
        const toml::table root = config::parseFile(o.config);
        std::vector<FieldMap> configured = parseFieldMaps(config::Section(root, o.config));
        if (!configured.empty()) maps = std::move(configured);
    }
    std::unique_ptr<std::FILE, int (*)(std::FILE*)> in(std::fopen(o.capture.c_str(), "rb"),
                                                       &std::fclose);
    if (!in) throw std::runtime_error("cannot open capture " + o.capture);

    Inspector inspector(std::move(maps), o.as, o.checksum_optional_talkers);
    LineFramer framer([&](std::string_view bytes, std::uint8_t flags) { inspector.line(bytes, flags); },
                      kFramerMaxBytes);
    std::vector<char> buf(1 << 18);
    for (;;) {
        const std::size_t got = std::fread(buf.data(), 1, buf.size(), in.get());
        if (got == 0) break;
        framer.feed(std::string_view(buf.data(), got));
    }
    if (std::ferror(in.get())) throw std::runtime_error("cannot read capture " + o.capture);
    framer.flush();
    inspector.summary(framer.bomSkipped());
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
    cmd->add_option("--checksum-optional-talkers", opts->checksum_optional_talkers,
                    "NMEA talker ids (e.g. HE) whose sentences without a checksum are accepted "
                    "after this file has sent checksums (as the [[input]] key "
                    "checksum_optional_talkers)")
        ->delimiter(',');
    cmd->callback([opts] { runInspect(*opts); });
}

}  // namespace sg::app
