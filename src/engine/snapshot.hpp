// The plain-data contract between the processing core and the screen: an immutable picture of the
// survey state (Snapshot) that the engine side fills and publishes, and the small commands
// (UiCommand) the screen sends back. Only the standard library and checks/check.hpp are used, so
// the core can build it without knowing anything about ImGui or OpenGL.
//
// Conventions:
// - Positions are (easting, northing) in metres in the survey's projected CRS.
// - Times (t_s) are seconds since the Unix epoch, UTC, as a double (sub-microsecond resolution
//   for the coming centuries); alarm episodes keep their TimeNs fields from checks::Episode, which
//   count the same epoch in nanoseconds (t_s = toSeconds(t_ns)).
// - One clock for what the survey did: every time here is on the SURVEY clock (the instruments'
//   time, SurveyEngine::surveyClock_ns) - plot samples, now_s, alarm start/end/acknowledgement,
//   runs, the replay position. Only fields named receive_* are on the receive clock (when lines
//   reached the computer): they answer latency and log-health questions only. A log recorded
//   at 20x has 20 survey seconds per receive second; the screen never mixes the two.
// - Angles are radians, clockwise from grid north (the screen converts to degrees at its edge).
// - Long, growing data (12-hour tracks and time series) is held in immutable shared chunks
//   (Chunked<T>): a new snapshot reuses every full chunk of the previous one and only copies or
//   appends the last, so publishing stays cheap however long the survey runs. Snapshots are never
//   modified after publication; the screen keeps a shared_ptr while it draws.
#pragma once

#include <algorithm>
#include <atomic>
#include <cstddef>
#include <cstdint>
#include <functional>
#include <memory>
#include <optional>
#include <string>
#include <utility>
#include <vector>

#include "checks/check.hpp"

namespace sg::engine {

struct PointEN {
    double e_m = 0.0;  // easting, metres
    double n_m = 0.0;  // northing, metres
};

// An append-only sequence stored as immutable chunks. Chunks are shared between successive
// snapshots; the producer starts a new chunk when the last one reaches its chosen size
// (a few thousand elements is a good size).
template <class T>
struct Chunked {
    std::vector<std::shared_ptr<const std::vector<T>>> chunks;

