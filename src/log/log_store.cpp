// SQLite survey log; see log_store.hpp and docs/log-schema.md.
#include "log/log_store.hpp"

#include <fcntl.h>
#include <sqlite3.h>
#include <sys/file.h>
#include <sys/stat.h>
#include <unistd.h>

#include <cerrno>
#include <chrono>
#include <cstring>
#include <filesystem>
#include <fstream>
#include <span>

#include <fmt/chrono.h>
#include <fmt/format.h>

namespace sg::log {

namespace {

// Raw lines first: the lossless record. Every decoded row points back at its raw line.
constexpr const char* kSchema = R"sql(
CREATE TABLE IF NOT EXISTS meta (
  key   TEXT PRIMARY KEY,
  value TEXT NOT NULL
);
CREATE TABLE IF NOT EXISTS raw_lines (
  id      INTEGER PRIMARY KEY,
  source  TEXT NOT NULL,
  mono_ns INTEGER NOT NULL,
  utc_ns  INTEGER NOT NULL,
  bytes   BLOB NOT NULL,
  flags   INTEGER NOT NULL,
  status  TEXT NOT NULL,
  reason  TEXT
);
CREATE TABLE IF NOT EXISTS fixes (
  raw_id        INTEGER NOT NULL REFERENCES raw_lines(id),
  source        TEXT NOT NULL,
  sentence      TEXT NOT NULL,
  time_utc_ns   INTEGER,
  time_of_day_s REAL,
  lat_deg       REAL NOT NULL,
  lon_deg       REAL NOT NULL,
  altitude_m    REAL,
  quality       INTEGER,
  satellites    INTEGER,
  hdop          REAL,
  speed_mps     REAL,
  course_deg    REAL,
  valid         INTEGER NOT NULL
);
CREATE TABLE IF NOT EXISTS headings (
  raw_id      INTEGER NOT NULL REFERENCES raw_lines(id),
  source      TEXT NOT NULL,
  sentence    TEXT NOT NULL,
  heading_deg REAL,
  course_deg  REAL,
  speed_mps   REAL
);
CREATE TABLE IF NOT EXISTS depths (
  raw_id   INTEGER NOT NULL REFERENCES raw_lines(id),
  source   TEXT NOT NULL,
  sentence TEXT NOT NULL,
  depth_m  REAL NOT NULL,
  offset_m REAL
);
CREATE TABLE IF NOT EXISTS mag_samples (
  raw_id         INTEGER NOT NULL REFERENCES raw_lines(id),
  source         TEXT NOT NULL,
  time_utc_ns    INTEGER,
  time_of_day_s  REAL,
  sensor         INTEGER NOT NULL,
  field_nT       REAL,
  signal_quality REAL,
  depth_m        REAL,
  altitude_m     REAL
);
CREATE TABLE IF NOT EXISTS aux (
  raw_id        INTEGER NOT NULL REFERENCES raw_lines(id),
  source        TEXT NOT NULL,
  kind          TEXT NOT NULL,
  time_utc_ns   INTEGER,
  time_of_day_s REAL,
  value         REAL NOT NULL
);
CREATE TABLE IF NOT EXISTS events (
  id           INTEGER PRIMARY KEY,
  kind         TEXT NOT NULL,
  source       TEXT NOT NULL,
  start_utc_ns INTEGER NOT NULL,
  end_utc_ns   INTEGER,
  value        REAL,
  detail       TEXT NOT NULL,
  ack_utc_ns   INTEGER
);
)sql";

// "file:" URI of a path for sqlite3_open_v2 with SQLITE_OPEN_URI (RFC 3986 percent-encoding of
// the characters SQLite's URI parser treats specially; https://sqlite.org/uri.html).
std::string fileUri(const std::string& path) {
    std::string out = "file:";
    const std::string abs = std::filesystem::absolute(path).string();
    for (unsigned char c : abs) {
        if (c == '%' || c == '?' || c == '#' || c < 0x20 || c >= 0x7f)
            out += fmt::format("%{:02X}", c);
        else
            out += static_cast<char>(c);
    }
    return out;
}

// What a file that `record` is asked to create already holds.
enum class Existing { None, EmptyDatabase, SwathguardLog, Foreign };

}  // namespace

// ---------------------------------------------------------------- WriteLock

