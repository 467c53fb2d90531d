// The SQLite writer thread; see log_writer.hpp for the commit rhythm and the disk-fault policy.
#include "io/log_writer.hpp"

#include <algorithm>
#include <chrono>
#include <iterator>
#include <type_traits>

#include <fmt/format.h>
#include <spdlog/spdlog.h>

namespace sg::io {

namespace {

using Clock = std::chrono::steady_clock;

// Decoded rows (derived data: replay recomputes them from the raw lines) held by a batch.
std::size_t decodedRows(const log::Batch& b) {
    return b.fixes.size() + b.headings.size() + b.depths.size() + b.mags.size() + b.aux.size();
}

void dropDecoded(log::Batch& b) {
    b.fixes.clear();
    b.headings.clear();
    b.depths.clear();
    b.mags.clear();
    b.aux.clear();
}

// The event of a loss episode: raw lines not logged while the backlog was at its limit.
// (A template: the writer's shared state is a private type of LogWriter.)
template <class Shared>
log::EventRow lossEvent(Shared& s) {
    log::EventRow e;
    e.id = s.next_event_id.fetch_add(1);
    e.kind = "log_loss";
    e.source = "log";
    e.start_utc_ns = s.loss_first_utc;
    e.end_utc_ns = s.loss_last_utc;
    e.value = static_cast<double>(s.loss_count);
    e.detail = fmt::format("{} raw lines not logged: the disk did not take rows and the backlog reached "
                           "its limit of {} bytes",
                           s.loss_count, s.options.queue_limit_bytes);
    return e;
}

// Cuts the first `n_raw` raw lines off `b` with the decoded rows that refer to them, and returns
// them as a batch of their own; events, event ends, acks and extension rows go with this first
// piece. `b` keeps the rest, its raw_index references rebased. The pieces, written in order,
// give the same rows as the whole batch.
log::Batch takeFront(log::Batch& b, std::size_t n_raw) {
    log::Batch head;
    n_raw = std::min(n_raw, b.raw.size());
    head.raw.assign(std::make_move_iterator(b.raw.begin()),
                    std::make_move_iterator(b.raw.begin() + static_cast<std::ptrdiff_t>(n_raw)));
    b.raw.erase(b.raw.begin(), b.raw.begin() + static_cast<std::ptrdiff_t>(n_raw));
    auto split = [n_raw](auto& src, auto& dst) {
        std::remove_reference_t<decltype(src)> rest;
        for (auto& r : src) {
            if (r.raw_index < n_raw) {
                dst.push_back(std::move(r));
            } else {
                r.raw_index -= n_raw;
                rest.push_back(std::move(r));
            }
        }
        src = std::move(rest);
    };
    split(b.fixes, head.fixes);
    split(b.headings, head.headings);
    split(b.depths, head.depths);
    split(b.mags, head.mags);
    split(b.aux, head.aux);
    head.events = std::move(b.events);
    head.event_ends = std::move(b.event_ends);
    head.event_acks = std::move(b.event_acks);
    head.extra = std::move(b.extra);
    b.events.clear();
    b.event_ends.clear();
    b.event_acks.clear();
    b.extra.clear();
    return head;
}

}  // namespace

std::size_t LogWriter::approxBytes(const log::Batch& b) {
    // Row structs plus the heap text of the rows that carry variable-length data.
    std::size_t n = b.raw.size() * sizeof(log::RawRow) + b.fixes.size() * sizeof(log::FixRow) +
                    b.headings.size() * sizeof(log::HeadingRow) +
                    b.depths.size() * sizeof(log::DepthRow) + b.mags.size() * sizeof(log::MagRow) +
                    b.aux.size() * sizeof(log::AuxRow) + b.events.size() * sizeof(log::EventRow) +
                    (b.event_ends.size() + b.event_acks.size()) * 32 + b.extra.size() * 256;
    for (const auto& r : b.raw) n += r.bytes.capacity() > 15 ? r.bytes.capacity() : 0;
    for (const auto& e : b.events) n += e.detail.size();
    return n;
}

LogWriter::Shared::Shared(const std::string& path, const LogWriterOptions& o)
    : store(path, log::OpenMode::Create, log::StoreOptions{o.synchronous_full}), options(o) {}

LogWriter::LogWriter(const std::string& path, LogWriterOptions options,
                     const std::vector<std::pair<std::string, std::string>>& meta) {
    options.commit_interval_ms = std::clamp<std::int64_t>(options.commit_interval_ms, 1, 1000);
    options.chunk_rows = std::max<std::size_t>(options.chunk_rows, 1);
    m_shared = std::make_shared<Shared>(path, options);
    for (const auto& [k, v] : meta) m_shared->store.setMeta(k, v);
    m_shared->next_event_id = m_shared->store.nextEventId();
    m_thread = std::thread(run, m_shared);
}

LogWriter::~LogWriter() { stop(); }

void LogWriter::post(log::Batch&& batch) {
    if (batch.empty()) return;
    auto& s = *m_shared;
    std::lock_guard lock(s.mutex);
    s.stats.raw_posted += batch.raw.size();
    if (s.stop && s.finished) {
        // Posted after the writer gave up: lost, and counted.
        s.stats.raw_unwritten += batch.raw.size();
        return;
    }
    const std::size_t limit = s.options.queue_limit_bytes;
    if (s.stats.queued_bytes > limit / 2 && decodedRows(batch) > 0) {
        s.stats.decoded_dropped += decodedRows(batch);
        dropDecoded(batch);
    }
    if (s.stats.queued_bytes > limit && !batch.raw.empty()) {
        // Raw lines are the lossless record, but memory is not: the oldest stay queued (the log
        // stays a contiguous record up to the stall) and the newest are counted as lost.
        if (s.loss_count == 0) s.loss_first_utc = batch.raw.front().utc_ns;
        s.loss_last_utc = batch.raw.back().utc_ns;
        s.loss_count += batch.raw.size();
        s.stats.raw_dropped += batch.raw.size();
        batch.raw.clear();
        dropDecoded(batch);  // they would point at raw lines that are gone
        if (batch.empty()) return;
    } else if (s.loss_count > 0 && !batch.raw.empty()) {
        // The backlog is below the limit again: the loss episode ends, written as an event.
        batch.events.insert(batch.events.begin(), lossEvent(s));
        s.loss_count = 0;
    }
    const std::size_t bytes = approxBytes(batch);
    s.stats.queued_rows += batch.rowCount();
    s.stats.queued_bytes += bytes;
    s.stats.peak_queued_bytes = std::max(s.stats.peak_queued_bytes, s.stats.queued_bytes);
    s.queue.push_back(std::move(batch));
    s.queue_bytes.push_back(bytes);
}

void LogWriter::flushSoon() {
    {
        std::lock_guard lock(m_shared->mutex);
        m_shared->flush = true;
    }
    m_shared->cv.notify_one();
}

void LogWriter::stop() {
    auto& s = *m_shared;
    {
        std::unique_lock lock(s.mutex);
        if (!m_thread.joinable()) return;
        s.stop = true;
        s.cv.notify_one();
        const auto wait = std::chrono::duration<double>(std::max(0.0, s.options.stop_timeout_s));
        // The thread itself gives up retrying at the same deadline; the extra second covers a
        // write that is under way. A write stalled in the kernel cannot be interrupted: then the
        // thread is left behind (it holds its own reference to the shared state) and what was
        // not committed is counted as unwritten.
        const bool done = s.done_cv.wait_for(
            lock, std::chrono::duration_cast<Clock::duration>(wait) + std::chrono::seconds(1),
            [&] { return s.finished; });
        if (!done) {
            s.abandoned = true;
            s.finished = true;
            s.stats.stop_timed_out = true;
            s.stats.raw_unwritten =
                s.stats.raw_posted - s.stats.raw_committed - s.stats.raw_dropped;
            spdlog::error("log: the disk did not take the last rows within {:.1f} s; {} raw lines "
                          "not written",
                          s.options.stop_timeout_s, s.stats.raw_unwritten);
        }
    }
    if (s.abandoned) m_thread.detach();
    else m_thread.join();
}

LogWriterStats LogWriter::stats() const {
    std::lock_guard lock(m_shared->mutex);
    return m_shared->stats;
}

void LogWriter::run(std::shared_ptr<Shared> sp) {
    auto& s = *sp;
    const auto interval = std::chrono::milliseconds(s.options.commit_interval_ms);
    auto next_commit = Clock::now() + interval;
    std::vector<log::Batch> pending;  // taken from the queue, not yet committed (oldest first)
    std::vector<std::size_t> pending_bytes;
    std::size_t chunk_rows = s.options.chunk_rows;
    std::optional<Clock::time_point> stop_deadline;
    std::string reported_error;
    auto finish = [&](std::uint64_t unwritten) {
        std::lock_guard lock(s.mutex);
        if (!s.abandoned) s.stats.raw_unwritten = unwritten;
        s.finished = true;
        s.done_cv.notify_all();
    };
    for (;;) {
        bool stopping = false;
        {
            std::unique_lock lock(s.mutex);
            s.cv.wait_until(lock, next_commit, [&] { return s.stop || s.flush; });
            if (s.abandoned) return;
            stopping = s.stop;
            s.flush = false;
            if (stopping && !stop_deadline) {
                stop_deadline = Clock::now() + std::chrono::duration_cast<Clock::duration>(
                                                   std::chrono::duration<double>(s.options.stop_timeout_s));
                if (s.loss_count > 0) {
                    // The loss episode still open at the end is written too (if the disk lets us).
                    log::Batch b;
                    b.events.push_back(lossEvent(s));
                    s.loss_count = 0;
                    s.queue.push_back(std::move(b));
                    s.queue_bytes.push_back(256);
                    s.stats.queued_rows += 1;
                    s.stats.queued_bytes += 256;
                }
            }
            for (std::size_t i = 0; i < s.queue.size(); ++i) {
                pending.push_back(std::move(s.queue[i]));
                pending_bytes.push_back(s.queue_bytes[i]);
            }
            s.queue.clear();
            s.queue_bytes.clear();
        }
        next_commit = Clock::now() + interval;
        // Oldest first, in transactions of at most chunk_rows rows (at least one batch each).
        bool failed = false;
        std::size_t done = 0;
        while (done < pending.size()) {
            // A batch larger than the chunk (a capture file read at once, a burst) is cut at line
            // boundaries, so that a chunk is never more than chunk_rows rows plus one line's.
            if (pending[done].rowCount() > chunk_rows && pending[done].raw.size() > 1) {
                auto& big = pending[done];
                const std::size_t n_raw = std::clamp<std::size_t>(
                    chunk_rows * big.raw.size() / big.rowCount(), 1, big.raw.size() - 1);
                const std::size_t head_bytes = pending_bytes[done] * n_raw / big.raw.size();
                log::Batch head = takeFront(big, n_raw);
                pending_bytes[done] -= head_bytes;  // the pieces' bytes add up to the whole's
                pending.insert(pending.begin() + static_cast<std::ptrdiff_t>(done), std::move(head));
                pending_bytes.insert(pending_bytes.begin() + static_cast<std::ptrdiff_t>(done), head_bytes);
            }
            std::size_t end = done, rows = 0;
            while (end < pending.size() && (end == done || rows + pending[end].rowCount() <= chunk_rows))
                rows += pending[end++].rowCount();
            std::uint64_t raw = 0;
            std::size_t bytes = 0;
            for (std::size_t i = done; i < end; ++i) {
                raw += pending[i].raw.size();
                bytes += pending_bytes[i];
            }
            if (s.options.before_write) s.options.before_write();
            {
                std::lock_guard lock(s.mutex);
                if (s.abandoned) return;
            }
            try {
                s.store.write(std::span<log::Batch>(pending.data() + done, end - done));
                done = end;
                std::lock_guard lock(s.mutex);
                s.stats.raw_committed += raw;
                s.stats.rows_committed += rows;
                s.stats.queued_rows -= rows;
                s.stats.queued_bytes -= bytes;
                ++s.stats.commits;
                if (!s.stats.last_error.empty())
                    spdlog::warn("log: writing again ({} rows queued)", s.stats.queued_rows);
                s.stats.last_error.clear();
                reported_error.clear();
                chunk_rows = std::min(s.options.chunk_rows, chunk_rows * 2);
            } catch (const std::exception& e) {
                // Disk full, I/O error...: the rows stay queued (oldest first) and are retried
                // next interval in smaller transactions, so that a little space is enough to go on.
                if (reported_error != e.what()) spdlog::error("log: {}", e.what());
                reported_error = e.what();
                std::lock_guard lock(s.mutex);
                s.stats.last_error = e.what();
                chunk_rows = std::max<std::size_t>(1, chunk_rows / 2);
                failed = true;
                break;
            }
        }
        pending.erase(pending.begin(), pending.begin() + static_cast<std::ptrdiff_t>(done));
        pending_bytes.erase(pending_bytes.begin(), pending_bytes.begin() + static_cast<std::ptrdiff_t>(done));
        if (stopping) {
            bool queue_empty = false;
            {
                std::lock_guard lock(s.mutex);
                queue_empty = s.queue.empty();
            }
            if (pending.empty() && queue_empty) return finish(0);
            if (Clock::now() >= *stop_deadline) {
                std::uint64_t unwritten = 0;
                for (const auto& b : pending) unwritten += b.raw.size();
                std::lock_guard lock(s.mutex);
                for (const auto& b : s.queue) unwritten += b.raw.size();
                if (unwritten > 0)
                    spdlog::error("log: stopping with the disk still failing; {} raw lines not "
                                  "written",
                                  unwritten);
                if (!s.abandoned) s.stats.raw_unwritten = unwritten;
                s.finished = true;
                s.done_cv.notify_all();
                return;
            }
            // Retry soon while stopping (the deadline bounds it).
            if (failed) next_commit = Clock::now() + std::chrono::milliseconds(100);
            else next_commit = Clock::now();
        }
    }
}

}  // namespace sg::io
