// NMEA 0183 sentences for the bridge: steering along the active survey or infill line (XTE, APB,
// RMB) and a line plan as a route (WPL waypoints, RTE route). Pure text building: no sockets,
// no clock; io/helm_output.* sends what this builds, src/engine/helm_steering.* fills SteeringFix
// from the engine's state.
//
// Field layouts follow NMEA 0183 (version 2.3 and later, with the mode indicator as the last
// field of XTE, APB and RMB). They are written from memory of the standard's published field
// tables, not copied from the standard's text; the tests check them against an independent
// parser from the npm registry (@signalk/nmea0183-signalk, nmea-simple). Each builder's comment
// lists the fields.
//
// The steering data are advisory: the master decides on navigation.
#pragma once

#include <optional>
#include <string>
#include <string_view>
#include <vector>

namespace sg::helm {

inline constexpr double kMetresPerNauticalMile = 1852.0;  // international nautical mile
inline constexpr double kMpsPerKnot = 1852.0 / 3600.0;
// NMEA 0183: at most 82 characters from '$' to the end of the line, CR LF included.
inline constexpr std::size_t kMaxSentenceChars = 82;

struct GeoPoint {
    double lat_deg = 0.0;  // WGS84 latitude, -90..90, north positive
    double lon_deg = 0.0;  // WGS84 longitude, -180..180, east positive
};

// One leg steered: from the origin waypoint to the destination waypoint (the end of the line).
struct SteeringFix {
    bool valid = false;             // false: no line is being run; void sentences (status V)
    std::string origin_id;          // waypoint identifiers (sanitised, see waypointId)
    std::string dest_id;
    GeoPoint dest;                  // destination waypoint
    double xte_m = 0.0;             // cross-track distance from the leg, metres, positive when the
                                    // reference is to starboard (right) of the track
                                    // origin -> destination (steer left to correct)
    double bearing_origin_dest_deg = 0.0;  // true bearing origin -> destination, 0..360
    double bearing_to_dest_deg = 0.0;      // true bearing present position -> destination
    double range_to_dest_m = 0.0;          // present position -> destination, metres
    std::optional<double> closing_mps;     // velocity towards the destination (m/s); empty
                                           // field when unknown
    bool arrival_circle_entered = false;   // within the arrival radius of the destination
    bool perpendicular_passed = false;     // past the perpendicular through the destination
};

struct SentenceOptions {
    // Talker identifier (two upper-case letters or digits). Default "IN": integrated navigation,
    // the talker of a navigation computer in NMEA 0183's talker list (from memory of the list).
    std::string talker = "IN";
    // Decimals of the cross-track error in nautical miles: 3 resolves 1.85 m (a survey line
    // needs metres; the standard's x.x leaves the number of decimals free).
    int xte_decimals = 3;
};

// Longest waypoint identifier: an RMB with two identifiers must stay within 82 characters
// (worked out in steering_sentences.cpp; tested with the longest values).
inline constexpr std::size_t kMaxWaypointIdChars = 6;

// A waypoint identifier the standard accepts: printable ASCII without the reserved characters
// ($ * , ! \ ^ ~ and the delimiter), every other character becomes '_'; cut to
// kMaxWaypointIdChars.
std::string waypointId(std::string_view name);
// The identifiers of a line's two ends: its letters and digits (longer than 5: the first 2 and
// the last 3) + 'A' (start as planned) or 'B' (end as planned), e.g. "HF01A", "INF01B".
std::string lineEndId(std::string_view line_name, bool at_end);

// "ddmm.mmmm,N" / "dddmm.mmmm,E" with `minute_decimals` decimals of the minutes (4: about
// 0.2 m; 3: about 1.9 m); a rounding up to 60 minutes carries into the degrees.
std::string formatLatitude(double lat_deg, int minute_decimals = 4);
std::string formatLongitude(double lon_deg, int minute_decimals = 4);

// Each builder returns one sentence "$" + body + "*hh", without CR LF.
std::string buildXte(const SteeringFix& fix, const SentenceOptions& opt);
std::string buildApb(const SteeringFix& fix, const SentenceOptions& opt);
std::string buildRmb(const SteeringFix& fix, const SentenceOptions& opt);
// The sentence `type` ("XTE", "APB" or "RMB"); throws std::invalid_argument for another type.
std::string buildSteering(std::string_view type, const SteeringFix& fix, const SentenceOptions& opt);
// Whether `type` is a steering sentence buildSteering knows.
bool isSteeringSentence(std::string_view type);

struct Waypoint {
    std::string id;  // waypointId()
    GeoPoint pos;
};

// One WPL per waypoint, then as many RTE sentences as the identifiers need (each <= 82
// characters), message mode 'c' (complete route). Waypoints first, so a receiver knows every
// identifier the route names.
std::vector<std::string> buildRoute(std::string_view route_id, const std::vector<Waypoint>& waypoints,
                                    const SentenceOptions& opt);

}  // namespace sg::helm
