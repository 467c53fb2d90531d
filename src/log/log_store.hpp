// SQLite access for the survey log: create/open a file, write batches with prepared statements,
// read it back (raw lines in id order for replay, meta, events). Single-threaded: one LogStore
// per thread. Throws LogError (naming the file and SQLite's message) on any database failure.
#pragma once

#include <functional>
#include <map>
#include <memory>
#include <span>
#include <optional>
#include <type_traits>
#include <stdexcept>
#include <string>
#include <string_view>

#include "log/log_schema.hpp"

struct sqlite3;
struct sqlite3_stmt;

namespace sg::log {

class LogError : public std::runtime_error {
public:
    using std::runtime_error::runtime_error;
};

// A prepared statement with typed binds. Owned by the LogStore's cache. Text and blobs are bound
// without a copy: they must stay alive until run() or the last step(); bind every parameter
// again before each run().
class Statement {
public:
    Statement(sqlite3* db, std::string_view sql, const std::string& file);
    ~Statement();
    Statement(const Statement&) = delete;
    Statement& operator=(const Statement&) = delete;

    Statement& bind(int i, std::int64_t v);
    Statement& bind(int i, double v);
    Statement& bind(int i, std::string_view text);
    Statement& bindBlob(int i, std::string_view bytes);
    Statement& bindNull(int i);
    template <typename T>
    Statement& bind(int i, const std::optional<T>& v) {
        if (!v) return bindNull(i);
        if constexpr (std::is_floating_point_v<T>) return bind(i, static_cast<double>(*v));
        else return bind(i, static_cast<std::int64_t>(*v));
    }
    // Runs a statement that returns no rows, then resets it for reuse.
    void run();
    // Steps once; true while a row is available.
    bool step();
    void reset();
    std::int64_t columnInt(int i) const;
    double columnDouble(int i) const;
    bool columnIsNull(int i) const;
    std::string columnText(int i) const;
    std::string columnBlob(int i) const;
    // The same without a copy: valid until the next step, reset or destruction.
    std::string_view columnTextView(int i) const;
    std::string_view columnBlobView(int i) const;

private:
    sqlite3* m_db;
    sqlite3_stmt* m_stmt = nullptr;
    const std::string& m_file;
};

enum class OpenMode { Create, ReadOnly, ReadWrite };

// The one-writer rule: an exclusive flock(2) on "<log>.lock" (which holds the writer's pid), held
// by every LogStore opened for writing. A second writer, in this or another process, gets a
// LogError naming the pid. Removed when released; a killed process's lock ends with it.
class WriteLock {
public:
    explicit WriteLock(const std::string& log_path);
    ~WriteLock();
    WriteLock(const WriteLock&) = delete;
    WriteLock& operator=(const WriteLock&) = delete;
    const std::string& path() const { return m_path; }

private:
    std::string m_path;
    int m_fd = -1;
};

struct StoreOptions {
    // FULL: every commit reaches the disk (one fsync per commit, about once a second).
    // NORMAL is safe against a killed process but may lose the last commits on power loss.
    bool synchronous_full = true;
};

class LogStore {
public:
    // Create makes a new file: it refuses a file that holds anything but nothing (a foreign
    // database, or a swathguard log of an earlier session, even an empty one). ReadWrite appends to
    // an existing swathguard log. Both take the WriteLock. ReadOnly is for replay and reports: it
    // never writes (read-only media work; "immutable" when no -wal file exists).
    LogStore(const std::string& path, OpenMode mode, StoreOptions options = {});
    ~LogStore();
    LogStore(const LogStore&) = delete;
    LogStore& operator=(const LogStore&) = delete;

    const std::string& path() const { return m_path; }

    // --- meta ---
    void setMeta(std::string_view key, std::string_view value);
    std::optional<std::string> meta(std::string_view key);
    int schemaVersion();
    // The survey's TOML config text, stored at record time so a replay uses the same settings.
    std::optional<std::string> configText() { return meta("config_text"); }

    // --- writing ---
    // Writes the whole batch in one transaction. Returns the id given to the first raw line
    // (0 when the batch had none); raw ids are consecutive.
    std::int64_t write(Batch& batch);
    // Writes several batches in one transaction (each batch's raw_index refers to its own raw).
    std::int64_t write(std::span<Batch> batches);
    // First free event id (producers hand out ids from here).
    std::int64_t nextEventId();
    void addExtension(std::string_view name, std::string_view ddl);
    // Cached prepared statement for `sql` (for RowSet implementations).
    Statement& statement(const std::string& sql);
    void exec(std::string_view sql);

    // --- reading ---
    std::int64_t rawCount();
    // UTC receive time of the last raw line (nullopt for an empty log).
    std::optional<TimeNs> lastRawUtc();
    // Earliest and latest instrument (survey) time of the decoded fixes and magnetometer samples,
    // or nullopt when none carries one.
    std::optional<std::pair<TimeNs, TimeNs>> instrumentTimeSpan();
    // Calls `f` for every raw line with id > after_id in id order, until f returns false.
    // Returns the last id delivered. The id of each line is passed alongside.
    std::int64_t forEachRaw(const std::function<bool(std::int64_t id, const RawRow&)>& f,
                            std::int64_t after_id = 0);
    std::vector<EventRow> events();

private:
    void createSchema();
    static void refuseForeign(const std::string& path, OpenMode mode);
    std::int64_t writeRows(Batch& batch);
    std::unique_ptr<WriteLock> m_lock;  // writable modes only
    sqlite3* m_db = nullptr;
    std::string m_path;
    std::map<std::string, std::unique_ptr<Statement>, std::less<>> m_cache;
};

}  // namespace sg::log
