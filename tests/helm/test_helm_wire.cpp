// End to end on the real binary: `swathguard demo` with an [[output]] over UDP to a socket this
// test binds; every datagram is one sentence, decoded by the project's own decoder
// (decode::decodeRouteNmea) and by two independent parsers from the npm registry run with
// nodejs: @signalk/nmea0183-signalk 3.20.1 (XTE, APB, RMB) and nmea-simple 3.3.0 (APB)
// (tests/helm/npm, installed by scripts/install-npm-test-deps.sh). The test skips only when
// node is absent; with node but without the parsers it fails.
#include <gtest/gtest.h>

#include <arpa/inet.h>
#include <netinet/in.h>
#include <poll.h>
#include <sys/socket.h>
#include <unistd.h>

#include <atomic>
#include <cmath>
#include <cstdio>
#include <filesystem>
#include <fstream>
#include <map>
#include <sstream>
#include <thread>

#include <nlohmann/json.hpp>

#include "decode/nmea.hpp"
#include "../demo_on_ports.hpp"
#include "../shell_output.hpp"

namespace fs = std::filesystem;
using namespace sg;

using sg::test::readFile;
constexpr auto* run = &sg::test::commandOutput;

namespace {

}  // namespace

TEST(HelmWire, DemoSendsSteeringOverUdpDecodedByOwnAndIndependentParsers) {
    const fs::path dir = fs::temp_directory_path() / ("sg_helm_wire_" + std::to_string(getpid()));
    fs::remove_all(dir);
    fs::create_directories(dir);
    // The test's socket on an ephemeral port.
    const int sock = ::socket(AF_INET, SOCK_DGRAM, 0);
    ASSERT_GE(sock, 0);
    sockaddr_in addr{};
    addr.sin_family = AF_INET;
    addr.sin_addr.s_addr = htonl(INADDR_LOOPBACK);
    ASSERT_EQ(::bind(sock, reinterpret_cast<sockaddr*>(&addr), sizeof addr), 0);
    int rcvbuf = 4 << 20;
    ::setsockopt(sock, SOL_SOCKET, SO_RCVBUF, &rcvbuf, sizeof rcvbuf);
    socklen_t len = sizeof addr;
    ASSERT_EQ(::getsockname(sock, reinterpret_cast<sockaddr*>(&addr), &len), 0);
    const int port = ntohs(addr.sin_port);

    // The demo config with absolute plan paths and one steering output.
    const fs::path demo = fs::path(SG_SOURCE_DIR) / "replay_logs/demo";
    std::string cfg = sg::testdata::demoConfigWithAbsolutePlan();
    for (const char* f : {"plan_area.geojson", "plan_lines.geojson"})
        ASSERT_NE(cfg.find("\"" + (demo / f).string() + "\""), std::string::npos);
    cfg += "\n[[output]]\nname = \"bridge\"\nkind = \"steering\"\ntransport = \"udp\"\nhost = \"127.0.0.1\"\n"
           "port = " + std::to_string(port) + "\nrate_hz = 1\nsentences = [\"XTE\", \"APB\", \"RMB\"]\n";
    std::ofstream(dir / "survey.toml") << cfg;

    std::vector<std::string> got;
    std::atomic<bool> done{false};
    std::thread rx([&] {
        char buf[512];
        while (true) {
            pollfd p{sock, POLLIN, 0};
            if (::poll(&p, 1, 200) <= 0) {
                if (done) break;
                continue;
            }
            const auto n = ::recv(sock, buf, sizeof buf, 0);
            if (n > 0) got.emplace_back(buf, static_cast<std::size_t>(n));
        }
    });
    // 300 s of survey at 50x: about 6 s; HF01 is being run from about 60 s on.
    const std::string out = run(
        std::string(SG_BINARY_DIR) + "/app/swathguard demo --config " + (dir / "survey.toml").string() +
        " --out " + (dir / "out").string() + " --duration 300 --speed 50 --no-faults 2>&1");
    done = true;
    rx.join();
    ::close(sock);
    ASSERT_NE(out.find("output 'bridge'"), std::string::npos) << out;
    EXPECT_NE(out.find(" 0 failed"), std::string::npos) << out;

    // 1 Hz of survey time, three sentences each: about 3 x 301 datagrams.
    ASSERT_GE(got.size(), 3u * 295u);
    EXPECT_LE(got.size(), 3u * 302u);
    std::map<std::string, int> valid, voids;
    std::ofstream lines(dir / "lines.txt");
    std::vector<decode::RouteSentence> own;
    for (const auto& g : got) {
        ASSERT_GE(g.size(), 2u);
        EXPECT_EQ(g.substr(g.size() - 2), "\r\n");
        EXPECT_LE(g.size(), 82u) << g;
        const auto line = g.substr(0, g.size() - 2);
        lines << line << "\n";
        auto d = decode::decodeRouteNmea(line);
        ASSERT_EQ(d.reason, decode::Reason::Ok) << line << ": " << d.detail;
        EXPECT_TRUE(d.checksum_ok);
        EXPECT_EQ(d.talker, "IN");
        bool ok = false;
        if (auto* x = std::get_if<decode::Xte>(&d.data)) ok = x->valid;
        if (auto* a = std::get_if<decode::Apb>(&d.data)) ok = a->valid;
        if (auto* r = std::get_if<decode::Rmb>(&d.data)) ok = r->valid;
        (ok ? valid : voids)[d.type]++;
        own.push_back(std::move(d));
    }
    lines.close();
    // Before the first line is acquired the sentences are void; then valid on HF01.
    EXPECT_GT(valid["XTE"], 100);
    EXPECT_GT(voids["XTE"], 0);
    EXPECT_EQ(valid["XTE"], valid["APB"]);
    EXPECT_EQ(valid["XTE"], valid["RMB"]);
    // The destination of the first line is HF01's end in plan_lines.geojson (read here, not
    // through the project's CRS): RMB gives it to 0.001 minute.
    const auto plan = nlohmann::json::parse(readFile(demo / "plan_lines.geojson"));
    nlohmann::json hf01;
    for (const auto& f : plan["features"])
        if (f["properties"]["name"] == "HF01") hf01 = f["geometry"]["coordinates"];
    ASSERT_FALSE(hf01.is_null());
    const double end_lon = hf01.back()[0], end_lat = hf01.back()[1];
    const double start_lon = hf01.front()[0], start_lat = hf01.front()[1];

    if (run("command -v node").empty()) GTEST_SKIP() << "node (Debian package nodejs) not installed: the "
                                                        "independent parsers cannot run";
    const fs::path npm = fs::path(SG_BINARY_DIR) / "npm/node_modules";
    ASSERT_TRUE(fs::exists(npm / "@signalk/nmea0183-signalk") && fs::exists(npm / "nmea-simple"))
        << "run: bash scripts/install-npm-test-deps.sh " << SG_BINARY_DIR;
    const std::string js = run("NODE_PATH=" + npm.string() + " node " + SG_SOURCE_DIR +
                               "/tests/helm/npm/decode.js " + (dir / "lines.txt").string() + " 2>&1");
    std::istringstream in(js);
    std::string row;
    std::size_t k = 0, compared = 0;
    while (std::getline(in, row)) {
        ASSERT_LT(k, own.size()) << row;
        const auto j = nlohmann::json::parse(row);
        const auto& d = own[k++];
        ASSERT_EQ(j["line"].get<std::string>().substr(3, 3), d.type);
        if (const auto* x = std::get_if<decode::Xte>(&d.data); x && x->valid) {
            // Signal K: crossTrackError in metres, positive when steering left.
            ASSERT_TRUE(j.contains("sk")) << row;
            const double sk = j["sk"]["navigation.courseRhumbline.crossTrackError"];
            EXPECT_NEAR(sk, (x->steer == 'L' ? 1 : -1) * *x->xte_nm * 1852.0, 1e-6) << row;
            ++compared;
        } else if (const auto* r = std::get_if<decode::Rmb>(&d.data); r && r->valid) {
            ASSERT_TRUE(j.contains("sk")) << row;
            const auto& v = j["sk"];
            EXPECT_NEAR(v["navigation.courseRhumbline.crossTrackError"].get<double>(),
                        (r->steer == 'L' ? 1 : -1) * *r->xte_nm * 1852.0, 1e-6);
            EXPECT_NEAR(v["navigation.courseRhumbline.nextPoint.distance"].get<double>(), *r->range_nm * 1852.0, 1e-3);
            const double lat = v["navigation.courseRhumbline.nextPoint.position"]["latitude"];
            const double lon = v["navigation.courseRhumbline.nextPoint.position"]["longitude"];
            EXPECT_NEAR(lat, *r->dest_lat_deg, 1e-9);
            // The line is flown start -> end or end -> start: the destination is one of its ends.
            const bool at_end = std::abs(lat - end_lat) < 0.002 / 60 && std::abs(lon - end_lon) < 0.002 / 60;
            const bool at_start = std::abs(lat - start_lat) < 0.002 / 60 && std::abs(lon - start_lon) < 0.002 / 60;
            EXPECT_TRUE(at_end || at_start) << row;
            EXPECT_EQ(v["navigation.courseRhumbline.nextPoint.ID"], r->dest_id);
            ++compared;
        } else if (const auto* a = std::get_if<decode::Apb>(&d.data); a && a->valid) {
            ASSERT_TRUE(j.contains("simple")) << row;
            EXPECT_TRUE(j["simple"]["chxOk"].get<bool>());
            EXPECT_NEAR(j["simple"]["xteMagn"].get<double>(), *a->xte_nm, 1e-12);
            EXPECT_EQ(j["simple"]["steerDir"].get<std::string>(), std::string(1, a->steer));
            EXPECT_EQ(j["simple"]["waypoint"].get<std::string>(), a->dest_id);
            EXPECT_NEAR(j["sk"]["navigation.courseRhumbline.bearingOriginToDestinationTrue"].get<double>(),
                        *a->bearing_origin_dest_deg * M_PI / 180.0, 1e-6);
            ++compared;
        } else {
            // Void sentences (status V, empty fields). The Signal K parser refuses XTE as void,
            // gives no values for APB, and for RMB (whose status it does not read) no position;
            // nmea-simple accepts the APB's checksum. None reports a checksum error.
            if (d.type == "XTE") {
                ASSERT_TRUE(j.contains("sk_error")) << row;
                EXPECT_NE(j["sk_error"].get<std::string>().find("void"), std::string::npos) << row;
            } else if (d.type == "APB") {
                EXPECT_TRUE(j.contains("sk") && j["sk"].empty()) << row;
                EXPECT_TRUE(j["simple"]["chxOk"].get<bool>()) << row;
                EXPECT_EQ(j["simple"]["waypoint"].get<std::string>(), "") << row;
            } else {
                ASSERT_TRUE(j.contains("sk")) << row;
                EXPECT_TRUE(j["sk"]["navigation.courseRhumbline.nextPoint.position"].is_null()) << row;
            }
        }
    }
    EXPECT_EQ(k, own.size()) << js.substr(0, 2000);
    EXPECT_EQ(compared, static_cast<std::size_t>(valid["XTE"] * 3));
    fs::remove_all(dir);
}
