// What a survey remembers beyond its coverage raster: alarm episodes, data outages, invalid-sample
// counts and, for a site (docs/site.md), the acquisition sessions (logs) it is made of. Plain data,
// shared by the engine (a live session seeded with the earlier logs of its site), the survey
// summary and the per-log session summaries.
#pragma once

#include <cstdint>
#include <optional>
#include <string>

#include "common/received_line.hpp"

namespace sg::engine {

// Why samples covered nothing, counted (a sample can have several reasons).
struct InvalidCounts {
    std::uint64_t no_field = 0;      // dropout or field missing
    std::uint64_t pose = 0;          // no/stale fix, no heading, no cable, ...
    std::uint64_t no_altitude = 0;
    std::uint64_t noise_warmup = 0;  // noise window not filled yet after a (re)start
    std::uint64_t noisy = 0;         // noise above the alarm limit
    std::uint64_t low_quality = 0;   // signal quality below the alarm limit
    // The pose reasons apart (a sample may have several):
    std::uint64_t pose_no_fix = 0;          // no position fix yet (or every fix refused)
    std::uint64_t pose_stale_fix = 0;       // fix too old or a hole in the fixes
    std::uint64_t pose_no_heading = 0;
    std::uint64_t pose_no_cable_out = 0;    // no cable counter, no [tow] cable_out_m
    std::uint64_t pose_no_sensor_depth = 0; // no depth field, no [tow] sensor_depth_m
    std::uint64_t pose_other = 0;           // cable shorter than the drop, layback past history
    // Samples of sensor indices with no [[sensor]]: never processed, counted here.
    std::uint64_t unknown_sensor = 0;
    InvalidCounts& operator+=(const InvalidCounts& o) {
        no_field += o.no_field;
        pose += o.pose;
        no_altitude += o.no_altitude;
        noise_warmup += o.noise_warmup;
        noisy += o.noisy;
        low_quality += o.low_quality;
        pose_no_fix += o.pose_no_fix;
        pose_stale_fix += o.pose_stale_fix;
        pose_no_heading += o.pose_no_heading;
        pose_no_cable_out += o.pose_no_cable_out;
        pose_no_sensor_depth += o.pose_no_sensor_depth;
        pose_other += o.pose_other;
        unknown_sensor += o.unknown_sensor;
        return *this;
    }
};

struct AlarmSummary {
    std::string check;
    std::string unit;
    TimeNs start_ns = 0;
    std::optional<TimeNs> end_ns;
    std::string peak_level;
    double peak_value = 0.0;
    std::optional<TimeNs> ack_ns;
    int session = 0;  // site session (log) it was raised in
};

// A stretch of time without data: a link outage logged by the reader (port lost, reconnect) or
// a silence the live checks raised an alarm for (GNSS, magnetometer, altitude).
struct OutageSummary {
    std::string kind;     // "link" (from the log's events) or the silence check's name
    std::string source;   // input name for a link outage; empty for a check
    TimeNs start_ns = 0;
    std::optional<TimeNs> end_ns;  // nullopt: still open at the end of the log
    double duration_s = 0.0;       // to end_ns, or to the end of the log when still open
    std::string detail;
    int session = 0;
};

// One acquisition session of a site: one log, as the site sees it.
struct SessionInfo {
    int index = 0;                 // 0 = earliest (sessions are ordered by their first line)
    std::string log;               // file name of the log
    std::string path;              // full path
    std::string vessel;            // [vessel] name of the log's own config ("" when unnamed)
    std::size_t sensors = 0;
    TimeNs first_ns = 0, last_ns = 0;                // UTC receive times of its first/last lines
    TimeNs survey_first_ns = 0, survey_last_ns = 0;  // instrument time of its first/last samples
    std::uint64_t lines = 0;
    int first_run = 0;             // site run ids first_run .. first_run + runs - 1
    int runs = 0;
    double own_covered_m2 = 0.0;   // covered by this session alone (whole raster)
    double added_m2 = 0.0;         // newly covered by it, joining the sessions in time order
    InvalidCounts invalid;
    bool recomputed = false;       // its summary was (re)built this time
    std::string note;              // e.g. why it was recomputed
    bool live = false;             // the session being recorded now
};

}  // namespace sg::engine
