// The SQLite writer thread; see log_writer.hpp.
#include "io/log_writer.hpp"

#include <chrono>

#include <spdlog/spdlog.h>

namespace sg::io {

LogWriter::LogWriter(const std::string& path, LogWriterOptions options,
                     const std::vector<std::pair<std::string, std::string>>& meta)
    : m_store(path, log::OpenMode::Create, log::StoreOptions{options.synchronous_full}),
      m_options(options) {
    if (m_options.commit_interval_ms < 1) m_options.commit_interval_ms = 1;
    if (m_options.commit_interval_ms > 1000) m_options.commit_interval_ms = 1000;
    for (const auto& [k, v] : meta) m_store.setMeta(k, v);
    m_next_event_id = m_store.nextEventId();
    m_thread = std::thread([this] { run(); });
}

LogWriter::~LogWriter() { stop(); }

void LogWriter::post(log::Batch&& batch) {
    if (batch.empty()) return;
    std::lock_guard lock(m_mutex);
    m_stats.queued_rows += batch.rowCount();
    m_queue.push_back(std::move(batch));
}

void LogWriter::flushSoon() {
    {
        std::lock_guard lock(m_mutex);
        m_flush = true;
    }
    m_cv.notify_one();
}

void LogWriter::stop() {
    {
        std::lock_guard lock(m_mutex);
        if (m_stop && !m_thread.joinable()) return;
        m_stop = true;
    }
    m_cv.notify_one();
    if (m_thread.joinable()) m_thread.join();
}

LogWriterStats LogWriter::stats() const {
    std::lock_guard lock(m_mutex);
    return m_stats;
}

void LogWriter::run() {
    using clock = std::chrono::steady_clock;
    const auto interval = std::chrono::milliseconds(m_options.commit_interval_ms);
    auto next_commit = clock::now() + interval;
    std::vector<log::Batch> pending;  // taken from the queue, not yet committed
    for (;;) {
        bool stopping = false;
        {
            std::unique_lock lock(m_mutex);
            m_cv.wait_until(lock, next_commit, [this] { return m_stop || m_flush; });
            stopping = m_stop;
            m_flush = false;
            for (auto& b : m_queue) pending.push_back(std::move(b));
            m_queue.clear();
        }
        next_commit = clock::now() + interval;
        if (!pending.empty()) {
            // Everything queued goes in one transaction: one commit (one fsync) per interval.
            std::uint64_t raw = 0, rows = 0;
            for (const auto& b : pending) {
                raw += b.raw.size();
                rows += b.rowCount();
            }
            try {
                m_store.write(std::span<log::Batch>(pending));
                pending.clear();
                std::lock_guard lock(m_mutex);
                m_stats.raw_committed += raw;
                m_stats.rows_committed += rows;
                m_stats.queued_rows -= rows;
                ++m_stats.commits;
                m_stats.last_error.clear();
            } catch (const std::exception& e) {
                // Disk full, file locked...: keep the rows and try again next interval, so
                // nothing is dropped while the problem lasts (memory grows meanwhile).
                spdlog::error("log: {}", e.what());
                std::lock_guard lock(m_mutex);
                m_stats.last_error = e.what();
                if (stopping) return;
            }
        }
        if (stopping) {
            std::lock_guard lock(m_mutex);
            if (m_queue.empty()) return;
        }
    }
}

}  // namespace sg::io
