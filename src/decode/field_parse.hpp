// Internal helpers shared by the NMEA and field-map decoders: allocation-free parsing of one field
// (a string_view) into a number, a time of day, a latitude or longitude. Not a public API.
#pragma once

#include <array>
#include <charconv>
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
