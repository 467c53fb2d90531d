// End to end on loopback: the simulator sends every instrument to its own UDP port at 10x real
// time for 60 s of simulated time, the real `swathguard record` acquires them, and every line the
// simulator reports having sent (its summary.json) is in the log's raw table.
#include <gtest/gtest.h>

#include <csignal>
#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <map>
#include <memory>
#include <cstdio>
#include <regex>
#include <sstream>
#include <thread>

#include <fcntl.h>
#include <spawn.h>
#include <sys/wait.h>
#include <unistd.h>

#include <nlohmann/json.hpp>

#include "log/log_reader.hpp"
#include "../demo_on_ports.hpp"
#include "../port_block.hpp"

extern char** environ;

namespace {

std::string readFile(const std::string& path) {
    std::ifstream in(path);
    std::stringstream ss;
    ss << in.rdbuf();
    return ss.str();
}

TEST(LoopbackRecord, EverySentLineIsInTheRawTable) {
    namespace fs = std::filesystem;
    const std::string src = SG_SOURCE_DIR;
    const std::string bin = SG_BINARY_DIR;
    const fs::path dir = fs::temp_directory_path() / ("sg_loopback_" + std::to_string(::getpid()));
    fs::remove_all(dir);
    fs::create_directories(dir);
    // Ports of our own (parallel test runs must not share them), plan files by absolute path.
    const sg::testdata::PortBlock ports(6);
    const int base = ports.base();
    std::string cfg = sg::testdata::demoConfigOnPorts(base);
    std::ofstream(dir / "survey.toml") << cfg;
    const std::string log = (dir / "loop.sglog").string();

    const std::string rec_bin = bin + "/app/swathguard";
    const std::string cfg_path = (dir / "survey.toml").string();
    const char* rec_argv[] = {rec_bin.c_str(), "record", "--config", cfg_path.c_str(), "--log",
                              log.c_str(), "--headless", nullptr};
    posix_spawn_file_actions_t fa;
    posix_spawn_file_actions_init(&fa);
    posix_spawn_file_actions_addopen(&fa, 1, "/dev/null", O_WRONLY, 0);
    pid_t rec = -1;
    ASSERT_EQ(posix_spawn(&rec, rec_bin.c_str(), &fa, nullptr, const_cast<char**>(rec_argv), environ), 0);
    posix_spawn_file_actions_destroy(&fa);
    std::this_thread::sleep_for(std::chrono::milliseconds(1500));  // readers bound

    const std::string sim = bin + "/drivers_sim/swathguard-sim --scenario " + src +
                            "/replay_logs/demo/scenario.toml --out udp --base-port " +
                            std::to_string(base) + " --speed 10 --duration 60 --dir " +
                            (dir / "sim").string() + " > /dev/null";
    ASSERT_EQ(std::system(sim.c_str()), 0);
    std::this_thread::sleep_for(std::chrono::milliseconds(1500));  // last datagrams logged
    ::kill(rec, SIGINT);
    int status = 0;
    ::waitpid(rec, &status, 0);
    ASSERT_TRUE(WIFEXITED(status)) << "record did not exit cleanly";
    EXPECT_EQ(WEXITSTATUS(status), 0);

    const auto summary = nlohmann::json::parse(readFile((dir / "sim" / "summary.json").string()));
    std::map<std::string, std::int64_t> sent;
    std::int64_t total_sent = 0;
    for (const auto& [name, ch] : summary.at("channels").items()) {
        sent[name] = ch.at("sent").get<std::int64_t>();
        total_sent += sent[name];
    }
    ASSERT_GT(total_sent, 5000);
    sg::log::LogReader reader(log);
    std::map<std::string, std::int64_t> logged;
    sg::ReceivedLine line;
    while (reader.next(line)) ++logged[line.source];
    for (const auto& [name, n] : sent) EXPECT_EQ(logged[name], n) << "channel " << name;
    fs::remove_all(dir);
}

// A wrong sensor index in a live `record`: the simulator's strings carry sensors 0-3, the config
// says 10-13. The unknown_sensor alarm is raised within seconds of the first string (survey
// time), and the run ends with exit 5 (samples arrived, nothing covered) and the counts.
TEST(LoopbackRecord, AWrongSensorIndexRaisesUnknownSensorAndEndsWithExitFive) {
    namespace fs = std::filesystem;
    const std::string src = SG_SOURCE_DIR;
    const std::string bin = SG_BINARY_DIR;
    const fs::path dir = fs::temp_directory_path() / ("sg_wrongsensor_" + std::to_string(::getpid()));
    fs::remove_all(dir);
    fs::create_directories(dir);
    const sg::testdata::PortBlock ports(6);
    const int base = ports.base();
    std::string cfg = sg::testdata::demoConfigOnPorts(base);
    cfg = std::regex_replace(cfg, std::regex("\nindex = ([0-3])\n"), "\nindex = 1$1\n");
    ASSERT_NE(cfg.find("index = 13"), std::string::npos);
    std::ofstream(dir / "survey.toml") << cfg;
    const std::string log = (dir / "wrong.sglog").string();
    const std::string rec_bin = bin + "/app/swathguard";
    const std::string cfg_path = (dir / "survey.toml").string();
    const std::string err_path = (dir / "err.txt").string();
    const char* rec_argv[] = {rec_bin.c_str(), "record", "--config", cfg_path.c_str(), "--log",
                              log.c_str(), "--headless", nullptr};
    posix_spawn_file_actions_t fa;
    posix_spawn_file_actions_init(&fa);
    posix_spawn_file_actions_addopen(&fa, 1, "/dev/null", O_WRONLY, 0);
    posix_spawn_file_actions_addopen(&fa, 2, err_path.c_str(), O_WRONLY | O_CREAT | O_TRUNC, 0644);
    pid_t rec = -1;
    ASSERT_EQ(posix_spawn(&rec, rec_bin.c_str(), &fa, nullptr, const_cast<char**>(rec_argv), environ), 0);
    posix_spawn_file_actions_destroy(&fa);
    std::this_thread::sleep_for(std::chrono::milliseconds(1500));  // readers bound
    const std::string sim = bin + "/drivers_sim/swathguard-sim --scenario " + src +
                            "/replay_logs/demo/scenario.toml --out udp --base-port " +
                            std::to_string(base) + " --speed 10 --duration 30 --dir " +
                            (dir / "sim").string() + " > /dev/null";
    ASSERT_EQ(std::system(sim.c_str()), 0);
    std::this_thread::sleep_for(std::chrono::milliseconds(1500));
    ::kill(rec, SIGINT);
    int status = 0;
    ::waitpid(rec, &status, 0);
    ASSERT_TRUE(WIFEXITED(status));
    EXPECT_EQ(WEXITSTATUS(status), 5) << readFile(err_path);
    const std::string err = readFile(err_path);
    // The counts by reason.
    EXPECT_NE(err.find("nothing was covered although"), std::string::npos) << err;
    EXPECT_NE(err.find("sensor index with no [[sensor]]"), std::string::npos) << err;
    const auto q = [&log](const std::string& sql) {
        std::string out;
        std::unique_ptr<FILE, int (*)(FILE*)> p(
            popen(("sqlite3 '" + log + "' \"" + sql + "\"").c_str(), "r"), pclose);
        char buf[256];
        while (p && fgets(buf, sizeof buf, p.get())) out += buf;
        while (!out.empty() && out.back() == '\n') out.pop_back();
        return out;
    };
    const std::string first_mag = q("select min(time_utc_ns) from mag_samples");
    const std::string alarm = q("select min(start_utc_ns) from events where kind = 'alarm.unknown_sensor'");
    ASSERT_FALSE(first_mag.empty());
    ASSERT_FALSE(alarm.empty()) << "no unknown_sensor alarm in the log";
    const double after_s = (std::stod(alarm) - std::stod(first_mag)) * 1e-9;
    std::printf("unknown_sensor alarm %.2f s (survey time) after the first magnetometer string\n", after_s);
    EXPECT_GE(after_s, 0.0);
    EXPECT_LE(after_s, 3.0);
    EXPECT_NE(q("select detail from events where kind = 'alarm.unknown_sensor' limit 1").find("has no configured offsets"),
              std::string::npos);
    fs::remove_all(dir);
}

}  // namespace
