// The SQLite writer thread. Producers post() batches (never blocking on the disk: post only
// moves the batch into a queue under a short lock); the thread writes everything queued at least
// every commit interval (<= 1 s), so a killed process loses at most that.
//
// When the disk fails or stalls (docs/log-schema.md, "When the disk fails"):
// - Writes go in transactions of at most `chunk_rows` rows; after a failure (disk full) the chunk
//   is halved down to one line (a batch larger than the chunk is cut at line boundaries), and
//   retried every commit interval, so logging resumes as soon as space for one chunk returns,
//   oldest rows first.
// - The backlog is bounded by `queue_limit_bytes`: above half of it, decoded rows are no longer
//   queued (replay recomputes them from the raw lines); above all of it, raw lines are not
//   queued either and are counted as lost, with the receive times of the first and last lost
//   line (a "log_loss" event is written once the disk takes rows again). Events (alarms,
//   outages) are always queued.
// - stop() waits at most `stop_timeout_s` for the disk; what was not written is then counted in
//   stats() (raw_unwritten) and the thread is left behind (a stalled write cannot be interrupted).
// Every raw line posted is in exactly one of raw_committed, raw_dropped and raw_unwritten.
#pragma once

#include <atomic>
#include <condition_variable>
#include <cstdint>
#include <functional>
#include <memory>
#include <mutex>
#include <optional>
#include <string>
#include <thread>
#include <vector>

#include "log/log_store.hpp"

namespace sg::io {

struct LogWriterOptions {
    LogWriterOptions() = default;
    LogWriterOptions(std::int64_t interval_ms, bool sync_full)
        : commit_interval_ms(interval_ms), synchronous_full(sync_full) {}
    std::int64_t commit_interval_ms = 500;  // 10 .. 1000
    bool synchronous_full = true;           // see log::StoreOptions
    std::size_t queue_limit_bytes = std::size_t{64} << 20;  // backlog bound (bytes of row data)
    std::size_t chunk_rows = 50000;                         // rows per transaction at most
    double stop_timeout_s = 5.0;                            // stop() waits this long for the disk
    // Test hook: called on the writer thread before every transaction (a test blocks it to play
    // a stalled disk). Empty in production.
    std::function<void()> before_write;
};

struct LogWriterStats {
    std::uint64_t raw_posted = 0;      // raw lines handed to post()
    std::uint64_t raw_committed = 0;   // raw lines in committed transactions
    std::uint64_t raw_dropped = 0;     // raw lines not queued: backlog over the limit (lost)
    std::uint64_t raw_unwritten = 0;   // raw lines still queued when stop() gave up (lost)
    std::uint64_t decoded_dropped = 0; // decoded rows not queued (backlog over half the limit)
    std::uint64_t rows_committed = 0;  // all rows
    std::uint64_t commits = 0;
    std::uint64_t queued_rows = 0;     // posted, not yet committed
    std::size_t queued_bytes = 0;      // their approximate size
    std::size_t peak_queued_bytes = 0;
    bool stop_timed_out = false;       // stop() returned with the disk still not taking rows
    std::string last_error;            // empty while all is well
    std::uint64_t rawLost() const { return raw_dropped + raw_unwritten; }
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

    // Thread-safe, returns at once (applies the backlog policy above).
    void post(log::Batch&& batch);
    // Thread-safe: a fresh event id for an EventRow that a later batch may end or acknowledge.
    std::int64_t nextEventId() { return m_shared->next_event_id.fetch_add(1); }
    // Asks the thread to commit what is queued now (without waiting for it).
    void flushSoon();
    // Commits everything posted so far and joins the thread, waiting at most stop_timeout_s.
    // Idempotent.
    void stop();
    LogWriterStats stats() const;

    // Approximate memory a batch holds (bytes of row data plus a per-row overhead).
    static std::size_t approxBytes(const log::Batch& batch);

private:
    // Everything the thread touches: shared with it, so a thread left behind by a timed-out
    // stop() never outlives what it uses.
    struct Shared {
        Shared(const std::string& path, const LogWriterOptions& o);
        log::LogStore store;
        LogWriterOptions options;
        std::atomic<std::int64_t> next_event_id{1};
        std::mutex mutex;
        std::condition_variable cv;       // wakes the thread
        std::condition_variable done_cv;  // the thread has finished
        std::vector<log::Batch> queue;
        std::vector<std::size_t> queue_bytes;  // approxBytes of each queued batch
        bool stop = false, flush = false, finished = false, abandoned = false;
        LogWriterStats stats;
        // The loss episode in progress (raw lines dropped by the limit, receive times).
        std::uint64_t loss_count = 0;
        TimeNs loss_first_utc = 0, loss_last_utc = 0;
    };
    static void run(std::shared_ptr<Shared> s);

    std::shared_ptr<Shared> m_shared;
    std::thread m_thread;
};

}  // namespace sg::io
