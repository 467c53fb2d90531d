// The SQLite writer thread. Producers post() batches (never blocking on the disk: post only
// moves the batch into a queue under a short lock); the thread writes everything queued in one
// transaction at least every commit interval (<= 1 s), so a killed process loses at most that.
#pragma once

#include <atomic>
#include <condition_variable>
#include <cstdint>
#include <mutex>
#include <string>
#include <thread>
#include <vector>

#include "log/log_store.hpp"

namespace sg::io {

struct LogWriterOptions {
    std::int64_t commit_interval_ms = 500;  // 10 .. 1000
    bool synchronous_full = true;           // see log::StoreOptions
};

struct LogWriterStats {
    std::uint64_t raw_committed = 0;   // raw lines in committed transactions
    std::uint64_t rows_committed = 0;  // all rows
    std::uint64_t commits = 0;
    std::uint64_t queued_rows = 0;     // posted, not yet committed
    std::string last_error;            // empty while all is well
};

class LogWriter {
public:
    // Creates the log file (throws log::LogError at once if it cannot) and stores the meta
    // entries given (e.g. config_text, config_file) before the thread starts.
    LogWriter(const std::string& path, LogWriterOptions options,
              const std::vector<std::pair<std::string, std::string>>& meta = {});
    ~LogWriter();  // stop()s
    LogWriter(const LogWriter&) = delete;
    LogWriter& operator=(const LogWriter&) = delete;

    // Thread-safe, returns at once.
    void post(log::Batch&& batch);
    // Thread-safe: a fresh event id for an EventRow that a later batch may end or acknowledge.
    std::int64_t nextEventId() { return m_next_event_id.fetch_add(1); }
    // Asks the thread to commit what is queued now (without waiting for it).
    void flushSoon();
    // Commits everything posted so far and joins the thread. Idempotent.
    void stop();
    LogWriterStats stats() const;

private:
    void run();

    log::LogStore m_store;  // used only by the thread once it runs
    LogWriterOptions m_options;
    std::atomic<std::int64_t> m_next_event_id{1};
    mutable std::mutex m_mutex;
    std::condition_variable m_cv;
    std::vector<log::Batch> m_queue;
    bool m_stop = false;
    bool m_flush = false;
    LogWriterStats m_stats;
    std::thread m_thread;
};

}  // namespace sg::io