WriteLock::WriteLock(const std::string& log_path) : m_path(log_path + ".lock") {
    // flock(2) on a lock file beside the log: released by the kernel when the process ends, so a
    // killed recorder leaves no stale lock. The file is checked to still be the one at the path
    // after locking (another process may have removed it while we waited for the lock).
    for (int attempt = 0; attempt < 5; ++attempt) {
        m_fd = ::open(m_path.c_str(), O_RDWR | O_CREAT | O_CLOEXEC, 0644);
        if (m_fd < 0)
            throw LogError(fmt::format("{}: cannot create the lock file {}: {}", log_path, m_path,
                                       std::strerror(errno)));
        if (::flock(m_fd, LOCK_EX | LOCK_NB) != 0) {
            const int err = errno;
            std::string holder;
            {
                std::ifstream in(m_path);
                std::getline(in, holder);
            }
            ::close(m_fd);
            m_fd = -1;
            if (err == EWOULDBLOCK)
                throw LogError(fmt::format(
                    "{}: another process is writing this log ({}; lock file {}): stop it or "
                    "choose another log file",
                    log_path, holder.empty() ? "pid unknown" : holder, m_path));
            throw LogError(fmt::format("{}: cannot lock {}: {}", log_path, m_path, std::strerror(err)));
        }
        struct stat held {}, now {};
        if (::fstat(m_fd, &held) == 0 && ::stat(m_path.c_str(), &now) == 0 &&
            held.st_ino == now.st_ino && held.st_dev == now.st_dev) {
            const std::string who = fmt::format("pid {}\n", static_cast<long>(::getpid()));
            if (::ftruncate(m_fd, 0) == 0 && ::pwrite(m_fd, who.data(), who.size(), 0) < 0) {
                // The pid is only a courtesy for the message of a second writer.
            }
            return;
        }
        ::close(m_fd);
        m_fd = -1;
    }
    throw LogError(fmt::format("{}: the lock file {} keeps being replaced", log_path, m_path));
}

WriteLock::~WriteLock() {
    if (m_fd < 0) return;
    ::unlink(m_path.c_str());  // while still locked: the next writer creates a fresh one
    ::close(m_fd);
}

const char* toString(DecodeStatus s) {
    switch (s) {
    case DecodeStatus::Ok: return "ok";
    case DecodeStatus::Rejected: return "rejected";
    case DecodeStatus::Unsupported: return "unsupported";
    case DecodeStatus::NotDecoded: return "not_decoded";
    }
    return "?";
}

DecodeStatus statusFromText(std::string_view s) {
    if (s == "ok") return DecodeStatus::Ok;
    if (s == "rejected") return DecodeStatus::Rejected;
    if (s == "unsupported") return DecodeStatus::Unsupported;
    return DecodeStatus::NotDecoded;
}

bool Batch::empty() const { return rowCount() == 0; }

std::size_t Batch::rowCount() const {
    return raw.size() + fixes.size() + headings.size() + depths.size() + mags.size() + aux.size() +
           events.size() + event_ends.size() + event_acks.size() + extra.size();
}

void Batch::append(Batch&& o) {
    const std::size_t base = raw.size();
    auto move = [base](auto& dst, auto& src, bool shift) {
        // No exact reserve here: appending many batches must grow geometrically.
        for (auto& r : src) {
            if constexpr (requires { r.raw_index; })
                if (shift) r.raw_index += base;
            dst.push_back(std::move(r));
        }
        src.clear();
    };
    move(raw, o.raw, false);
    move(fixes, o.fixes, true);
    move(headings, o.headings, true);
    move(depths, o.depths, true);
    move(mags, o.mags, true);
    move(aux, o.aux, true);
    move(events, o.events, false);
    move(event_ends, o.event_ends, false);
    move(event_acks, o.event_acks, false);
    move(extra, o.extra, false);
}

// ---------------------------------------------------------------- Statement

Statement::Statement(sqlite3* db, std::string_view sql, const std::string& file)
    : m_db(db), m_file(file) {
    if (sqlite3_prepare_v3(db, sql.data(), static_cast<int>(sql.size()), SQLITE_PREPARE_PERSISTENT,
                           &m_stmt, nullptr) != SQLITE_OK)
        throw LogError(fmt::format("{}: cannot prepare '{}': {}", file, sql, sqlite3_errmsg(db)));
}

