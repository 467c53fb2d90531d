// NMEA 0183 decoding: envelope (start, checksum, address), then a table of sentence type ->
// minimum field count -> handler. Each handler opens with an example sentence, field by field.
// Field numbers in `detail` count from 1 after the address, as NMEA documentation does.
#include "decode/nmea.hpp"

#include <algorithm>
#include <array>
#include <chrono>
#include <cstring>

#include "decode/field_parse.hpp"

namespace sg::decode {

std::string_view reasonName(Reason r) {
    switch (r) {
        case Reason::Ok: return "ok";
        case Reason::NoChecksum: return "no_checksum";
        case Reason::BadChecksum: return "bad_checksum";
        case Reason::NotNmea: return "not_nmea";
        case Reason::Truncated: return "truncated";
        case Reason::BadField: return "bad_field";
        case Reason::UnknownSentence: return "unknown_sentence";
        case Reason::BinaryBytes: return "binary_bytes";
        case Reason::TooLong: return "too_long";
        case Reason::EmptyLine: return "empty_line";
        case Reason::BadStart: return "bad_start";
        case Reason::FieldIgnored: return "field_ignored";
        case Reason::MissingChecksum: return "missing_checksum";
    }
    return "unknown_reason";
}

bool isValidDate(const Date& d) {
    if (d.year < 1970 || d.year > 2199) return false;
    const std::chrono::year_month_day ymd{std::chrono::year{d.year},
                                          std::chrono::month{static_cast<unsigned>(d.month)},
                                          std::chrono::day{static_cast<unsigned>(d.day)}};
    return d.month >= 1 && d.month <= 12 && d.day >= 1 && ymd.ok();
}

std::int64_t daysFromCivil(const Date& d) {
    const std::chrono::year_month_day ymd{std::chrono::year{d.year},
                                          std::chrono::month{static_cast<unsigned>(d.month)},
                                          std::chrono::day{static_cast<unsigned>(d.day)}};
    return std::chrono::sys_days{ymd}.time_since_epoch().count();
}

std::uint8_t xorChecksum(std::string_view bytes) {
    unsigned x = 0;
    for (const char c : bytes) x ^= static_cast<unsigned char>(c);
    return static_cast<std::uint8_t>(x);
}

std::string nmeaWithChecksum(std::string_view body) {
    const std::uint8_t cs = xorChecksum(body);
    std::string s;
    s.reserve(body.size() + 4);
    s += '$';
    s += body;
    s += '*';
    s += detail::kHexUpper[cs >> 4];
    s += detail::kHexUpper[cs & 0xF];
    return s;
}

namespace {

using detail::parseDecimal;
using detail::parseUnsigned;

constexpr double kKnotToMps = 1852.0 / 3600.0;  // 1 knot = 1 nautical mile (1852 m) per hour
constexpr double kKmhToMps = 1000.0 / 3600.0;
constexpr double kFootM = 0.3048;     // international foot
constexpr double kFathomM = 1.8288;   // 6 international feet

// The data fields of one sentence (address excluded); field 1 is index 0. Kept as offsets into
// the line in an uninitialised array: zeroing 40 string_views per line cost ~10% of the decode.
static_assert(kMaxNmeaBytes < 65536, "field offsets are 16-bit");
struct Fields {
    struct Span {
        std::uint16_t begin;
        std::uint16_t size;
    };
    const char* base = nullptr;
    std::size_t n = 0;
    Span f[kMaxNmeaFields];  // only the first n are set

    std::string_view operator[](std::size_t i) const {
        return i < n ? std::string_view(base + f[i].begin, f[i].size) : std::string_view{};
    }
    void push(std::size_t begin, std::size_t size) {
        f[n++] = {static_cast<std::uint16_t>(begin), static_cast<std::uint16_t>(size)};
    }
};

// A field that failed: its 0-based index into Fields, its name, and what is wrong.
struct FieldError {
    std::size_t index = 0;
    const char* name = "";
    const char* what = "";
};

// Most ignored fields named in a detail (a sentence with more keeps the count only).
constexpr std::size_t kMaxFlags = 6;

class Decoder {
public:
    explicit Decoder(const Fields& f) : m_f(f) {}

    const FieldError& error() const { return m_err; }
    bool failed() const { return m_failed; }
    std::size_t flagCount() const { return m_nflags; }
    const FieldError& flag(std::size_t k) const { return m_flags[k]; }
    std::string_view field(std::size_t i) const { return m_f[i]; }

    // Inside unused(...) a failing field is flagged (the helper returns nullopt / 0, so its value
    // is null) and the sentence goes on; outside it the sentence fails.
    bool fail(std::size_t i, const char* name, const char* what) {
        if (m_soft) {
            if (m_nflags < kMaxFlags) m_flags[m_nflags] = {i, name, what};
            ++m_nflags;
            return false;
        }
        if (!m_failed) m_err = {i, name, what};
        m_failed = true;
        return false;
    }
    // Runs `f` with failures turned into flags: for the fields the core does not use.
    template <typename F>
    void unused(F&& f) {
        const bool was = m_soft;
        m_soft = true;
        f();
        m_soft = was;
    }

