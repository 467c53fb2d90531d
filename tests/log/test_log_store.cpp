// The SQLite survey log: exact bytes back in id order, decoded rows linked to their raw line,
// events ended in a later batch, meta and config text, extensions, and the writer thread.
// The outside reference is Debian's sqlite3 shell: it must read the file and find it intact.
#include <gtest/gtest.h>

#include <thread>

#include "../io/io_test_util.hpp"
#include "io/log_writer.hpp"
#include "log/log_reader.hpp"
#include "log/log_store.hpp"

namespace {

using namespace sg;
using sg::test::shell;
using sg::test::TempDir;

std::string hexOf(const std::string& s) {
    static const char* kHex = "0123456789ABCDEF";
    std::string out;
    for (unsigned char c : s) {
        out += kHex[c >> 4];
        out += kHex[c & 15];
    }
    return out;
}

std::vector<std::string> awkwardLines() {
    return {"$GPHDT,123.4,T*3B", "", std::string("a\0b\x01\xff", 5), std::string(10240, 'x'),
            "\xc2\xb0 degree sign", "$GPGGA,truncat"};
}

TEST(LogStore, RawBytesComeBackExactInIdOrder) {
    TempDir dir;
    const auto path = dir.file("a.sqlite");
    const auto lines = awkwardLines();
    {
        log::LogStore store(path, log::OpenMode::Create);
        log::Batch b;
        for (std::size_t i = 0; i < lines.size(); ++i)
            b.raw.push_back({"gnss", static_cast<TimeNs>(i), 1'700'000'000'000'000'000 + static_cast<TimeNs>(i),
                             lines[i], static_cast<std::uint8_t>(i % 3), log::DecodeStatus::Rejected,
                             i == 0 ? "" : "why"});
        EXPECT_EQ(store.write(b), 1);
    }
    log::LogReader reader(path);
    EXPECT_EQ(reader.schemaVersion(), log::kSchemaVersion);
    EXPECT_EQ(reader.rawCount(), static_cast<std::int64_t>(lines.size()));
    std::int64_t id = 0;
    log::RawRow r;
    for (std::size_t i = 0; i < lines.size(); ++i) {
        ASSERT_TRUE(reader.next(id, r));
        EXPECT_EQ(id, static_cast<std::int64_t>(i + 1));
        EXPECT_EQ(r.bytes, lines[i]) << i;
        EXPECT_EQ(r.flags, i % 3);
        EXPECT_EQ(r.mono_ns, static_cast<TimeNs>(i));
    }
    EXPECT_FALSE(reader.next(id, r));
    reader.seek(4);
    ASSERT_TRUE(reader.next(id, r));
    EXPECT_EQ(id, 5);

    // Outside reference: the sqlite3 shell sees the same bytes (hex) and an intact file.
    EXPECT_EQ(shell("sqlite3 " + path + " 'pragma integrity_check'"), "ok");
    EXPECT_EQ(shell("sqlite3 " + path + " 'select hex(bytes) from raw_lines where id = 3'"),
              hexOf(lines[2]));
    EXPECT_EQ(shell("sqlite3 " + path + " 'select length(bytes) from raw_lines where id = 4'"),
              "10240");
    EXPECT_EQ(shell("sqlite3 " + path + " \"select typeof(bytes) from raw_lines where id = 2\""),
              "blob");  // an empty line is an empty BLOB, not NULL
    EXPECT_EQ(shell("sqlite3 " + path + " 'pragma journal_mode'"), "wal");
}

TEST(LogStore, DecodedRowsPointAtTheirRawLine) {
    TempDir dir;
    log::LogStore store(dir.file("b.sqlite"), log::OpenMode::Create);
    for (int round = 0; round < 2; ++round) {
        log::Batch b;
        b.raw.push_back({"gnss", 1, 1, "$GPGGA...", 0, log::DecodeStatus::Ok, ""});
        b.raw.push_back({"mag", 2, 2, "SGM...", 0, log::DecodeStatus::Ok, ""});
        log::FixRow f;
        f.raw_index = 0;
        f.source = "gnss";
        f.sentence = "GGA";
        f.lat_deg = 52.0 + round;
        f.lon_deg = 4.5;
        b.fixes.push_back(f);
        log::MagRow m;
        m.raw_index = 1;
        m.source = "mag";
        m.field_nT = 48000.0 + round;
        b.mags.push_back(m);
        log::Batch outer;
        outer.raw.push_back({"x", 0, 0, "first", 0, log::DecodeStatus::NotDecoded, ""});
        outer.append(std::move(b));  // indices shift by one
        store.write(outer);
    }
    const auto q = shell("sqlite3 " + store.path() +
                         " 'select r.source || \"=\" || f.lat_deg from fixes f join raw_lines r "
                         "on r.id = f.raw_id order by f.raw_id'");
    EXPECT_EQ(q, "gnss=52.0\ngnss=53.0");
    const auto m = shell("sqlite3 " + store.path() +
                         " 'select r.id || \":\" || m.field_nT from mag_samples m join raw_lines r "
                         "on r.id = m.raw_id'");
    EXPECT_EQ(m, "3:48000.0\n6:48001.0");
}

TEST(LogStore, EventsEndInALaterBatchAndMetaHoldsTheConfig) {
    TempDir dir;
    const auto path = dir.file("c.sqlite");
    {
        log::LogStore store(path, log::OpenMode::Create);
        store.setMeta("config_text", "[[input]]\nname = \"gnss\"\n");
        const auto id = store.nextEventId();
        EXPECT_EQ(id, 1);
        log::Batch b;
        b.events.push_back({id, "outage", "gnss", 100, {}, {}, "peer closed", {}});
        store.write(b);
        EXPECT_EQ(store.nextEventId(), 2);
        log::Batch c;
        c.event_ends.push_back({id, 300, 2.0e-7});
        c.event_acks.push_back({id, 400});
        store.write(c);
    }
    log::LogReader r(path);
    EXPECT_EQ(r.configText().value_or(""), "[[input]]\nname = \"gnss\"\n");
    const auto ev = r.events();
    ASSERT_EQ(ev.size(), 1u);
    EXPECT_EQ(ev[0].start_utc_ns, 100);
    EXPECT_EQ(ev[0].end_utc_ns.value_or(0), 300);
    EXPECT_EQ(ev[0].ack_utc_ns.value_or(0), 400);
    EXPECT_EQ(ev[0].detail, "peer closed");
}

TEST(LogStore, RefusesToOverwriteALogAndNamesAMissingFile) {
    TempDir dir;
    const auto path = dir.file("d.sqlite");
    {
        log::LogStore s(path, log::OpenMode::Create);
        log::Batch b;
        b.raw.push_back({"a", 0, 0, "x", 0, log::DecodeStatus::Ok, ""});
        s.write(b);
    }
    try {
        log::LogStore again(path, log::OpenMode::Create);
        FAIL() << "created over an existing log";
    } catch (const log::LogError& e) {
        EXPECT_NE(std::string(e.what()).find(path), std::string::npos);
    }
    try {
        log::LogReader r(dir.file("missing.sqlite"));
        FAIL();
    } catch (const log::LogError& e) {
        EXPECT_NE(std::string(e.what()).find("missing.sqlite"), std::string::npos);
    }
}

// An extension table, as the engine will add for alarms or line runs.
struct NoteRows final : log::RowSet {
    std::vector<std::string> notes;
    void write(log::LogStore& store) override {
        auto& s = store.statement("INSERT INTO notes(text) VALUES (?1)");
        for (const auto& n : notes) {
            s.bind(1, std::string_view(n));
            s.run();
        }
    }
};

TEST(LogStore, ExtensionsAddTablesAndRows) {
    TempDir dir;
    log::LogStore store(dir.file("e.sqlite"), log::OpenMode::Create);
    store.addExtension("notes", "CREATE TABLE IF NOT EXISTS notes(id INTEGER PRIMARY KEY, text TEXT)");
    log::Batch b;
    auto rows = std::make_unique<NoteRows>();
    rows->notes = {"one", "two"};
    b.extra.push_back(std::move(rows));
    store.write(b);
    EXPECT_EQ(shell("sqlite3 " + store.path() + " 'select group_concat(text) from notes'"), "one,two");
    EXPECT_EQ(store.meta("extension.notes").value_or(""), "1");
}

TEST(LogWriter, CommitsWithinTheIntervalWithoutStopping) {
    TempDir dir;
    const auto path = dir.file("w.sqlite");
    io::LogWriter w(path, {200, false}, {{"config_text", "x = 1"}});
    for (int i = 0; i < 50; ++i) {
        log::Batch b;
        for (int k = 0; k < 100; ++k)
            b.raw.push_back({"s", i, i, "line " + std::to_string(i * 100 + k), 0,
                             log::DecodeStatus::Ok, ""});
        w.post(std::move(b));
    }
    // Another connection (the sqlite3 shell) sees the rows once a commit has happened, long
    // before stop(). Poll rather than sleep a fixed time.
    std::string n;
    for (int i = 0; i < 300 && n != "5000"; ++i) {
        std::this_thread::sleep_for(std::chrono::milliseconds(10));
        n = shell("sqlite3 " + path + " 'select count(*) from raw_lines'");
    }
    EXPECT_EQ(n, "5000");
    w.stop();
    EXPECT_EQ(w.stats().raw_committed, 5000u);
    EXPECT_EQ(w.stats().queued_rows, 0u);
    EXPECT_EQ(shell("sqlite3 " + path + " \"select value from meta where key='config_text'\""), "x = 1");
    EXPECT_EQ(shell("sqlite3 " + path + " 'select bytes from raw_lines order by id desc limit 1'"),
              "line 4999");
}

}  // namespace