    std::size_t size() const {
        std::size_t n = 0;
        for (const auto& c : chunks) n += c ? c->size() : 0;
        return n;
    }
    bool empty() const { return size() == 0; }
    template <class F>
    void forEach(F&& f) const {
        for (const auto& c : chunks)
            if (c)
                for (const T& v : *c) f(v);
    }
    // Appends one element (producer helper; chunk_size >= 1): in place while no snapshot shares the
    // last chunk, else into a copy of it, so a snapshot never sees a chunk change.
    void append(const T& value, std::size_t chunk_size = 4096) {
        if (chunks.empty() || !chunks.back() || chunks.back()->size() >= chunk_size) {
            auto fresh = std::make_shared<std::vector<T>>();
            fresh->reserve(chunk_size);
            fresh->push_back(value);
            chunks.push_back(std::move(fresh));
        } else if (chunks.back().use_count() == 1) {
            // No published snapshot shares the last chunk: append in place. The chunk was made
            // non-const by this producer, so the const_cast is sound; the fence orders our write
            // after the release of any reader's last reference.
            std::atomic_thread_fence(std::memory_order_acquire);
            const_cast<std::vector<T>&>(*chunks.back()).push_back(value);
        } else {
            auto copy = std::make_shared<std::vector<T>>();
            copy->reserve(chunk_size);
            copy->assign(chunks.back()->begin(), chunks.back()->end());
            copy->push_back(value);
            chunks.back() = std::move(copy);
        }
    }
};

// ---- plan view ------------------------------------------------------------------------------

// One square tile of the coverage raster. Cells are row-major from the south-west corner:
// cell (col, row) covers e in [origin_e + col*cell_m, +cell_m), n in [origin_n + row*cell_m, +cell_m).
struct CoverageTileView {
    int tx = 0, ty = 0;          // tile index in the raster's tile grid
    int layer = 0;               // 0 = the whole site (or session), 1 = this session's own painting
    int size_cells = 0;          // cells per side (the tile is size_cells x size_cells)
    double cell_m = 1.0;         // cell side, metres, > 0
    double origin_e = 0.0;       // south-west corner of the tile, metres
    double origin_n = 0.0;
    std::uint64_t generation = 0;  // changes whenever any cell of this tile changes
    // Quantised detection margin per cell (size_cells^2 values): 0 = not covered, 1..255 = covered,
    // mapped to a margin with MarginScale.
    std::shared_ptr<const std::vector<std::uint8_t>> margin_q;
    // Optional: which run covered the cell best (0 = none, k = runs[k-1]); empty when unknown.
    std::shared_ptr<const std::vector<std::uint16_t>> run_of_cell;
};

// Maps a quantised margin q in 1..255 to the margin value: lo + (q - 1) * (hi - lo) / 254.
struct MarginScale {
    double lo = 0.0;
    double hi = 20.0;
    std::string unit = "dB";  // e.g. dB of peak anomaly over the detection threshold
    double value(std::uint8_t q) const { return lo + (static_cast<double>(q) - 1.0) * (hi - lo) / 254.0; }
};

struct PlannedLineView {
    std::string name;
    std::vector<PointEN> points;  // the planned polyline, in survey direction
};

struct SensorView {
    std::string name;        // "mag1", "port", ...
    PointEN position;        // sensor (fish) position now
    std::optional<double> altitude_m;  // above the seabed now; empty when unknown
    // The live detectable swath: its left and right edge points now (perpendicular to the track;
    // equal to position when the swath is empty).
    PointEN swath_left;
    PointEN swath_right;
    Chunked<PointEN> track;  // the sensor's track, already thinned by the core (e.g. 0.5 m)
};

struct GapView {
    std::uint64_t id = 0;         // stable number for the life of the site
    std::string name;             // "G7" (docs/coverage.md, "Gap names")
    std::vector<std::vector<PointEN>> rings;  // outline rings (first = outer), closed implicitly
    double area_m2 = 0.0;
    PointEN centroid;
};

// A forming gap located (docs/checks.md, forming_gap): drawn as a marker on the plan while its
// check is above ok.
struct FormingGapView {
    bool active = false;          // the forming_gap check is above ok and the gap is located
    std::string line;             // planned line name, e.g. "L07"
    bool starboard = false;       // side of the direction of travel
    double width_m = 0.0;
    double along_m = 0.0;         // along the line from its start (m)
    PointEN at;                   // middle of the gap, survey CRS
    double lon_deg = 0.0, lat_deg = 0.0;
    // Its words are the alarm's (AlarmView::text, engine::alarmStatement), not kept here.
};

struct InfillView {
    std::uint64_t id = 0;
    std::string name;             // e.g. "IF-03"
    std::vector<PointEN> points;  // including run-in and run-out
    double length_m = 0.0;
    std::vector<std::uint64_t> gap_ids;  // gaps it closes
};

// ---- anomaly picks and the verification strip (docs/picks.md) -------------------------------

// One pick as the screen shows it (from detect::AnomalyPick; the core's types stay out of here).
struct PickView {
    int id = 0;                   // shown as "P<id>"
    double first_s = 0.0;         // survey clock: first detection
    PointEN at;                   // survey CRS
    double peak_nT = 0.0;         // signed
    double width_m = 0.0;
    double altitude_m = 0.0;      // sensor altitude at the peak
    std::optional<double> burial_m;              // below the seabed
    std::optional<double> depth_below_sensor_m;  // altitude + burial
    std::optional<double> moment_Am2;
    std::optional<double> mass_rule_kg;          // equivalent mass by the mass rule
    std::string moment_model;     // "dipole, induced", "dipole, free direction" or "" (no fit)
    double fit_r2 = 0.0;
    double snr = 0.0;             // |peak| / threshold
    std::string quality;          // "strong", "fair", "weak"
    std::vector<std::string> runs;  // names of the line runs that saw it ("L03 run 1")
};

// One pass of one sensor near a known item.
struct VerificationPassView {
    std::string item;
    std::string target_class;
    std::string run;              // line run name
    int sensor_slot = 0;
    double t_s = 0.0;             // survey clock: closest approach
    double offset_m = 0.0;        // cross-track, starboard positive
    double altitude_m = 0.0;
    double threshold_nT = 0.0;
    double predicted_nT = 0.0;
    double measured_nT = 0.0;
    double ratio = 0.0;           // measured / predicted
    bool predicted_detected = false;
    bool detected = false;
};

struct VerificationVerdictView {
    std::string target_class;
    std::string verdict;          // "confirmed", "too_optimistic", "conservative", "not_enough_passes"
    std::string text;             // the sentence the report prints
    int passes_used = 0;
    int passes_detected = 0;
    double median_ratio = 0.0;
};

struct PicksView {
    bool enabled = false;         // [picks] enabled
    std::string caution;          // engine::kPicksCaution
    std::vector<PickView> picks;  // by id
    std::vector<VerificationPassView> passes;
    std::vector<VerificationVerdictView> verdicts;
    std::vector<std::string> unplaced;
};

// ---- time plots and profiles ----------------------------------------------------------------

struct SeriesPoint {
    double t_s = 0.0;  // UTC seconds since the epoch, non-decreasing along a series
    float value = 0.0f;
};

struct Series {
    std::string name;  // "mag1", "mag1-mag2", ...
    Chunked<SeriesPoint> points;
    double break_after_s = 5.0;  // the line is broken where samples are further apart than this
};

struct PlotLimit {
    double value = 0.0;               // in the group's unit
    checks::Level level = checks::Level::kWarn;
    std::string label;                // "limit", "tolerance", "min speed"
};

// One time plot: several series sharing a unit and limits. The engine sends, in this order:
// "Altitude" (m, per sensor, max altitude limit), "Deviation" (m, cross-track, +/- tolerance),
// "Total field" (nT, per sensor), "Gradient" (nT/m, per transverse pair), "Noise" (nT, per sensor,
// limit), "Speed" (m/s, band). The screen draws whatever groups it gets.
struct PlotGroup {
    std::string title;
    std::string unit;
    std::vector<std::shared_ptr<const Series>> series;
    std::vector<PlotLimit> limits;
};

struct ProfileTrace {
    std::string sensor;
    std::vector<float> along_m;     // along-track distance from the start of the run, increasing
    std::vector<float> residual_nT; // total field with the ambient trend removed, same length
};

struct ProfileSet {
    int run_index = -1;  // index into Snapshot::runs, -1 when no run
    std::string run_name;
    std::vector<ProfileTrace> traces;  // one per sensor, in array order (port to starboard)
};

// ---- alarms, runs, replay -------------------------------------------------------------------

struct AlarmView {
    checks::Episode episode;   // start/end/peak/ack/id as the check set keeps them
    std::string unit;          // of peak_value
    std::string words;         // the check in a surveyor's words (checks::checkWords)
    std::string value_text;    // the peak in words and rounded, e.g. "7.0 m", "GPS fix"
    std::string text;          // the one sentence for the operator (engine::alarmStatement): the
                               // banner shows it, the headless status line prints the same
    // Where the vessel's sensors were (their mean position) when the episode started, when known
    // (the forming-gap key of the screen jumps there).
    std::optional<PointEN> where;
};

struct RunView {
    std::string name;           // "L012 run 2"
    int line_index = -1;        // into Snapshot::lines
    double start_s = 0.0, end_s = 0.0;  // UTC seconds; end_s == start_s while running
    double percent_covered = 0.0;       // 0..100 of the line's corridor
    double mean_altitude_m = 0.0;
    double worst_altitude_m = 0.0;
    double worst_deviation_m = 0.0;
    int alarm_count = 0;
    bool active = false;        // being recorded now
    int session = 0;            // site session (log) the run came from (docs/site.md)
    std::string log;            // that log's file name ("this session" for the current one)
    bool earlier_session = false;  // from an earlier log of the site
};

struct ReplayView {
    bool is_replay = false;
    // Survey clock: the replay position and the log's span (seconds since the epoch, UTC).
    double t_s = 0.0, t_start_s = 0.0, t_end_s = 0.0;
    double speed = 1.0;  // survey seconds per wall second; 0 = as fast as possible
    bool paused = false;
    // Episodes the log recorded (alarms and warnings), their survey start times in order, and the
    // index of the one "next alarm" visited last (-1 = none yet).
    std::vector<double> episode_starts_s;
    int episode_visited = -1;
    // Receive clock of the replayed line (log health only).
    double receive_t_s = 0.0;
};

// Health of one input (the receive clock: this is log health, not survey time).
struct InputHealthView {
    std::string name;             // [[input]] name
    double rate_hz = -1.0;        // lines per receive second over the last few seconds; < 0 = not
                                  // measured yet
    double age_s = -1.0;          // receive seconds since its last line; < 0 = none yet
    std::uint64_t lines = 0;
    std::uint64_t errors = 0;     // rejected lines (bad checksum, malformed field, ...)
    bool in_outage = false;       // the link is down now
};

// The numbers the helm and the surveyor watch, large (the helm panel).
struct HelmView {
    std::string line;                     // active line name, empty = no active line
    bool infill = false;                  // `line` is an infill line the crew steers to
    std::optional<double> off_line_m;     // cross-track distance, starboard of the line positive
    std::optional<double> to_end_m;       // distance to the end of the line, along it
    std::optional<double> to_end_s;       // time to the end at the present speed
    std::optional<double> speed_mps;      // over ground
    std::optional<double> layback_m;      // tow point -> sensor, along the path (first sensor)
    std::optional<double> cable_out_m;
    std::optional<int> fix_quality;       // GGA quality indicator (NMEA 0183)
    std::string fix_name;                 // its name (checks::fixQualityName)
    std::optional<int> satellites;
    std::optional<double> hdop;
    std::optional<double> coverage_pct;   // of the area of interest, at the last gap update
};

struct Snapshot {
    std::uint64_t seq = 0;  // increases with every published snapshot
    double now_s = 0.0;     // survey clock (UTC seconds) the state refers to
    double receive_s = 0.0; // receive clock of the latest line (latency / log health only)