Statement::~Statement() { sqlite3_finalize(m_stmt); }

Statement& Statement::bind(int i, std::int64_t v) {
    sqlite3_bind_int64(m_stmt, i, v);
    return *this;
}
Statement& Statement::bind(int i, double v) {
    sqlite3_bind_double(m_stmt, i, v);
    return *this;
}
Statement& Statement::bind(int i, std::string_view t) {
    // SQLITE_STATIC: callers keep the text alive until run()/step(); saves a copy per value.
    sqlite3_bind_text64(m_stmt, i, t.data(), t.size(), SQLITE_STATIC, SQLITE_UTF8);
    return *this;
}
Statement& Statement::bindBlob(int i, std::string_view b) {
    // An empty line is stored as an empty BLOB, not NULL (a zero-length blob with a null
    // pointer would bind NULL).
    static const char kEmpty = 0;
    sqlite3_bind_blob64(m_stmt, i, b.empty() ? &kEmpty : b.data(), b.size(), SQLITE_STATIC);
    return *this;
}
Statement& Statement::bindNull(int i) {
    sqlite3_bind_null(m_stmt, i);
    return *this;
}

void Statement::run() {
    const int rc = sqlite3_step(m_stmt);
    sqlite3_reset(m_stmt);
    if (rc != SQLITE_DONE && rc != SQLITE_ROW)
        throw LogError(fmt::format("{}: write failed: {}", m_file, sqlite3_errmsg(m_db)));
}

bool Statement::step() {
    const int rc = sqlite3_step(m_stmt);
    if (rc == SQLITE_ROW) return true;
    if (rc == SQLITE_DONE) return false;
    throw LogError(fmt::format("{}: read failed: {}", m_file, sqlite3_errmsg(m_db)));
}

void Statement::reset() {
    sqlite3_reset(m_stmt);
    sqlite3_clear_bindings(m_stmt);
}

std::int64_t Statement::columnInt(int i) const { return sqlite3_column_int64(m_stmt, i); }
double Statement::columnDouble(int i) const { return sqlite3_column_double(m_stmt, i); }
bool Statement::columnIsNull(int i) const { return sqlite3_column_type(m_stmt, i) == SQLITE_NULL; }
std::string Statement::columnText(int i) const {
    const auto* p = sqlite3_column_text(m_stmt, i);
    const int n = sqlite3_column_bytes(m_stmt, i);
    return p == nullptr ? std::string() : std::string(reinterpret_cast<const char*>(p), static_cast<std::size_t>(n));
}
std::string Statement::columnBlob(int i) const {
    const void* p = sqlite3_column_blob(m_stmt, i);
    const int n = sqlite3_column_bytes(m_stmt, i);
    return p == nullptr ? std::string() : std::string(static_cast<const char*>(p), static_cast<std::size_t>(n));
}

std::string_view Statement::columnTextView(int i) const {
    const auto* p = sqlite3_column_text(m_stmt, i);
    const int n = sqlite3_column_bytes(m_stmt, i);
    return p == nullptr ? std::string_view() : std::string_view(reinterpret_cast<const char*>(p), static_cast<std::size_t>(n));
}
std::string_view Statement::columnBlobView(int i) const {
    const void* p = sqlite3_column_blob(m_stmt, i);
    const int n = sqlite3_column_bytes(m_stmt, i);
    return p == nullptr ? std::string_view() : std::string_view(static_cast<const char*>(p), static_cast<std::size_t>(n));
}

// ---------------------------------------------------------------- LogStore

