// NMEA 0183 sentence decoder: GGA, RMC, VTG, HDT, ZDA, GST, GNS, GLL, DPT, DBT from any talker.
// Other well-formed sentences (proprietary $P..., GSV, AIS '!' ...) are UnknownSentence: counted,
// not errors. Never throws; no heap allocation per field (fields are string_views of the line).
// Units: SI inside (m, m/s, s) except angles, which stay in degrees (this is an edge of the core).
// Which sentences exist, their fields and the reason codes: docs/formats.md.
#pragma once

#include <cstdint>
#include <optional>
#include <span>
#include <string>
#include <string_view>
#include <variant>
#include <vector>

#include "decode/reason.hpp"

namespace sg::decode {

// Longest NMEA line accepted. The standard caps a sentence at 82 characters including "$" and
// CR LF, but receivers with extra decimals (e.g. GGA with 8-decimal minutes and 3-decimal height)
// exceed it, so we allow more; anything longer than this is certainly not one sentence.
inline constexpr std::size_t kMaxNmeaBytes = 256;
// Most fields any sentence may have (GNS/GSA/GSV fit easily); more is TooLong.
inline constexpr std::size_t kMaxNmeaFields = 40;

// UTC calendar date. RMC's two-digit year maps to 1980..2079 (common practice for GNSS receivers).
struct Date {
    int year = 1970;  // full year, e.g. 2026
    int month = 1;    // 1..12
    int day = 1;      // 1..31 (validated against the month, leap years included)
    friend bool operator==(const Date&, const Date&) = default;
};

// GGA: fix data. With no fix (quality 0) receivers leave position and height empty.
struct Gga {
    std::optional<double> tod_s;        // UTC time of day, 0 <= t < 86401 s
    std::optional<double> lat_deg;      // -90..90, north positive
    std::optional<double> lon_deg;      // -180..180, east positive
    int quality = 0;                    // 0 none, 1 GPS, 2 DGPS, 3 PPS, 4 RTK fixed, 5 RTK float,
                                        // 6 dead reckoning, 7 manual, 8 simulator
    std::optional<int> satellites;      // satellites used, 0..99
    std::optional<double> hdop;         // horizontal dilution of precision, >= 0
    std::optional<double> alt_m;        // antenna height above mean sea level (geoid), m
    std::optional<double> geoid_sep_m;  // geoid above WGS84 ellipsoid, m
    std::optional<double> dgps_age_s;   // age of differential corrections, s
    std::optional<int> dgps_station;    // differential reference station id, 0..1023
};
using GgaFix = Gga;

// RMC: recommended minimum. `valid` is status 'A'; with 'V' fields are often empty.
struct Rmc {
    std::optional<double> tod_s;
    bool valid = false;
    std::optional<double> lat_deg;
    std::optional<double> lon_deg;
    std::optional<double> sog_mps;      // speed over ground, m/s (the sentence gives knots)
    std::optional<double> cog_deg;      // course over ground, true, 0..360
    std::optional<Date> date;
    std::optional<double> mag_var_deg;  // magnetic variation, east positive
    char mode = 0;                      // NMEA 2.3 mode: A autonomous, D differential, E, M, S, N
                                        // (0 when absent)
};

// VTG: course and speed over ground.
struct Vtg {
    std::optional<double> cog_true_deg;
    std::optional<double> cog_mag_deg;
    std::optional<double> sog_mps;  // from the km/h field when present, else knots
    char mode = 0;
};

// HDT: true heading (gyro, GNSS compass).
struct Hdt {
    double heading_deg = 0;  // 0..360
};

// ZDA: UTC time and date, local zone.
struct Zda {
    double tod_s = 0;
    Date date;
    std::optional<int> zone_hours;    // -13..13
    std::optional<int> zone_minutes;  // 0..59
};

// GST: pseudorange error statistics (1-sigma, metres).
struct Gst {
    std::optional<double> tod_s;
    std::optional<double> rms_m;
    std::optional<double> sigma_major_m;
    std::optional<double> sigma_minor_m;
    std::optional<double> orient_deg;  // of the semi-major axis, true
    std::optional<double> sigma_lat_m;
    std::optional<double> sigma_lon_m;
    std::optional<double> sigma_alt_m;
};

// GNS: multi-constellation fix data.
struct Gns {
    std::optional<double> tod_s;
    std::optional<double> lat_deg;
    std::optional<double> lon_deg;
    std::string mode;  // one letter per constellation (N, A, D, P, R, F, E, M, S), e.g. "AAN"
    std::optional<int> satellites;
    std::optional<double> hdop;
    std::optional<double> alt_m;
    std::optional<double> geoid_sep_m;
    std::optional<double> dgps_age_s;
    std::optional<int> dgps_station;
    char nav_status = 0;  // NMEA 4.1: S safe, C caution, U unsafe, V not valid (0 when absent)
};

// GLL: position.
struct Gll {
    std::optional<double> lat_deg;
    std::optional<double> lon_deg;
    std::optional<double> tod_s;
    bool valid = false;  // status 'A'
    char mode = 0;
};

// DPT: depth below the transducer, plus the transducer offset.
struct Dpt {
    double depth_m = 0;                // below transducer, >= 0
    std::optional<double> offset_m;    // + to water line, - to keel
    std::optional<double> max_range_m;
};

// DBT: depth below transducer in feet, metres and fathoms; depth_m from the first one present
// (metres preferred).
struct Dbt {
    double depth_m = 0;
};

// True for a real calendar date (leap years included), years 1970..2199.
bool isValidDate(const Date& d);
// Days since 1970-01-01 of a valid date (proleptic Gregorian, std::chrono civil calendar).
std::int64_t daysFromCivil(const Date& d);

using NmeaData = std::variant<std::monostate, Gga, Rmc, Vtg, Hdt, Zda, Gst, Gns, Gll, Dpt, Dbt>;

struct NmeaSentence {
    std::string talker;  // "GP", "GN", "II", ...; "P" for proprietary; empty if not parsed
    std::string type;    // "GGA", ...; for proprietary the rest of the address ("GRME")
    NmeaData data;       // monostate unless reason is Ok or NoChecksum (and the type is known)
    Reason reason = Reason::NotNmea;
    std::string detail;  // which field and why, e.g. "field 2 (latitude): minutes >= 60"; with
                         // FieldIgnored (or NoChecksum) the fields set to null, e.g.
                         // "field 10 (magnetic variation) '999.9': out of range, set to null"
    bool checksum_ok = false;  // '*hh' present and equal to the XOR of the sentence
};

// Decodes one line (terminator already removed; a trailing CR/LF is tolerated).
// Never throws. Any input, including binary bytes, gives a Reason.
// A field the core does not use (e.g. RMC magnetic variation, GGA HDOP, ZDA zone) that is
// malformed does not fail the sentence: its value is null, the reason is FieldIgnored (NoChecksum
// when the sentence has no checksum) and `detail` names the field. Fields the core uses (time,
// date, position, status, fix quality, speed, heading, depth, GST sigmas) fail it (BadField).
// `require_checksum`: a sentence without '*hh' is MissingChecksum instead of NoChecksum (see
// NmeaStreamDecoder), unless the first two characters of its address are one of
// `checksum_optional_talkers` (talker ids as sg::isTalkerId accepts them; a proprietary '$P...'
// sentence has no such talker and is never exempt). A checksum that is present is verified
// whatever the talker.
NmeaSentence decodeNmea(std::string_view line, bool require_checksum = false,
                        std::span<const std::string> checksum_optional_talkers = {});

// decodeNmea with the state of one source (one input, one capture file): once the source has sent
// a sentence with a correct checksum, every later sentence from it without one is rejected as
// MissingChecksum. A receiver does not drop checksums from one sentence to the next; a corrupted
// or lost '*' does, and would otherwise turn the checksum digits into data of the last field.
// `checksum_optional_talkers` (the input's `checksum_optional_talkers`, docs/formats.md) are
// exempt from that rule on this source: a multiplexer that merges a checksumming GNSS and a gyro
// that never sends checksums onto one port (common practice on survey vessels).
class NmeaStreamDecoder {
public:
    NmeaStreamDecoder() = default;
    // Each id should satisfy sg::isTalkerId (common/nmea_talker.hpp; the parsers of the config
    // and of `inspect` check it): any other string simply matches no sentence.
    explicit NmeaStreamDecoder(std::vector<std::string> checksum_optional_talkers)
        : m_optional(std::move(checksum_optional_talkers)) {}

