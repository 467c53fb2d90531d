// The helm's serial output on a pseudo-terminal (posix_openpt(3)): the sink's end of the pty
// stands for the bridge's serial port, the test reads the other end (the master) and decodes
// what arrived with the project's own NMEA decoder (decode::decodeRouteNmea, checksums checked).
// 1. HelmOutputs with the real serial sink: exclusive (a second opener is refused), raw output
//    (CR LF arrives as sent: with OPOST/ONLCR on, a fresh pty's default, it would arrive as
//    CR CR LF; Boost.Asio's open clears OPOST too, so this checks the outcome, not our line), the
//    configured baud, and after the far end goes away a failed send, an outage logged once
//    (event output_outage) and the port reopened through the same path (a symlink, as udev's
//    /dev/serial/by-id names are) when it is back.
// 2. End to end: `swathguard demo` steering to a serial [[output]] on a pty at 1 Hz, then
//    `swathguard route LOG --to serial:PTY@9600`: WPL and RTE read from the pty and decoded by
//    our decoder and by pynmea2 1.15.0 (Debian python3-nmea2, a general-purpose NMEA 0183
//    parser; tests/helm/py/decode_route.py), the waypoints checked against infill.geojson.
#include <gtest/gtest.h>

#include <fcntl.h>
#include <poll.h>
#include <termios.h>
#include <unistd.h>

#include <atomic>
#include <cmath>
#include <cstdio>
#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <map>
#include <sstream>
#include <thread>

#include <nlohmann/json.hpp>

#include "decode/nmea.hpp"
#include "helm/steering_sentences.hpp"
#include "io/helm_output.hpp"
#include "../demo_on_ports.hpp"
#include "../shell_output.hpp"

namespace fs = std::filesystem;
using namespace sg;

using sg::test::readFile;
constexpr auto* run = &sg::test::commandOutput;

namespace {

// One pseudo-terminal: the master (ours) and the name of the other end.
struct Pty {
    int master = -1;
    std::string slave;
    Pty() {
        master = ::posix_openpt(O_RDWR | O_NOCTTY);
        if (master < 0 || ::grantpt(master) != 0 || ::unlockpt(master) != 0) return;
        if (const char* n = ::ptsname(master)) slave = n;
    }
    ~Pty() { close(); }
    void close() {
        if (master >= 0) ::close(master);
        master = -1;
    }
    bool ok() const { return master >= 0 && !slave.empty(); }
    // Everything readable within `ms` of quiet (returns when nothing more comes).
    std::string drain(int ms = 200) const {
        std::string out;
        char buf[4096];
        while (true) {
            pollfd p{master, POLLIN, 0};
            if (::poll(&p, 1, ms) <= 0 || !(p.revents & POLLIN)) break;
            const auto n = ::read(master, buf, sizeof buf);
            if (n <= 0) break;
            out.append(buf, static_cast<std::size_t>(n));
        }
        return out;
    }
};

std::vector<std::string> splitCrLf(const std::string& bytes, std::string* rest = nullptr) {
    std::vector<std::string> lines;
    std::size_t at = 0;
    for (auto e = bytes.find("\r\n"); e != std::string::npos; e = bytes.find("\r\n", at)) {
        lines.push_back(bytes.substr(at, e - at));
        at = e + 2;
    }
    if (rest) *rest = bytes.substr(at);
    return lines;
}

helm::SteeringFix exampleFix() {
    helm::SteeringFix f;
    f.valid = true;
    f.origin_id = "HF01A";
    f.dest_id = "HF01B";
    f.dest = {52.1852, 4.5};
    f.xte_m = 20.0;
    f.bearing_origin_dest_deg = 45.0;
    f.bearing_to_dest_deg = 44.9;
    f.range_to_dest_m = 555.6;
    return f;
}

}  // namespace

