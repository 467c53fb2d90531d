// Internal helpers shared by the NMEA and field-map decoders: allocation-free parsing of one field
// (a string_view) into a number, a time of day, a latitude or longitude. Not a public API.
#pragma once

#include <array>
#include <charconv>
#include <chrono>
#include <cmath>
#include <cstdint>
#include <string>
#include <string_view>

namespace sg::decode::detail {

inline constexpr std::array<double, 23> kPow10 = {
    1e0,  1e1,  1e2,  1e3,  1e4,  1e5,  1e6,  1e7,  1e8,  1e9,  1e10, 1e11,
    1e12, 1e13, 1e14, 1e15, 1e16, 1e17, 1e18, 1e19, 1e20, 1e21, 1e22};

inline bool isDigit(char c) { return c >= '0' && c <= '9'; }

// A plain decimal: optional '-', digits, optional '.' and digits (at least one digit in all).
// No '+', exponent, spaces, "inf" or "nan". When the digits fit in 2^53 and there are at most 22
// decimals the result is mantissa / 10^decimals, which IEEE division rounds correctly because
// both operands are exact (Clinger 1990, "How to read floating point numbers accurately", the
// fast path); otherwise std::from_chars does the conversion.
inline bool parseDecimal(std::string_view s, double& out) {
    const char* p = s.data();
    const char* const end = p + s.size();
    bool neg = false;
    if (p != end && *p == '-') {
        neg = true;
        ++p;
    }
    const char* const digits_begin = p;
    std::uint64_t mant = 0;
    int frac = 0;
    bool dot = false;
    bool any = false;
    bool exact = true;
    for (; p != end; ++p) {
        const char c = *p;
        if (isDigit(c)) {
            any = true;
            if (mant < (std::uint64_t{1} << 53) / 10 - 1) {
                mant = mant * 10 + static_cast<std::uint64_t>(c - '0');
                if (dot) ++frac;
            } else {
                exact = false;
            }
        } else if (c == '.' && !dot) {
            dot = true;
        } else {
            return false;
        }
    }
    if (!any) return false;
    if (exact && frac < static_cast<int>(kPow10.size())) {
        const double v = static_cast<double>(mant) / kPow10[static_cast<std::size_t>(frac)];
        out = neg ? -v : v;
        return true;
    }
    double v = 0;
    const auto r = std::from_chars(digits_begin, end, v, std::chars_format::fixed);
    if (r.ec != std::errc{} || r.ptr != end || !std::isfinite(v)) return false;
    out = neg ? -v : v;
    return true;
}

// Digits only, value <= max_value.
inline bool parseUnsigned(std::string_view s, int max_value, int& out) {
    if (s.empty() || s.size() > 9) return false;
    int v = 0;
    for (const char c : s) {
        if (!isDigit(c)) return false;
        v = v * 10 + (c - '0');
    }
    if (v > max_value) return false;
    out = v;
    return true;
}

// Optional leading '-', then digits; |value| <= max_abs.
inline bool parseSigned(std::string_view s, int max_abs, int& out) {
    bool neg = false;
    if (!s.empty() && (s[0] == '-' || s[0] == '+')) {
        neg = s[0] == '-';
        s.remove_prefix(1);
    }
    int v = 0;
    if (!parseUnsigned(s, max_abs, v)) return false;
    out = neg ? -v : v;
    return true;
}

inline int twoDigits(const char* p) { return (p[0] - '0') * 10 + (p[1] - '0'); }

// "hhmmss" or "hhmmss.sss" -> seconds since UTC midnight. hh < 24, mm < 60, ss <= 60 (a leap
// second, 23:59:60, is legal UTC). Returns nullptr on success, else what is wrong.
inline const char* parseHhMmSs(std::string_view s, double& tod_s) {
    if (s.size() < 6) return "expected hhmmss[.sss]";
    for (int i = 0; i < 6; ++i) {
        if (!isDigit(s[static_cast<std::size_t>(i)])) return "expected hhmmss[.sss]";
    }
    if (s.size() > 6 && s[6] != '.') return "expected hhmmss[.sss]";
    const int hh = twoDigits(s.data());
    const int mm = twoDigits(s.data() + 2);
    double ss = 0;
    if (!parseDecimal(s.substr(4), ss)) return "expected hhmmss[.sss]";
    if (hh > 23) return "hours > 23";
    if (mm > 59) return "minutes > 59";
    if (ss >= 61.0) return "seconds >= 61";
    tod_s = hh * 3600.0 + mm * 60.0 + ss;
    return nullptr;
}

// Digits of a decimal fraction ("5", "123456789012") -> nanoseconds, rounded to the nearest
// nanosecond (half up) whatever the number of digits. Returns false for an empty string or a
// non-digit. The result may be 1'000'000'000 ("9999999999"): the caller adds it to whole seconds.
inline bool parseFractionNs(std::string_view digits, std::int64_t& ns) {
    if (digits.empty()) return false;
    std::int64_t v = 0;
    for (std::size_t i = 0; i < digits.size(); ++i) {
        const char c = digits[i];
        if (!isDigit(c)) return false;
        if (i < 9) v = v * 10 + (c - '0');
    }
    for (std::size_t i = digits.size(); i < 9; ++i) v *= 10;
    if (digits.size() > 9 && digits[9] >= '5') ++v;
    ns = v;
    return true;
}

// Latest instrument time accepted as full UTC: 2200-01-01T00:00:00Z (the NMEA date range of this
// project ends in 2199 too).
inline constexpr std::int64_t kMaxUnix_s = 7'258'118'400;
inline constexpr std::int64_t kNsPerS = 1'000'000'000;

// Unix seconds "1796173200", "1796173200.25", fraction of any length (rounded to the ns) ->
// nanoseconds since 1970-01-01T00:00:00Z, exactly (no double on the way). 0 <= value < 2200.
// Returns nullptr on success, else what is wrong.
inline const char* parseUnixNs(std::string_view s, std::int64_t& out_ns) {
    const std::size_t dot = s.find('.');
    const std::string_view whole = s.substr(0, dot);
    std::int64_t f = 0;
    if (dot != std::string_view::npos && !parseFractionNs(s.substr(dot + 1), f)) {
        return "expected unix seconds: digits, optionally '.' and digits";
    }
    if (whole.empty() || whole.size() > 11) {
        return "expected unix seconds: digits, optionally '.' and digits";
    }
    std::int64_t w = 0;
    for (const char c : whole) {
        if (!isDigit(c)) return "expected unix seconds: digits, optionally '.' and digits";
        w = w * 10 + (c - '0');
    }
    if (w >= kMaxUnix_s) return "unix seconds beyond 2200-01-01 (7258118400)";
    out_ns = w * kNsPerS + f;
    return nullptr;
}

// A UTC offset "Z", "z", "+hh:mm", "-hh:mm", "+hhmm", "+hh" -> seconds east of UTC. |offset| <=
// 14:00 (the largest in use, UTC+14, Line Islands; from memory), minutes < 60. "-00:00" is UTC
// (RFC 3339 section 4.3: UTC with the local offset unknown). Returns nullptr on success.
inline const char* parseUtcOffset(std::string_view s, int& offset_s) {
    if (s == "Z" || s == "z") {
        offset_s = 0;
        return nullptr;
    }
    const char* const what = "expected a zone designator Z, +hh:mm, +hhmm or +hh";
    if (s.size() < 3 || (s[0] != '+' && s[0] != '-') || !isDigit(s[1]) || !isDigit(s[2])) return what;
    const int hh = twoDigits(s.data() + 1);
    int mm = 0;
    std::string_view rest = s.substr(3);
    if (!rest.empty() && rest[0] == ':') rest.remove_prefix(1);
    if (!rest.empty()) {
        if (rest.size() != 2 || !isDigit(rest[0]) || !isDigit(rest[1])) return what;
        mm = twoDigits(rest.data());
    } else if (s.size() == 4) {
        return what;  // "+01:" without minutes
    }
    if (mm > 59) return "zone offset minutes > 59";
    if (hh * 60 + mm > 14 * 60) return "zone offset beyond +-14:00";
    offset_s = (s[0] == '-' ? -1 : 1) * (hh * 3600 + mm * 60);
    return nullptr;
}

// ISO 8601 date and time of day -> nanoseconds since 1970-01-01T00:00:00Z (ISO 8601-1:2019; the
// profile of RFC 3339 section 5.6 plus the basic format):
//   date       YYYY-MM-DD or YYYYMMDD, a real calendar date, year 1970..2199
//   separator  'T' (also 't' or one space, as RFC 3339 allows)
//   time       hh:mm:ss or hhmmss; hh <= 23, mm <= 59, ss <= 60 (23:59:60 is a leap second; it
//              counts as the first second of the next day, as POSIX time has no leap seconds)
//   fraction   optional: '.' or ',' then digits, any number, rounded to the nanosecond
//   zone       optional: Z, +hh:mm, -hh:mm, +hhmm, +hh. Without one, `default_offset_s` (seconds
//              east of UTC) applies: ISO 8601 calls such a time local time.
// Returns nullptr on success, else what is wrong.
inline const char* parseIso8601Ns(std::string_view s, int default_offset_s, std::int64_t& out_ns) {
    const char* const shape = "expected ISO 8601 YYYY-MM-DDThh:mm:ss[.s][Z|+hh:mm]";
    auto digitsAt = [&](std::size_t pos, std::size_t n) {
        if (pos + n > s.size()) return false;
        for (std::size_t i = 0; i < n; ++i) {
            if (!isDigit(s[pos + i])) return false;
        }
        return true;
    };
    if (!digitsAt(0, 4)) return shape;
    const int year = twoDigits(s.data()) * 100 + twoDigits(s.data() + 2);
    std::size_t p = 4;
    const bool ext_date = p < s.size() && s[p] == '-';
    if (ext_date) ++p;
    if (!digitsAt(p, 2)) return shape;
    const int month = twoDigits(s.data() + p);
    p += 2;
    if (ext_date) {
        if (p >= s.size() || s[p] != '-') return shape;
        ++p;
    }
    if (!digitsAt(p, 2)) return shape;
    const int day = twoDigits(s.data() + p);
    p += 2;
    if (p >= s.size() || (s[p] != 'T' && s[p] != 't' && s[p] != ' ')) {
        return "expected 'T' between the date and the time";
    }
    ++p;
    if (!digitsAt(p, 2)) return shape;
    const int hh = twoDigits(s.data() + p);
    p += 2;
    const bool ext_time = p < s.size() && s[p] == ':';
    if (ext_time) ++p;
    if (!digitsAt(p, 2)) return shape;
    const int mm = twoDigits(s.data() + p);
    p += 2;
    if (ext_time) {
        if (p >= s.size() || s[p] != ':') return "expected seconds (hh:mm:ss)";
        ++p;
    }
    if (!digitsAt(p, 2)) return "expected seconds (hh:mm:ss)";
    const int ss = twoDigits(s.data() + p);
    p += 2;
    std::int64_t frac_ns = 0;
    if (p < s.size() && (s[p] == '.' || s[p] == ',')) {
        ++p;
        std::size_t e = p;
        while (e < s.size() && isDigit(s[e])) ++e;
        if (!parseFractionNs(s.substr(p, e - p), frac_ns)) return "expected digits after the decimal sign";
        p = e;
    }
    int offset_s = default_offset_s;
    if (p < s.size()) {
        if (const char* what = parseUtcOffset(s.substr(p), offset_s)) return what;
    }
    if (year < 1970 || year > 2199) return "year outside 1970..2199";
    if (month < 1 || month > 12) return "month outside 01..12";
    const std::chrono::year_month_day ymd{std::chrono::year{year},
                                          std::chrono::month{static_cast<unsigned>(month)},
                                          std::chrono::day{static_cast<unsigned>(day)}};
    if (day < 1 || !ymd.ok()) return "not a calendar date";
    if (hh > 23) return "hours > 23";
    if (mm > 59) return "minutes > 59";
    if (ss > 60) return "seconds > 60";
    const std::int64_t days = std::chrono::sys_days{ymd}.time_since_epoch().count();
    out_ns = (days * 86'400 + hh * 3'600 + mm * 60 + ss - offset_s) * kNsPerS + frac_ns;
    return nullptr;
}

// NMEA angle "ddmm.mmm" (latitude, deg_digits_max 2) or "dddmm.mmm" (longitude, 3).
// Returns nullptr on success, else what is wrong. Result in degrees, unsigned.
inline const char* parseDegMin(std::string_view s, int deg_digits_max, double max_deg,
                               double& deg) {
    std::size_t int_len = s.find('.');
    if (int_len == std::string_view::npos) int_len = s.size();
    if (int_len < 3 || int_len > static_cast<std::size_t>(deg_digits_max) + 2) {
        return "expected (d)ddmm.mmm";
    }
    int d = 0;
    if (!parseUnsigned(s.substr(0, int_len - 2), 999, d)) return "expected (d)ddmm.mmm";
    const std::string_view min_s = s.substr(int_len - 2);
    if (!isDigit(min_s[0])) return "expected (d)ddmm.mmm";
    double minutes = 0;
    if (!parseDecimal(min_s, minutes)) return "expected (d)ddmm.mmm";
    if (minutes >= 60.0) return "minutes >= 60";
    const double v = d + minutes / 60.0;
    if (v > max_deg) return max_deg < 100 ? "latitude > 90 degrees" : "longitude > 180 degrees";
    deg = v;
    return nullptr;
}

inline int hexValue(char c) {
    if (c >= '0' && c <= '9') return c - '0';
    if (c >= 'A' && c <= 'F') return c - 'A' + 10;
    if (c >= 'a' && c <= 'f') return c - 'a' + 10;
    return -1;
}

inline constexpr char kHexUpper[] = "0123456789ABCDEF";

// "byte 0x1B at offset 7": the detail of a binary-byte rejection. The value is in hex so that it
// does not read like a position or a measurement.
inline std::string binaryByteDetail(unsigned char c, std::size_t offset) {
    std::string d = "byte 0x";
    d += kHexUpper[c >> 4];
    d += kHexUpper[c & 0xF];
    d += " at offset ";
    d += std::to_string(offset);
    return d;
}

}  // namespace sg::decode::detail
