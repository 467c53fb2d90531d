// Input sources: one per [[input]]. The Source base owns framing (LineFramer, 4 KiB limit), stamps
// every line with the source name and its monotonic and UTC receive times, and tracks outages:
// a port that disappears is reopened with exponential backoff, and the outage's start and end are
// reported as events. Subclasses (serial, UDP, TCP, file) only open, read and close.
// All sources of a process share one io_context and run on its thread; no locking inside.
#pragma once

#include <chrono>
#include <cstdint>
#include <functional>
#include <memory>
#include <string>
#include <string_view>

#include <boost/asio/io_context.hpp>
#include <boost/asio/steady_timer.hpp>

#include "common/input_config.hpp"
#include "common/line_framer.hpp"
#include "common/received_line.hpp"
#include "common/source_event.hpp"

namespace sg::io {

namespace asio = boost::asio;

// Current times in the units of ReceivedLine.
TimeNs monoNowNs();
TimeNs utcNowNs();

using SourceEvent = sg::SourceEvent;

struct SourceCallbacks {
    std::function<void(ReceivedLine&&)> line;
    std::function<void(const SourceEvent&)> event;  // may be empty
};

// Exponential backoff between reopen attempts: min, 2*min, 4*min ... up to max (seconds).
class Backoff {
public:
    Backoff(double min_s, double max_s) : m_min_s(min_s), m_max_s(max_s), m_next_s(min_s) {}
    std::chrono::nanoseconds next();  // the delay to wait now; doubles the following one
    void reset() { m_next_s = m_min_s; }

private:
    double m_min_s, m_max_s, m_next_s;
};

class Source {
public:
    static constexpr std::size_t kMaxLineBytes = 4096;

    // Backoff at most 1 s by default: a port that comes back is read again within a second.
    Source(asio::io_context& io, std::string name, SourceCallbacks callbacks,
           double backoff_min_s = 0.25, double backoff_max_s = 1.0);
    virtual ~Source() = default;
    Source(const Source&) = delete;
    Source& operator=(const Source&) = delete;

    virtual void start() = 0;
    virtual void stop() = 0;

    const std::string& name() const { return m_name; }
    bool connected() const { return m_connected; }
    bool inOutage() const { return m_outage; }
    bool finished() const { return m_finished; }
    std::uint64_t bytesReceived() const { return m_bytes; }
    std::uint64_t linesDelivered() const { return m_lines; }
    std::uint64_t outages() const { return m_outage_count; }
    // Datagrams the kernel dropped before this source read them (UDP; 0 for the others).
    std::uint64_t dropped() const { return m_dropped; }

protected:
    // Frames `bytes`; every complete line goes to the line callback, stamped now.
    void onBytes(std::string_view bytes);
    // Delivers a pending partial line (end of file, peer closed, datagram end).
    void flushPartial();
    // The port is open and reading (ends an outage if one is running).
    void markConnected();
    // The port is gone or cannot be opened: starts an outage (once) and schedules reopen() after
    // the next backoff delay. `detail` says what failed.
    void markLost(std::string detail);
    // A finite source (file read once) has delivered everything.
    void markFinished();
    // `count` more datagrams were dropped by the kernel (reported as a Drops event).
    void reportDrops(std::uint64_t count, std::string detail);
    // Called by the retry timer; reopen the port (and call markConnected or markLost).
    virtual void reopen() = 0;
    void cancelRetry();

    asio::io_context& m_io;

private:
    std::string m_name;
    SourceCallbacks m_cb;
    LineFramer m_framer;
    asio::steady_timer m_retry;
    Backoff m_backoff;
    TimeNs m_chunk_mono = 0, m_chunk_utc = 0;
    bool m_connected = false, m_outage = false, m_finished = false;
    std::uint64_t m_bytes = 0, m_lines = 0, m_outage_count = 0, m_dropped = 0;
};

// Builds the source an [[input]] describes.
std::unique_ptr<Source> makeSource(asio::io_context& io, const config::InputConfig& cfg,
                                   SourceCallbacks callbacks);

}  // namespace sg::io
