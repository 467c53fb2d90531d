// Input kind -> decoder -> decode status and reason, decoded rows and per-source counters; the
// decoded values also go to an optional DecodedSink (the Pipeline, which feeds the engine).
// Builds the log batch that the writer thread commits. Used by `record` (lines from the Asio sources) and `import` (lines synthesised from capture files), so
// both give the same statuses and rows. Single-threaded (the io_context thread).
#pragma once

#include <cstdint>
#include <functional>
#include <map>
#include <optional>
#include <string>
#include <vector>

#include "common/input_config.hpp"
#include "common/received_line.hpp"
#include "decode/field_map.hpp"
#include "decode/instrument_clock.hpp"
#include "decode/nmea.hpp"
#include "common/source_event.hpp"
#include "log/log_schema.hpp"

namespace sg::engine {

struct SourceCounters {
    std::uint64_t lines = 0;        // all raw lines
    std::uint64_t ok = 0;           // decoded (status ok)
    std::uint64_t rejected = 0;     // malformed (status rejected)
    std::uint64_t unsupported = 0;  // well formed, not used (status unsupported)
    std::uint64_t not_decoded = 0;  // continuation pieces of over-long lines
    std::map<std::string, std::uint64_t, std::less<>> by_reason;  // reason name -> count (all statuses)
    bool in_outage = false;
    std::uint64_t outages = 0;
    TimeNs last_utc_ns = 0;         // receive time of the latest line (0 = none yet)
    std::uint64_t dropped = 0;      // datagrams the kernel dropped before the reader (UDP)
    // Latest values, for the status line.
    std::optional<double> last_lat_deg, last_lon_deg;
    std::optional<double> last_field_nT;
    std::optional<std::pair<std::string, double>> last_value;  // e.g. {"altitude_m", 4.2}
};

// Receives every usable decoded line, in order, with the instrument's own UTC time when the line
// carries a time of day and the date is known (RMC/ZDA seen), or a full time from the field map.
class DecodedSink {
public:
    virtual ~DecodedSink() = default;
    virtual void onNmea(const config::InputConfig& input, const ReceivedLine& line,
                        const decode::NmeaSentence& sentence,
                        std::optional<TimeNs> instrument_utc_ns) = 0;
    virtual void onFields(const config::InputConfig& input, const ReceivedLine& line,
                          const decode::FieldRecord& record,
                          std::optional<TimeNs> instrument_utc_ns) = 0;
};

class LineDecoder {
public:
    // `maps` are the config's field maps ([fieldmap.NAME]); each fieldmap input names one.
    // `next_event_id` hands out event ids (LogWriter::nextEventId, or a counter for import).
    LineDecoder(std::vector<config::InputConfig> inputs, std::vector<decode::FieldMap> maps,
               std::function<std::int64_t()> next_event_id);

    // Decoded values also go to `sink` (may be null; must outlive the decoder).
    void setSink(DecodedSink* sink) { m_sink = sink; }
    // false: no rows are gathered for the log (a replay, which writes none: without this its
    // batch would grow by every line of the log, gigabytes for a long day). Statuses, counters
    // and the sink are the same either way. Default true.
    void setLogRows(bool keep) { m_log_rows = keep; }
    bool logRows() const { return m_log_rows; }
    // Decodes one line and adds its raw row (always) and decoded row (if any) to the batch.
    void onLine(const ReceivedLine& line);
    // A line that is no instrument's (the crew's commands, Pipeline::kCrewSource): its raw row
    // only, with the given status and reason; no decoder, no input counters.
    void logOnly(const ReceivedLine& line, log::DecodeStatus status, std::string reason);
    // Outage start/end become events (start row, later an end with the duration in s).
    void onEvent(const SourceEvent& e);
    // Adds an event that is not an outage (e.g. "clock_disagreement" from import).
    void addEvent(log::EventRow row);

    // The rows gathered since the last call.
    log::Batch takeBatch();
    std::size_t pendingRaw() const { return m_batch.raw.size(); }

    const std::map<std::string, SourceCounters>& counters() const { return m_counters; }
    const std::vector<config::InputConfig>& inputs() const { return m_inputs; }

private:
    struct Input {
        const config::InputConfig* cfg = nullptr;
        const decode::FieldMap* map = nullptr;
        SourceCounters* counters = nullptr;  // this input's entry in m_counters (map: stable)
        decode::NmeaStreamDecoder nmea;       // per-source checksum rule (decode/nmea.hpp),
                                              // with the input's checksum_optional_talkers
    };
    void decodeNmea(const ReceivedLine& line, Input& in, log::RawRow& raw, SourceCounters& c);
    void decodeFields(const ReceivedLine& line, const Input& in, log::RawRow& raw, SourceCounters& c);

    std::vector<config::InputConfig> m_inputs;
    std::vector<decode::FieldMap> m_maps;
    std::map<std::string, Input, std::less<>> m_by_name;
    std::function<std::int64_t()> m_next_event_id;
    std::map<std::string, std::pair<std::int64_t, TimeNs>> m_open_outages;  // source -> id, start
    std::map<std::string, SourceCounters> m_counters;
    decode::InstrumentClock m_clock;  // dates from any RMC/ZDA; times of day from every input
    log::Batch m_batch;
    DecodedSink* m_sink = nullptr;
    bool m_log_rows = true;
};

// Map a decoder reason to the stored status.
log::DecodeStatus statusOf(decode::Reason r);

}  // namespace sg::engine
