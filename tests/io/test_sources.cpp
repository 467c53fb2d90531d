// Readers end to end into the log: bad input of every kind, a serial pty pair (socat), TCP
// reconnect with an outage event, UDP, and a followed file that is removed and comes back.
#include <gtest/gtest.h>

#include <fcntl.h>
#include <signal.h>
#include <spawn.h>
#include <sys/wait.h>
#include <termios.h>
#include <unistd.h>

#include <fstream>
#include <thread>

#include <boost/asio/ip/tcp.hpp>
#include <boost/asio/ip/udp.hpp>
#include <boost/asio/write.hpp>

#include "io/log_writer.hpp"
#include "io/recorder.hpp"
#include "io/sources.hpp"
#include "io_test_util.hpp"
#include "log/log_reader.hpp"

extern char** environ;

namespace {

using namespace sg;
using sg::test::TempDir;
namespace asio = boost::asio;

config::InputConfig nmeaInput(const std::string& name, config::Transport t) {
    config::InputConfig c;
    c.name = name;
    c.kind = config::InputKind::Nmea;
    c.role = "gnss";
    c.transport = t;
    return c;
}

std::vector<std::string> rawBytes(const std::string& path) {
    log::LogReader r(path);
    std::vector<std::string> out;
    std::int64_t id = 0;
    log::RawRow row;
    while (r.next(id, row)) out.push_back(row.bytes);
    return out;
}

// Every kind of bad input, mixed with good lines. Returns the lines as the framer will deliver
// them (a 10 KiB line arrives as 4096 + 4096 + 2048 bytes) and the bytes to send.
struct BadMix {
    std::string stream;
    std::vector<std::string> expected;
    std::size_t valid = 0;
};
BadMix badMix(int n) {
    BadMix m;
    std::mt19937 rng(7);
    auto add = [&](const std::string& line) {
        m.stream += line + "\r\n";
        for (std::size_t off = 0; off < line.size() || off == 0; off += 4096) {
            m.expected.push_back(line.substr(off, 4096));
            if (line.empty()) break;
        }
    };
    for (int i = 0; i < n; ++i) {
        switch (i % 8) {
        case 0: add(test::gga(3600.0 + i)); ++m.valid; break;
        case 1: add(test::gga(3600.0 + i).substr(0, 30)); break;  // truncated
        case 2: {  // wrong checksum
            std::string s = test::gga(3600.0 + i);
            s[s.size() - 1] = s[s.size() - 1] == '0' ? '1' : '0';
            add(s);
            break;
        }
        case 3: {  // garbage bytes (no line terminators in them)
            std::string g;
            for (int k = 0; k < 40; ++k) {
                char c = static_cast<char>(rng() & 0xff);
                if (c == '\r' || c == '\n') c = '?';
                g += c;
            }
            add(g);
            break;
        }
        case 4: add(i % 64 == 4 ? std::string(10240, 'Z') : "$GPHDT,271.5,T"); break;
        case 5: add(""); break;
        case 6: add(std::string("$GPHDT,1\0\0.5,T", 15)); break;  // NUL bytes
        case 7: add(test::rmc(3600.0 + i, "011226")); ++m.valid; break;
        }
    }
    return m;
}

TEST(Sources, BadInputThroughAFileReaderIsAllLoggedAndCounted) {
    TempDir dir;
    const auto mix = badMix(4000);
    {
        std::ofstream f(dir.file("bad.txt"), std::ios::binary);
        f << mix.stream;
    }
    auto in = nmeaInput("gnss", config::Transport::File);
    in.path = dir.file("bad.txt");
    const auto logp = dir.file("bad.sqlite");
    asio::io_context io;
    io::LogWriter w(logp, {100, false});
    io::Recorder rec(io, {in}, {}, w);
    rec.start();
    ASSERT_TRUE(test::runUntil(io, [&] { return rec.allFinished(); }));
    rec.stop();
    w.stop();
    const auto& c = rec.dispatcher().counters().at("gnss");
    EXPECT_EQ(c.lines, mix.expected.size());
    EXPECT_EQ(c.ok + c.rejected + c.unsupported + c.not_decoded, c.lines);
    // Valid: GGA and RMC. The HDT lines of case 4 (63 of every 64 groups) and the cut GGA lines
    // of case 1 (500) carry no checksum on a source that has sent checksums: rejected as
    // missing_checksum (docs/formats.md).
    std::size_t hdt = 0, big = 0;
    for (int i = 4; i < 4000; i += 8) (i % 64 == 4 ? big : hdt) += 1;
    EXPECT_EQ(c.ok, mix.valid);
    EXPECT_EQ(c.by_reason.count("missing_checksum") ? c.by_reason.at("missing_checksum") : 0,
              hdt + 500);
    EXPECT_EQ(c.not_decoded, 2 * big);  // the two tails of each 10 KiB line
    EXPECT_EQ(c.by_reason.count("too_long") ? c.by_reason.at("too_long") : 0, big);
    EXPECT_EQ(c.by_reason.count("empty_line") ? c.by_reason.at("empty_line") : 0, 500u);
    EXPECT_EQ(rawBytes(logp), mix.expected);
    EXPECT_EQ(test::shell("sqlite3 " + logp + " \"select count(*) from raw_lines where status='ok'\""),
              std::to_string(c.ok));
    EXPECT_EQ(test::shell("sqlite3 " + logp + " 'select count(*) from fixes'"),
              std::to_string(mix.valid));
}

// socat pty pair (BUILD-NOTES pitfall 7): the links appear shortly after start.
class Socat {
public:
    explicit Socat(const TempDir& dir) : m_a(dir.file("a")), m_b(dir.file("b")) {
        const std::string a = "pty,raw,echo=0,link=" + m_a;
        const std::string b = "pty,raw,echo=0,link=" + m_b;
        const char* argv[] = {"socat", "-d", "-d", a.c_str(), b.c_str(), nullptr};
        posix_spawn_file_actions_t fa;
        posix_spawn_file_actions_init(&fa);
        posix_spawn_file_actions_addopen(&fa, 2, "/dev/null", O_WRONLY, 0);
        if (posix_spawnp(&m_pid, "socat", &fa, nullptr, const_cast<char**>(argv), environ) != 0)
            m_pid = -1;
        posix_spawn_file_actions_destroy(&fa);
        for (int i = 0; i < 500 && m_pid > 0; ++i) {
            if (std::filesystem::exists(m_a) && std::filesystem::exists(m_b)) break;
            std::this_thread::sleep_for(std::chrono::milliseconds(10));
        }
    }
    ~Socat() {
        if (m_pid > 0) {
            ::kill(m_pid, SIGTERM);
            ::waitpid(m_pid, nullptr, 0);
        }
    }
    bool ok() const { return m_pid > 0 && std::filesystem::exists(m_a) && std::filesystem::exists(m_b); }
    const std::string& a() const { return m_a; }
    const std::string& b() const { return m_b; }

private:
    pid_t m_pid = -1;
    std::string m_a, m_b;
};

TEST(Sources, SerialPtyCarriesTenThousandMixedLinesInOrder) {
    TempDir dir;
    Socat socat(dir);
    ASSERT_TRUE(socat.ok()) << "socat did not create the pty pair";
    auto in = nmeaInput("gnss", config::Transport::Serial);
    in.serial.device = socat.a();
    in.serial.baud = 115200;
    const auto logp = dir.file("serial.sqlite");
    asio::io_context io;
    io::LogWriter w(logp, {200, false});
    io::Recorder rec(io, {in}, {}, w);
    rec.start();
    ASSERT_TRUE(test::runUntil(io, [&] { return rec.source("gnss")->connected(); }));

    // 10,000 lines: valid, invalid and garbage, none longer than the framer's limit.
    std::vector<std::string> lines;
    std::mt19937 rng(11);
    for (int i = 0; i < 10000; ++i) {
        if (i % 5 == 3) {
            std::string g;
            for (int k = 0; k < 30; ++k) {
                // No CR/LF (they end lines); no XON/XOFF in case a tty layer eats them.
                char c = static_cast<char>(rng() & 0xff);
                if (c == '\r' || c == '\n' || c == 0x11 || c == 0x13) c = '#';
                g += c;
            }
            lines.push_back(g);
        } else if (i % 5 == 4) {
            lines.push_back(test::gga(i).substr(0, 25));
        } else {
            lines.push_back(test::gga(i * 0.1, (i % 600) * 0.1));
        }
    }
    std::string stream;
    for (const auto& l : lines) stream += l + "\r\n";
    std::thread writer([&] {
        const int fd = ::open(socat.b().c_str(), O_WRONLY | O_NOCTTY);
        if (fd < 0) return;
        ::tcflush(fd, TCIOFLUSH);
        std::size_t off = 0;
        while (off < stream.size()) {
            const ssize_t n = ::write(fd, stream.data() + off, stream.size() - off);
            if (n <= 0) break;
            off += static_cast<std::size_t>(n);
        }
        ::tcdrain(fd);
        ::close(fd);
    });
    const bool all = test::runUntil(
        io, [&] { return rec.dispatcher().counters().at("gnss").lines >= lines.size(); },
        std::chrono::seconds(20));
    writer.join();
    rec.stop();
    w.stop();
    ASSERT_TRUE(all) << rec.dispatcher().counters().at("gnss").lines;
    const auto got = rawBytes(logp);
    ASSERT_EQ(got.size(), lines.size());
    EXPECT_EQ(got, lines);
    const auto& c = rec.dispatcher().counters().at("gnss");
    EXPECT_EQ(c.ok, 6000u);
    EXPECT_EQ(c.rejected, 4000u);
}

// Writes `text` to the pty end `path` from the calling thread.
void writePty(const std::string& path, const std::string& text) {
    const int fd = ::open(path.c_str(), O_WRONLY | O_NOCTTY);
    ASSERT_GE(fd, 0) << path;
    std::size_t off = 0;
    while (off < text.size()) {
        const ssize_t n = ::write(fd, text.data() + off, text.size() - off);
        if (n <= 0) break;
        off += static_cast<std::size_t>(n);
    }
    ::tcdrain(fd);
    ::close(fd);
}

TEST(Sources, SerialDeviceThatDisappearsIsReopened) {
    TempDir dir;
    auto socat = std::make_unique<Socat>(dir);
    ASSERT_TRUE(socat->ok());
    auto in = nmeaInput("gnss", config::Transport::Serial);
    in.serial.device = socat->a();
    const auto logp = dir.file("gone.sqlite");
    asio::io_context io;
    io::LogWriter w(logp, {100, false});
    io::Recorder rec(io, {in}, {}, w);
    rec.start();
    auto& c = rec.dispatcher().counters().at("gnss");
    ASSERT_TRUE(test::runUntil(io, [&] { return rec.source("gnss")->connected(); }));
    writePty(socat->b(), test::gga(1) + "\r\n");
    ASSERT_TRUE(test::runUntil(io, [&] { return c.lines == 1; }));
    socat.reset();  // the device goes away
    ASSERT_TRUE(test::runUntil(io, [&] { return c.in_outage; }));
    socat = std::make_unique<Socat>(dir);  // and comes back under the same name
    ASSERT_TRUE(socat->ok());
    ASSERT_TRUE(test::runUntil(io, [&] { return rec.source("gnss")->connected(); }));
    writePty(socat->b(), test::gga(2) + "\r\n");
    ASSERT_TRUE(test::runUntil(io, [&] { return c.lines == 2; }));
    rec.stop();
    w.stop();
    EXPECT_EQ(rawBytes(logp), (std::vector<std::string>{test::gga(1), test::gga(2)}));
    log::LogReader r(logp);
    const auto ev = r.events();
    ASSERT_EQ(ev.size(), 1u);
    EXPECT_EQ(ev[0].kind, "outage");
    EXPECT_TRUE(ev[0].end_utc_ns.has_value());
}

TEST(Sources, SerialDeviceHeldByAnotherReaderIsRefused) {
    TempDir dir;
    Socat socat(dir);
    ASSERT_TRUE(socat.ok());
    auto in = nmeaInput("gnss", config::Transport::Serial);
    in.serial.device = socat.a();
    asio::io_context io;
    io::LogWriter w1(dir.file("one.sqlite"), {100, false});
    io::Recorder first(io, {in}, {}, w1);
    first.start();
    ASSERT_TRUE(test::runUntil(io, [&] { return first.source("gnss")->connected(); }));
    // A second reader of the same device: refused at start, naming the device.
    io::LogWriter w2(dir.file("two.sqlite"), {100, false});
    io::Recorder second(io, {in}, {}, w2);
    try {
        second.start();
        ADD_FAILURE() << "the second reader opened a device the first holds";
    } catch (const io::SerialSource::DeviceBusy& e) {
        EXPECT_NE(std::string(e.what()).find("serial device " + socat.a() + " is held by another process"),
                  std::string::npos)
            << e.what();
    }
    // So is the pre-acquisition check `record` runs before creating its log.
    EXPECT_THROW(io::checkSerialDevicesFree({in}), io::SerialSource::DeviceBusy);
    second.stop();
    first.stop();
    // Released: the device is free again.
    EXPECT_NO_THROW(io::checkSerialDevicesFree({in}));
    w1.stop();
    w2.stop();
}

TEST(Sources, TcpPeerThatClosesAndReturnsIsAnOutageWithStartAndEnd) {
    TempDir dir;
    asio::io_context io;
    asio::ip::tcp::acceptor acc(io, {asio::ip::make_address("127.0.0.1"), 0});
    const auto port = acc.local_endpoint().port();
    auto in = nmeaInput("gnss", config::Transport::Tcp);
    in.connect_host = "127.0.0.1";
    in.connect_port = port;
    in.reconnect_min_s = 0.05;
    in.reconnect_max_s = 0.2;
    const auto logp = dir.file("tcp.sqlite");
    io::LogWriter w(logp, {100, false});
    io::Recorder rec(io, {in}, {}, w);

    auto serve = [&](asio::ip::tcp::acceptor& a, int first) {
        auto sock = std::make_shared<asio::ip::tcp::socket>(io);
        auto text = std::make_shared<std::string>();
        for (int i = first; i < first + 50; ++i) *text += test::gga(i) + "\r\n";
        a.async_accept(*sock, [sock, text](const boost::system::error_code& ec) {
            if (ec) return;
            asio::async_write(*sock, asio::buffer(*text),
                              [sock, text](const boost::system::error_code&, std::size_t) {
                boost::system::error_code ignore;
                sock->shutdown(asio::ip::tcp::socket::shutdown_both, ignore);
                sock->close(ignore);
            });
        });
    };
    serve(acc, 0);
    rec.start();
    auto& c = rec.dispatcher().counters().at("gnss");
    ASSERT_TRUE(test::runUntil(io, [&] { return c.lines >= 50 && c.in_outage; }));
    acc.close();
    // The server is away for a while: the source retries with backoff and keeps failing.
    test::runUntil(io, [] { return false; }, std::chrono::milliseconds(400));
    EXPECT_TRUE(c.in_outage);
    EXPECT_EQ(c.outages, 1u);  // one outage, however many retries failed
    asio::ip::tcp::acceptor back(io);
    back.open(asio::ip::tcp::v4());
    back.set_option(asio::socket_base::reuse_address(true));
    back.bind({asio::ip::make_address("127.0.0.1"), port});
    back.listen();
    serve(back, 100);
    ASSERT_TRUE(test::runUntil(io, [&] { return c.lines >= 100; }));
    rec.stop();
    w.stop();

    log::LogReader r(logp);
    const auto ev = r.events();
    ASSERT_GE(ev.size(), 1u);
    EXPECT_EQ(ev[0].kind, "outage");
    EXPECT_EQ(ev[0].source, "gnss");
    ASSERT_TRUE(ev[0].end_utc_ns.has_value());
    EXPECT_GE(*ev[0].end_utc_ns - ev[0].start_utc_ns, 300'000'000);  // >= the 400 ms away, roughly
    EXPECT_NE(ev[0].detail.find("closed"), std::string::npos) << ev[0].detail;
    const auto got = rawBytes(logp);
    ASSERT_GE(got.size(), 100u);
    EXPECT_EQ(got[50], test::gga(100));  // the first line after the reconnect
    EXPECT_EQ(got[99], test::gga(149));
}

TEST(Sources, UdpDatagramsAreFramedAndLogged) {
    TempDir dir;
    asio::io_context io;
    auto in = nmeaInput("hdg", config::Transport::Udp);
    in.listen_host = "127.0.0.1";
    in.listen_port = 0;  // any free port; asked back from the source
    const auto logp = dir.file("udp.sqlite");
    io::LogWriter w(logp, {100, false});
    io::Recorder rec(io, {in}, {}, w);
    rec.start();
    auto* src = dynamic_cast<io::UdpSource*>(rec.source("hdg"));
    ASSERT_NE(src, nullptr);
    ASSERT_TRUE(test::runUntil(io, [&] { return src->connected(); }));
    asio::ip::udp::socket out(io, asio::ip::udp::v4());
    const asio::ip::udp::endpoint to(asio::ip::make_address("127.0.0.1"), src->localPort());
    // Two sentences in one datagram, then one without a terminator (the datagram ends it).
    const auto h10 = decode::nmeaWithChecksum("HEHDT,10.0,T");
    const auto h11 = decode::nmeaWithChecksum("HEHDT,11.0,T");
    const auto h12 = decode::nmeaWithChecksum("HEHDT,12.0,T");
    out.send_to(asio::buffer(h10 + "\r\n" + h11 + "\r\n"), to);
    out.send_to(asio::buffer(h12), to);
    ASSERT_TRUE(test::runUntil(io, [&] { return rec.dispatcher().counters().at("hdg").lines >= 3; }));
    rec.stop();
    w.stop();
    EXPECT_EQ(rawBytes(logp), (std::vector<std::string>{h10, h11, h12}));
    EXPECT_EQ(test::shell("sqlite3 " + logp + " 'select group_concat(heading_deg) from headings'"),
              "10.0,11.0,12.0");
}

TEST(Sources, FollowedFileGrowsIsRemovedAndComesBack) {
    TempDir dir;
    const auto path = dir.file("follow.txt");
    { std::ofstream(path) << test::gga(1) << "\r\n"; }
    asio::io_context io;
    auto in = nmeaInput("gnss", config::Transport::File);
    in.path = path;
    in.follow = true;
    const auto logp = dir.file("follow.sqlite");
    io::LogWriter w(logp, {100, false});
    io::Recorder rec(io, {in}, {}, w);
    rec.start();
    auto& c = rec.dispatcher().counters().at("gnss");
    ASSERT_TRUE(test::runUntil(io, [&] { return c.lines == 1; }));
    { std::ofstream(path, std::ios::app) << test::gga(2) << "\r\n" << test::gga(3) << "\r\n"; }
    ASSERT_TRUE(test::runUntil(io, [&] { return c.lines == 3; }));
    std::filesystem::remove(path);
    ASSERT_TRUE(test::runUntil(io, [&] { return c.in_outage; }));
    { std::ofstream(path) << test::gga(4) << "\r\n"; }
    ASSERT_TRUE(test::runUntil(io, [&] { return c.lines == 4 && !c.in_outage; }));
    rec.stop();
    w.stop();
    EXPECT_EQ(rawBytes(logp),
              (std::vector<std::string>{test::gga(1), test::gga(2), test::gga(3), test::gga(4)}));
    log::LogReader r(logp);
    const auto ev = r.events();
    ASSERT_EQ(ev.size(), 1u);
    EXPECT_TRUE(ev[0].end_utc_ns.has_value());
    EXPECT_NE(ev[0].detail.find("removed"), std::string::npos) << ev[0].detail;
}

TEST(Sources, BackoffDoublesUpToTheMaximum) {
    io::Backoff b(0.5, 3.0);
    EXPECT_EQ(b.next().count(), 500'000'000);
    EXPECT_EQ(b.next().count(), 1'000'000'000);
    EXPECT_EQ(b.next().count(), 2'000'000'000);
    EXPECT_EQ(b.next().count(), 3'000'000'000);
    EXPECT_EQ(b.next().count(), 3'000'000'000);
    b.reset();
    EXPECT_EQ(b.next().count(), 500'000'000);
}

}  // namespace