    NmeaSentence decode(std::string_view line) {
        NmeaSentence s = decodeNmea(line, m_checksummed, m_optional);
        if (s.checksum_ok) m_checksummed = true;
        return s;
    }
    // True once a sentence with a correct checksum was seen.
    bool checksummed() const { return m_checksummed; }

private:
    bool m_checksummed = false;
    std::vector<std::string> m_optional;
};

// Steering and route sentences: what swathguard sends to the bridge (src/helm, docs/helm-output.md).
// decodeRouteNmea reads them (tests, tools); acquisition does not: an input that carries them
// keeps them as unknown_sentence, as before. Distances stay in nautical miles and speeds in knots
// as sent (these structs describe the sentence, not the core's state).
struct Xte {
    bool valid = false;              // both status fields 'A'
    std::optional<double> xte_nm;    // cross-track error magnitude, nautical miles
    char steer = 0;                  // 'L' or 'R' (0 when empty)
    char mode = 0;                   // NMEA 2.3 mode indicator (0 when absent)
};
struct Apb {
    bool valid = false;
    std::optional<double> xte_nm;
    char steer = 0;
    bool arrival_circle = false;     // field 6 'A'
    bool perpendicular = false;      // field 7 'A'
    std::optional<double> bearing_origin_dest_deg;
    char bearing_origin_dest_ref = 0;  // 'T' true, 'M' magnetic
    std::string dest_id;
    std::optional<double> bearing_to_dest_deg;
    char bearing_to_dest_ref = 0;
    std::optional<double> heading_to_steer_deg;
    char heading_to_steer_ref = 0;
    char mode = 0;
};
struct Rmb {
    bool valid = false;              // status 'A'
    std::optional<double> xte_nm;
    char steer = 0;
    std::string origin_id, dest_id;
    std::optional<double> dest_lat_deg, dest_lon_deg;
    std::optional<double> range_nm;
    std::optional<double> bearing_to_dest_deg;  // true
    std::optional<double> closing_kn;
    bool arrived = false;            // field 13 'A'
    char mode = 0;
};
struct Wpl {
    double lat_deg = 0.0, lon_deg = 0.0;
    std::string id;
};
struct Rte {
    int total = 0, number = 0;       // sentences of the route, this one (1..total)
    char mode = 0;                   // 'c' complete, 'w' working
    std::string route_id;
    std::vector<std::string> waypoints;
};
using RouteData = std::variant<std::monostate, Xte, Apb, Rmb, Wpl, Rte>;
struct RouteSentence {
    std::string talker, type;
    RouteData data;                  // monostate unless reason is Ok or NoChecksum
    Reason reason = Reason::NotNmea; // UnknownSentence for any other well-formed sentence
    std::string detail;
    bool checksum_ok = false;
};
// Decodes one XTE, APB, RMB, WPL or RTE line (same envelope checks as decodeNmea). Never throws.
RouteSentence decodeRouteNmea(std::string_view line);

// XOR of all bytes of `bytes` (the NMEA checksum when given the text between '$' and '*').
std::uint8_t xorChecksum(std::string_view bytes);

// "$" + body + "*HH" (two upper-case hex digits). `body` is e.g. "GPHDT,123.4,T".
std::string nmeaWithChecksum(std::string_view body);

}  // namespace sg::decode
