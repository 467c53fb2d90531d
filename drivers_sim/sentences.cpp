// Text of the simulated instrument lines; see sentences.hpp. Checksums come from the decoder's
// own helpers (src/decode), so the simulator and the core agree on one implementation; the tests
// check them against an independent XOR.
#include "drivers_sim/sentences.hpp"

#include <cmath>
#include <cstdlib>
#include <ctime>

#include <fmt/format.h>

#include "decode/field_map.hpp"
#include "decode/nmea.hpp"

namespace sg::sim {

namespace {

// ddmm.mmmmmmm / dddmm.mmmmmmm with hemisphere, rounded in integer units of 1e-7 minute so that
// 59.99999999 minutes never prints as 60.
std::string angle(double deg, int deg_digits, char pos, char neg) {
    const char hemi = deg >= 0.0 ? pos : neg;
    const auto units = static_cast<long long>(std::llround(std::abs(deg) * 60.0 * 1e7));
    const long long whole_deg = units / 600'000'000LL;
    const long long rem = units % 600'000'000LL;
    return fmt::format("{:0{}d}{:02d}.{:07d},{}", whole_deg, deg_digits, rem / 10'000'000LL,
                       rem % 10'000'000LL, hemi);
}

// Course in [0, 360) that never prints as 360.00 with two decimals.
double course2(double deg) {
    double d = std::fmod(deg, 360.0);
    if (d < 0.0) d += 360.0;
    return d >= 359.995 ? 0.0 : d;
}

std::tm utcTm(TimeNs t) {
    const std::time_t s = static_cast<std::time_t>(t / kNsPerSecond);
    std::tm tm{};
    gmtime_r(&s, &tm);
    return tm;
}

}  // namespace

std::string timeOfDay(TimeNs utc_ns, int decimals) {
    // Truncate to the stated resolution (an instrument stamps the start of its epoch).
    const TimeNs unit = decimals >= 3 ? 1'000'000 : 10'000'000;
    const TimeNs t = utc_ns - (utc_ns % unit);
    const std::tm tm = utcTm(t);
    const auto frac = static_cast<int>((t % kNsPerSecond) / unit);
    return fmt::format("{:02d}{:02d}{:02d}.{:0{}d}", tm.tm_hour, tm.tm_min, tm.tm_sec, frac,
                       decimals >= 3 ? 3 : 2);
}

std::string ggaSentence(const std::string& talker, const GgaFields& f) {
    std::string body = talker + "GGA," + timeOfDay(f.utc_ns, 2) + ",";
    if (f.quality > 0) {
        body += angle(f.lat_deg, 2, 'N', 'S') + "," + angle(f.lon_deg, 3, 'E', 'W');
        body += fmt::format(",{},{:02d},{:.1f},{:.3f},M,{:.3f},M,", f.quality, f.satellites,
                            f.hdop, f.altitude_m, f.geoid_separation_m);
        body += f.diff_age_s >= 0.0 ? fmt::format("{:.1f}", f.diff_age_s) : std::string();
        body += ",";
        body += f.station >= 0 ? fmt::format("{:04d}", f.station) : std::string();
    } else {
        body += fmt::format(",,,,0,{:02d},,,M,,M,,", f.satellites);
    }
    return decode::nmeaWithChecksum(body);
}

std::string rmcSentence(const std::string& talker, const RmcFields& f) {
    const std::tm tm = utcTm(f.utc_ns);
    std::string body = talker + "RMC," + timeOfDay(f.utc_ns, 2) + (f.valid ? ",A," : ",V,");
    if (f.valid) {
        body += angle(f.lat_deg, 2, 'N', 'S') + "," + angle(f.lon_deg, 3, 'E', 'W');
        body += fmt::format(",{:.2f},{:.2f},", f.sog_kn, course2(f.cog_true_deg));
    } else {
        body += ",,,,,,";
    }
    body += fmt::format("{:02d}{:02d}{:02d},{:.1f},{},{}", tm.tm_mday, tm.tm_mon + 1,
                        tm.tm_year % 100, std::abs(f.variation_deg),
                        f.variation_deg >= 0.0 ? 'E' : 'W', f.valid ? f.mode : 'N');
    return decode::nmeaWithChecksum(body);
}

std::string vtgSentence(const std::string& talker, bool valid, double cog_true_deg,
                        double variation_deg, double sog_kn, char mode) {
    if (!valid) return decode::nmeaWithChecksum(talker + "VTG,,T,,M,,N,,K,N");
    return decode::nmeaWithChecksum(fmt::format("{}VTG,{:.2f},T,{:.2f},M,{:.2f},N,{:.2f},K,{}",
                                                talker, course2(cog_true_deg),
                                                course2(cog_true_deg - variation_deg), sog_kn,
                                                sog_kn * 1.852, mode));
}

std::string zdaSentence(const std::string& talker, TimeNs utc_ns) {
    const std::tm tm = utcTm(utc_ns);
    return decode::nmeaWithChecksum(fmt::format("{}ZDA,{},{:02d},{:02d},{:04d},00,00", talker,
                                                timeOfDay(utc_ns, 2), tm.tm_mday, tm.tm_mon + 1,
                                                tm.tm_year + 1900));
}

std::string gstSentence(const std::string& talker, TimeNs utc_ns, double rms, double smaj_m,
                        double smin_m, double orient_deg, double lat_m, double lon_m,
                        double alt_m) {
    return decode::nmeaWithChecksum(
        fmt::format("{}GST,{},{:.2f},{:.3f},{:.3f},{:.1f},{:.3f},{:.3f},{:.3f}", talker,
                    timeOfDay(utc_ns, 2), rms, smaj_m, smin_m, orient_deg, lat_m, lon_m, alt_m));
}

std::string hdtSentence(const std::string& talker, double heading_true_deg) {
    return decode::nmeaWithChecksum(fmt::format("{}HDT,{:.2f},T", talker, course2(heading_true_deg)));
}

std::string dptSentence(const std::string& talker, double depth_m, double offset_m,
                        double range_m) {
    return decode::nmeaWithChecksum(
        fmt::format("{}DPT,{:.2f},{:.2f},{:.0f}", talker, depth_m, offset_m, range_m));
}

std::string sgmString(int sensor, TimeNs utc_ns, double field_nT, int quality, double depth_m,
                      double altitude_m) {
    std::string body = fmt::format("SGM,{},{},{:.3f},{},{:.2f},", sensor, timeOfDay(utc_ns, 3),
                                   field_nT, quality, depth_m);
    if (altitude_m >= 0.0) body += fmt::format("{:.2f}", altitude_m);
    return decode::withXorChecksum(body);
}

std::string sgaString(TimeNs utc_ns, double altitude_m) {
    return decode::withXorChecksum(fmt::format("SGA,{},{:.2f}", timeOfDay(utc_ns, 2), altitude_m));
}

std::string sgcString(TimeNs utc_ns, double cable_out_m) {
    return decode::withXorChecksum(fmt::format("SGC,{},{:.1f}", timeOfDay(utc_ns, 2), cable_out_m));
}

std::string spoilChecksum(const std::string& line, unsigned flip) {
    const auto star = line.rfind('*');
    if (star == std::string::npos || star + 3 > line.size()) return line + "*00";
    const unsigned old = static_cast<unsigned>(std::strtoul(line.substr(star + 1, 2).c_str(), nullptr, 16));
    return line.substr(0, star + 1) + fmt::format("{:02X}", (old ^ (flip & 0xFFu)) & 0xFFu) +
           line.substr(star + 3);
}

}  // namespace sg::sim
