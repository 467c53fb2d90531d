// Sensor positioning: GNSS antenna -> tow point (vessel-frame offsets rotated by the heading),
// then layback along the path the tow point actually travelled, then each sensor's cross- and
// along-track offset relative to the local direction of that path; plus the sensor altitude.
// Fed timestamped values (UTC nanoseconds), queried at magnetometer sample times. Everything that
// is missing or stale is reported as a flag, never as a zero.
//
// Layback (straight-cable approximation, common practice): horizontal layback =
// sqrt(cable^2 - vertical^2) + extra, with vertical = sensor depth + tow-point height above water.
#pragma once

#include <cstdint>
#include <deque>
#include <optional>
#include <vector>

#include "nav/nav_config.hpp"
#include "nav/survey_crs.hpp"

namespace sg::nav {

// Bits of SensorPose::flags. Problems make the pose unusable for coverage; notes do not.
enum PoseFlag : std::uint32_t {
    kNoFix = 1u << 0,                 // no position at all yet
    kStaleFix = 1u << 1,              // sample time further than fix_max_age_s from any fix
    kBeforeHistory = 1u << 2,         // sample time before the first kept position
    kNoHeading = 1u << 3,             // no fresh HDT and no usable course made good
    kNoCableOut = 1u << 4,            // no cable-out value and no fixed one
    kNoSensorDepth = 1u << 5,         // no sensor depth and no fixed one (layback assumed depth 0)
    kCableShorterThanDrop = 1u << 6,  // cable out < vertical drop: inconsistent inputs
    kLaybackBeyondHistory = 1u << 7,  // travelled path too short: extended straight back
    kNoAltitude = 1u << 8,            // neither altimeter nor depth-minus-sensor-depth
    kUnknownSensor = 1u << 9,         // no [[sensor]] with this index
    // Notes (information, not problems):
    kHeadingFromCmg = 1u << 16,       // tow-point offset rotated by course made good
    kExtrapolated = 1u << 17,         // sample time after the last fix (within fix_max_age_s):
                                      // held at it, or carried on for extrapolation_s at most
    kFixedCableOut = 1u << 18,        // cable out from the configuration
    kFixedSensorDepth = 1u << 19,     // sensor depth from the configuration
};
inline constexpr std::uint32_t kPoseProblemMask = 0xFFFFu;
inline constexpr std::uint32_t kAltitudeProblemMask = kNoAltitude;
inline constexpr std::uint32_t kPositionProblemMask = kPoseProblemMask & ~kAltitudeProblemMask;

enum class AltitudeSource { None, Altimeter, WaterDepthMinusSensorDepth };

struct SensorPose {
    double easting_m = 0.0;
    double northing_m = 0.0;
    double heading_grid_rad = 0.0;  // direction of the travelled path at the sensor, from grid N
    double heading_true_rad = 0.0;  // the same from true north (grid + convergence)
    double layback_m = 0.0;         // horizontal, along the path, tow point -> fish reference
    double cable_out_m = 0.0;
    double sensor_depth_m = 0.0;
    double altitude_m = 0.0;        // sensor above the seabed; meaningful only with a source
    AltitudeSource altitude_source = AltitudeSource::None;
    std::uint32_t flags = 0;
    bool ok() const { return (flags & kPoseProblemMask) == 0; }                // all usable
    bool positionOk() const { return (flags & kPositionProblemMask) == 0; }    // position only
    bool altitudeOk() const { return (flags & kAltitudeProblemMask) == 0; }
};

// A value series with linear interpolation and an age limit. Times must not go backwards
// (an older value is rejected and counted). Keeps `keep_ns` of history.
class TimedSeries {
public:
    explicit TimedSeries(std::int64_t keep_ns) : m_keep_ns(keep_ns) {}
    bool add(std::int64_t t_ns, double v);
    // Value at t: interpolated between neighbours (when both are within max_age_ns of t), else the
    // nearest one within max_age_ns; nullopt otherwise.
    std::optional<double> at(std::int64_t t_ns, std::int64_t max_age_ns) const;
    bool empty() const { return m_v.empty(); }
    std::int64_t rejected() const { return m_rejected; }

private:
    struct Item {
        std::int64_t t_ns;
        double v;
    };
    std::deque<Item> m_v;
    std::int64_t m_keep_ns;
    std::int64_t m_rejected = 0;
};

// Total water depth below the surface (m) from an echo sounder value.
// depth_below_transducer_m: DBT, or DPT's depth. dpt_offset_m: DPT's offset when present
// (NMEA 0183: positive = transducer to waterline, negative = transducer to keel). Without an
// offset (DBT, or a DPT offset of 0) the configured transducer depth is added.
double waterDepthBelowSurface_m(double depth_below_transducer_m,
                                std::optional<double> dpt_offset_m, const VesselConfig& vessel);

class Positioner {
public:
    // `crs` must outlive the Positioner (it converts fixes and gives the grid convergence);
    // it may be null when only addFixProjected is used (convergence then 0).
    Positioner(NavConfig config, const SurveyCrs* crs);

