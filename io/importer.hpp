// `import`: builds a survey log from one capture file per instrument, as if it had been recorded
// live. Lines are merged in order of INSTRUMENT time (NMEA time of day + date from RMC/ZDA via
// decode::InstrumentClock; the field map's time field), each file keeping its own line order;
// receive times are synthesised from instrument time (+ the input's latency_ms); every line then
// goes through the same engine::LineDecoder as live lines, so decode statuses and rows are identical.
// A capture whose clock is shifted against the reference capture by more than
// [import] max_clock_disagreement_s is reported and not merged unless the caller accepts it.
// A capture with no instrument time at all (HDT, DPT, a field map without `time`) is placed in
// receive order: its lines are spread evenly over the time span of a timed capture of the same
// session (the [[input]] import_align, else the reference capture); see docs/config.md, [import].
#pragma once

#include <string>
#include <vector>

#include "common/input_config.hpp"
#include "common/received_line.hpp"
#include "decode/field_map.hpp"

namespace sg::io {

struct CaptureFile {
    std::string input;  // [[input]] name
    std::string path;
    std::string origin = "--input";  // where the path came from, for messages
};

struct CaptureSummary {
    std::string input;
    std::string path;
    std::size_t lines = 0;
    std::size_t timed_lines = 0;  // lines that carried an instrument time
    TimeNs first_ns = 0, last_ns = 0;  // instrument time span (UTC ns)
    double shift_s = 0.0;          // clock shift against the reference capture (0 for it); for
                                   // a placed capture with import_rate_hz: its span at that rate
                                   // minus the span it was placed over
    bool disagrees = false;        // |shift_s| > max_clock_disagreement_s
    // Placement of a capture without any instrument time (placed == true): its lines were spread
    // evenly, in file order, over [first_ns, last_ns], the span of `aligned_to`.
    bool placed = false;
    std::string aligned_to;        // [[input]] name of the timed capture it was aligned to
    double implied_rate_hz = 0.0;  // (lines - 1) / span
    std::string assumption;        // the rule and assumption in words (output, log event, meta)
};

struct MergedCaptures {
    std::vector<ReceivedLine> lines;  // in merged order, receive times synthesised
    std::vector<CaptureSummary> captures;
    std::vector<std::string> problems;  // one message per disagreeing capture
};

// Reads and merges the captures. Throws std::runtime_error for an unreadable file, an unknown
// input name, a capture none of whose lines decodes, a capture without time when no capture has
// time (or its import_align names no timed capture), or times of day with no date anywhere.
MergedCaptures mergeCaptures(const std::vector<config::InputConfig>& inputs,
                             const std::vector<decode::FieldMap>& maps,
                             const std::vector<CaptureFile>& files,
                             const config::ImportConfig& options);

struct ImportResult {
    MergedCaptures merged;
    std::uint64_t raw_lines = 0;
    bool written = false;  // false when a disagreement stopped the import
};

// mergeCaptures, then (if no capture disagrees, or `accept_disagreement`) writes `log_path`
// (a new file) through the engine::LineDecoder; accepted disagreements are logged as events of kind
// "clock_disagreement" (value = shift in s). `config_text` is stored in meta like `record` does.
// Each placed capture is logged as an event of kind "untimed_placement" (start/end = the span,
// value = implied rate in Hz, detail = the assumption) and in meta key "import_placement".
ImportResult importCaptures(const std::vector<config::InputConfig>& inputs,
                            const std::vector<decode::FieldMap>& maps,
                            const std::vector<CaptureFile>& files,
                            const config::ImportConfig& options, const std::string& log_path,
                            const std::string& config_text, const std::string& config_file,
                            bool accept_disagreement);

// The writing half of importCaptures, for merged captures the caller has checked first.
ImportResult importMerged(MergedCaptures merged, const std::vector<config::InputConfig>& inputs,
                          const std::vector<decode::FieldMap>& maps, const std::string& log_path,
                          const std::string& config_text, const std::string& config_file,
                          bool accept_disagreement);

}  // namespace sg::io
