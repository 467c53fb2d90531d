// Field-map decoder: delimited instrument strings (magnetometer, altimeter, cable out) whose layout
// is described in the configuration ([fieldmap.NAME] tables). Also the team's own default layouts
// used by the simulator (SGM, SGA, SGC; documented with examples in docs/formats.md).
// decodeFieldMap never throws; parseFieldMap throws config::ConfigError naming file and key.
#pragma once

#include <cstdint>
#include <optional>
#include <span>
#include <string>
#include <string_view>
#include <vector>

#include "common/config_section.hpp"
#include "common/received_line.hpp"
#include "decode/reason.hpp"

namespace sg::decode {

// Longest field-map line accepted; instrument strings are short, this is a guard only.
inline constexpr std::size_t kMaxFieldMapBytes = 512;
// Highest field index a map may use (0 = first field).
inline constexpr int kMaxFieldIndex = 63;

// Plausible total-field range. The Earth's main field is about 22,000 nT (South Atlantic) to
// 67,000 nT (near the magnetic poles) (IGRF maps, from memory); the margin allows anomalies and
// offsets while still catching a dropped digit or a decimal point moved by a byte error.
inline constexpr double kMinField_nT = 10'000.0;
inline constexpr double kMaxField_nT = 120'000.0;

enum class TimeFormat : std::uint8_t {
    HhMmSs,        // "hhmmss.sss": UTC time of day (config value "hhmmss.sss" or "hhmmss")
    SecondsOfDay,  // seconds since UTC midnight, 0 <= t < 86401 ("seconds_of_day")
    UnixS,         // seconds since 1970-01-01T00:00:00Z ("unix_s")
    Iso8601,       // date and time, e.g. 2026-06-02T09:00:00.000Z ("iso8601")
};

// True when the format carries the date (FieldRecord::utc_ns), false for a time of day (tod_s,
// which needs a GNSS date through InstrumentClock).
inline bool carriesDate(TimeFormat f) { return f == TimeFormat::UnixS || f == TimeFormat::Iso8601; }

enum class MapChecksum : std::uint8_t {
    None,  // no checksum ("none")
    Xor,   // XOR of every byte before the last '*', as two hex digits after it ("xor")
};

struct FieldMap {
    std::string name;       // NAME of [fieldmap.NAME]
    std::string start;      // token the first field must equal; empty = no start token
    char delimiter = ',';   // one byte (TAB allowed)
    MapChecksum checksum = MapChecksum::None;
    TimeFormat time_format = TimeFormat::HhMmSs;
    // iso8601 only: offset of times written without a zone designator, seconds east of UTC
    // (-14 h .. +14 h; key time_zone, default "Z").
    int time_zone_s = 0;
    // Field indices (0 = first field, which is the start token when `start` is set).
    std::optional<int> time;
    std::optional<int> field_nT;
    std::optional<int> quality;
    std::optional<int> depth_m;
    std::optional<int> altitude_m;
    std::optional<int> sensor;
    std::optional<int> cable_out_m;

    // Number of fields a line needs (highest index used + 1).
    int minFields() const;
};

struct FieldRecord {
    std::optional<double> tod_s;   // UTC time of day, for hhmmss.sss and seconds_of_day
    std::optional<TimeNs> utc_ns;  // full UTC, for unix_s and iso8601 (InstrumentClock for tod_s)
    // Measurements: empty when the map has no such field or the instrument left it empty.
    std::optional<double> field_nT;     // total field, kMinField_nT..kMaxField_nT
    std::optional<double> quality;      // instrument's signal quality, >= 0 (meaning per instrument)
    std::optional<double> depth_m;      // sensor depth below the surface, -100..11000 m
    std::optional<double> altitude_m;   // sensor altitude above the seabed, 0..10000 m
    std::optional<double> cable_out_m;  // cable paid out, 0..20000 m
    int sensor = 0;                     // sensor index in the array, 0..99
    Reason reason = Reason::Ok;
    std::string detail;  // which field and why
};

// Reads one [fieldmap.NAME] table. Keys: start, delimiter, checksum, time, time_format, time_zone,
// field_nT, quality, depth_m, altitude_m, sensor, cable_out_m (see docs/formats.md). Throws
// ConfigError.
FieldMap parseFieldMap(const config::Section& table);
// Reads every [fieldmap.*] table under `root` (the config's root table), in NAME order (toml++
// keeps a table's keys sorted, so file order is not available). An absent [fieldmap] table gives
// an empty vector.
std::vector<FieldMap> parseFieldMaps(const config::Section& root);

// Decodes one line with `map`. Never throws.
// Mapped time and sensor fields are required (empty = BadField); an empty measurement field gives
// an empty optional (the instrument had no value), a present one is range-checked (BadField).
FieldRecord decodeFieldMap(const FieldMap& map, std::string_view line);

// Tries each map in order; the first map whose start token matches (or the first that decodes
// usable, among maps without a start token) wins. map_index is -1 when nothing matched (then
// record.reason is BadStart, or the reason of the first start-less map that was tried).
struct MatchedRecord {
    int map_index = -1;
    FieldRecord record;
};
MatchedRecord decodeWithMaps(std::span<const FieldMap> maps, std::string_view line);

// The team's default layouts (docs/formats.md). The simulator writes exactly these.
//   magnetometer: SGM,<sensor 0-7>,<hhmmss.sss>,<field nT>,<quality 0-99>,<depth m>,<alt m|>*HH
//   altimeter:    SGA,<hhmmss.ss>,<altitude m>*HH
//   cable out:    SGC,<hhmmss.ss>,<cable out m>*HH
FieldMap defaultMagnetometerMap();
FieldMap defaultAltimeterMap();
FieldMap defaultCableMap();
std::vector<FieldMap> defaultFieldMaps();  // the three above, in that order

// body + "*HH", HH = XOR of every byte of body as two upper-case hex digits.
// e.g. withXorChecksum("SGA,004512.30,4.10") for the simulator.
std::string withXorChecksum(std::string_view body);

}  // namespace sg::decode