    // Inputs. Times are the instruments' UTC stamps in ns; each instrument's configured latency is
    // subtracted. A value older than the previous one of its kind is rejected and counted.
    // quality: GGA fix quality (0 = invalid: the fix is ignored and counted).
    // Returns the antenna position in the survey CRS (NaN when it cannot be projected), so that a
    // caller needing it too does not project again.
    EastNorth addFix(std::int64_t t_ns, double lon_deg, double lat_deg, int quality);
    void addFixProjected(std::int64_t t_ns, double easting_m, double northing_m, int quality,
                         double convergence_rad);
    void addHeading(std::int64_t t_ns, double true_heading_deg);  // HDT, degrees from true N
    void addCableOut(std::int64_t t_ns, double cable_out_m);
    void addSensorDepth(std::int64_t t_ns, double depth_m);       // fish below the surface
    void addAltitude(std::int64_t t_ns, double altitude_m);       // altimeter: fish above seabed
    void addWaterDepth(std::int64_t t_ns, double depth_below_surface_m);

    // Pose of the sensor with this index at magnetometer time t_ns (its latency is subtracted).
    SensorPose poseAt(std::int64_t t_ns, int sensor_index) const;
    // All sensors at once, in the order of config().sensors (cheaper than one call each).
    void posesAt(std::int64_t t_ns, std::vector<SensorPose>& out) const;

    const NavConfig& config() const { return m_cfg; }
    std::size_t pathPoints() const { return m_path.size(); }
    // Whether a fix at or after magnetometer time t_ns (its latency removed) is known: a pose at
    // t_ns is then interpolated between fixes, not held or extrapolated past the last one.
    bool hasFixAtOrAfter(std::int64_t mag_t_ns) const;
    std::int64_t rejectedFixes() const { return m_rejected_fixes; }

private:
    struct PathPoint {
        std::int64_t t_ns;
        double e, n;            // tow point
        double s;               // cumulative travelled length (m)
        double heading_grid;    // vessel heading used for the offset (rad); NaN if none
        double convergence;     // rad
        std::uint32_t flags;
    };
    struct Fix {
        std::int64_t t_ns;
        double e, n;
    };
    struct PathPos {
        double e, n, t_ns, heading_grid, convergence;
        std::uint32_t flags;
    };

    std::optional<double> vesselHeadingGrid(std::int64_t t_ns, double convergence,
                                            std::uint32_t& flags) const;
    PathPos pointAtLength(double s) const;
    std::size_t lowerBoundNear(double s_m, std::size_t hint) const;
    double directionAtLength(double s, double fallback) const;
    SensorPose fishReference(std::int64_t t_ns, double& s_fish, PathPos& fish) const;
    void placeSensor(const SensorOffset& o, const SensorPose& ref, double s_fish,
                     SensorPose& out) const;
    static void applyCross(const SensorOffset& o, const PathPos& p, double dir, bool no_heading,
                           SensorPose& out);

    NavConfig m_cfg;
    const SurveyCrs* m_crs;
    std::deque<Fix> m_fixes;          // antenna track, for course made good
    std::deque<PathPoint> m_path;     // tow-point track
    TimedSeries m_heading_true;       // radians, unwrapped (continuous across north)
    TimedSeries m_cable;
    TimedSeries m_depth;
    TimedSeries m_altitude;
    TimedSeries m_water_depth;
    // Last placed path point within one query (queries are const but not thread-safe: one
    // Positioner per thread, as everything in the core).
    struct PlaceCache {
        bool valid = false;
        double s = 0.0;
        PathPos p{};
        double dir = 0.0;
        bool no_heading = false;
    };
    mutable PlaceCache m_place_cache;
    mutable std::size_t m_length_hint = 0;  // last path index found by length
    mutable std::size_t m_time_hint = 0;    // last path index found by time
    std::int64_t m_rejected_fixes = 0;
    double m_last_heading_rad = 0.0;
    bool m_have_heading = false;
};

}  // namespace sg::nav
