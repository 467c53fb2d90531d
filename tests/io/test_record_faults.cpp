// Faults tried on the real `swathguard record` (and read commands), over loopback only
// (127.0.0.1): a UDP burst the kernel cannot queue (drops counted exactly, alarmed), two
// recorders on one port, two recorders on one log, a foreign SQLite database, an earlier
// session's log, a log on read-only media, a disk that fills up (tmpfs) and comes back, and a TCP
// source that is away for 10 s. Errors go to stderr, status lines to stdout. The outside judge
// of every log is Debian's sqlite3 shell.
#include <gtest/gtest.h>

#include <fcntl.h>
#include <pty.h>
#include <signal.h>
#include <spawn.h>
#include <sys/mount.h>
#include <sys/wait.h>
#include <unistd.h>

#include <fstream>
#include <sstream>
#include <thread>

#include <boost/asio/ip/tcp.hpp>
#include <boost/asio/ip/udp.hpp>
#include <boost/asio/write.hpp>

#include "../port_block.hpp"
#include "io_test_util.hpp"

extern char** environ;

namespace {

using namespace sg;
using sg::test::shell;
using sg::test::TempDir;
using Clock = std::chrono::steady_clock;
namespace asio = boost::asio;

std::string readFile(const std::string& p) {
    std::ifstream in(p, std::ios::binary);
    std::stringstream ss;
    ss << in.rdbuf();
    return ss.str();
}

// One run of the real binary, stdout and stderr to files.
class Proc {
public:
    Proc(const std::vector<std::string>& args, const std::string& out, const std::string& err)
        : m_out(out), m_err(err) {
        const std::string bin = std::string(SG_BINARY_DIR) + "/app/swathguard";
        std::vector<char*> argv;
        argv.push_back(const_cast<char*>(bin.c_str()));
        for (const auto& a : args) argv.push_back(const_cast<char*>(a.c_str()));
        argv.push_back(nullptr);
        posix_spawn_file_actions_t fa;
        posix_spawn_file_actions_init(&fa);
        posix_spawn_file_actions_addopen(&fa, 1, out.c_str(), O_WRONLY | O_CREAT | O_TRUNC, 0644);
        posix_spawn_file_actions_addopen(&fa, 2, err.c_str(), O_WRONLY | O_CREAT | O_TRUNC, 0644);
        if (posix_spawn(&m_pid, bin.c_str(), &fa, nullptr, argv.data(), environ) != 0) m_pid = -1;
        posix_spawn_file_actions_destroy(&fa);
    }
    ~Proc() {
        if (m_pid > 0 && !m_done) {
            ::kill(m_pid, SIGKILL);
            ::waitpid(m_pid, nullptr, 0);
        }
    }
    pid_t pid() const { return m_pid; }
    // Exit code, or -1 if still running after `timeout`.
    int wait(std::chrono::milliseconds timeout) {
        const auto end = Clock::now() + timeout;
        while (!m_done) {
            int st = 0;
            const pid_t r = ::waitpid(m_pid, &st, WNOHANG);
            if (r == m_pid) {
                m_done = true;
                m_code = WIFEXITED(st) ? WEXITSTATUS(st) : 128 + WTERMSIG(st);
                break;
            }
            if (Clock::now() > end) return -1;
            std::this_thread::sleep_for(std::chrono::milliseconds(10));
        }
        return m_code;
    }
    int interrupt(std::chrono::milliseconds timeout = std::chrono::seconds(15)) {
        ::kill(m_pid, SIGINT);
        return wait(timeout);
    }
    std::string out() const { return readFile(m_out); }
    std::string err() const { return readFile(m_err); }
    // Waits until stdout holds `text` (e.g. the first status line).
    bool waitForOut(const std::string& text, std::chrono::milliseconds timeout) {
        const auto end = Clock::now() + timeout;
        while (Clock::now() < end) {
            if (out().find(text) != std::string::npos) return true;
            std::this_thread::sleep_for(std::chrono::milliseconds(20));
        }
        return false;
    }

private:
    std::string m_out, m_err;
    pid_t m_pid = -1;
    bool m_done = false;
    int m_code = -1;
};

std::uint16_t freePort(bool udp) {
    asio::io_context io;
    if (udp) {
        asio::ip::udp::socket s(io, {asio::ip::make_address("127.0.0.1"), 0});
        return s.local_endpoint().port();
    }
    // Below the ephemeral range (32768..60999 on Linux): a client retrying a port in that range
    // can be handed the same port as its own and connect to itself (TCP simultaneous open). From
    // this process's locked block, so no parallel test process draws the same port.
    static const sg::testdata::PortBlock block(8);
    static int next = 0;
    return static_cast<std::uint16_t>(block.base() + next++ % 8);
}

// A record config with one NMEA input; the core needs a field and a target class.
std::string writeConfig(const TempDir& dir, const std::string& input_keys,
                        const std::string& log_keys = "") {
    const auto cfg = dir.file("survey.toml");
    std::ofstream c(cfg);
    c << "[[input]]\nname = \"gnss\"\nkind = \"nmea\"\nrole = \"gnss\"\n" << input_keys
      << "\n[log]\ncommit_interval_ms = 200\n" << log_keys
      << "\n[geomagnetic]\ninclination_deg = 66.0\nintensity_nT = 50000.0\n"
      << "[[target]]\nname = \"t\"\nmodel = \"mass_rule\"\nmass_kg = 50.0\n";
    return cfg;
}

std::string sql(const std::string& log, const std::string& query) {
    return shell("sqlite3 '" + log + "' \"" + query + "\"");
}

// The same on a log on read-only media (URI filename, immutable: no -shm needed).
std::string sqlImmutable(const std::string& log, const std::string& query) {
    return shell("sqlite3 'file:" + log + "?immutable=1' \"" + query + "\"");
}

// A tmpfs of `size` mounted on `dir` (we are root in CI); empty if mounting is not permitted.
class Tmpfs {
public:
    Tmpfs(const std::filesystem::path& dir, const std::string& size) : m_dir(dir) {
        std::filesystem::create_directories(dir);
        m_ok = ::mount("tmpfs", dir.c_str(), "tmpfs", 0, ("size=" + size).c_str()) == 0;
        if (!m_ok) m_error = std::strerror(errno);
    }
    ~Tmpfs() {
        if (m_ok) ::umount2(m_dir.c_str(), MNT_DETACH);
    }
    bool ok() const { return m_ok; }
    const std::string& error() const { return m_error; }
    bool remountReadOnly() {
        return ::mount("tmpfs", m_dir.c_str(), "tmpfs", MS_REMOUNT | MS_RDONLY, nullptr) == 0;
    }

private:
    std::filesystem::path m_dir;
    bool m_ok = false;
    std::string m_error;
};

// Fills the filesystem of `path` to the last byte with one file; returns its size.
std::uint64_t fill(const std::string& path) {
    const int fd = ::open(path.c_str(), O_WRONLY | O_CREAT | O_TRUNC, 0644);
    std::vector<char> block(65536, 'F');
    std::uint64_t n = 0;
    for (std::size_t chunk = block.size(); chunk > 0;) {
        const ssize_t w = ::write(fd, block.data(), chunk);
        if (w > 0) n += static_cast<std::uint64_t>(w);
        else chunk /= 2;
    }
    ::close(fd);
    return n;
}

TEST(RecordFaults, UdpBurstDropsAreCountedExactlyAndRaiseTheAlarm) {
    TempDir dir;
    const auto port = freePort(true);
    // A small receive buffer so that a burst overflows it on any machine.
    const auto cfg = writeConfig(dir, "transport = \"udp\"\nlisten = \"127.0.0.1:" +
                                          std::to_string(port) + "\"\nreceive_buffer_bytes = 4096\n");
    const auto logp = dir.file("burst.sqlite");
    Proc rec({"record", "--config", cfg, "--log", logp, "--headless"}, dir.file("out"), dir.file("err"));
    ASSERT_TRUE(rec.waitForOut(" err", std::chrono::seconds(10))) << rec.err();
    asio::io_context io;
    asio::ip::udp::socket out(io, asio::ip::udp::v4());
    const asio::ip::udp::endpoint to(asio::ip::make_address("127.0.0.1"), port);
    // 20,000 datagrams as fast as the loop goes (bounded in count and time), then a few slowly
    // so the counter's last value reaches the reader.
    constexpr int kBurst = 20000, kSlow = 20;
    for (int i = 0; i < kBurst; ++i) out.send_to(asio::buffer(test::gga(i * 0.01) + "\r\n"), to);
    for (int i = 0; i < kSlow; ++i) {
        std::this_thread::sleep_for(std::chrono::milliseconds(20));
        out.send_to(asio::buffer(test::gga(300.0 + i) + "\r\n"), to);
    }
    std::this_thread::sleep_for(std::chrono::milliseconds(1500));
    EXPECT_EQ(rec.interrupt(), 0) << rec.err();
    const long logged = std::stol(sql(logp, "select count(*) from raw_lines"));
    const long dropped = std::stol(sql(logp, "select coalesce(sum(value), 0) from events where kind = 'input_drops'"));
    EXPECT_GT(dropped, 0) << "the burst should overflow a 4 KiB buffer";
    EXPECT_EQ(logged + dropped, kBurst + kSlow) << "every datagram is either logged or counted";
    std::printf("%ld logged + %ld dropped = %d sent\n", logged, dropped, kBurst + kSlow);
    // The alarm went through the check set into the log, and the operator saw it.
    EXPECT_EQ(sql(logp, "select count(*) from events where kind = 'alarm.input_drops'"), "1");
    EXPECT_NE(rec.out().find("DROPPED"), std::string::npos);
    EXPECT_NE(rec.err().find(std::to_string(dropped) + " datagrams dropped by the kernel"),
              std::string::npos)
        << rec.err();
}

TEST(RecordFaults, ASecondRecorderOnTheSameUdpPortFailsAndTheFirstKeepsTheStream) {
    TempDir dir;
    const auto port = freePort(true);
    const auto cfg = writeConfig(dir, "transport = \"udp\"\nlisten = \"127.0.0.1:" +
                                          std::to_string(port) + "\"\n");
    const auto log1 = dir.file("first.sqlite"), log2 = dir.file("second.sqlite");
    Proc first({"record", "--config", cfg, "--log", log1, "--headless"}, dir.file("o1"), dir.file("e1"));
    ASSERT_TRUE(first.waitForOut(" err", std::chrono::seconds(10))) << first.err();
    Proc second({"record", "--config", cfg, "--log", log2, "--headless"}, dir.file("o2"), dir.file("e2"));
    EXPECT_NE(second.wait(std::chrono::seconds(10)), 0);
    EXPECT_NE(second.err().find("port in use"), std::string::npos) << second.err();
    EXPECT_EQ(second.out().find("port in use"), std::string::npos) << "errors go to stderr";
    EXPECT_FALSE(std::filesystem::exists(log2)) << "no log is left behind";
    asio::io_context io;
    asio::ip::udp::socket out(io, asio::ip::udp::v4());
    for (int i = 0; i < 50; ++i) {
        out.send_to(asio::buffer(test::gga(i) + "\r\n"),
                    asio::ip::udp::endpoint(asio::ip::make_address("127.0.0.1"), port));
        std::this_thread::sleep_for(std::chrono::milliseconds(2));
    }
    std::this_thread::sleep_for(std::chrono::milliseconds(800));
    EXPECT_EQ(first.interrupt(), 0);
    EXPECT_EQ(sql(log1, "select count(*) from raw_lines"), "50");
}

// A pseudo-terminal pair (openpty(3)) held by the test: the slave is the "device".
struct PtyPair {
    int master = -1, slave = -1;
    std::string device;
    PtyPair() {
        char name[256] = {};
        if (::openpty(&master, &slave, name, nullptr, nullptr) == 0) device = name;
    }
    ~PtyPair() {
        if (master >= 0) ::close(master);
        if (slave >= 0) ::close(slave);
    }
};

TEST(RecordFaults, ASecondRecorderOnTheSameSerialDeviceIsRefusedNamingTheDevice) {
    TempDir dir;
    PtyPair pty;
    ASSERT_FALSE(pty.device.empty()) << "openpty failed";
    const auto cfg = writeConfig(dir, "transport = \"serial\"\ndevice = \"" + pty.device +
                                          "\"\nbaud = 115200\n");
    const auto log1 = dir.file("first.sqlite"), log2 = dir.file("second.sqlite");
    Proc first({"record", "--config", cfg, "--log", log1, "--headless"}, dir.file("o1"), dir.file("e1"));
    ASSERT_TRUE(first.waitForOut(" err", std::chrono::seconds(10))) << first.err();
    // The first recorder holds the device (flock + TIOCEXCL) before its first status line.
    Proc second({"record", "--config", cfg, "--log", log2, "--headless"}, dir.file("o2"), dir.file("e2"));
    EXPECT_EQ(second.wait(std::chrono::seconds(10)), 1);
    EXPECT_NE(second.err().find("serial device " + pty.device + " is held by another process"),
              std::string::npos)
        << second.err();
    EXPECT_FALSE(std::filesystem::exists(log2)) << "no log is left behind";
    // The first one keeps reading the device.
    std::string text;
    for (int i = 0; i < 50; ++i) text += test::gga(i) + "\r\n";
    ASSERT_EQ(::write(pty.master, text.data(), text.size()), static_cast<ssize_t>(text.size()));
    std::this_thread::sleep_for(std::chrono::milliseconds(800));
    EXPECT_EQ(first.interrupt(), 0) << first.err();
    EXPECT_EQ(sql(log1, "select count(*) from raw_lines"), "50");
}

TEST(RecordFaults, ASecondRecorderOnTheSameLogFailsNamingTheFirst) {
    TempDir dir;
    const auto data = dir.file("gnss.txt");
    { std::ofstream(data) << test::gga(1) << "\r\n"; }
    const auto cfg = writeConfig(dir, "transport = \"file\"\npath = \"" + data + "\"\nfollow = true\n");
    const auto logp = dir.file("shared.sqlite");
    Proc first({"record", "--config", cfg, "--log", logp, "--headless"}, dir.file("o1"), dir.file("e1"));
    ASSERT_TRUE(first.waitForOut(" err", std::chrono::seconds(10))) << first.err();
    Proc second({"record", "--config", cfg, "--log", logp, "--headless"}, dir.file("o2"), dir.file("e2"));
    EXPECT_NE(second.wait(std::chrono::seconds(10)), 0);
    EXPECT_NE(second.err().find("another process is writing this log"), std::string::npos) << second.err();
    EXPECT_NE(second.err().find("pid " + std::to_string(first.pid())), std::string::npos) << second.err();
    { std::ofstream(data, std::ios::app) << test::gga(2) << "\r\n"; }
    std::this_thread::sleep_for(std::chrono::milliseconds(800));
    EXPECT_EQ(first.interrupt(), 0);
    EXPECT_EQ(sql(logp, "pragma integrity_check"), "ok");
    EXPECT_EQ(sql(logp, "select count(*) from raw_lines"), "2");
}

TEST(RecordFaults, AForeignDatabaseAndAnEarlierSessionsLogAreRefusedUntouched) {
    TempDir dir;
    const auto data = dir.file("gnss.txt");
    { std::ofstream(data) << test::gga(1) << "\r\n"; }
    const auto cfg = writeConfig(dir, "transport = \"file\"\npath = \"" + data + "\"\n");
    const auto foreign = dir.file("inventory.db");
    shell("sqlite3 " + foreign + " 'create table items(name text); insert into items values (\"x\")'");
    const auto md5 = shell("md5sum < " + foreign);
    Proc a({"record", "--config", cfg, "--log", foreign, "--headless"}, dir.file("oa"), dir.file("ea"));
    EXPECT_NE(a.wait(std::chrono::seconds(10)), 0);
    EXPECT_NE(a.err().find("not a swathguard log"), std::string::npos) << a.err();
    EXPECT_EQ(shell("md5sum < " + foreign), md5);
    EXPECT_EQ(sql(foreign, "pragma journal_mode"), "delete");

    // An earlier session that logged nothing (its input was empty) still owns its file.
    const auto empty_data = dir.file("empty.txt");
    { std::ofstream touch(empty_data); }
    const auto cfg2 = writeConfig(dir, "transport = \"file\"\npath = \"" + empty_data + "\"\n");
    const auto old = dir.file("old.sqlite");
    Proc b({"record", "--config", cfg2, "--log", old, "--headless"}, dir.file("ob"), dir.file("eb"));
    EXPECT_EQ(b.wait(std::chrono::seconds(10)), 0) << b.err();
    ASSERT_EQ(sql(old, "select count(*) from raw_lines"), "0");
    Proc c({"record", "--config", cfg, "--log", old, "--headless"}, dir.file("oc"), dir.file("ec"));
    EXPECT_NE(c.wait(std::chrono::seconds(10)), 0);
    EXPECT_NE(c.err().find("already holds the log of a session created"), std::string::npos) << c.err();
    EXPECT_EQ(sql(old, "select count(*) from raw_lines"), "0");
}

TEST(RecordFaults, ReadCommandsWorkOnALogOnReadOnlyMedia) {
    TempDir dir;
    Tmpfs media(dir.path() / "media", "8m");
    if (!media.ok()) GTEST_SKIP() << "cannot mount a tmpfs here (" << media.error() << "): needs root";
    const auto data = dir.file("gnss.txt");
    {
        std::ofstream d(data);
        for (int i = 0; i < 100; ++i) d << test::gga(i) << "\r\n";
    }
    const auto cfg = writeConfig(dir, "transport = \"file\"\npath = \"" + data + "\"\n");
    const auto logp = (dir.path() / "media" / "day1.sqlite").string();
    Proc rec({"record", "--config", cfg, "--log", logp, "--headless"}, dir.file("o"), dir.file("e"));
    ASSERT_EQ(rec.wait(std::chrono::seconds(20)), 0) << rec.err();
    ASSERT_TRUE(media.remountReadOnly()) << std::strerror(errno);
    ASSERT_NE(::access(logp.c_str(), W_OK), 0) << "the media should be read-only now";
    Proc replay({"replay", logp, "--speed", "max", "--headless"}, dir.file("or"), dir.file("er"));
    EXPECT_EQ(replay.wait(std::chrono::seconds(20)), 0) << replay.err();
    EXPECT_NE(replay.out().find("100 lines"), std::string::npos) << replay.out();
    EXPECT_EQ(sqlImmutable(logp, "select count(*) from raw_lines"), "100");
}

TEST(RecordFaults, AFullDiskResumesAsSoonAsSpaceReturnsWithNothingLost) {
    TempDir dir;
    Tmpfs disk(dir.path() / "disk", "6m");
    if (!disk.ok()) GTEST_SKIP() << "cannot mount a tmpfs here (" << disk.error() << "): needs root";
    const auto data = dir.file("gnss.txt");
    { std::ofstream touch(data); }
    const auto cfg = writeConfig(dir, "transport = \"file\"\npath = \"" + data + "\"\nfollow = true\n");
    const auto logp = (dir.path() / "disk" / "full.sqlite").string();
    Proc rec({"record", "--config", cfg, "--log", logp, "--headless"}, dir.file("o"), dir.file("e"));
    ASSERT_TRUE(rec.waitForOut(" err", std::chrono::seconds(10))) << rec.err();
    const auto filler = (dir.path() / "disk" / "filler").string();
    const auto filled = fill(filler);
    ASSERT_GT(filled, 0u);
    constexpr int kFull = 4000, kAfter = 500;
    {
        std::ofstream d(data, std::ios::app);
        for (int i = 0; i < kFull; ++i) d << test::gga(i * 0.1) << "\r\n";
    }
    ASSERT_TRUE(rec.waitForOut("LOG ERROR", std::chrono::seconds(10))) << rec.out();
    // Part of the space comes back (less than the whole backlog would need at once in the WAL
    // and the database together is not guaranteed, so the writer must go on in chunks).
    ASSERT_EQ(::truncate(filler.c_str(), static_cast<off_t>(filled / 2)), 0);
    const auto freed = Clock::now();
    std::string n;
    while (Clock::now() - freed < std::chrono::seconds(10) && n != std::to_string(kFull)) {
        std::this_thread::sleep_for(std::chrono::milliseconds(50));
        n = sql(logp, "select count(*) from raw_lines");
    }
    const double resumed_s = std::chrono::duration<double>(Clock::now() - freed).count();
    std::printf("backlog of %d lines written %.2f s after space returned\n", kFull, resumed_s);
    EXPECT_EQ(n, std::to_string(kFull));
    EXPECT_LT(resumed_s, 3.0) << "the backlog is written within a few commit intervals";
    {
        std::ofstream d(data, std::ios::app);
        for (int i = 0; i < kAfter; ++i) d << test::gga(1000 + i * 0.1) << "\r\n";
    }
    std::this_thread::sleep_for(std::chrono::milliseconds(1000));
    EXPECT_EQ(rec.interrupt(), 0) << rec.err();
    EXPECT_NE(rec.err().find("disk is full"), std::string::npos) << rec.err();
    EXPECT_EQ(sql(logp, "pragma integrity_check"), "ok");
    EXPECT_EQ(sql(logp, "select count(*) from raw_lines"), std::to_string(kFull + kAfter));
    EXPECT_EQ(rec.err().find("NOT logged"), std::string::npos) << rec.err();
}

TEST(RecordFaults, StoppingWhileTheDiskIsFullReportsTheLostLinesExactly) {
    TempDir dir;
    Tmpfs disk(dir.path() / "disk", "4m");
    if (!disk.ok()) GTEST_SKIP() << "cannot mount a tmpfs here (" << disk.error() << "): needs root";
    const auto data = dir.file("gnss.txt");
    { std::ofstream touch(data); }
    const auto cfg = writeConfig(dir, "transport = \"file\"\npath = \"" + data + "\"\nfollow = true\n",
                                 "queue_limit_mb = 1\nstop_timeout_s = 1\n");
    const auto logp = (dir.path() / "disk" / "full.sqlite").string();
    Proc rec({"record", "--config", cfg, "--log", logp, "--headless"}, dir.file("o"), dir.file("e"));
    ASSERT_TRUE(rec.waitForOut(" err", std::chrono::seconds(10))) << rec.err();
    constexpr int kBefore = 200, kFull = 30000;
    {
        std::ofstream d(data, std::ios::app);
        for (int i = 0; i < kBefore; ++i) d << test::gga(i * 0.1) << "\r\n";
    }
    for (int i = 0; i < 100 && sql(logp, "select count(*) from raw_lines") != std::to_string(kBefore); ++i)
        std::this_thread::sleep_for(std::chrono::milliseconds(50));
    ASSERT_GT(fill((dir.path() / "disk" / "filler").string()), 0u);
    {
        std::ofstream d(data, std::ios::app);
        for (int i = 0; i < kFull; ++i) d << test::gga(100 + i * 0.01) << "\r\n";
    }
    ASSERT_TRUE(rec.waitForOut("LOST", std::chrono::seconds(10))) << rec.out();
    std::this_thread::sleep_for(std::chrono::seconds(2));  // the rest of the file is read
    const auto t0 = Clock::now();
    const int code = rec.interrupt();
    // stop_timeout_s = 1, plus up to 1 s for a write under way.
    EXPECT_LT(std::chrono::duration<double>(Clock::now() - t0).count(), 4.0) << "bounded stop";
    EXPECT_EQ(code, 2) << "lines were lost: not a clean exit";
    const long logged = std::stol(sql(logp, "select count(*) from raw_lines"));
    const auto err = rec.err();
    const auto at = err.find(" lines NOT logged");
    ASSERT_NE(at, std::string::npos) << err;
    const auto line_start = err.rfind("record: ", at);
    long lost = 0, received = 0;
    ASSERT_EQ(std::sscanf(err.c_str() + line_start, "record: %ld of %ld", &lost, &received), 2) << err;
    EXPECT_EQ(received, kBefore + kFull) << "every line of the file was received";
    EXPECT_GT(lost, 0);
    EXPECT_EQ(logged + lost, received) << "the count of lost lines is exact";
    std::printf("%ld logged + %ld reported lost = %ld received\n", logged, lost, received);
}

// Issue #14: the space that returns is enough for a chunk but far less than the backlog needs as
// one transaction (8,000 lines: between 1 and 1.5 MB on this tmpfs, measured with the old
// writer, docs/faults.md; 256 KB come back). A writer that retries the whole backlog at once never
// commits again; the chunked writer logs the oldest lines that fit within a second, then counts
// the rest exactly when stopped. Judge: the sqlite3 shell (what the log holds, in order).
TEST(RecordFaults, SpaceForAChunkButNotTheWholeBacklogResumesLoggingAndCountsTheRestExactly) {
    TempDir dir;
    Tmpfs disk(dir.path() / "disk", "4m");
    if (!disk.ok()) GTEST_SKIP() << "cannot mount a tmpfs here (" << disk.error() << "): needs root";
    const auto data = dir.file("gnss.txt");
    { std::ofstream touch(data); }
    const auto cfg = writeConfig(dir, "transport = \"file\"\npath = \"" + data + "\"\nfollow = true\n",
                                 "stop_timeout_s = 1\n");
    const auto logp = (dir.path() / "disk" / "chunk.sqlite").string();
    Proc rec({"record", "--config", cfg, "--log", logp, "--headless"}, dir.file("o"), dir.file("e"));
    ASSERT_TRUE(rec.waitForOut(" err", std::chrono::seconds(10))) << rec.err();
    constexpr int kBefore = 200, kFull = 8000, kBlock = 500;
    constexpr off_t kFreed = 256 * 1024;
    std::vector<std::string> sent;
    auto append = [&](int from, int count) {
        std::ofstream d(data, std::ios::app);
        for (int i = from; i < from + count; ++i) {
            sent.push_back(test::gga(i * 0.1));
            d << sent.back() << "\r\n";
        }
    };
    append(0, kBefore);
    for (int i = 0; i < 100 && sql(logp, "select count(*) from raw_lines") != std::to_string(kBefore); ++i)
        std::this_thread::sleep_for(std::chrono::milliseconds(50));
    ASSERT_EQ(sql(logp, "select count(*) from raw_lines"), std::to_string(kBefore));
    const auto filler = (dir.path() / "disk" / "filler").string();
    const auto filled = fill(filler);
    ASSERT_GT(filled, static_cast<std::uint64_t>(kFreed));
    // Live-like: blocks arrive over 0.8 s while the disk is full (many batches in the backlog).
    for (int b = 0; b < kFull / kBlock; ++b) {
        append(kBefore + b * kBlock, kBlock);
        std::this_thread::sleep_for(std::chrono::milliseconds(50));
    }
    ASSERT_TRUE(rec.waitForOut("LOG ERROR", std::chrono::seconds(10))) << rec.out();
    std::this_thread::sleep_for(std::chrono::seconds(1));  // every line read; retries failing
    ASSERT_EQ(sql(logp, "select count(*) from raw_lines"), std::to_string(kBefore));
    ASSERT_EQ(::truncate(filler.c_str(), static_cast<off_t>(filled) - kFreed), 0);
    const auto freed = Clock::now();
    long logged = kBefore;
    while (Clock::now() - freed < std::chrono::seconds(5) && logged == kBefore) {
        std::this_thread::sleep_for(std::chrono::milliseconds(50));
        logged = std::stol(sql(logp, "select count(*) from raw_lines"));
    }
    const double resumed_s = std::chrono::duration<double>(Clock::now() - freed).count();
    ASSERT_GT(logged, kBefore) << "no line of the backlog was logged 5 s after " << kFreed
                               << " bytes came back: the writer does not go on in chunks";
    EXPECT_LT(resumed_s, 2.0) << "logging resumes within a few commit intervals";
    std::this_thread::sleep_for(std::chrono::seconds(2));  // as much as fits is written
    const int code = rec.interrupt();
    logged = std::stol(sql(logp, "select count(*) from raw_lines"));
    const auto err = rec.err();
    const auto at = err.find(" lines NOT logged");
    ASSERT_NE(at, std::string::npos) << "the backlog cannot fit in 256 KB: lines must be reported lost\n"
                                     << err;
    long lost = 0, received = 0;
    ASSERT_EQ(std::sscanf(err.c_str() + err.rfind("record: ", at), "record: %ld of %ld", &lost, &received), 2)
        << err;
    EXPECT_EQ(code, 2) << "lines were lost: not a clean exit";
    EXPECT_EQ(received, kBefore + kFull) << "every line of the file was received";
    EXPECT_EQ(logged + lost, received) << "the count of lost lines is exact";
    EXPECT_EQ(sql(logp, "pragma integrity_check"), "ok");
    // The log holds the oldest lines, in the order sent, with no hole.
    std::istringstream rows(sql(logp, "select cast(bytes as text) from raw_lines order by id"));
    std::string row;
    std::size_t k = 0, mismatches = 0;
    while (std::getline(rows, row)) {
        while (!row.empty() && (row.back() == '\r' || row.back() == '\n')) row.pop_back();
        if (k >= sent.size() || row != sent[k]) ++mismatches;
        ++k;
    }
    EXPECT_EQ(k, static_cast<std::size_t>(logged));
    EXPECT_EQ(mismatches, 0u) << "the logged lines are the first ones sent, in order";
    std::printf("%ld KB freed: backlog resumed %.2f s after; %ld logged (%ld of the %d backlog lines) + "
                "%ld reported lost = %ld received\n",
                static_cast<long>(kFreed / 1024), resumed_s, logged, logged - kBefore, kFull, lost, received);
}

TEST(RecordFaults, ATcpSourceBackAfterTenSecondsIsReadWithinASecond) {
    TempDir dir;
    const auto port = freePort(false);
    const auto cfg = writeConfig(dir, "transport = \"tcp\"\nconnect = \"127.0.0.1:" +
                                          std::to_string(port) + "\"\n");
    const auto logp = dir.file("tcp.sqlite");
    asio::io_context io;
    const asio::ip::tcp::endpoint ep(asio::ip::make_address("127.0.0.1"), port);
    auto listen = [&] {
        auto a = std::make_unique<asio::ip::tcp::acceptor>(io);
        a->open(ep.protocol());
        a->set_option(asio::socket_base::reuse_address(true));
        boost::system::error_code ec;
        a->bind(ep, ec);
        if (ec) ADD_FAILURE() << ec.message() << "\n" << shell("ss -tanp | grep :" + std::to_string(port));
        a->listen();
        return a;
    };
    // Accepts one connection within `timeout` (never blocks the test for good).
    auto accept = [&](asio::ip::tcp::acceptor& a, asio::ip::tcp::socket& s) {
        bool done = false;
        a.async_accept(s, [&](const boost::system::error_code& ec) { done = !ec; });
        io.restart();
        io.run_for(std::chrono::seconds(5));
        return done;
    };
    // The recorder first: a child would inherit the listening socket (no close-on-exec).
    Proc rec({"record", "--config", cfg, "--log", logp, "--headless"}, dir.file("o"), dir.file("e"));
    auto acc = listen();
    {
        asio::ip::tcp::socket s(io);
        ASSERT_TRUE(accept(*acc, s)) << rec.err();
        asio::write(s, asio::buffer(test::gga(1) + "\r\n"));
        std::this_thread::sleep_for(std::chrono::milliseconds(300));
    }  // the source goes away: connection closed, nobody listening
    acc.reset();
    std::this_thread::sleep_for(std::chrono::seconds(10));
    acc = listen();
    const auto back_utc = std::chrono::system_clock::now();
    asio::ip::tcp::socket s(io);
    ASSERT_TRUE(accept(*acc, s)) << rec.err();
    asio::write(s, asio::buffer(test::gga(2) + "\r\n"));
    std::this_thread::sleep_for(std::chrono::milliseconds(800));
    EXPECT_EQ(rec.interrupt(), 0) << rec.err();
    const auto back_ns = std::chrono::duration_cast<std::chrono::nanoseconds>(back_utc.time_since_epoch()).count();
    ASSERT_EQ(sql(logp, "select count(*) from raw_lines"), "2");
    const double late_s =
        static_cast<double>(std::stoll(sql(logp, "select utc_ns from raw_lines order by id desc limit 1")) -
                            back_ns) * 1e-9;
    std::printf("first line after the return logged %.3f s after it\n", late_s);
    EXPECT_GE(late_s, 0.0);
    EXPECT_LT(late_s, 1.0) << "first line after the return logged " << late_s << " s after it";
    EXPECT_EQ(sql(logp, "select count(*) from events where kind = 'outage' and end_utc_ns is not null"), "1");
}

}  // namespace
