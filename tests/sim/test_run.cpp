// Running to outputs: byte-identical files for the same seed (and different ones for another
// seed), counts in summary.json equal to the lines in the files, and end to end on loopback
// (UDP and TCP at speed 10): a receiver here counts the lines and finds the simulator's counts.
#include <gtest/gtest.h>

#include <arpa/inet.h>
#include <fcntl.h>
#include <termios.h>
#include <netinet/in.h>
#include <poll.h>
#include <sys/socket.h>
#include <unistd.h>

#include <algorithm>
#include <atomic>
#include <chrono>
#include <filesystem>
#include <thread>
#include <tuple>

#include <nlohmann/json.hpp>

#include "drivers_sim/run.hpp"
#include "sim_test_util.hpp"
#include "../port_block.hpp"

namespace sg::sim::test {
namespace {

namespace fs = std::filesystem;

std::string tempDir(const std::string& name) {
    const fs::path p = fs::temp_directory_path() /
                       ("sg_sim_test_" + std::to_string(::getpid()) + "_" + name);
    fs::remove_all(p);
    fs::create_directories(p);
    return p.string();
}

RunResult runToFiles(const std::string& dir, std::uint64_t seed, double duration_s) {
    RunOptions o;
    o.output = OutputKind::File;
    o.dir = dir;
    o.truth = true;
    o.sim.seed = seed;
    o.sim.duration_s = duration_s;
    return runSimulation(loadScenario(dataPath("short.toml")), o, nullptr);
}

std::vector<std::string> filesIn(const std::string& dir) {
    std::vector<std::string> names;
    for (const auto& e : fs::directory_iterator(dir)) names.push_back(e.path().filename().string());
    std::sort(names.begin(), names.end());
    return names;
}

TEST(Run, SameSeedGivesByteIdenticalFiles) {
    // 180 s covers every fault window of short.toml (random bytes, spoiled checksums included).
    const std::string a = tempDir("a"), b = tempDir("b"), c = tempDir("c");
    runToFiles(a, 42, 180.0);
    runToFiles(b, 42, 180.0);
    runToFiles(c, 43, 180.0);
    const auto names = filesIn(a);
    ASSERT_EQ(names, filesIn(b));
    EXPECT_GE(names.size(), 11u);  // 6 logs, summary, 2 GeoJSON, 2 truth
    for (const auto& n : names) {
        const std::string x = readFile(a + "/" + n);
        EXPECT_FALSE(x.empty()) << n;
        EXPECT_EQ(x, readFile(b + "/" + n)) << n << " differs between two runs with seed 42";
    }
    for (const std::string n : {"gnss.log", "mag.log", "gyro.log", "truth_mag.csv"})
        EXPECT_NE(readFile(a + "/" + n), readFile(c + "/" + n)) << n << " same for seeds 42, 43";
    // The plan does not depend on the seed.
    EXPECT_EQ(readFile(a + "/plan_lines.geojson"), readFile(c + "/plan_lines.geojson"));
    for (const auto& d : {a, b, c}) fs::remove_all(d);
}

TEST(Run, SummaryCountsEqualTheLinesInTheFiles) {
    const std::string dir = tempDir("summary");
    const RunResult r = runToFiles(dir, 9, 90.0);
    const auto j = nlohmann::json::parse(readFile(dir + "/summary.json"));
    EXPECT_EQ(j["seed"], 9);
    for (int c = 0; c < kChannelCount; ++c) {
        const std::string name = channelName(static_cast<Channel>(c));
        const std::string text = readFile(dir + "/" + name + ".log");
        const auto lines = static_cast<std::uint64_t>(std::count(text.begin(), text.end(), '\n'));
        EXPECT_EQ(j["channels"][name]["sent"].get<std::uint64_t>(), lines) << name;
        EXPECT_EQ(r.counts[static_cast<std::size_t>(c)].sent, lines) << name;
        EXPECT_EQ(j["channels"][name]["bytes"].get<std::uint64_t>(), text.size()) << name;
    }
    // gnss at 10 Hz (GGA, RMC, VTG) + 1 Hz (GST, ZDA), minus the 25..35 s loss, 10..20 s
    // degraded fix still sends everything: 90 s * 32 lines/s - 10 s * 32.
    EXPECT_EQ(j["channels"]["gnss"]["sent"].get<int>(), 90 * 32 - 10 * 32);
    EXPECT_EQ(j["faults"].size(), 10u);  // every scheduled fault, even those after the end
    fs::remove_all(dir);
}

int basePort() {
    // A block of 24 ports held by this process (tests use +0..+17): ctest runs test processes
    // in parallel, and the block's lock keeps them apart.
    static const sg::testdata::PortBlock block(24);
    return block.base();
}

TEST(Run, UdpLoopbackCountsMatch) {
    const int base = basePort();
    std::array<int, kChannelCount> fds{};
    for (int c = 0; c < kChannelCount; ++c) {
        fds[static_cast<std::size_t>(c)] = ::socket(AF_INET, SOCK_DGRAM, 0);
        sockaddr_in a{};
        a.sin_family = AF_INET;
        a.sin_port = htons(static_cast<std::uint16_t>(base + c));
        a.sin_addr.s_addr = htonl(INADDR_LOOPBACK);
        const int big = 1 << 20;
        ::setsockopt(fds[static_cast<std::size_t>(c)], SOL_SOCKET, SO_RCVBUF, &big, sizeof big);
        ASSERT_EQ(::bind(fds[static_cast<std::size_t>(c)], reinterpret_cast<sockaddr*>(&a), sizeof a), 0)
            << "port " << base + c;
    }
    std::array<std::uint64_t, kChannelCount> got{};
    std::atomic<bool> stop{false};
    std::atomic<bool> malformed{false};
    std::thread rx([&] {
        std::vector<pollfd> p;
        for (int fd : fds) p.push_back({fd, POLLIN, 0});
        char buf[4096];
        for (;;) {
            const int n = ::poll(p.data(), p.size(), 100);
            if (n == 0 && stop) break;
            for (std::size_t i = 0; i < p.size(); ++i) {
                if ((p[i].revents & POLLIN) == 0) continue;
                const ssize_t len = ::recv(p[i].fd, buf, sizeof buf, 0);
                if (len < 2 || buf[len - 2] != '\r' || buf[len - 1] != '\n') malformed = true;
                ++got[i];
            }
        }
    });
    RunOptions o;
    o.output = OutputKind::Udp;
    o.dir = tempDir("udp");
    o.base_port = base;
    o.speed = 10.0;
    o.sim.seed = 3;
    o.sim.duration_s = 25.0;  // 2.5 s of wall time; the degraded fix (10..20 s) included
    const RunResult r = runSimulation(loadScenario(dataPath("short.toml")), o, nullptr);
    EXPECT_NEAR(r.simulated_s, 25.0, 0.011);
    stop = true;
    rx.join();
    for (int fd : fds) ::close(fd);
    EXPECT_FALSE(malformed);
    for (int c = 0; c < kChannelCount; ++c) {
        const auto& n = r.counts[static_cast<std::size_t>(c)];
        EXPECT_GT(n.sent, 0u);
        EXPECT_EQ(n.sent, n.produced);
        EXPECT_EQ(got[static_cast<std::size_t>(c)], n.sent) << channelName(static_cast<Channel>(c));
    }
    fs::remove_all(o.dir);
}

TEST(Run, TcpLoopbackCountsMatch) {
    const int base = basePort();  // TCP ports are apart from UDP ports
    std::array<std::uint64_t, kChannelCount> got{};
    std::vector<std::thread> readers;
    RunOptions o;
    o.output = OutputKind::Tcp;
    o.dir = tempDir("tcp");
    o.base_port = base;
    o.speed = 10.0;
    o.sim.seed = 3;
    o.sim.duration_s = 12.0;
    o.on_ready = [&](const Output&) {
        // The servers listen now; connect before the first line (accepted at the first step).
        for (int c = 0; c < kChannelCount; ++c) {
            const int fd = ::socket(AF_INET, SOCK_STREAM, 0);
            sockaddr_in a{};
            a.sin_family = AF_INET;
            a.sin_port = htons(static_cast<std::uint16_t>(base + c));
            a.sin_addr.s_addr = htonl(INADDR_LOOPBACK);
            ASSERT_EQ(::connect(fd, reinterpret_cast<sockaddr*>(&a), sizeof a), 0);
            readers.emplace_back([fd, &got, c] {
                char buf[4096];
                for (;;) {
                    const ssize_t len = ::recv(fd, buf, sizeof buf, 0);
                    if (len <= 0) break;  // the simulator closes at the end
                    got[static_cast<std::size_t>(c)] += static_cast<std::uint64_t>(
                        std::count(buf, buf + len, '\n'));
                }
                ::close(fd);
            });
        }
    };
    const RunResult r = runSimulation(loadScenario(dataPath("short.toml")), o, nullptr);
    for (auto& t : readers) t.join();
    ASSERT_EQ(readers.size(), static_cast<std::size_t>(kChannelCount));
    for (int c = 0; c < kChannelCount; ++c) {
        const auto& n = r.counts[static_cast<std::size_t>(c)];
        EXPECT_GT(n.sent, 0u);
        EXPECT_EQ(n.dropped, 0u);
        EXPECT_EQ(got[static_cast<std::size_t>(c)], n.sent) << channelName(static_cast<Channel>(c));
    }
    fs::remove_all(o.dir);
}

TEST(Run, PtyLinesArriveOnTheSlaveSide) {
    std::array<std::uint64_t, kChannelCount> got{};
    std::vector<std::thread> readers;
    RunOptions o;
    o.output = OutputKind::Pty;
    o.dir = tempDir("pty");
    o.speed = 10.0;
    o.sim.seed = 3;
    o.sim.duration_s = 4.0;
    o.on_ready = [&](const Output& out) {
        for (int c = 0; c < kChannelCount; ++c) {
            const std::string path = out.endpoint(static_cast<Channel>(c));
            // The symlink in --dir points at the same terminal.
            EXPECT_EQ(fs::read_symlink(o.dir + "/" + channelName(static_cast<Channel>(c)) + ".pty"), path);
            const int fd = ::open(path.c_str(), O_RDONLY | O_NOCTTY);
            ASSERT_GE(fd, 0) << path;
            termios t{};
            ::tcgetattr(fd, &t);
            ::cfmakeraw(&t);
            ::tcsetattr(fd, TCSANOW, &t);
            readers.emplace_back([fd, &got, c] {
                char buf[4096];
                for (;;) {
                    const ssize_t len = ::read(fd, buf, sizeof buf);
                    if (len <= 0) break;  // EIO once the simulator closes the master side
                    got[static_cast<std::size_t>(c)] +=
                        static_cast<std::uint64_t>(std::count(buf, buf + len, '\n'));
                }
                ::close(fd);
            });
        }
    };
    const RunResult r = runSimulation(loadScenario(dataPath("short.toml")), o, nullptr);
    for (auto& t : readers) t.join();
    for (int c = 0; c < kChannelCount; ++c) {
        const auto& n = r.counts[static_cast<std::size_t>(c)];
        EXPECT_GT(n.sent, 0u);
        EXPECT_EQ(got[static_cast<std::size_t>(c)], n.sent) << channelName(static_cast<Channel>(c));
    }
    fs::remove_all(o.dir);
}

TEST(Run, UdpPortCloseDropsTheLinesOfItsWindow) {
    // port_close mag 110..115 s of short.toml: on UDP the mag lines of those 5 s are not sent.
    Scenario sc = loadScenario(dataPath("short.toml"));
    RunOptions o;
    o.output = OutputKind::Udp;
    o.dir = tempDir("udpclose");
    o.base_port = basePort() + 6;  // nothing listens: datagrams are simply lost
    o.sim.seed = 3;
    o.sim.duration_s = 120.0;
    const RunResult r = runSimulation(sc, o, nullptr);
    const auto& mag = r.counts[static_cast<std::size_t>(Channel::Mag)];
    EXPECT_EQ(mag.dropped, 5u * 10u * 4u);  // 5 s, 10 Hz, 4 sensors
    EXPECT_EQ(mag.sent + mag.dropped, mag.produced);
    EXPECT_EQ(r.counts[static_cast<std::size_t>(Channel::Gyro)].dropped, 0u);
    fs::remove_all(o.dir);
}

TEST(Run, TcpPortCloseDropsClientsAndListensAgain) {
    // port_close on mag from 2 s to 3 s: the client is disconnected, reconnects once the port
    // listens again, and every line is either received or counted as dropped.
    Scenario sc = loadScenario(dataPath("short.toml"));
    sc.faults.clear();
    FaultSpec close;
    close.kind = FaultKind::PortClose;
    close.channel = "mag";
    close.start_s = 2.0;
    close.duration_s = 1.0;
    sc.faults.push_back(close);
    const int base = basePort() + 12;
    const int mag_port = base + static_cast<int>(Channel::Mag);
    auto connectMag = [mag_port] {
        const int fd = ::socket(AF_INET, SOCK_STREAM, 0);
        sockaddr_in a{};
        a.sin_family = AF_INET;
        a.sin_port = htons(static_cast<std::uint16_t>(mag_port));
        a.sin_addr.s_addr = htonl(INADDR_LOOPBACK);
        if (::connect(fd, reinterpret_cast<sockaddr*>(&a), sizeof a) == 0) return fd;
        ::close(fd);
        return -1;
    };
    auto countUntilEof = [](int fd) {
        std::uint64_t n = 0;
        char buf[4096];
        for (;;) {
            const ssize_t len = ::recv(fd, buf, sizeof buf, 0);
            if (len <= 0) break;
            n += static_cast<std::uint64_t>(std::count(buf, buf + len, '\n'));
        }
        ::close(fd);
        return n;
    };
    std::uint64_t first = 0, second = 0;
    int refused_while_closed = 0;
    std::thread client;
    RunOptions o;
    o.output = OutputKind::Tcp;
    o.dir = tempDir("tcpclose");
    o.base_port = base;
    o.speed = 10.0;
    o.sim.seed = 3;
    o.sim.duration_s = 6.0;
    o.on_ready = [&](const Output&) {
        const int fd = connectMag();
        ASSERT_GE(fd, 0);
        client = std::thread([&, fd] {
            first = countUntilEof(fd);  // ends when the port closes at 2 s (0.2 s wall)
            for (int i = 0; i < 400; ++i) {
                const int again = connectMag();
                if (again >= 0) {
                    second = countUntilEof(again);
                    return;
                }
                ++refused_while_closed;
                std::this_thread::sleep_for(std::chrono::milliseconds(5));
            }
        });
    };
    const RunResult r = runSimulation(sc, o, nullptr);
    client.join();
    const auto& mag = r.counts[static_cast<std::size_t>(Channel::Mag)];
    EXPECT_GT(refused_while_closed, 0);       // nobody listened during the window
    EXPECT_NEAR(static_cast<double>(first), 2.0 * 10 * 4, 4.0);  // about 2 s of 4 sensors at 10 Hz
    EXPECT_GT(second, 0u);
    EXPECT_EQ(first + second, mag.sent);
    EXPECT_EQ(mag.sent + mag.dropped, mag.produced);
    EXPECT_GE(mag.dropped, 1u * 10u * 4u);     // the closed second at least
    fs::remove_all(o.dir);
}

TEST(Run, RandomFaultsAreReproducible) {
    Scenario sc = loadScenario(dataPath("short.toml"));
    sc.faults.clear();
    sc.random_faults.per_hour = 360.0;  // one every 10 s on average
    sc.random_faults.mean_duration_s = 5.0;
    sc.random_faults.kinds = {FaultKind::MagDropout, FaultKind::GnssLoss, FaultKind::BadChecksum};
    auto faults = [&](std::uint64_t seed) {
        SimOptions o;
        o.seed = seed;
        o.duration_s = 200.0;
        Simulator sim(sc, o);
        std::vector<std::tuple<int, double, double, std::string>> out;
        while (!sim.done()) sim.step();
        for (const FaultSpec& f : sim.faults())
            out.emplace_back(static_cast<int>(f.kind), f.start_s, f.duration_s, f.channel);
        return out;
    };
    const auto a = faults(21);
    EXPECT_EQ(a, faults(21));
    EXPECT_NE(a, faults(22));
    EXPECT_GT(a.size(), 5u);   // Poisson mean 20 over 200 s
    EXPECT_LT(a.size(), 45u);
    for (const auto& f : a) {
        const auto k = static_cast<FaultKind>(std::get<0>(f));
        EXPECT_TRUE(k == FaultKind::MagDropout || k == FaultKind::GnssLoss || k == FaultKind::BadChecksum);
        EXPECT_GE(std::get<2>(f), 1.0);
    }
}

}  // namespace
}  // namespace sg::sim::test