    // Optional number: empty -> nullopt; otherwise must parse and lie in [lo, hi].
    std::optional<double> number(std::size_t i, const char* name, double lo, double hi) {
        const std::string_view s = m_f[i];
        if (s.empty()) return std::nullopt;
        double v = 0;
        if (!parseDecimal(s, v)) {
            fail(i, name, "not a number");
            return std::nullopt;
        }
        if (v < lo || v > hi) {
            fail(i, name, "out of range");
            return std::nullopt;
        }
        return v;
    }
    double requiredNumber(std::size_t i, const char* name, double lo, double hi) {
        if (m_f[i].empty()) {
            fail(i, name, "empty");
            return 0;
        }
        return number(i, name, lo, hi).value_or(0.0);
    }
    std::optional<int> integer(std::size_t i, const char* name, int max_value) {
        const std::string_view s = m_f[i];
        if (s.empty()) return std::nullopt;
        int v = 0;
        if (!parseUnsigned(s, max_value, v)) {
            fail(i, name, "not an integer in range");
            return std::nullopt;
        }
        return v;
    }
    std::optional<double> time(std::size_t i) {
        const std::string_view s = m_f[i];
        if (s.empty()) return std::nullopt;
        double t = 0;
        if (const char* what = detail::parseHhMmSs(s, t)) {
            fail(i, "time", what);
            return std::nullopt;
        }
        return t;
    }
    // Latitude at field i, hemisphere N/S at i+1. Both empty -> nullopt.
    std::optional<double> latitude(std::size_t i) { return angle(i, 2, 90.0, 'N', 'S', "latitude"); }
    std::optional<double> longitude(std::size_t i) {
        return angle(i, 3, 180.0, 'E', 'W', "longitude");
    }
    // A single-letter field that must be one of `allowed` (empty allowed when `may_be_empty`).
    char letter(std::size_t i, const char* name, const char* allowed, bool may_be_empty) {
        const std::string_view s = m_f[i];
        if (s.empty()) {
            if (!may_be_empty) fail(i, name, "empty");
            return 0;
        }
        if (s.size() != 1 || std::strchr(allowed, s[0]) == nullptr) {
            fail(i, name, "unexpected letter");
            return 0;
        }
        return s[0];
    }
    // A unit field that must equal `unit` when the value before it is present. False if not.
    bool unit(std::size_t i, const char* name, char expected) {
        const std::string_view s = m_f[i];
        if (s.empty()) return true;
        if (s.size() != 1 || s[0] != expected) return fail(i, name, "unexpected unit letter");
        return true;
    }

private:
    std::optional<double> angle(std::size_t i, int deg_digits, double max_deg, char pos, char neg,
                                const char* name) {
        const std::string_view v = m_f[i];
        const std::string_view h = m_f[i + 1];
        if (v.empty() && h.empty()) return std::nullopt;
        if (v.empty()) {
            fail(i, name, "empty but hemisphere given");
            return std::nullopt;
        }
        if (h.size() != 1 || (h[0] != pos && h[0] != neg)) {
            fail(i + 1, name, pos == 'N' ? "hemisphere not N or S" : "hemisphere not E or W");
            return std::nullopt;
        }
        double deg = 0;
        if (const char* what = detail::parseDegMin(v, deg_digits, max_deg, deg)) {
            fail(i, name, what);
            return std::nullopt;
        }
        return h[0] == neg ? -deg : deg;
    }