    // Vessel and tow.
    PointEN vessel;
    double heading_rad = 0.0;  // clockwise from grid north
    double speed_mps = 0.0;
    PointEN tow_point;
    Chunked<PointEN> tow_track;
    std::vector<SensorView> sensors;

    // Plan.
    std::vector<std::vector<PointEN>> area;  // area of interest polygon(s), outer rings
    std::vector<PlannedLineView> lines;
    int active_line = -1;                    // index into lines, -1 = none
    std::vector<CoverageTileView> tiles;
    // A site with earlier sessions: this session's own coverage (layer 1), so that the plan can
    // hide what earlier sessions covered. Empty without earlier sessions.
    std::vector<CoverageTileView> session_tiles;
    int earlier_sessions = 0;  // a site: logs joined before this session (0 = a single log)
    MarginScale margin;
    std::vector<GapView> gaps;          // missed ground only
    std::vector<InfillView> infill;
    // Ground of planned lines not run yet (drawn quietly; not a gap): quadrilaterals, survey CRS.
    std::vector<std::vector<PointEN>> not_run_yet;
    std::string not_run_message;        // "3 of 12 planned lines not run yet: ..."; empty when none
    FormingGapView forming_gap;
    // Anomaly picks and the verification strip; null before the first computation. Shared from
    // snapshot to snapshot until the builder recomputes it.
    std::shared_ptr<const PicksView> picks;

