// Source base: framing, receive stamps, outage tracking with backoff; see source.hpp.
#include "io/source.hpp"

#include <algorithm>

#include <spdlog/spdlog.h>

namespace sg::io {

TimeNs monoNowNs() {
    return std::chrono::duration_cast<std::chrono::nanoseconds>(
               std::chrono::steady_clock::now().time_since_epoch())
        .count();
}

TimeNs utcNowNs() {
    return std::chrono::duration_cast<std::chrono::nanoseconds>(
               std::chrono::system_clock::now().time_since_epoch())
        .count();
}

std::chrono::nanoseconds Backoff::next() {
    const double d = m_next_s;
    m_next_s = std::min(m_max_s, m_next_s * 2.0);
    return std::chrono::nanoseconds(static_cast<std::int64_t>(d * 1e9));
}

Source::Source(asio::io_context& io, std::string name, SourceCallbacks callbacks,
               double backoff_min_s, double backoff_max_s)
    : m_io(io),
      m_name(std::move(name)),
      m_cb(std::move(callbacks)),
      m_framer(
          [this](std::string_view bytes, std::uint8_t flags) {
              ReceivedLine l;
              l.source = m_name;
              l.mono_ns = m_chunk_mono;
              l.utc_ns = m_chunk_utc;
              l.bytes.assign(bytes);
              l.flags = flags;
              ++m_lines;
              m_cb.line(std::move(l));
          },
          kMaxLineBytes),
      m_retry(io),
      m_backoff(backoff_min_s, backoff_max_s) {}

void Source::onBytes(std::string_view bytes) {
    // Every line completed by this chunk gets the time the chunk arrived: the best this reader
    // knows. (A line split over two chunks takes the time of the chunk that ends it.)
    m_chunk_mono = monoNowNs();
    m_chunk_utc = utcNowNs();
    m_bytes += bytes.size();
    m_framer.feed(bytes);
}

void Source::flushPartial() {
    if (m_framer.pendingBytes() == 0) return;
    m_chunk_mono = monoNowNs();
    m_chunk_utc = utcNowNs();
    m_framer.flush();
}

void Source::markConnected() {
    m_connected = true;
    m_backoff.reset();
    if (m_outage) {
        m_outage = false;
        spdlog::info("{}: input restored", m_name);
        if (m_cb.event)
            m_cb.event({SourceEvent::Kind::OutageEnd, m_name, utcNowNs(), monoNowNs(), "restored"});
    }
}

void Source::markLost(std::string detail) {
    m_connected = false;
    flushPartial();
    if (!m_outage) {
        m_outage = true;
        ++m_outage_count;
        spdlog::warn("{}: input lost: {}", m_name, detail);
        if (m_cb.event)
            m_cb.event({SourceEvent::Kind::OutageStart, m_name, utcNowNs(), monoNowNs(), detail});
    } else {
        spdlog::debug("{}: reopen failed: {}", m_name, detail);
    }
    m_retry.expires_after(m_backoff.next());
    m_retry.async_wait([this](const boost::system::error_code& ec) {
        if (!ec) reopen();
    });
}

void Source::markFinished() {
    flushPartial();
    m_connected = false;
    if (m_finished) return;
    m_finished = true;
    if (m_cb.event)
        m_cb.event({SourceEvent::Kind::Finished, m_name, utcNowNs(), monoNowNs(), "end of input"});
}

void Source::reportDrops(std::uint64_t count, std::string detail) {
    if (count == 0) return;
    m_dropped += count;
    spdlog::warn("{}: {}", m_name, detail);
    if (m_cb.event) {
        SourceEvent e{SourceEvent::Kind::Drops, m_name, utcNowNs(), monoNowNs(), std::move(detail)};
        e.count = count;
        m_cb.event(e);
    }
}

void Source::cancelRetry() { m_retry.cancel(); }

}  // namespace sg::io