LogStore::LogStore(const std::string& path, OpenMode mode, StoreOptions options) : m_path(path) {
    int flags = SQLITE_OPEN_NOMUTEX;
    if (mode == OpenMode::ReadOnly) flags |= SQLITE_OPEN_READONLY | SQLITE_OPEN_URI;
    else flags |= SQLITE_OPEN_READWRITE | SQLITE_OPEN_CREATE;
    if (mode == OpenMode::ReadOnly && !std::filesystem::exists(path))
        throw LogError(fmt::format("{}: no such log file", path));
    if (mode == OpenMode::ReadWrite && !std::filesystem::exists(path))
        throw LogError(fmt::format("{}: no such log file", path));
    // One writer per log: a second process fails here with the first one's pid.
    if (mode != OpenMode::ReadOnly) m_lock = std::make_unique<WriteLock>(path);
    // Read commands never write: "mode=ro" opens read-only media, and "immutable=1" (only when no
    // -wal file exists, i.e. no writer has the log open and no crash left a WAL to apply) also
    // needs no -shm file and takes no locks (https://sqlite.org/uri.html).
    const bool wal_exists = std::filesystem::exists(path + "-wal");
    const std::string target =
        mode == OpenMode::ReadOnly ? fileUri(path) + (wal_exists ? "?mode=ro" : "?mode=ro&immutable=1")
                                   : path;
    if (mode != OpenMode::ReadOnly) refuseForeign(path, mode);
    if (sqlite3_open_v2(target.c_str(), &m_db, flags, nullptr) != SQLITE_OK) {
        std::string msg = m_db ? sqlite3_errmsg(m_db) : "out of memory";
        sqlite3_close(m_db);
        m_db = nullptr;
        throw LogError(fmt::format("{}: cannot open log: {}", path, msg));
    }
    sqlite3_busy_timeout(m_db, 5000);
    try {
        if (mode == OpenMode::ReadOnly) {
            if (!meta("schema_version"))
                throw LogError(fmt::format("{}: not a swathguard log (no schema_version)", path));
            return;
        }
        exec("PRAGMA journal_mode=WAL");
        exec(options.synchronous_full ? "PRAGMA synchronous=FULL" : "PRAGMA synchronous=NORMAL");
        // A second of lines at full rate (a few MB) fits in the page cache, so a transaction
        // does not spill pages to the WAL before its commit.
        exec("PRAGMA cache_size=-32768");
        Statement probe(m_db, "SELECT count(*) FROM sqlite_master WHERE name='meta'", m_path);
        probe.step();
        const bool existing = probe.columnInt(0) > 0;
        createSchema();
        if (!existing) {
            setMeta("schema_version", std::to_string(kSchemaVersion));
            setMeta("created_utc_ns",
                    std::to_string(std::chrono::duration_cast<std::chrono::nanoseconds>(
                                       std::chrono::system_clock::now().time_since_epoch())
                                       .count()));
            setMeta("software", "swathguard 0.1.0");
        } else if (schemaVersion() != kSchemaVersion) {
            throw LogError(fmt::format("{}: schema version {} but this program writes {}", path,
                                       schemaVersion(), kSchemaVersion));
        }
    } catch (...) {
        m_cache.clear();
        sqlite3_close(m_db);
        m_db = nullptr;
        throw;
    }
}

LogStore::~LogStore() {
    m_cache.clear();  // statements must be finalised before the connection closes
    if (m_db) sqlite3_close(m_db);
}