    // Time plots and profiles.
    std::vector<PlotGroup> plots;
    ProfileSet profiles;

    // Alarms: active ones first, then past ones newest first.
    std::vector<AlarmView> alarms;

    std::vector<RunView> runs;
    ReplayView replay;

    // CRS for the cursor read-out. to_lonlat returns (longitude, latitude) in degrees; it is called
    // on the screen thread, so it must not share a non-thread-safe PROJ context with the core.
    std::string crs_name;  // "EPSG:32631"
    std::function<std::pair<double, double>(double e_m, double n_m)> to_lonlat;

    std::string cautions;             // safety text shown in the status bar
    std::vector<std::string> status;  // short health items ("gnss ok", "mag 10 Hz")
    HelmView helm;
    std::vector<InputHealthView> inputs;

    // True while an alarm-level episode that is still active waits for acknowledgement (the
    // banner shows only these; ended ones are in the list).
    bool hasUnacknowledgedActiveAlarm() const {
        return std::any_of(alarms.begin(), alarms.end(), [](const AlarmView& a) {
            return !a.episode.ack_ns && !a.episode.end_ns && a.episode.peak_level == checks::Level::kAlarm;
        });
    }

    // True while an alarm-level episode (active or already ended) waits for acknowledgement.
    bool hasUnacknowledgedAlarm() const {
        return std::any_of(alarms.begin(), alarms.end(), [](const AlarmView& a) {
            return !a.episode.ack_ns && a.episode.peak_level == checks::Level::kAlarm;
        });
    }
};

// ---- commands from the screen ---------------------------------------------------------------

struct UiCommand {
    enum class Kind : std::uint8_t {
        kAcknowledgeAlarm,   // id = episode id
        kAcknowledgeAll,
        kSetActiveLine,      // id = index into Snapshot::lines
        kChooseProfileRun,   // value = run index, -1 = the current run
        kReplayPlay,
        kReplayPause,
        kReplaySpeed,        // value = speed factor, 0 = as fast as possible
        kReplaySeek,         // value = UTC seconds
        kReplayNextAlarm,
        kExportInfill,       // text = "geojson" | "gpx" | "csv"; all current proposals
        kAcknowledgeAlarms,  // every unacknowledged alarm-level episode (warnings untouched)
        kAcknowledgeWarnings,  // every unacknowledged warning-level episode
        kSteerInfill,        // text = infill line name (I7): the helm steers to it (logged)
        kSteerPlanned,       // back to the planned lines (logged)
    };
    Kind kind = Kind::kAcknowledgeAll;
    std::uint64_t id = 0;
    double value = 0.0;
    std::string text;
};

inline const char* toString(UiCommand::Kind kind) {
    switch (kind) {
        case UiCommand::Kind::kAcknowledgeAlarm: return "acknowledge-alarm";
        case UiCommand::Kind::kAcknowledgeAll: return "acknowledge-all";
        case UiCommand::Kind::kSetActiveLine: return "set-active-line";
        case UiCommand::Kind::kChooseProfileRun: return "choose-profile-run";
        case UiCommand::Kind::kReplayPlay: return "replay-play";
        case UiCommand::Kind::kReplayPause: return "replay-pause";
        case UiCommand::Kind::kReplaySpeed: return "replay-speed";
        case UiCommand::Kind::kReplaySeek: return "replay-seek";
        case UiCommand::Kind::kReplayNextAlarm: return "replay-next-alarm";
        case UiCommand::Kind::kExportInfill: return "export-infill";
        case UiCommand::Kind::kAcknowledgeAlarms: return "acknowledge-alarms";
        case UiCommand::Kind::kAcknowledgeWarnings: return "acknowledge-warnings";
        case UiCommand::Kind::kSteerInfill: return "steer-infill";
        case UiCommand::Kind::kSteerPlanned: return "steer-planned";
    }
    return "unknown";
}

}  // namespace sg::engine
