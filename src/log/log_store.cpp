// SQLite survey log; see log_store.hpp and docs/log-schema.md.
#include "log/log_store.hpp"

#include <sqlite3.h>

#include <chrono>
#include <filesystem>
#include <span>

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

}  // namespace

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
    if (mode == OpenMode::ReadOnly) flags |= SQLITE_OPEN_READONLY;
    else flags |= SQLITE_OPEN_READWRITE | SQLITE_OPEN_CREATE;
    if (mode == OpenMode::ReadOnly && !std::filesystem::exists(path))
        throw LogError(fmt::format("{}: no such log file", path));
    if (sqlite3_open_v2(path.c_str(), &m_db, flags, nullptr) != SQLITE_OK) {
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
        if (mode == OpenMode::Create && existing) {
            Statement rows(m_db, "SELECT count(*) FROM raw_lines", m_path);
            if (rows.step() && rows.columnInt(0) > 0)
                throw LogError(fmt::format("{}: already holds a log; choose a new file", path));
        }
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