void LogStore::refuseForeign(const std::string& path, OpenMode mode) {
    // Looked at through a separate read-only connection before anything is written: the checks
    // must not change the file (journal_mode=WAL alone would convert a foreign database).
    std::error_code ec;
    const auto size = std::filesystem::file_size(path, ec);
    if (ec || size == 0) {
        if (mode == OpenMode::ReadWrite)
            throw LogError(fmt::format("{}: no swathguard log to append to (empty file)", path));
        return;  // a new or empty file
    }
    Existing what = Existing::Foreign;
    std::string detail = "not an SQLite database";
    std::string created;
    sqlite3* db = nullptr;
    if (sqlite3_open_v2((fileUri(path) + "?mode=ro").c_str(), &db,
                        SQLITE_OPEN_READONLY | SQLITE_OPEN_URI | SQLITE_OPEN_NOMUTEX, nullptr) == SQLITE_OK) {
        sqlite3_busy_timeout(db, 5000);
        sqlite3_stmt* st = nullptr;
        if (sqlite3_prepare_v2(db, "SELECT name FROM sqlite_master WHERE type='table' ORDER BY name", -1,
                               &st, nullptr) == SQLITE_OK) {
            std::string tables;
            bool has_meta = false, has_raw = false;
            while (sqlite3_step(st) == SQLITE_ROW) {
                const std::string n(reinterpret_cast<const char*>(sqlite3_column_text(st, 0)));
                has_meta |= n == "meta";
                has_raw |= n == "raw_lines";
                tables += (tables.empty() ? "" : ", ") + n;
            }
            sqlite3_finalize(st);
            st = nullptr;
            if (tables.empty()) {
                what = Existing::EmptyDatabase;
            } else if (has_meta && has_raw &&
                       sqlite3_prepare_v2(db, "SELECT value FROM meta WHERE key='created_utc_ns'", -1,
                                          &st, nullptr) == SQLITE_OK) {
                what = Existing::SwathguardLog;
                if (sqlite3_step(st) == SQLITE_ROW)
                    created = reinterpret_cast<const char*>(sqlite3_column_text(st, 0));
            } else {
                detail = "its tables are " + tables;
            }
            sqlite3_finalize(st);
        }
    }
    sqlite3_close(db);
    if (what == Existing::Foreign)
        throw LogError(fmt::format(
            "{}: not a swathguard log ({}); refusing to write into it: choose a new file", path,
            detail));
    if (what == Existing::EmptyDatabase && mode == OpenMode::ReadWrite)
        throw LogError(fmt::format("{}: no swathguard log to append to (no tables)", path));
    if (what == Existing::SwathguardLog && mode == OpenMode::Create) {
        std::string when = "an earlier session";
        if (!created.empty()) {
            const auto t = std::chrono::system_clock::time_point(
                std::chrono::duration_cast<std::chrono::system_clock::duration>(
                    std::chrono::nanoseconds(std::stoll(created))));
            when = fmt::format("a session created {:%Y-%m-%d %H:%M:%S} UTC",
                               std::chrono::floor<std::chrono::seconds>(t));
        }
        throw LogError(fmt::format(
            "{}: already holds the log of {}; each session writes a new file: choose a new file",
            path, when));
    }
}

void LogStore::exec(std::string_view sql) {
    char* err = nullptr;
    const std::string s(sql);
    if (sqlite3_exec(m_db, s.c_str(), nullptr, nullptr, &err) != SQLITE_OK) {
        std::string msg = err ? err : "unknown error";
        sqlite3_free(err);
        throw LogError(fmt::format("{}: {}", m_path, msg));
    }
}

void LogStore::createSchema() { exec(kSchema); }

void LogStore::addExtension(std::string_view name, std::string_view ddl) {
    exec(ddl);
    setMeta(fmt::format("extension.{}", name), "1");
}

Statement& LogStore::statement(const std::string& sql) {
    auto it = m_cache.find(sql);
    if (it == m_cache.end())
        it = m_cache.emplace(sql, std::make_unique<Statement>(m_db, sql, m_path)).first;
    return *it->second;
}

void LogStore::setMeta(std::string_view key, std::string_view value) {
    statement("INSERT INTO meta(key, value) VALUES (?1, ?2) "
              "ON CONFLICT(key) DO UPDATE SET value = excluded.value")
        .bind(1, key)
        .bind(2, value)
        .run();
}

std::optional<std::string> LogStore::meta(std::string_view key) {
    // Not cached through statement(): a read-only file without the table must give an error.
    Statement s(m_db, "SELECT value FROM meta WHERE key = ?1", m_path);
    s.bind(1, key);
    if (!s.step()) return std::nullopt;
    return s.columnText(0);
}

int LogStore::schemaVersion() {
    auto v = meta("schema_version");
    return v ? std::stoi(*v) : 0;
}

std::int64_t LogStore::nextEventId() {
    auto& s = statement("SELECT coalesce(max(id), 0) + 1 FROM events");
    s.step();
    const auto id = s.columnInt(0);
    s.reset();
    return id;
}

std::int64_t LogStore::write(Batch& b) {
    if (b.empty()) return 0;
    std::span<Batch> one(&b, 1);
    return write(one);
}

std::int64_t LogStore::write(std::span<Batch> batches) {
    exec("BEGIN IMMEDIATE");
    std::int64_t first_id = 0;
    try {
        for (auto& b : batches) {
            const auto id = writeRows(b);
            if (first_id == 0) first_id = id;
        }
        exec("COMMIT");
    } catch (...) {
        sqlite3_exec(m_db, "ROLLBACK", nullptr, nullptr, nullptr);
        throw;
    }
    return first_id;
}

