// The helm's NMEA 0183 output: every [[output]] of kind "steering" gets the active line's XTE /
// APB / RMB sentences at rate_hz on the survey clock, over UDP (one datagram per sentence) or a
// serial port; and, on request, the infill plan as a route (WPL + RTE). Every sentence sent is
// logged (table helm_sent, docs/log-schema.md); a failed send is logged with its error and
// counted, never fatal. An output whose sends fail is in an outage from its first failed send to
// its next good one: logged once (stderr, and an event `output_outage` when event ids are given). Single-threaded: call from the thread that feeds the Pipeline.
// The steering data are advisory: the master decides on navigation.
#pragma once

#include <cstdint>
#include <functional>
#include <memory>
#include <string>
#include <string_view>
#include <vector>

#include "common/received_line.hpp"
#include "helm/helm_config.hpp"
#include "log/log_schema.hpp"

namespace sg::engine {
class SurveyEngine;
}

namespace sg::io {

// One destination for NMEA lines (bytes end with CR LF).
class LineSink {
public:
    virtual ~LineSink() = default;
    // False with `error` set when the bytes could not be handed to the OS in full.
    virtual bool send(std::string_view bytes, std::string& error) = 0;
};

// Opens the transport of `cfg` (UDP: resolves host and port; serial: opens the device at its
// baud). Throws std::runtime_error naming the output and the key at fault.
std::unique_ptr<LineSink> openLineSink(const helm::OutputConfig& cfg);

struct HelmCounts {
    std::uint64_t sent = 0;    // sentences handed to the transport
    std::uint64_t failed = 0;  // sentences the transport refused (logged with the error)
    std::string last_error;
    std::uint64_t outages = 0;  // runs of failed sends (each ended by a good send, or not yet)
    bool in_outage = false;     // the last send failed
};

class HelmOutputs {
public:
    // Opens every output now (a wrong host or a missing device is an error at start).
    explicit HelmOutputs(const std::vector<helm::OutputConfig>& outputs);
    // For tests: outputs with sinks already made.
    HelmOutputs(const std::vector<helm::OutputConfig>& outputs, std::vector<std::unique_ptr<LineSink>> sinks);
    ~HelmOutputs();

    bool empty() const { return m_outputs.empty(); }
    // Ids for the `output_outage` events (LogWriter::nextEventId). Without them an outage is
    // still counted and reported on stderr, but not put in the log's events.
    void setEventIds(std::function<std::int64_t()> next_event_id) { m_next_event_id = std::move(next_event_id); }
    // Sends each output's steering sentences when the survey clock has reached its next due time
    // (whole multiples of 1/rate_hz of survey time), at most once per due time. `recv_utc_ns`
    // is the wall (receive) clock, logged beside the survey time.
    void update(const engine::SurveyEngine& engine, TimeNs recv_utc_ns);
    // Sends `sentences` (e.g. helm::buildRoute) to every output now; returns how many failed.
    std::uint64_t sendNow(const std::vector<std::string>& sentences, TimeNs survey_ns, TimeNs recv_utc_ns);
    // The helm_sent rows since the last call (a RowSet in batch.extra; nothing when none), and the
    // output_outage events started or ended since (batch.events, batch.event_ends).
    void takeRows(log::Batch& batch);

    const std::vector<helm::OutputConfig>& outputs() const { return m_outputs; }
    const std::vector<HelmCounts>& counts() const { return m_counts; }
    // One line per output: "<cmd>: output 'bridge' (udp 127.0.0.1:10110): 360 sentences sent,
    // 0 failed" (+ the last error); empty without outputs.
    std::string summaryText(std::string_view cmd) const;

private:
    struct Rows;
    void send(std::size_t k, const std::string& sentence, TimeNs survey_ns, TimeNs recv_utc_ns);

    std::vector<helm::OutputConfig> m_outputs;
    std::vector<std::unique_ptr<LineSink>> m_sinks;
    std::vector<HelmCounts> m_counts;
    std::vector<TimeNs> m_next_due_ns;  // per output, survey time of the next send (0: first)
    std::unique_ptr<Rows> m_rows;
    std::function<std::int64_t()> m_next_event_id;
    std::vector<std::int64_t> m_outage_event;  // per output: the open outage's event id (0: none)
    std::vector<TimeNs> m_outage_start_ns;     // per output: the open outage's start (wall clock)
    std::vector<log::EventRow> m_events;
    std::vector<log::EventEnd> m_event_ends;
};

}  // namespace sg::io
