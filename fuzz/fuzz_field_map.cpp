// libFuzzer target for the field-map decoder with the default layouts (SGM/SGA/SGC) and with a
// start-less, tab-delimited, unix-time map, a seconds-of-day map and an ISO 8601 map: any bytes
// give a Reason, values stay in range.
#include <cmath>
#include <cstddef>
#include <cstdint>
#include <string_view>

#include "decode/field_map.hpp"

namespace {

using namespace sg::decode;

void check(bool ok) {
    if (!ok) __builtin_trap();
}

FieldMap tabUnixMap() {
    FieldMap m;
    m.name = "tab";
    m.delimiter = '\t';
    m.time_format = TimeFormat::UnixS;
    m.time = 0;
    m.field_nT = 1;
    m.sensor = 2;
    return m;
}

FieldMap secondsMap() {
    FieldMap m;
    m.name = "sod";
    m.delimiter = ';';
    m.time_format = TimeFormat::SecondsOfDay;
    m.checksum = MapChecksum::Xor;
    m.time = 0;
    m.depth_m = 1;
    m.cable_out_m = 40;
    return m;
}

FieldMap isoMap() {
    FieldMap m;
    m.name = "iso";
    m.delimiter = '|';
    m.time_format = TimeFormat::Iso8601;
    m.time_zone_s = 3600;
    m.time = 1;
    m.field_nT = 0;
    return m;
}

void checkRecord(const FieldRecord& r) {
    check(static_cast<int>(r.reason) < kReasonCount);
    if (r.reason != Reason::Ok) return;
    if (r.tod_s) check(*r.tod_s >= 0.0 && *r.tod_s < 86401.0);
    // Full UTC: 1969-12-31T10:00 (1970-01-01T00:00 at +14:00) .. 2200-01-01T14:00 (at -14:00).
    if (r.utc_ns) check(*r.utc_ns >= -14 * 3600LL * 1'000'000'000 &&
                        *r.utc_ns < (7'258'118'400LL + 14 * 3600 + 2) * 1'000'000'000);
    if (r.field_nT) check(*r.field_nT >= kMinField_nT && *r.field_nT <= kMaxField_nT);
    if (r.altitude_m) check(std::isfinite(*r.altitude_m));
    check(r.sensor >= 0 && r.sensor <= 99);
}

}  // namespace

extern "C" int LLVMFuzzerTestOneInput(const std::uint8_t* data, std::size_t size) {
    static const std::vector<FieldMap> maps = [] {
        auto v = defaultFieldMaps();
        v.push_back(tabUnixMap());
        v.push_back(secondsMap());
        v.push_back(isoMap());
        return v;
    }();
    const std::string_view line(reinterpret_cast<const char*>(data), size);
    for (const auto& m : maps) checkRecord(decodeFieldMap(m, line));
    const MatchedRecord mr = decodeWithMaps(maps, line);
    check(mr.map_index >= -1 && mr.map_index < static_cast<int>(maps.size()));
    checkRecord(mr.record);
    return 0;
}