std::int64_t LogStore::writeRows(Batch& b) {
    std::int64_t first_id = 0;
    {
        std::vector<std::int64_t> ids;
        ids.reserve(b.raw.size());
        auto& raw = statement(
            "INSERT INTO raw_lines(source, mono_ns, utc_ns, bytes, flags, status, reason) "
            "VALUES (?1, ?2, ?3, ?4, ?5, ?6, ?7)");
        for (const auto& r : b.raw) {
            raw.bind(1, std::string_view(r.source))
                .bind(2, std::int64_t{r.mono_ns})
                .bind(3, std::int64_t{r.utc_ns})
                .bindBlob(4, r.bytes)
                .bind(5, std::int64_t{r.flags})
                .bind(6, std::string_view(toString(r.status)));
            if (r.reason.empty()) raw.bindNull(7);
            else raw.bind(7, std::string_view(r.reason));
            raw.run();
            ids.push_back(sqlite3_last_insert_rowid(m_db));
        }
        if (!ids.empty()) first_id = ids.front();
        auto rawId = [&](std::size_t idx) -> std::int64_t {
            if (idx >= ids.size())
                throw LogError(fmt::format("{}: decoded row refers to raw line {} of a batch of {}",
                                           m_path, idx, ids.size()));
            return ids[idx];
        };
        auto& fix = statement(
            "INSERT INTO fixes(raw_id, source, sentence, time_utc_ns, time_of_day_s, lat_deg, "
            "lon_deg, altitude_m, quality, satellites, hdop, speed_mps, course_deg, valid) "
            "VALUES (?1,?2,?3,?4,?5,?6,?7,?8,?9,?10,?11,?12,?13,?14)");
        for (const auto& r : b.fixes) {
            fix.bind(1, rawId(r.raw_index)).bind(2, std::string_view(r.source))
                .bind(3, std::string_view(r.sentence)).bind(4, r.time_utc_ns)
                .bind(5, r.time_of_day_s).bind(6, r.lat_deg).bind(7, r.lon_deg)
                .bind(8, r.altitude_m).bind(9, r.quality).bind(10, r.satellites)
                .bind(11, r.hdop).bind(12, r.speed_mps).bind(13, r.course_deg)
                .bind(14, std::int64_t{r.valid ? 1 : 0});
            fix.run();
        }
        auto& hdg = statement(
            "INSERT INTO headings(raw_id, source, sentence, heading_deg, course_deg, speed_mps) "
            "VALUES (?1,?2,?3,?4,?5,?6)");
        for (const auto& r : b.headings) {
            hdg.bind(1, rawId(r.raw_index)).bind(2, std::string_view(r.source))
                .bind(3, std::string_view(r.sentence)).bind(4, r.heading_deg)
                .bind(5, r.course_deg).bind(6, r.speed_mps);
            hdg.run();
        }
        auto& dep = statement(
            "INSERT INTO depths(raw_id, source, sentence, depth_m, offset_m) VALUES (?1,?2,?3,?4,?5)");
        for (const auto& r : b.depths) {
            dep.bind(1, rawId(r.raw_index)).bind(2, std::string_view(r.source))
                .bind(3, std::string_view(r.sentence)).bind(4, r.depth_m).bind(5, r.offset_m);
            dep.run();
        }
        auto& mag = statement(
            "INSERT INTO mag_samples(raw_id, source, time_utc_ns, time_of_day_s, sensor, field_nT, "
            "signal_quality, depth_m, altitude_m) VALUES (?1,?2,?3,?4,?5,?6,?7,?8,?9)");
        for (const auto& r : b.mags) {
            mag.bind(1, rawId(r.raw_index)).bind(2, std::string_view(r.source))
                .bind(3, r.time_utc_ns).bind(4, r.time_of_day_s)
                .bind(5, std::int64_t{r.sensor}).bind(6, r.field_nT).bind(7, r.signal_quality)
                .bind(8, r.depth_m).bind(9, r.altitude_m);
            mag.run();
        }
        auto& aux = statement(
            "INSERT INTO aux(raw_id, source, kind, time_utc_ns, time_of_day_s, value) "
            "VALUES (?1,?2,?3,?4,?5,?6)");
        for (const auto& r : b.aux) {
            aux.bind(1, rawId(r.raw_index)).bind(2, std::string_view(r.source))
                .bind(3, std::string_view(r.kind)).bind(4, r.time_utc_ns)
                .bind(5, r.time_of_day_s).bind(6, r.value);
            aux.run();
        }
        auto& ev = statement(
            "INSERT INTO events(id, kind, source, start_utc_ns, end_utc_ns, value, detail, "
            "ack_utc_ns) VALUES (?1,?2,?3,?4,?5,?6,?7,?8)");
        for (const auto& r : b.events) {
            ev.bind(1, r.id).bind(2, std::string_view(r.kind)).bind(3, std::string_view(r.source))
                .bind(4, std::int64_t{r.start_utc_ns}).bind(5, r.end_utc_ns).bind(6, r.value)
                .bind(7, std::string_view(r.detail)).bind(8, r.ack_utc_ns);
            ev.run();
        }
        auto& end = statement(
            "UPDATE events SET end_utc_ns = ?2, value = coalesce(?3, value) WHERE id = ?1");
        for (const auto& r : b.event_ends) {
            end.bind(1, r.id).bind(2, std::int64_t{r.end_utc_ns}).bind(3, r.value);
            end.run();
        }
        auto& ack = statement("UPDATE events SET ack_utc_ns = ?2 WHERE id = ?1");
        for (const auto& r : b.event_acks) {
            ack.bind(1, r.id).bind(2, std::int64_t{r.ack_utc_ns});
            ack.run();
        }
        for (auto& e : b.extra) e->write(*this);
    }
    return first_id;
}

