// Field-map decoding of delimited instrument strings, its configuration, and the default layouts.
#include "decode/field_map.hpp"

#include <array>
#include <cmath>

#include "decode/field_parse.hpp"
#include "decode/nmea.hpp"

namespace sg::decode {

namespace {

struct Range {
    double lo;
    double hi;
};
// Plausible ranges (see the header): sensor depth below the surface (a little negative allows a
// calibration offset above the surface), altitude above the seabed, cable paid out.
constexpr Range kDepthRange{-100.0, 11'000.0};
constexpr Range kAltitudeRange{0.0, 10'000.0};
constexpr Range kCableRange{0.0, 20'000.0};
constexpr Range kFieldRange{kMinField_nT, kMaxField_nT};
constexpr int kMaxSensor = 99;

constexpr std::size_t kMaxFields = kMaxFieldIndex + 1;

std::string_view stripTerminator(std::string_view line) {
    while (!line.empty() && (line.back() == '\n' || line.back() == '\r')) line.remove_suffix(1);
    return line;
}

// Checks that do not depend on the layout. Returns Ok when the line may be decoded.
Reason precheck(std::string_view line, char delimiter, std::string& detail) {
    if (line.find_first_not_of(' ') == std::string_view::npos) return Reason::EmptyLine;
    if (line.size() > kMaxFieldMapBytes) {
        detail = std::to_string(line.size()) + " bytes > " + std::to_string(kMaxFieldMapBytes);
        return Reason::TooLong;
    }
    for (std::size_t i = 0; i < line.size(); ++i) {
        const auto c = static_cast<unsigned char>(line[i]);
        if ((c < 0x20 && !(c == '\t' && delimiter == '\t')) || c == 0x7F) {
            detail = detail::binaryByteDetail(c, i);
            return Reason::BinaryBytes;
        }
    }
    return Reason::Ok;
}

std::string_view firstToken(const FieldMap& map, std::string_view line) {
    std::string_view first = line.substr(0, line.find(map.delimiter));
    if (map.checksum == MapChecksum::Xor) first = first.substr(0, first.find('*'));
    return first;
}

FieldRecord failed(FieldRecord&& r, Reason reason, std::string detail) {
    r.reason = reason;
    r.detail = std::move(detail);
    return std::move(r);
}

std::string fieldDetail(int index, const char* name, const char* what) {
    return "field " + std::to_string(index) + " (" + name + "): " + what;
}

}  // namespace

int FieldMap::minFields() const {
    int hi = start.empty() ? -1 : 0;
    for (const auto& idx : {time, field_nT, quality, depth_m, altitude_m, sensor, cable_out_m}) {
        if (idx && *idx > hi) hi = *idx;
    }
    return hi + 1;
}

FieldRecord decodeFieldMap(const FieldMap& map, std::string_view line) {
    FieldRecord r;
    line = stripTerminator(line);
    if (const Reason pre = precheck(line, map.delimiter, r.detail); pre != Reason::Ok) {
        r.reason = pre;
        return r;
    }
    if (!map.start.empty() && firstToken(map, line) != map.start) {
        return failed(std::move(r), Reason::BadStart, "first field is not '" + map.start + "'");
    }

    std::string_view body = line;
    if (map.checksum == MapChecksum::Xor) {
        const std::size_t star = line.rfind('*');
        if (star == std::string_view::npos) {
            return failed(std::move(r), Reason::BadChecksum, "no '*hh' checksum");
        }
        const std::string_view cs = line.substr(star + 1);
        const int hi = cs.size() == 2 ? detail::hexValue(cs[0]) : -1;
        const int lo = cs.size() == 2 ? detail::hexValue(cs[1]) : -1;
        if (hi < 0 || lo < 0) {
            return failed(std::move(r), Reason::BadChecksum,
                          "'*' not followed by exactly two hex digits");
        }
        body = line.substr(0, star);
        const std::uint8_t expected = xorChecksum(body);
        if (expected != static_cast<std::uint8_t>(hi * 16 + lo)) {
            const char got[3] = {cs[0], cs[1], 0};
            const char want[3] = {detail::kHexUpper[expected >> 4],
                                  detail::kHexUpper[expected & 0xF], 0};
            return failed(std::move(r), Reason::BadChecksum,
                          std::string("sent ") + got + ", computed " + want);
        }
    }

    std::array<std::string_view, kMaxFields> f{};
    std::size_t n = 0;
    for (std::size_t pos = 0;;) {
        const std::size_t next = body.find(map.delimiter, pos);
        if (n < kMaxFields) f[n] = body.substr(pos, next == std::string_view::npos
                                                       ? std::string_view::npos
                                                       : next - pos);
        ++n;
        if (next == std::string_view::npos) break;
        pos = next + 1;
    }
    if (n < static_cast<std::size_t>(map.minFields())) {
        return failed(std::move(r), Reason::Truncated,
                      std::to_string(n) + " fields, layout '" + map.name + "' needs " +
                          std::to_string(map.minFields()));
    }
    auto at = [&](int i) { return f[static_cast<std::size_t>(i)]; };

    if (map.time) {
        const std::string_view s = at(*map.time);
        const char* what = nullptr;
        if (s.empty()) {
            what = "empty";
        } else if (map.time_format == TimeFormat::HhMmSs) {
            double t = 0;
            what = detail::parseHhMmSs(s, t);
            if (!what) r.tod_s = t;
        } else if (map.time_format == TimeFormat::SecondsOfDay) {
            double t = 0;
            if (!detail::parseDecimal(s, t)) {
                what = "not a number";
            } else if (t < 0.0 || t >= 86'401.0) {
                what = "seconds of day outside 0..86401";
            } else {
                r.tod_s = t;
            }
        } else if (map.time_format == TimeFormat::UnixS) {
            TimeNs t = 0;
            what = detail::parseUnixNs(s, t);
            if (!what) r.utc_ns = t;
        } else {
            TimeNs t = 0;
            what = detail::parseIso8601Ns(s, map.time_zone_s, t);
            if (!what) r.utc_ns = t;
        }
        if (what) return failed(std::move(r), Reason::BadField, fieldDetail(*map.time, "time", what));
    }
    if (map.sensor) {
        int v = 0;
        if (!detail::parseUnsigned(at(*map.sensor), kMaxSensor, v)) {
            return failed(std::move(r), Reason::BadField,
                          fieldDetail(*map.sensor, "sensor", "expected an integer 0..99"));
        }
        r.sensor = v;
    }

    struct Measured {
        const std::optional<int>& index;
        const char* name;
        Range range;
        std::optional<double>& out;
    };
    const std::array<Measured, 5> measured = {{
        {map.field_nT, "field_nT", kFieldRange, r.field_nT},
        {map.quality, "quality", Range{0.0, 1e9}, r.quality},
        {map.depth_m, "depth_m", kDepthRange, r.depth_m},
        {map.altitude_m, "altitude_m", kAltitudeRange, r.altitude_m},
        {map.cable_out_m, "cable_out_m", kCableRange, r.cable_out_m},
    }};
    for (const auto& m : measured) {
        if (!m.index) continue;
        const std::string_view s = at(*m.index);
        if (s.empty()) continue;  // the instrument had no value
        double v = 0;
        if (!detail::parseDecimal(s, v)) {
            return failed(std::move(r), Reason::BadField, fieldDetail(*m.index, m.name, "not a number"));
        }
        if (v < m.range.lo || v > m.range.hi) {
            return failed(std::move(r), Reason::BadField,
                          fieldDetail(*m.index, m.name,
                                      &m.out == &r.field_nT
                                          ? "outside the plausible Earth field 10000..120000 nT"
                                          : "out of range"));
        }
        m.out = v;
    }
    r.reason = Reason::Ok;
    return r;
}

MatchedRecord decodeWithMaps(std::span<const FieldMap> maps, std::string_view line) {
    MatchedRecord result;
    line = stripTerminator(line);
    {
        std::string detail;
        const Reason pre = precheck(line, '\t', detail);
        if (pre != Reason::Ok) {
            result.record.reason = pre;
            result.record.detail = std::move(detail);
            return result;
        }
    }
    for (std::size_t i = 0; i < maps.size(); ++i) {
        if (!maps[i].start.empty() && firstToken(maps[i], line) == maps[i].start) {
            result.map_index = static_cast<int>(i);
            result.record = decodeFieldMap(maps[i], line);
            return result;
        }
    }
    bool tried = false;
    for (std::size_t i = 0; i < maps.size(); ++i) {
        if (!maps[i].start.empty()) continue;
        FieldRecord r = decodeFieldMap(maps[i], line);
        if (isUsable(r.reason)) {
            result.map_index = static_cast<int>(i);
            result.record = std::move(r);
            return result;
        }
        if (!tried) result.record = std::move(r);
        tried = true;
    }
    if (!tried) {
        result.record.reason = Reason::BadStart;
        result.record.detail = "no field map starts with '" +
                               std::string(line.substr(0, std::min<std::size_t>(line.find(','), 16))) +
                               "'";
    }
    return result;
}

FieldMap parseFieldMap(const config::Section& t) {
    t.allowOnly({"start", "delimiter", "checksum", "time", "time_format", "time_zone", "field_nT",
                 "quality", "depth_m", "altitude_m", "sensor", "cable_out_m"});
    FieldMap m;
    const std::string& path = t.path();
    const std::size_t dot = path.rfind('.');
    m.name = dot == std::string::npos ? path : path.substr(dot + 1);
    m.start = t.string("start", "");
    m.checksum = t.choice("checksum", {"none", "xor"}, "none") == "xor" ? MapChecksum::Xor
                                                                         : MapChecksum::None;
    const std::string delim = t.string("delimiter", ",");
    if (delim.size() != 1 || detail::isDigit(delim[0]) || delim[0] == '.' || delim[0] == '-' ||
        (m.checksum == MapChecksum::Xor && delim[0] == '*')) {
        t.fail("delimiter", "one character that cannot be part of a number, e.g. \",\" or \"\\t\"");
    }
    m.delimiter = delim[0];
    if (m.start.find(m.delimiter) != std::string::npos) {
        t.fail("start", "a token without the delimiter");
    }
    const std::string tf = t.choice(
        "time_format", {"hhmmss.sss", "hhmmss", "seconds_of_day", "unix_s", "iso8601"}, "hhmmss.sss");
    m.time_format = tf == "unix_s"           ? TimeFormat::UnixS
                    : tf == "seconds_of_day" ? TimeFormat::SecondsOfDay
                    : tf == "iso8601"        ? TimeFormat::Iso8601
                                             : TimeFormat::HhMmSs;
    if (const auto zone = t.optionalString("time_zone")) {
        // Only ISO 8601 can say its zone; for the other formats the key would be a silent no-op.
        if (m.time_format != TimeFormat::Iso8601) {
            t.fail("time_zone", "no time_zone unless time_format = \"iso8601\" (the other formats are UTC)");
        }
        if (detail::parseUtcOffset(*zone, m.time_zone_s) != nullptr) {
            t.fail("time_zone", "\"Z\" or an offset from UTC \"+hh:mm\" / \"-hh:mm\" up to 14:00");
        }
    }

    const int first = m.start.empty() ? 0 : 1;
    std::array<const char*, kMaxFields> used{};
    auto index = [&](const char* key) -> std::optional<int> {
        const auto v = t.optionalInteger(key, 0, kMaxFieldIndex);
        if (!v) return std::nullopt;
        if (*v < first) t.fail(key, "an index >= 1 (field 0 is the start token)");
        const auto i = static_cast<std::size_t>(*v);
        if (used[i] != nullptr) {
            t.fail(key, std::string("an index not already used by '") + used[i] + "'");
        }
        used[i] = key;
        return static_cast<int>(*v);
    };
    m.time = index("time");
    m.sensor = index("sensor");
    m.field_nT = index("field_nT");
    m.quality = index("quality");
    m.depth_m = index("depth_m");
    m.altitude_m = index("altitude_m");
    m.cable_out_m = index("cable_out_m");
    if (!m.time && (t.has("time_format") || t.has("time_zone"))) {
        // A time format without a time field would be ignored: say so instead.
        t.fail(t.has("time_format") ? "time_format" : "time_zone",
               "no time format without a `time` index (set time = <field index>)");
    }
    if (!m.field_nT && !m.quality && !m.depth_m && !m.altitude_m && !m.cable_out_m) {
        t.fail("field_nT",
               "at least one measurement index (field_nT, quality, depth_m, altitude_m, "
               "cable_out_m)");
    }
    return m;
}

std::vector<FieldMap> parseFieldMaps(const config::Section& root) {
    std::vector<FieldMap> maps;
    const auto fm = root.optionalTable("fieldmap");
    if (!fm) return maps;
    for (const std::string& name : fm->keys()) maps.push_back(parseFieldMap(fm->table(name)));
    return maps;
}

FieldMap defaultMagnetometerMap() {
    // SGM,2,004512.300,48213.417,97,12.40,4.10*HH
    FieldMap m;
    m.name = "mag";
    m.start = "SGM";
    m.checksum = MapChecksum::Xor;
    m.sensor = 1;
    m.time = 2;
    m.field_nT = 3;
    m.quality = 4;
    m.depth_m = 5;
    m.altitude_m = 6;
    return m;
}

FieldMap defaultAltimeterMap() {
    // SGA,004512.30,4.10*HH
    FieldMap m;
    m.name = "alt";
    m.start = "SGA";
    m.checksum = MapChecksum::Xor;
    m.time = 1;
    m.altitude_m = 2;
    return m;
}

FieldMap defaultCableMap() {
    // SGC,004512.30,152.5*HH
    FieldMap m;
    m.name = "cable";
    m.start = "SGC";
    m.checksum = MapChecksum::Xor;
    m.time = 1;
    m.cable_out_m = 2;
    return m;
}

std::vector<FieldMap> defaultFieldMaps() {
    return {defaultMagnetometerMap(), defaultAltimeterMap(), defaultCableMap()};
}

std::string withXorChecksum(std::string_view body) {
    const std::uint8_t cs = xorChecksum(body);
    std::string s;
    s.reserve(body.size() + 3);
    s += body;
    s += '*';
    s += detail::kHexUpper[cs >> 4];
    s += detail::kHexUpper[cs & 0xF];
    return s;
}

}  // namespace sg::decode
