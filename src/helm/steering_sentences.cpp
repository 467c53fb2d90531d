// NMEA 0183 steering and route sentences; see steering_sentences.hpp. Field tables below are
// from memory of NMEA 0183 (v2.3+); the tests decode every sentence with an independent parser.
#include "helm/steering_sentences.hpp"

#include <algorithm>
#include <cmath>
#include <stdexcept>

#include <fmt/format.h>

#include "decode/nmea.hpp"

namespace sg::helm {

namespace {

// NMEA 0183 reserved characters (plus CR/LF): never inside a data field.
bool isReserved(char c) {
    return c == '$' || c == '*' || c == ',' || c == '!' || c == '\\' || c == '^' || c == '~' ||
           c == '\r' || c == '\n';
}

// "ddmm.mmmm" with `deg_digits` digits of degrees; a rounding to 60 minutes carries.
std::string degMin(double abs_deg, int deg_digits, int decimals) {
    int deg = static_cast<int>(std::floor(abs_deg));
    const double scale = std::pow(10.0, decimals);
    double minutes = std::round((abs_deg - deg) * 60.0 * scale) / scale;
    if (minutes >= 60.0) {
        minutes -= 60.0;
        ++deg;
    }
    return fmt::format("{:0{}d}{:0{}.{}f}", deg, deg_digits, minutes, decimals + 3, decimals);
}

// Cross-track magnitude in nautical miles and the direction to steer: a reference to starboard
// (right) of the track steers left (L) to come back (NMEA 0183, XTE field 4).
struct XteFields {
    std::string magnitude;
    char steer = 'L';
};
XteFields xteFields(double xte_m, int decimals, double max_nm) {
    const double nm = std::min(std::abs(xte_m) / kMetresPerNauticalMile, max_nm);
    return {fmt::format("{:.{}f}", nm, decimals), xte_m > 0.0 ? 'L' : 'R'};
}

std::string bearing(double deg) {
    double b = std::fmod(deg, 360.0);
    if (b < 0) b += 360.0;
    if (std::round(b * 10.0) >= 3600.0) b = 0.0;  // 359.96 prints as 0.0, not 360.0
    return fmt::format("{:.1f}", b);
}

std::string finish(const std::string& body) {
    std::string s = decode::nmeaWithChecksum(body);
    if (s.size() + 2 > kMaxSentenceChars)
        throw std::logic_error(fmt::format("NMEA sentence longer than {} characters: {}", kMaxSentenceChars, s));
    return s;
}

std::string talker(const SentenceOptions& opt) { return opt.talker; }

}  // namespace

std::string waypointId(std::string_view name) {
    std::string id;
    for (const char c : name) {
        if (id.size() == kMaxWaypointIdChars) break;
        const auto u = static_cast<unsigned char>(c);
        id += (u < 0x20 || u >= 0x7F || isReserved(c)) ? '_' : c;
    }
    return id;
}

std::string lineEndId(std::string_view line_name, bool at_end) {
    // Letters and digits only; a name longer than 5 keeps its first 2 and last 3 characters, so
    // numbered names stay apart ("INF-01" -> "INF01", "LINE0123" -> "LI123").
    std::string base;
    for (const char c : line_name)
        if ((c >= 'A' && c <= 'Z') || (c >= 'a' && c <= 'z') || (c >= '0' && c <= '9')) base += c;
    const std::size_t keep = kMaxWaypointIdChars - 1;
    if (base.size() > keep) base = base.substr(0, 2) + base.substr(base.size() - (keep - 2));
    return base + (at_end ? 'B' : 'A');
}

std::string formatLatitude(double lat_deg, int minute_decimals) {
    return degMin(std::abs(lat_deg), 2, minute_decimals) + (lat_deg < 0 ? ",S" : ",N");
}

std::string formatLongitude(double lon_deg, int minute_decimals) {
    return degMin(std::abs(lon_deg), 3, minute_decimals) + (lon_deg < 0 ? ",W" : ",E");
}

std::string buildXte(const SteeringFix& fix, const SentenceOptions& opt) {
    // $--XTE,A,A,x.x,a,N,a*hh
    //   1 A  status: A data valid, V warning (originally Loran-C blink/SNR)
    //   2 A  status: A valid, V warning (originally Loran-C cycle lock)
    //   3 x.x  cross-track error magnitude
    //   4 a  direction to steer, L or R
    //   5 N  units: nautical miles
    //   6 a  mode indicator (NMEA 2.3): A autonomous, D differential, ..., N data not valid
    if (!fix.valid) return finish(talker(opt) + "XTE,V,V,,,N,N");
    const auto x = xteFields(fix.xte_m, opt.xte_decimals, 99.0);
    return finish(fmt::format("{}XTE,A,A,{},{},N,A", talker(opt), x.magnitude, x.steer));
}

std::string buildApb(const SteeringFix& fix, const SentenceOptions& opt) {
    // $--APB,A,A,x.x,a,N,A,A,x.x,a,c--c,x.x,a,x.x,a,a*hh
    //   1, 2  status A valid / V warning (as XTE)
    //   3  cross-track error magnitude   4 direction to steer L/R   5 units N (nautical miles)
    //   6  A arrival circle entered, V not entered
    //   7  A perpendicular passed at the destination waypoint, V not passed
    //   8  bearing origin -> destination   9 M magnetic / T true
    //  10  destination waypoint identifier
    //  11  bearing present position -> destination   12 M/T
    //  13  heading to steer to the destination waypoint   14 M/T
    //  15  mode indicator (NMEA 2.3)
    // Heading to steer: the bearing to the destination (no set and drift is estimated here).
    if (!fix.valid) return finish(talker(opt) + "APB,V,V,,,,V,V,,,,,,,,N");
    const auto x = xteFields(fix.xte_m, opt.xte_decimals, 99.0);
    return finish(fmt::format("{}APB,A,A,{},{},N,{},{},{},T,{},{},T,{},T,A", talker(opt), x.magnitude,
                              x.steer, fix.arrival_circle_entered ? 'A' : 'V',
                              fix.perpendicular_passed ? 'A' : 'V', bearing(fix.bearing_origin_dest_deg),
                              fix.dest_id, bearing(fix.bearing_to_dest_deg), bearing(fix.bearing_to_dest_deg)));
}

std::string buildRmb(const SteeringFix& fix, const SentenceOptions& opt) {
    // $--RMB,A,x.x,a,c--c,c--c,llll.ll,a,yyyyy.yy,a,x.x,x.x,x.x,A,a*hh
    //   1  status A valid, V warning
    //   2  cross-track error, nautical miles (at most 9.99)   3 direction to steer L/R
    //   4  origin waypoint identifier   5 destination waypoint identifier
    //   6, 7  destination latitude, N/S   8, 9  destination longitude, E/W
    //  10  range to the destination, nautical miles (at most 999.9)
    //  11  bearing to the destination, degrees true
    //  12  destination closing velocity, knots
    //  13  arrival status: A arrival circle entered (or perpendicular passed), V not arrived
    //  14  mode indicator (NMEA 2.3)
    // Length budget (82 characters with $, *hh and CR LF): with minutes to 3 decimals here
    // (1.9 m), range and velocity at their caps and 6-character identifiers the sentence is 80.
    if (!fix.valid) return finish(talker(opt) + "RMB,V,,,,,,,,,,,,V,N");
    const auto x = xteFields(fix.xte_m, opt.xte_decimals, 9.99);
    const double range_nm = std::min(fix.range_to_dest_m / kMetresPerNauticalMile, 999.9);
    const std::string range = range_nm < 100.0 ? fmt::format("{:.2f}", range_nm) : fmt::format("{:.1f}", range_nm);
    std::string closing;
    if (fix.closing_mps) closing = fmt::format("{:.1f}", std::clamp(*fix.closing_mps / kMpsPerKnot, -99.9, 99.9));
    const bool arrived = fix.arrival_circle_entered || fix.perpendicular_passed;
    return finish(fmt::format("{}RMB,A,{},{},{},{},{},{},{},{},{},{},A", talker(opt), x.magnitude, x.steer,
                              fix.origin_id, fix.dest_id, formatLatitude(fix.dest.lat_deg, 3),
                              formatLongitude(fix.dest.lon_deg, 3), range, bearing(fix.bearing_to_dest_deg),
                              closing, arrived ? 'A' : 'V'));
}

bool isSteeringSentence(std::string_view type) { return type == "XTE" || type == "APB" || type == "RMB"; }

std::string buildSteering(std::string_view type, const SteeringFix& fix, const SentenceOptions& opt) {
    if (type == "XTE") return buildXte(fix, opt);
    if (type == "APB") return buildApb(fix, opt);
    if (type == "RMB") return buildRmb(fix, opt);
    throw std::invalid_argument(fmt::format("not a steering sentence: {}", type));
}

std::vector<std::string> buildRoute(std::string_view route_id, const std::vector<Waypoint>& waypoints,
                                    const SentenceOptions& opt) {
    std::vector<std::string> out;
    // $--WPL,llll.ll,a,yyyyy.yy,a,c--c*hh
    //   1, 2  latitude, N/S   3, 4  longitude, E/W   5 waypoint identifier
    for (const auto& w : waypoints)
        out.push_back(finish(fmt::format("{}WPL,{},{},{}", talker(opt), formatLatitude(w.pos.lat_deg),
                                         formatLongitude(w.pos.lon_deg), w.id)));
    // $--RTE,x.x,x.x,a,c--c,c--c, ..., c--c*hh
    //   1  total number of RTE sentences of this route   2  this sentence's number (from 1)
    //   3  message mode: c complete route (all waypoints), w working route (first: the active
    //      leg's origin, second: its destination, then the rest)
    //   4  route identifier   5..  waypoint identifiers in order
    // The identifiers are split over as many sentences as fit 82 characters; the total is only
    // known once split, so the split is done on the longest header (two-digit counts).
    const std::string rid = waypointId(route_id);
    std::vector<std::vector<std::string>> parts(1);
    std::size_t len = 0;
    const std::size_t header = fmt::format("{}RTE,99,99,c,{}", talker(opt), rid).size();
    for (const auto& w : waypoints) {
        if (!parts.back().empty() && 1 + header + len + 1 + w.id.size() + 3 + 2 > kMaxSentenceChars) {
            parts.emplace_back();
            len = 0;
        }
        parts.back().push_back(w.id);
        len += 1 + w.id.size();
    }
    if (parts.size() > 99) throw std::invalid_argument("route too long for RTE (more than 99 sentences)");
    for (std::size_t k = 0; k < parts.size(); ++k) {
        std::string body = fmt::format("{}RTE,{},{},c,{}", talker(opt), parts.size(), k + 1, rid);
        for (const auto& id : parts[k]) body += "," + id;
        out.push_back(finish(body));
    }
    return out;
}

}  // namespace sg::helm