TEST(HelmSerial, ExclusiveRawAtTheBaudAndReopenedAfterTheFarEndWentAway) {
    Pty a;
    ASSERT_TRUE(a.ok()) << "posix_openpt: " << std::strerror(errno);
    const fs::path dir = fs::temp_directory_path() / ("sg_helm_serial_" + std::to_string(getpid()));
    fs::remove_all(dir);
    fs::create_directories(dir);
    const fs::path link = dir / "bridge";
    fs::create_symlink(a.slave, link);

    helm::OutputConfig o;
    o.name = "bridge";
    o.transport = "serial";
    o.device = link.string();
    o.baud = 38400;
    io::HelmOutputs helm({o});
    std::int64_t next_id = 100;
    helm.setEventIds([&next_id] { return next_id++; });

    // The configured baud and raw output, read back from the pty pair's termios (on Linux the
    // master's tcgetattr(3) gives the other end's settings).
    auto checkTermios = [](int master) {
        termios t{};
        ASSERT_EQ(::tcgetattr(master, &t), 0);
        EXPECT_EQ(::cfgetospeed(&t), static_cast<speed_t>(B38400));
        EXPECT_EQ(t.c_oflag & OPOST, 0u) << "output processing left on";
        EXPECT_EQ(t.c_cflag & CSIZE, static_cast<tcflag_t>(CS8));
        EXPECT_EQ(t.c_cflag & (PARENB | CSTOPB), 0u);
    };
    checkTermios(a.master);

    // Exclusive: a second sink (a second program) on the same port is refused at open.
    try {
        io::openLineSink(o);
        ADD_FAILURE() << "a second opener was let in";
    } catch (const std::runtime_error& e) {
        EXPECT_NE(std::string(e.what()).find("held by another process"), std::string::npos) << e.what();
        EXPECT_NE(std::string(e.what()).find("output 'bridge'"), std::string::npos) << e.what();
    }

    // Steering sentences and a route go out byte for byte: each ends CR LF, never CR CR LF.
    const helm::SentenceOptions opt;
    std::vector<std::string> sent{helm::buildXte(exampleFix(), opt), helm::buildApb(exampleFix(), opt),
                                  helm::buildRmb(exampleFix(), opt)};
    for (const auto& s : helm::buildRoute("INFILL", {{"I01A", {52.18, 4.49}}, {"I01B", {52.19, 4.51}}}, opt))
        sent.push_back(s);
    EXPECT_EQ(helm.sendNow(sent, 1'000'000'000, 5'000'000'000), 0u);
    std::string expect;
    for (const auto& s : sent) expect += s + "\r\n";
    const std::string got = a.drain();
    ASSERT_EQ(got, expect);
    std::map<std::string, int> types;
    for (const auto& line : splitCrLf(got)) {
        const auto d = decode::decodeRouteNmea(line);
        ASSERT_EQ(d.reason, decode::Reason::Ok) << line << ": " << d.detail;
        EXPECT_TRUE(d.checksum_ok) << line;
        types[d.type]++;
    }
    EXPECT_EQ(types, (std::map<std::string, int>{{"XTE", 1}, {"APB", 1}, {"RMB", 1}, {"WPL", 2}, {"RTE", 1}}));
    log::Batch b0;
    helm.takeRows(b0);
    EXPECT_TRUE(b0.events.empty());

    // The far end goes away (the adapter unplugged): the write fails (EIO on a hung-up pty),
    // the outage starts once, and while the device is missing every send fails without a
    // second event.
    a.close();
    EXPECT_EQ(helm.sendNow({sent[0]}, 2'000'000'000, 6'000'000'000), 1u);
    EXPECT_EQ(helm.sendNow({sent[0]}, 3'000'000'000, 7'000'000'000), 1u);
    EXPECT_TRUE(helm.counts()[0].in_outage);
    EXPECT_EQ(helm.counts()[0].outages, 1u);
    EXPECT_EQ(helm.counts()[0].failed, 2u);
    log::Batch b1;
    helm.takeRows(b1);
    ASSERT_EQ(b1.events.size(), 1u);
    EXPECT_EQ(b1.events[0].kind, "output_outage");
    EXPECT_EQ(b1.events[0].source, "bridge");
    EXPECT_EQ(b1.events[0].start_utc_ns, 6'000'000'000);
    EXPECT_FALSE(b1.events[0].detail.empty());
    EXPECT_TRUE(b1.event_ends.empty());

    // Back under the same name (a new pty behind the symlink): the next send reopens it, at the
    // configured baud and raw again, and ends the outage (duration on the wall clock).
    Pty b;
    ASSERT_TRUE(b.ok());
    fs::remove(link);
    fs::create_symlink(b.slave, link);
    EXPECT_EQ(helm.sendNow({sent[2]}, 4'000'000'000, 9'500'000'000), 0u);
    EXPECT_EQ(b.drain(), sent[2] + "\r\n");
    checkTermios(b.master);
    EXPECT_FALSE(helm.counts()[0].in_outage);
    log::Batch b2;
    helm.takeRows(b2);
    EXPECT_TRUE(b2.events.empty());
    ASSERT_EQ(b2.event_ends.size(), 1u);
    EXPECT_EQ(b2.event_ends[0].id, b1.events[0].id);
    EXPECT_EQ(b2.event_ends[0].end_utc_ns, 9'500'000'000);
    ASSERT_TRUE(b2.event_ends[0].value.has_value());
    EXPECT_NEAR(*b2.event_ends[0].value, 3.5, 1e-9);
    EXPECT_NE(helm.summaryText("t").find("1 outage(s)"), std::string::npos) << helm.summaryText("t");
    fs::remove_all(dir);
}

TEST(HelmSerial, DemoSteersOverAPtyAndTheRouteIsReadByAnIndependentParser) {
    Pty pty;
    ASSERT_TRUE(pty.ok());
    const fs::path dir = fs::temp_directory_path() / ("sg_helm_serial_demo_" + std::to_string(getpid()));
    fs::remove_all(dir);
    fs::create_directories(dir);
    const fs::path demo = fs::path(SG_SOURCE_DIR) / "replay_logs/demo";
    std::string cfg = sg::testdata::demoConfigWithAbsolutePlan();
    for (const char* f : {"plan_area.geojson", "plan_lines.geojson"})
        ASSERT_NE(cfg.find("\"" + (demo / f).string() + "\""), std::string::npos);
    cfg += "\n[[output]]\nname = \"bridge\"\nkind = \"steering\"\ntransport = \"serial\"\ndevice = \"" + pty.slave +
           "\"\nbaud = 4800\nrate_hz = 1\nsentences = [\"XTE\", \"APB\", \"RMB\"]\n";
    std::ofstream(dir / "survey.toml") << cfg;

    // The pty holds a few KB: read while the demo runs.
    std::string got;
    std::atomic<bool> done{false};
    std::thread rx([&] {
        while (!done) got += pty.drain(100);
        got += pty.drain(100);
    });
    // 900 s of survey at 60x (about 15 s): long enough for missed ground, so an infill plan.
    const std::string out = run(std::string(SG_BINARY_DIR) + "/app/swathguard demo --config " +
                                (dir / "survey.toml").string() + " --out " + (dir / "out").string() +
                                " --duration 900 --speed 60 2>&1");
    done = true;
    rx.join();
    ASSERT_NE(out.find("output 'bridge' (serial " + pty.slave + " 4800 baud)"), std::string::npos) << out;
    EXPECT_NE(out.find(" 0 failed"), std::string::npos) << out;
    std::string rest;
    const auto lines = splitCrLf(got, &rest);
    EXPECT_TRUE(rest.empty()) << rest;
    EXPECT_EQ(got.find("\r\r"), std::string::npos);
    // 1 Hz of survey time, three sentences each: about 3 x 901.
    EXPECT_GE(lines.size(), 3u * 890u);
    EXPECT_LE(lines.size(), 3u * 902u);
    std::map<std::string, int> valid;
    for (const auto& line : lines) {
        const auto d = decode::decodeRouteNmea(line);
        ASSERT_EQ(d.reason, decode::Reason::Ok) << line << ": " << d.detail;
        EXPECT_TRUE(d.checksum_ok) << line;
        if (const auto* x = std::get_if<decode::Xte>(&d.data); x && x->valid) valid["XTE"]++;
        if (const auto* r = std::get_if<decode::Rmb>(&d.data); r && r->valid) valid["RMB"]++;
    }
    EXPECT_GT(valid["XTE"], 300);
    EXPECT_EQ(valid["XTE"], valid["RMB"]);

    // The infill plan of that log as a route over the same port, on request.
    const fs::path log = dir / "out/demo.sglog";
    const std::string rout = run(std::string(SG_BINARY_DIR) + "/app/swathguard route " + log.string() +
                                 " --to serial:" + pty.slave + "@9600 2>&1");
    const std::string bytes = pty.drain(300);
    ASSERT_NE(rout.find("0 failed"), std::string::npos) << rout;
    const auto route = splitCrLf(bytes, &rest);
    EXPECT_TRUE(rest.empty());
    ASSERT_GE(route.size(), 3u) << rout;
    std::vector<decode::Wpl> wpls;
    std::vector<std::string> rte_ids;
    std::ofstream lf(dir / "route.txt");
    for (const auto& line : route) {
        lf << line << "\n";
        const auto d = decode::decodeRouteNmea(line);
        ASSERT_EQ(d.reason, decode::Reason::Ok) << line;
        EXPECT_TRUE(d.checksum_ok);
        if (const auto* w = std::get_if<decode::Wpl>(&d.data)) wpls.push_back(*w);
        if (const auto* r = std::get_if<decode::Rte>(&d.data)) {
            EXPECT_EQ(r->route_id, "INFILL");
            EXPECT_EQ(r->mode, 'c');
            rte_ids.insert(rte_ids.end(), r->waypoints.begin(), r->waypoints.end());
        }
    }
    lf.close();
    // Two waypoints per infill line of infill.geojson (the demo's own export of the same plan,
    // read here as plain GeoJSON), in rank order, each to 0.0001 minute (WPL's resolution).
    const auto infill = nlohmann::json::parse(readFile(dir / "out/infill.geojson"));
    ASSERT_EQ(wpls.size(), 2 * infill["features"].size());
    ASSERT_EQ(rte_ids.size(), wpls.size());
    for (std::size_t i = 0; i < wpls.size(); ++i) {
        const auto& c = infill["features"][i / 2]["geometry"]["coordinates"];
        const auto& p = i % 2 == 0 ? c.front() : c.back();
        EXPECT_NEAR(wpls[i].lat_deg, p[1].get<double>(), 0.00006 / 60) << i;
        EXPECT_NEAR(wpls[i].lon_deg, p[0].get<double>(), 0.00006 / 60) << i;
        EXPECT_EQ(rte_ids[i], wpls[i].id);
    }

    // The independent parser: pynmea2 (Debian python3-nmea2), checksums checked.
    // Debian's python3 by its path: a python3 earlier on PATH (pyenv, a venv) has not got
    // Debian's dist-packages.
    if (!fs::exists("/usr/bin/python3"))
        GTEST_SKIP() << "/usr/bin/python3 not installed: the independent parser (Debian python3-nmea2) cannot run";
    if (run("/usr/bin/python3 -c 'import pynmea2' 2>&1 && echo ok").find("ok") == std::string::npos)
        GTEST_SKIP() << "pynmea2 missing: apt-get install python3-nmea2 (scripts/install-deps.sh): the route's "
                        "independent check did not run";
    const std::string js = run("/usr/bin/python3 " + std::string(SG_SOURCE_DIR) + "/tests/helm/py/decode_route.py " +
                               (dir / "route.txt").string() + " 2>&1");
    std::istringstream in(js);
    std::string row;
    std::size_t k = 0, w = 0;
    std::vector<std::string> py_rte;
    while (std::getline(in, row)) {
        ASSERT_LT(k, route.size()) << row;
        const auto j = nlohmann::json::parse(row);
        ASSERT_FALSE(j.contains("error")) << row;
        EXPECT_EQ(j["line"].get<std::string>(), route[k]);
        ++k;
        if (j["type"] == "WPL") {
            ASSERT_LT(w, wpls.size());
            EXPECT_NEAR(j["lat"].get<double>(), wpls[w].lat_deg, 1e-12) << row;
            EXPECT_NEAR(j["lon"].get<double>(), wpls[w].lon_deg, 1e-12) << row;
            EXPECT_EQ(j["id"].get<std::string>(), wpls[w].id) << row;
            ++w;
        } else {
            ASSERT_EQ(j["type"], "RTE") << row;
            EXPECT_EQ(j["route_id"], "INFILL");
            EXPECT_EQ(j["mode"], "c");
            for (const auto& id : j["waypoints"]) py_rte.push_back(id.get<std::string>());
        }
    }
    EXPECT_EQ(k, route.size()) << js.substr(0, 2000);
    EXPECT_EQ(w, wpls.size());
    EXPECT_EQ(py_rte, rte_ids);
    std::printf("serial demo: %zu steering sentences (%d valid XTE); route: %zu WPL + %zu RTE, all read by pynmea2\n",
                lines.size(), valid["XTE"], wpls.size(), route.size() - wpls.size());
    fs::remove_all(dir);
}
