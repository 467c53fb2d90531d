// The whole core behind one call: a received line goes through the line decoder (raw and decoded
// rows for the log, counters) and, time-aligned, into the survey engine (navigation, detection,
// coverage, checks). `record`, `import`, `replay`, `demo` and the tests all feed lines through a
// Pipeline, so a replay of a log reproduces the live session.
//
// Time alignment per input ([[input]] clock): "instrument" uses the instrument's own UTC time when
// the line has one (and the date is known); a line of such an input without a time of its own
// (HDT, DPT) gets its receive time shifted by the latest instrument-minus-receive offset seen;
// "receive" uses the UTC receive time. Instrument-clock lines that arrive before any dated time
// (RMC/ZDA) are logged but not processed. The input's latency_ms is subtracted from receive times.
#pragma once

#include <cstdint>
#include <functional>
#include <map>
#include <memory>
#include <string>

#include "engine/line_decoder.hpp"
#include "engine/survey_config.hpp"
#include "engine/survey_engine.hpp"

namespace sg::engine {

class Pipeline final : public DecodedSink {
public:
    // The source of the crew's commands (SurveyEngine::onCrewCommand): lines of this source are
    // logged like any other and replayed in their place. No [[input]] may take a name that
    // starts with '@'.
    static constexpr std::string_view kCrewSource = "@crew";

    // `next_event_id` hands out ids for the events table (LogWriter::nextEventId live).
    Pipeline(const SurveyConfig& config, std::function<std::int64_t()> next_event_id);

    // Decodes and processes one line.
    void feed(const ReceivedLine& line);
    // An input's outage began or ended (logged as an event), or it lost datagrams (logged, and
    // fed to the input_drops check).
    void onSourceEvent(const SourceEvent& event);
    // The receive clock reached utc_ns without a line (live: called about once a second).
    void tick(TimeNs utc_ns);

    // Rows for the log since the last call: raw lines, decoded rows, events.
    log::Batch takeBatch();

    LineDecoder& decoder() { return m_decoder; }
    const LineDecoder& decoder() const { return m_decoder; }
    SurveyEngine& engine() { return *m_engine; }
    const SurveyEngine& engine() const { return *m_engine; }
    std::uint64_t linesFed() const { return m_lines; }

    // DecodedSink
    void onNmea(const config::InputConfig& input, const ReceivedLine& line,
                const decode::NmeaSentence& sentence, std::optional<TimeNs> instrument_utc_ns) override;
    void onFields(const config::InputConfig& input, const ReceivedLine& line,
                  const decode::FieldRecord& record, std::optional<TimeNs> instrument_utc_ns) override;

private:
    // Nullopt: an instrument-clock line before the instruments' clock is known (not processed).
    std::optional<TimeNs> align(const config::InputConfig& input, const ReceivedLine& line,
                                std::optional<TimeNs> instrument_utc_ns);

    std::function<std::int64_t()> m_next_event_id;
    LineDecoder m_decoder;
    std::unique_ptr<SurveyEngine> m_engine;
    std::map<std::string, bool, std::less<>> m_has_fix_sentence;  // input sent GGA/GNS
    std::uint64_t m_lines = 0;
    std::optional<TimeNs> m_instrument_offset_ns;  // instrument time - receive time, latest
};

}  // namespace sg::engine