    const Fields& m_f;
    FieldError m_err;
    bool m_failed = false;
    bool m_soft = false;
    std::size_t m_nflags = 0;
    FieldError m_flags[kMaxFlags];
};

// ddmmyy with the two-digit year in 1980..2079 (common practice: GNSS did not exist before 1980).
std::optional<Date> rmcDate(Decoder& d, const Fields& f, std::size_t i) {
    const std::string_view s = f[i];
    if (s.empty()) return std::nullopt;
    if (s.size() != 6) {
        d.fail(i, "date", "expected ddmmyy");
        return std::nullopt;
    }
    for (const char c : s) {
        if (!detail::isDigit(c)) {
            d.fail(i, "date", "expected ddmmyy");
            return std::nullopt;
        }
    }
    const int yy = detail::twoDigits(s.data() + 4);
    Date date{yy < 80 ? 2000 + yy : 1900 + yy, detail::twoDigits(s.data() + 2),
              detail::twoDigits(s.data())};
    if (!isValidDate(date)) {
        d.fail(i, "date", "not a calendar date");
        return std::nullopt;
    }
    return date;
}

using Handler = bool (*)(Decoder&, const Fields&, NmeaData&);

bool decodeGga(Decoder& d, const Fields& f, NmeaData& out) {
    // $GPGGA,123519,4807.038,N,01131.000,E,1,08,0.9,545.4,M,46.9,M,,*47
    //   1 123519     UTC time hhmmss(.sss)
    //   2 4807.038   latitude ddmm.mmm      3 N  hemisphere N/S
    //   4 01131.000  longitude dddmm.mmm    5 E  hemisphere E/W
    //   6 1          fix quality 0..8
    //   7 08         satellites used
    //   8 0.9        HDOP
    //   9 545.4      antenna altitude above mean sea level   10 M  unit
    //  11 46.9       geoid separation (geoid above ellipsoid) 12 M  unit
    //  13 (empty)    age of differential data, s
    //  14 (empty)    differential reference station id 0000..1023
    Gga& g = out.emplace<Gga>();
    g.tod_s = d.time(0);
    g.lat_deg = d.latitude(1);
    g.lon_deg = d.longitude(3);
    g.quality = d.integer(5, "fix quality", 8).value_or(0);
    if (f[5].empty()) d.fail(5, "fix quality", "empty");
    // Not used by the core's computations (kept in the log; satellites and HDOP are shown on the
    // helm panel): flagged and null when malformed, the fix kept.
    d.unused([&] {
        g.satellites = d.integer(6, "satellites", 99);
        g.hdop = d.number(7, "hdop", 0.0, 99.99);
        g.alt_m = d.number(8, "altitude", -10'000.0, 100'000.0);
        if (!d.unit(9, "altitude unit", 'M')) g.alt_m.reset();
        g.geoid_sep_m = d.number(10, "geoid separation", -200.0, 200.0);
        if (!d.unit(11, "geoid separation unit", 'M')) g.geoid_sep_m.reset();
        g.dgps_age_s = d.number(12, "dgps age", 0.0, 1e6);
        g.dgps_station = d.integer(13, "dgps station", 1023);
    });
    if (g.quality != 0 && (!g.lat_deg || !g.lon_deg)) d.fail(1, "latitude", "empty with a fix");
    return !d.failed();
}

bool decodeRmc(Decoder& d, const Fields& f, NmeaData& out) {
    // $GPRMC,123519,A,4807.038,N,01131.000,E,022.4,084.4,230394,003.1,W*6A
    //   1 123519     UTC time
    //   2 A          status A valid, V void (navigation receiver warning)
    //   3 4807.038   latitude     4 N hemisphere
    //   5 01131.000  longitude    6 E hemisphere
    //   7 022.4      speed over ground, knots
    //   8 084.4      course over ground, degrees true
    //   9 230394     date ddmmyy (23 March 1994)
    //  10 003.1      magnetic variation, degrees   11 W  direction E/W
    //  12 (NMEA 2.3) mode A/D/E/M/S/N     13 (NMEA 4.1) navigational status
    // Course, variation and mode are not used by the core: a malformed one is null and flagged,
    // never a reason to lose the sentence (it may be the receiver's only date source). Seen from
    // real receivers: variation "999.9,E" meaning unknown, and the E/W letter missing with the mode
    // letter in its place ("...,230394,,A" with 11 fields).
    Rmc& r = out.emplace<Rmc>();
    r.tod_s = d.time(0);
    r.valid = d.letter(1, "status", "AV", false) == 'A';
    r.lat_deg = d.latitude(2);
    r.lon_deg = d.longitude(4);
    if (auto k = d.number(6, "speed", 0.0, 10'000.0)) r.sog_mps = *k * kKnotToMps;
    r.date = rmcDate(d, f, 8);
    d.unused([&] {
        r.cog_deg = d.number(7, "course", 0.0, 360.0);
        r.mode = d.letter(11, "mode", "ADEFMNPRS", true);
        const std::string_view dir = f[10];
        auto v = d.number(9, "magnetic variation", 0.0, 180.0);
        if (dir.size() == 1 && (dir[0] == 'E' || dir[0] == 'W')) {
            if (v && dir[0] == 'W') *v = -*v;
            r.mag_var_deg = v;
        } else if (dir.size() == 1 && f.n == 11 && std::strchr("ADFMNPRS", dir[0]) != nullptr) {
            // Older/odd layout: no E/W field, the mode letter moved up into its place ('E' is
            // read as east, so it never lands here).
            r.mode = dir[0];
            d.fail(10, "variation direction", "missing, mode letter in its place");
        } else if (!dir.empty()) {
            d.fail(10, "variation direction", "not E or W");
        } else if (v) {
            d.fail(10, "variation direction", "missing E/W");
        }
    });
    if (r.valid && (!r.lat_deg || !r.lon_deg)) d.fail(2, "latitude", "empty with status A");
    return !d.failed();
}

bool decodeVtg(Decoder& d, const Fields&, NmeaData& out) {
    // $GPVTG,054.7,T,034.4,M,005.5,N,010.2,K*48
    //   1 054.7  course over ground, degrees true       2 T
    //   3 034.4  course over ground, degrees magnetic   4 M
    //   5 005.5  speed, knots                           6 N
    //   7 010.2  speed, km/h                            8 K
    //   9 (NMEA 2.3) mode A/D/E/M/S/N
    // Courses and mode are not used by the core (flagged and null when malformed); speeds are.
    Vtg& v = out.emplace<Vtg>();
    d.unused([&] {
        v.cog_true_deg = d.number(0, "course true", 0.0, 360.0);
        if (!d.unit(1, "course true unit", 'T')) v.cog_true_deg.reset();
        v.cog_mag_deg = d.number(2, "course magnetic", 0.0, 360.0);
        if (!d.unit(3, "course magnetic unit", 'M')) v.cog_mag_deg.reset();
        v.mode = d.letter(8, "mode", "ADEFMNPRS", true);
    });
    const auto kn = d.number(4, "speed knots", 0.0, 10'000.0);
    d.unit(5, "speed knots unit", 'N');
    const auto kmh = d.number(6, "speed km/h", 0.0, 20'000.0);
    d.unit(7, "speed km/h unit", 'K');
    // km/h has the finer resolution for the same number of decimals.
    if (kmh) {
        v.sog_mps = *kmh * kKmhToMps;
    } else if (kn) {
        v.sog_mps = *kn * kKnotToMps;
    }
    return !d.failed();
}

bool decodeHdt(Decoder& d, const Fields&, NmeaData& out) {
    // $GPHDT,123.456,T*32
    //   1 123.456 heading, degrees true
    //   2 T       true
    Hdt& h = out.emplace<Hdt>();
    h.heading_deg = d.requiredNumber(0, "heading", 0.0, 360.0);
    d.letter(1, "heading unit", "T", false);
    return !d.failed();
}

bool decodeZda(Decoder& d, const Fields& f, NmeaData& out) {
    // $GPZDA,201530.00,04,07,2002,00,00*60
    //   1 201530.00  UTC time
    //   2 04         day 01..31
    //   3 07         month 01..12
    //   4 2002       year, four digits
    //   5 00         local zone hours -13..13
    //   6 00         local zone minutes 00..59
    Zda& z = out.emplace<Zda>();
    const auto t = d.time(0);
    if (!t && !d.failed()) d.fail(0, "time", "empty");
    z.tod_s = t.value_or(0.0);
    const auto day = d.integer(1, "day", 31);
    const auto month = d.integer(2, "month", 12);
    const auto year = d.integer(3, "year", 9999);
    if (!day || !month || !year) {
        if (!d.failed()) d.fail(!day ? 1 : !month ? 2 : 3, "date", "empty");
    } else {
        z.date = Date{*year, *month, *day};
        if (f[3].size() != 4 || !isValidDate(z.date)) d.fail(1, "date", "not a calendar date");
    }
    // The local zone is not used by the core: flagged and null when malformed.
    d.unused([&] {
        if (!f[4].empty()) {
            int zh = 0;
            if (!detail::parseSigned(f[4], 13, zh)) {
                d.fail(4, "zone hours", "not an integer -13..13");
            } else {
                z.zone_hours = zh;
            }
        }
        z.zone_minutes = d.integer(5, "zone minutes", 59);
    });
    return !d.failed();
}

bool decodeGst(Decoder& d, const Fields&, NmeaData& out) {
    // $GPGST,172814.0,0.006,0.023,0.020,273.6,0.023,0.020,0.031*6A
    //   1 172814.0  UTC time
    //   2 0.006     RMS of the pseudorange residuals, m
    //   3 0.023     semi-major axis of the error ellipse, 1 sigma, m
    //   4 0.020     semi-minor axis, m
    //   5 273.6     orientation of the semi-major axis, degrees true
    //   6 0.023     latitude error 1 sigma, m
    //   7 0.020     longitude error 1 sigma, m
    //   8 0.031     height error 1 sigma, m
    Gst& g = out.emplace<Gst>();
    g.tod_s = d.time(0);
    constexpr double kMax = 1e6;
    // The core uses the latitude and longitude sigmas (position error check); the rest is
    // flagged and null when malformed.
    d.unused([&] {
        g.rms_m = d.number(1, "rms", 0.0, kMax);
        g.sigma_major_m = d.number(2, "sigma major", 0.0, kMax);
        g.sigma_minor_m = d.number(3, "sigma minor", 0.0, kMax);
        g.orient_deg = d.number(4, "orientation", 0.0, 360.0);
        g.sigma_alt_m = d.number(7, "sigma altitude", 0.0, kMax);
    });
    g.sigma_lat_m = d.number(5, "sigma latitude", 0.0, kMax);
    g.sigma_lon_m = d.number(6, "sigma longitude", 0.0, kMax);
    return !d.failed();
}

bool decodeGns(Decoder& d, const Fields& f, NmeaData& out) {
    // $GNGNS,014035.00,4332.69262,S,17235.48549,E,RR,13,0.9,25.63,11.24,,*70
    //   1 014035.00    UTC time
    //   2 4332.69262   latitude    3 S
    //   4 17235.48549  longitude   5 E
    //   6 RR           mode per constellation (GPS, GLONASS, ...): N no fix, A autonomous,
    //                  D differential, P precise, R RTK fixed, F RTK float, E dead reckoning,
    //                  M manual, S simulator
    //   7 13           satellites used
    //   8 0.9          HDOP
    //   9 25.63        antenna altitude above mean sea level, m
    //  10 11.24        geoid separation, m
    //  11 (empty)      age of differential data, s
    //  12 (empty)      reference station id
    //  13 (NMEA 4.1)   navigational status S/C/U/V
    Gns& g = out.emplace<Gns>();
    g.tod_s = d.time(0);
    g.lat_deg = d.latitude(1);
    g.lon_deg = d.longitude(3);
    const std::string_view mode = f[5];
    if (mode.empty() || mode.size() > 8 ||
        mode.find_first_not_of("NADPRFEMS") != std::string_view::npos) {
        d.fail(5, "mode", "expected letters N/A/D/P/R/F/E/M/S");
    } else {
        g.mode.assign(mode);
    }
    // Not used by the core (kept in the log): flagged and null when malformed.
    d.unused([&] {
        g.satellites = d.integer(6, "satellites", 99);
        g.hdop = d.number(7, "hdop", 0.0, 99.99);
        g.alt_m = d.number(8, "altitude", -10'000.0, 100'000.0);
        g.geoid_sep_m = d.number(9, "geoid separation", -200.0, 200.0);
        g.dgps_age_s = d.number(10, "dgps age", 0.0, 1e6);
        g.dgps_station = d.integer(11, "dgps station", 1023);
        g.nav_status = d.letter(12, "navigational status", "SCUV", true);
    });
    return !d.failed();
}

bool decodeGll(Decoder& d, const Fields& f, NmeaData& out) {
    // $GPGLL,4916.45,N,12311.12,W,225444,A,*1D
    //   1 4916.45   latitude    2 N
    //   3 12311.12  longitude   4 W
    //   5 225444    UTC time
    //   6 A         status A valid, V void
    //   7 (NMEA 2.3) mode A/D/E/M/S/N (empty here)
    // Before NMEA 2.0 the sentence ended after field 4 ($GPGLL,3751.65,S,14507.36,E*77): accepted,
    // but with no status the position is marked not valid.
    Gll& g = out.emplace<Gll>();
    g.lat_deg = d.latitude(0);
    g.lon_deg = d.longitude(2);
    g.tod_s = d.time(4);
    g.valid = d.letter(5, "status", "AV", f.n < 6) == 'A';
    d.unused([&] { g.mode = d.letter(6, "mode", "ADEFMNPRS", true); });  // not used by the core
    return !d.failed();
}

bool decodeDpt(Decoder& d, const Fields&, NmeaData& out) {
    // $SDDPT,12.5,0.5,100*79   (invented example, NMEA 3.0 layout)
    //   1 12.5  water depth below the transducer, m
    //   2 0.5   transducer offset, m: + distance to the water line, - distance to the keel
    //   3 100   maximum range scale in use, m (NMEA 3.0)
    Dpt& p = out.emplace<Dpt>();
    p.depth_m = d.requiredNumber(0, "depth", 0.0, 12'000.0);
    p.offset_m = d.number(1, "offset", -100.0, 100.0);
    d.unused([&] { p.max_range_m = d.number(2, "max range", 0.0, 20'000.0); });  // not used
    return !d.failed();
}

bool decodeDbt(Decoder& d, const Fields&, NmeaData& out) {
    // $SDDBT,7.8,f,2.4,M,1.3,F*0D
    //   1 7.8   depth below transducer, feet     2 f
    //   3 2.4   depth below transducer, metres   4 M
    //   5 1.3   depth below transducer, fathoms  6 F
    // All three fields are the depth the core uses: a malformed one fails the sentence even when
    // another unit is present (which of two disagreeing depths is right cannot be told).
    Dbt& b = out.emplace<Dbt>();
    const auto ft = d.number(0, "depth feet", 0.0, 40'000.0);
    d.unit(1, "feet unit", 'f');
    const auto m = d.number(2, "depth metres", 0.0, 12'000.0);
    d.unit(3, "metres unit", 'M');
    const auto fa = d.number(4, "depth fathoms", 0.0, 7'000.0);
    d.unit(5, "fathoms unit", 'F');
    if (m) {
        b.depth_m = *m;
    } else if (ft) {
        b.depth_m = *ft * kFootM;
    } else if (fa) {
        b.depth_m = *fa * kFathomM;
    } else if (!d.failed()) {
        d.fail(2, "depth metres", "no depth in any unit");
    }
    return !d.failed();
}

struct SentenceSpec {
    std::string_view type;
    std::size_t min_fields;  // data fields after the address
    Handler handler;
};

// The sentence table. min_fields is the oldest layout we accept (e.g. VTG before NMEA 2.3 has 8
// fields, RMC 11); later versions append fields, which the handlers read when present.
constexpr std::array<SentenceSpec, 10> kSentences = {{
    {"GGA", 14, decodeGga},
    {"RMC", 11, decodeRmc},
    {"VTG", 8, decodeVtg},
    {"HDT", 2, decodeHdt},
    {"ZDA", 6, decodeZda},
    {"GST", 8, decodeGst},
    {"GNS", 12, decodeGns},
    {"GLL", 4, decodeGll},
    {"DPT", 2, decodeDpt},
    {"DBT", 6, decodeDbt},
}};

const SentenceSpec* findSentence(std::string_view type) {
    for (const auto& s : kSentences) {
        if (s.type == type) return &s;
    }
    return nullptr;
}

bool isAddressChar(char c) { return (c >= 'A' && c <= 'Z') || (c >= '0' && c <= '9'); }

NmeaSentence fail(NmeaSentence&& s, Reason r, std::string detail) {
    s.reason = r;
    s.detail = std::move(detail);
    s.data = std::monostate{};
    return std::move(s);
}

std::string flagsDetail(const Decoder& d) {
    std::string s;
    const std::size_t shown = std::min(d.flagCount(), kMaxFlags);
    for (std::size_t k = 0; k < shown; ++k) {
        const FieldError& e = d.flag(k);
        if (k) s += "; ";
        s += "field ";
        s += std::to_string(e.index + 1);
        s += " (";
        s += e.name;
        s += ") '";
        s += d.field(e.index);
        s += "': ";
        s += e.what;
        s += ", set to null";
    }
    if (d.flagCount() > shown) s += "; and " + std::to_string(d.flagCount() - shown) + " more";
    return s;
}

// True when the sentence's talker is exempt from the missing-checksum rule: the first two
// characters of the address, matched exactly. A proprietary sentence ('$P...') has no
// two-character talker and is never exempt.
bool checksumOptional(std::string_view line, std::string_view address,
                      std::span<const std::string> talkers) {
    if (talkers.empty() || address.size() < 2) return false;
    if (line[0] == '$' && address[0] == 'P') return false;
    const std::string_view talker = address.substr(0, 2);
    return std::any_of(talkers.begin(), talkers.end(),
                       [&](const std::string& t) { return t == talker; });
}

}  // namespace

NmeaSentence decodeNmea(std::string_view line, bool require_checksum,
                        std::span<const std::string> checksum_optional_talkers) {
    NmeaSentence out;
    // Tolerate a terminator left on by a caller that did not frame the line.
    while (!line.empty() && (line.back() == '\n' || line.back() == '\r')) line.remove_suffix(1);
    if (line.empty() || (line[0] == ' ' && line.find_first_not_of(' ') == std::string_view::npos)) {
        return fail(std::move(out), Reason::EmptyLine, "");
    }
    if (line.size() > kMaxNmeaBytes) {
        return fail(std::move(out), Reason::TooLong,
                    std::to_string(line.size()) + " bytes > " + std::to_string(kMaxNmeaBytes));
    }
    auto binaryAt = [&](std::size_t i) {
        return fail(std::move(out), Reason::BinaryBytes,
                    detail::binaryByteDetail(static_cast<unsigned char>(line[i]), i));
    };
    auto isBinary = [](char ch) {
        const auto c = static_cast<unsigned char>(ch);
        return c < 0x20 || c >= 0x7F;
    };
    if (line[0] != '$' && line[0] != '!') {
        for (std::size_t i = 0; i < line.size(); ++i) {
            if (isBinary(line[i])) return binaryAt(i);
        }
        return fail(std::move(out), Reason::NotNmea, "does not start with '$' or '!'");
    }

    // One pass over the body: reject binary bytes, XOR the bytes up to '*' (the checksum covers
    // the bytes between the start character and '*'), and cut the fields at each ','. The fields
    // are views into `line`: nothing is allocated.
    Fields fields;
    fields.base = line.data();
    std::string_view address;
    unsigned x = 0;
    std::size_t star = std::string_view::npos;
    bool too_many_fields = false;
    {
        std::size_t field_start = 1;
        bool in_address = true;
        for (std::size_t i = 1; i < line.size(); ++i) {
            const char c = line[i];
            if (isBinary(c)) return binaryAt(i);
            if (c == '*') {
                star = i;
                break;
            }
            x ^= static_cast<unsigned char>(c);
            if (c == ',') {
                if (in_address) {
                    address = line.substr(field_start, i - field_start);
                    in_address = false;
                } else if (fields.n < kMaxNmeaFields) {
                    fields.push(field_start, i - field_start);
                } else {
                    too_many_fields = true;
                }
                field_start = i + 1;
            }
        }
        const std::size_t body_end = star == std::string_view::npos ? line.size() : star;
        const std::string_view last = line.substr(field_start, body_end - field_start);
        if (in_address) {
            address = last;
        } else if (fields.n < kMaxNmeaFields) {
            fields.push(field_start, last.size());
        } else {
            too_many_fields = true;
        }
        if (star != std::string_view::npos) {
            for (std::size_t i = star + 1; i < line.size(); ++i) {
                if (isBinary(line[i])) return binaryAt(i);
            }
        }
    }

    bool has_checksum = false;
    if (star != std::string_view::npos) {
        const std::string_view cs = line.substr(star + 1);
        const int hi = cs.size() == 2 ? detail::hexValue(cs[0]) : -1;
        const int lo = cs.size() == 2 ? detail::hexValue(cs[1]) : -1;
        if (hi < 0 || lo < 0) {
            return fail(std::move(out), Reason::BadChecksum,
                        "'*' not followed by exactly two hex digits");
        }
        const auto expected = static_cast<std::uint8_t>(x);
        if (expected != static_cast<std::uint8_t>(hi * 16 + lo)) {
            const char got[3] = {cs[0], cs[1], 0};
            const char want[3] = {detail::kHexUpper[expected >> 4],
                                  detail::kHexUpper[expected & 0xF], 0};
            return fail(std::move(out), Reason::BadChecksum,
                        std::string("sent ") + got + ", computed " + want);
        }
        has_checksum = true;
        out.checksum_ok = true;
    } else if (require_checksum && !checksumOptional(line, address, checksum_optional_talkers)) {
        return fail(std::move(out), Reason::MissingChecksum,
                    "no '*hh' although this source has sent checksums");
    }
    if (too_many_fields) {
        return fail(std::move(out), Reason::TooLong,
                    "more than " + std::to_string(kMaxNmeaFields) + " fields");
    }

    // Address: talker (2) + type (3), or 'P' + maker/type for proprietary sentences.
    if (address.empty() || address.size() > 8) {
        return fail(std::move(out), Reason::BadStart, "address field must be 1..8 characters");
    }
    for (const char c : address) {
        if (!isAddressChar(c)) {
            return fail(std::move(out), Reason::BadStart,
                        "address field must be upper-case letters and digits");
        }
    }
    const Reason ok = has_checksum ? Reason::Ok : Reason::NoChecksum;
    if (address[0] == 'P' || line[0] == '!') {
        out.talker = address.substr(0, address[0] == 'P' ? 1 : 2);
        out.type = address.substr(out.talker.size());
        out.reason = Reason::UnknownSentence;
        out.detail = line[0] == '!' ? "encapsulated sentence" : "proprietary sentence";
        return out;
    }
    if (address.size() != 5) {
        return fail(std::move(out), Reason::BadStart,
                    "address field must be talker (2) + sentence type (3)");
    }
    out.talker = address.substr(0, 2);
    out.type = address.substr(2);

    const SentenceSpec* spec = findSentence(address.substr(2));
    if (spec == nullptr) {
        out.reason = Reason::UnknownSentence;
        return out;
    }
    if (fields.n < spec->min_fields) {
        return fail(std::move(out), Reason::Truncated,
                    std::to_string(fields.n) + " fields, " + std::string(spec->type) + " needs " +
                        std::to_string(spec->min_fields));
    }
    Decoder d(fields);
    if (!spec->handler(d, fields, out.data)) {
        const FieldError& e = d.error();
        return fail(std::move(out), Reason::BadField,
                    "field " + std::to_string(e.index + 1) + " (" + e.name + "): " + e.what);
    }
    out.reason = ok;
    if (d.flagCount() > 0) {
        if (has_checksum) out.reason = Reason::FieldIgnored;
        out.detail = flagsDetail(d);
    }
    return out;
}

namespace {

// The data fields of a line decodeNmea accepted (after the address, up to '*').
Fields splitFields(std::string_view line) {
    Fields f;
    f.base = line.data();
    const std::size_t star = line.find('*');
    const std::size_t end = star == std::string_view::npos ? line.size() : star;
    std::size_t start = line.find(',');
    if (start == std::string_view::npos || start > end) return f;
    ++start;
    for (std::size_t i = start; i <= end && f.n < kMaxNmeaFields; ++i) {
        if (i == end || line[i] == ',') {
            f.push(start, i - start);
            start = i + 1;
        }
    }
    return f;
}

bool statusA(Decoder& d, std::size_t i, const char* name) { return d.letter(i, name, "AV", false) == 'A'; }

using RouteHandler = bool (*)(Decoder&, const Fields&, RouteData&);

bool decodeXte(Decoder& d, const Fields&, RouteData& out) {
    // $INXTE,A,A,0.011,L,N,A*hh
    //   1 A  status (A valid, V warning)   2 A  status (A valid, V warning)
    //   3 0.011  cross-track error magnitude   4 L  steer L/R   5 N  units nautical miles
    //   6 A  mode indicator (NMEA 2.3; absent in older talkers)
    Xte& x = out.emplace<Xte>();
    const bool a = statusA(d, 0, "status");
    const bool b = statusA(d, 1, "cycle lock status");
    x.valid = a && b;
    x.xte_nm = d.number(2, "cross-track error", 0.0, 999.0);
    x.steer = d.letter(3, "direction to steer", "LR", true);
    d.unit(4, "cross-track units", 'N');
    x.mode = d.letter(5, "mode", "ADEMSNP", true);
    if (x.valid && (!x.xte_nm || !x.steer)) d.fail(2, "cross-track error", "empty with status A");
    return !d.failed();
}

bool decodeApb(Decoder& d, const Fields& f, RouteData& out) {
    // $INAPB,A,A,0.011,L,N,V,V,45.0,T,HF01B,44.9,T,44.9,T,A*hh
    //   1, 2  status A/V   3 0.011 cross-track error   4 L steer   5 N nautical miles
    //   6 V  arrival circle entered (A) or not (V)   7 V  perpendicular passed (A) or not (V)
    //   8 45.0  bearing origin -> destination   9 T  true (M magnetic)
    //  10 HF01B  destination waypoint identifier
    //  11 44.9  bearing present position -> destination   12 T
    //  13 44.9  heading to steer to the destination   14 T
    //  15 A  mode indicator (NMEA 2.3)
    Apb& a = out.emplace<Apb>();
    const bool s1 = statusA(d, 0, "status");
    const bool s2 = statusA(d, 1, "cycle lock status");
    a.valid = s1 && s2;
    a.xte_nm = d.number(2, "cross-track error", 0.0, 999.0);
    a.steer = d.letter(3, "direction to steer", "LR", true);
    d.unit(4, "cross-track units", 'N');
    a.arrival_circle = d.letter(5, "arrival circle status", "AV", true) == 'A';
    a.perpendicular = d.letter(6, "perpendicular status", "AV", true) == 'A';
    a.bearing_origin_dest_deg = d.number(7, "bearing origin to destination", 0.0, 360.0);
    a.bearing_origin_dest_ref = d.letter(8, "bearing reference", "TM", true);
    a.dest_id = std::string(f[9]);
    a.bearing_to_dest_deg = d.number(10, "bearing to destination", 0.0, 360.0);
    a.bearing_to_dest_ref = d.letter(11, "bearing reference", "TM", true);
    a.heading_to_steer_deg = d.number(12, "heading to steer", 0.0, 360.0);
    a.heading_to_steer_ref = d.letter(13, "heading reference", "TM", true);
    a.mode = d.letter(14, "mode", "ADEMSNP", true);
    if (a.valid && (!a.xte_nm || !a.steer)) d.fail(2, "cross-track error", "empty with status A");
    return !d.failed();
}

bool decodeRmb(Decoder& d, const Fields& f, RouteData& out) {
    // $INRMB,A,0.011,L,HF01A,HF01B,5211.123,N,00430.000,E,0.30,45.0,,V,A*hh
    //   1 A  status A valid, V warning   2 0.011  cross-track error, nautical miles   3 L  steer
    //   4 HF01A  origin waypoint   5 HF01B  destination waypoint
    //   6, 7  destination latitude, N/S   8, 9  destination longitude, E/W
    //  10 0.30  range to destination, nautical miles   11 45.0  bearing to destination, true
    //  12 (empty)  closing velocity, knots   13 V  arrival status (A arrived)
    //  14 A  mode indicator (NMEA 2.3)
    Rmb& r = out.emplace<Rmb>();
    r.valid = statusA(d, 0, "status");
    r.xte_nm = d.number(1, "cross-track error", 0.0, 999.0);
    r.steer = d.letter(2, "direction to steer", "LR", true);
    r.origin_id = std::string(f[3]);
    r.dest_id = std::string(f[4]);
    r.dest_lat_deg = d.latitude(5);
    r.dest_lon_deg = d.longitude(7);
    r.range_nm = d.number(9, "range to destination", 0.0, 99999.0);
    r.bearing_to_dest_deg = d.number(10, "bearing to destination", 0.0, 360.0);
    r.closing_kn = d.number(11, "closing velocity", -999.0, 999.0);
    r.arrived = d.letter(12, "arrival status", "AV", true) == 'A';
    r.mode = d.letter(13, "mode", "ADEMSNP", true);
    if (r.valid && (!r.xte_nm || !r.steer || !r.dest_lat_deg)) d.fail(1, "cross-track error", "empty with status A");
    return !d.failed();
}

bool decodeWpl(Decoder& d, const Fields& f, RouteData& out) {
    // $INWPL,5211.1234,N,00430.0000,E,HF01A*hh
    //   1, 2  latitude, N/S   3, 4  longitude, E/W   5  waypoint identifier
    Wpl& w = out.emplace<Wpl>();
    const auto lat = d.latitude(0);
    const auto lon = d.longitude(2);
    if (!lat) d.fail(0, "latitude", "empty");
    if (!lon) d.fail(2, "longitude", "empty");
    w.lat_deg = lat.value_or(0.0);
    w.lon_deg = lon.value_or(0.0);
    w.id = std::string(f[4]);
    if (w.id.empty()) d.fail(4, "waypoint identifier", "empty");
    return !d.failed();
}

bool decodeRte(Decoder& d, const Fields& f, RouteData& out) {
    // $INRTE,2,1,c,INFILL,IF-01A,IF-01B,IF-02A*hh
    //   1 2  total sentences   2 1  this sentence's number   3 c  complete (w working) route
    //   4 INFILL  route identifier   5..  waypoint identifiers in order
    Rte& r = out.emplace<Rte>();
    r.total = d.integer(0, "sentence count", 99).value_or(0);
    r.number = d.integer(1, "sentence number", 99).value_or(0);
    if (r.total < 1) d.fail(0, "sentence count", "empty or 0");
    if (r.number < 1 || r.number > r.total) d.fail(1, "sentence number", "not 1..count");
    r.mode = d.letter(2, "message mode", "cw", false);
    r.route_id = std::string(f[3]);
    for (std::size_t i = 4; i < f.n; ++i) r.waypoints.emplace_back(f[i]);
    return !d.failed();
}

struct RouteSpec {
    std::string_view type;
    std::size_t min_fields;
    RouteHandler handler;
};
constexpr std::array<RouteSpec, 5> kRouteSentences = {{
    {"XTE", 5, decodeXte},
    {"APB", 14, decodeApb},
    {"RMB", 13, decodeRmb},
    {"WPL", 5, decodeWpl},
    {"RTE", 4, decodeRte},
}};

}  // namespace

RouteSentence decodeRouteNmea(std::string_view line) {
    while (!line.empty() && (line.back() == '\n' || line.back() == '\r')) line.remove_suffix(1);
    const NmeaSentence env = decodeNmea(line);
    RouteSentence out;
    out.talker = env.talker;
    out.type = env.type;
    out.checksum_ok = env.checksum_ok;
    out.reason = env.reason;
    out.detail = env.detail;
    const RouteSpec* spec = nullptr;
    for (const auto& s : kRouteSentences)
        if (s.type == env.type) spec = &s;
    if (env.reason != Reason::UnknownSentence || env.talker == "P" || line.empty() || line[0] != '$' ||
        spec == nullptr) {
        if (env.reason == Reason::Ok || env.reason == Reason::NoChecksum || env.reason == Reason::FieldIgnored) {
            out.reason = Reason::UnknownSentence;
            out.detail = "not a steering or route sentence";
        }
        return out;
    }
    const Fields fields = splitFields(line);
    if (fields.n < spec->min_fields) {
        out.reason = Reason::Truncated;
        out.detail = std::to_string(fields.n) + " fields, " + std::string(spec->type) + " needs " +
                     std::to_string(spec->min_fields);
        return out;
    }
    Decoder d(fields);
    if (!spec->handler(d, fields, out.data)) {
        const FieldError& e = d.error();
        out.data = std::monostate{};
        out.reason = Reason::BadField;
        out.detail = "field " + std::to_string(e.index + 1) + " (" + e.name + "): " + e.what;
        return out;
    }
    out.reason = env.checksum_ok ? Reason::Ok : Reason::NoChecksum;
    out.detail.clear();
    return out;
}

}  // namespace sg::decode