std::int64_t LogStore::rawCount() {
    Statement s(m_db, "SELECT count(*) FROM raw_lines", m_path);
    s.step();
    return s.columnInt(0);
}

std::optional<TimeNs> LogStore::lastRawUtc() {
    Statement s(m_db, "SELECT utc_ns FROM raw_lines ORDER BY id DESC LIMIT 1", m_path);
    if (!s.step()) return std::nullopt;
    return s.columnInt(0);
}

std::optional<std::pair<TimeNs, TimeNs>> LogStore::instrumentTimeSpan() {
    Statement s(m_db,
                "SELECT coalesce(min(t), 0), coalesce(max(t), 0), count(t) FROM (SELECT time_utc_ns AS t "
                "FROM mag_samples UNION ALL SELECT time_utc_ns FROM fixes) WHERE t IS NOT NULL",
                m_path);
    if (!s.step() || s.columnInt(2) == 0) return std::nullopt;
    return std::make_pair(static_cast<TimeNs>(s.columnInt(0)), static_cast<TimeNs>(s.columnInt(1)));
}

std::int64_t LogStore::forEachRaw(const std::function<bool(std::int64_t, const RawRow&)>& f,
                                  std::int64_t after_id) {
    Statement s(m_db,
                "SELECT id, source, mono_ns, utc_ns, bytes, flags, status, reason FROM raw_lines "
                "WHERE id > ?1 ORDER BY id",
                m_path);
    s.bind(1, after_id);
    std::int64_t last = after_id;
    RawRow r;
    while (s.step()) {
        last = s.columnInt(0);
        r.source = s.columnText(1);
        r.mono_ns = s.columnInt(2);
        r.utc_ns = s.columnInt(3);
        r.bytes = s.columnBlob(4);
        r.flags = static_cast<std::uint8_t>(s.columnInt(5));
        r.status = statusFromText(s.columnText(6));
        r.reason = s.columnText(7);
        if (!f(last, r)) break;
    }
    return last;
}

std::vector<EventRow> LogStore::events() {
    Statement s(m_db,
                "SELECT id, kind, source, start_utc_ns, end_utc_ns, value, detail, ack_utc_ns "
                "FROM events ORDER BY id",
                m_path);
    std::vector<EventRow> out;
    while (s.step()) {
        EventRow e;
        e.id = s.columnInt(0);
        e.kind = s.columnText(1);
        e.source = s.columnText(2);
        e.start_utc_ns = s.columnInt(3);
        if (!s.columnIsNull(4)) e.end_utc_ns = s.columnInt(4);
        if (!s.columnIsNull(5)) e.value = s.columnDouble(5);
        e.detail = s.columnText(6);
        if (!s.columnIsNull(7)) e.ack_utc_ns = s.columnInt(7);
        out.push_back(std::move(e));
    }
    return out;
}

}  // namespace sg::log
