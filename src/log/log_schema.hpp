// The survey log: one SQLite file per survey. Row types, the schema (documented column by column
// in docs/log-schema.md) and the store that writes batches and reads them back. No threads here:
// io/log_writer.hpp runs a LogStore on its own thread so acquisition never waits on the disk.
#pragma once

#include <cstdint>
#include <memory>
#include <optional>
#include <string>
#include <string_view>
#include <vector>

#include "common/received_line.hpp"

namespace sg::log {

// Bumped whenever a table or column changes meaning; stored in meta.schema_version.
constexpr int kSchemaVersion = 1;

// Decode status of a raw line (raw_lines.status).
enum class DecodeStatus : std::uint8_t {
    Ok = 0,           // decoded; its values are in one of the decoded tables
    Rejected = 1,     // malformed (checksum, field count, value...): reason says why
    Unsupported = 2,  // well formed but a sentence this program does not use
    NotDecoded = 3,   // no decoder ran (e.g. the continuation of an over-long line)
};
const char* toString(DecodeStatus s);
DecodeStatus statusFromText(std::string_view s);  // inverse of toString; unknown -> NotDecoded

struct RawRow {
    std::string source;
    TimeNs mono_ns = 0;
    TimeNs utc_ns = 0;
    std::string bytes;  // exact bytes, stored as a BLOB
    std::uint8_t flags = 0;
    DecodeStatus status = DecodeStatus::NotDecoded;
    std::string reason;  // empty when ok
};

// Decoded rows refer to their raw line by its index in the same Batch (raw_index); the store
// turns that into raw_lines.id. Optional values are stored as NULL.
struct FixRow {
    std::size_t raw_index = 0;
    std::string source;
    std::string sentence;                 // "GGA", "RMC", "GNS", "GLL"
    std::optional<TimeNs> time_utc_ns;    // instrument time when the day is known
    std::optional<double> time_of_day_s;  // instrument time of day, seconds since 00:00 UTC
    double lat_deg = 0.0;
    double lon_deg = 0.0;
    std::optional<double> altitude_m;     // above mean sea level (GGA/GNS)
    std::optional<int> quality;           // GGA fix quality / mode
    std::optional<int> satellites;
    std::optional<double> hdop;
    std::optional<double> speed_mps;      // RMC
    std::optional<double> course_deg;     // RMC, true
    bool valid = true;                    // status/mode says the fix is usable
};

struct HeadingRow {
    std::size_t raw_index = 0;
    std::string source;
    std::string sentence;                 // "HDT", "VTG"
    std::optional<double> heading_deg;    // true heading (HDT)
    std::optional<double> course_deg;     // course over ground, true (VTG)
    std::optional<double> speed_mps;      // speed over ground (VTG)
};

struct DepthRow {
    std::size_t raw_index = 0;
    std::string source;
    std::string sentence;                 // "DPT", "DBT"
    double depth_m = 0.0;                 // below the transducer
    std::optional<double> offset_m;       // DPT offset (+ to waterline, - to keel)
};

struct MagRow {
    std::size_t raw_index = 0;
    std::string source;
    std::optional<TimeNs> time_utc_ns;
    std::optional<double> time_of_day_s;
    int sensor = 0;
    std::optional<double> field_nT;
    std::optional<double> signal_quality;
    std::optional<double> depth_m;        // sensor depth below the surface
    std::optional<double> altitude_m;     // sensor height above the seabed
};

struct AuxRow {
    std::size_t raw_index = 0;
    std::string source;
    std::string kind;                     // "altitude_m", "cable_out_m", "depth_m"
    std::optional<TimeNs> time_utc_ns;
    std::optional<double> time_of_day_s;
    double value = 0.0;                   // in the unit the kind names
};

// Events: outages, reconnects, later alarms. The id is chosen by the producer (LogStore /
// LogWriter::nextEventId) so an end or an acknowledgement can follow in a later batch.
struct EventRow {
    std::int64_t id = 0;
    std::string kind;                     // "outage", "clock_disagreement", "alarm.<name>" ...
    std::string source;
    TimeNs start_utc_ns = 0;
    std::optional<TimeNs> end_utc_ns;
    std::optional<double> value;          // peak value, duration... (unit given by kind)
    std::string detail;
    std::optional<TimeNs> ack_utc_ns;
};
struct EventEnd {
    std::int64_t id = 0;
    TimeNs end_utc_ns = 0;
    std::optional<double> value;
};
struct EventAck {
    std::int64_t id = 0;
    TimeNs ack_utc_ns = 0;
};

class LogStore;

// More tables (alarms, line runs, coverage snapshots, infill plans): a module derives from
// TableExtension, gives its CREATE statements once (LogStore::addExtension) and puts its rows in
// Batch::extra as a RowSet that writes itself with the store's cached prepared statements.
class RowSet {
public:
    virtual ~RowSet() = default;
    virtual void write(LogStore& store) = 0;
};

// One transaction's worth of rows. Everything in a batch commits together.
struct Batch {
    std::vector<RawRow> raw;
    std::vector<FixRow> fixes;
    std::vector<HeadingRow> headings;
    std::vector<DepthRow> depths;
    std::vector<MagRow> mags;
    std::vector<AuxRow> aux;
    std::vector<EventRow> events;
    std::vector<EventEnd> event_ends;
    std::vector<EventAck> event_acks;
    std::vector<std::unique_ptr<RowSet>> extra;

    bool empty() const;
    std::size_t rowCount() const;
    void append(Batch&& other);  // keeps raw_index references valid
};

}  // namespace sg::log
