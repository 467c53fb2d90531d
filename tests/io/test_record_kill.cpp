// The real `swathguard record` binary killed with SIGKILL mid-run: Debian's sqlite3 shell (the
// outside reference) must find the log intact, and it must hold every line that was written more
// than one commit interval (plus reader and flush slack) before the kill, in order.
#include <gtest/gtest.h>

#include <fcntl.h>
#include <signal.h>
#include <spawn.h>
#include <sys/wait.h>
#include <unistd.h>

#include <fstream>
#include <thread>

#include "io_test_util.hpp"
#include "log/log_reader.hpp"

extern char** environ;

namespace {

using namespace sg;
using Clock = std::chrono::steady_clock;

TEST(RecordKill, KilledRecorderLeavesAnIntactLogWithEverythingCommitted) {
    test::TempDir dir;
    const auto data = dir.file("gnss.txt");
    const auto logp = dir.file("killed.sqlite");
    const auto cfg = dir.file("survey.toml");
    {
        std::ofstream c(cfg);
        c << "[[input]]\nname = \"gnss\"\nkind = \"nmea\"\nrole = \"gnss\"\ntransport = \"file\"\n"
          << "path = \"" << data << "\"\nfollow = true\n\n[log]\ncommit_interval_ms = 1000\n"
          // record runs the whole core, which needs a field and a target class.
          << "[geomagnetic]\ninclination_deg = 66.0\nintensity_nT = 50000.0\n"
          << "[[target]]\nname = \"t\"\nmodel = \"mass_rule\"\nmass_kg = 50.0\n";
    }
    std::ofstream out(data, std::ios::binary);
    const std::string bin = std::string(SG_BINARY_DIR) + "/app/swathguard";
    const char* argv[] = {bin.c_str(), "record", "--config", cfg.c_str(), "--log", logp.c_str(),
                          "--headless", nullptr};
    posix_spawn_file_actions_t fa;
    posix_spawn_file_actions_init(&fa);
    posix_spawn_file_actions_addopen(&fa, 1, "/dev/null", O_WRONLY, 0);
    pid_t pid = -1;
    ASSERT_EQ(posix_spawn(&pid, bin.c_str(), &fa, nullptr, const_cast<char**>(argv), environ), 0);
    posix_spawn_file_actions_destroy(&fa);

    // Write 100 lines every 50 ms for 3.5 s, remembering when each was flushed to the file.
    std::vector<std::string> lines;
    std::vector<Clock::time_point> written;
    const auto start = Clock::now();
    int n = 0;
    while (Clock::now() - start < std::chrono::milliseconds(3500)) {
        for (int k = 0; k < 100; ++k, ++n) {
            lines.push_back(n % 10 == 9 ? "garbage " + std::to_string(n) : test::gga(n * 0.01));
            out << lines.back() << "\r\n";
        }
        out.flush();
        const auto t = Clock::now();
        written.resize(lines.size(), t);
        std::this_thread::sleep_for(std::chrono::milliseconds(50));
    }
    const auto killed_at = Clock::now();
    ASSERT_EQ(::kill(pid, SIGKILL), 0);
    int status = 0;
    ::waitpid(pid, &status, 0);
    ASSERT_TRUE(WIFSIGNALED(status));

    EXPECT_EQ(test::shell("sqlite3 " + logp + " 'pragma integrity_check'"), "ok");
    log::LogReader r(logp);
    std::vector<std::string> got;
    std::int64_t id = 0;
    log::RawRow row;
    while (r.next(id, row)) got.push_back(row.bytes);
    // Worst case: 1 s commit interval + 100 ms recorder flush + 50 ms file poll; 0.85 s slack
    // for a loaded CI machine.
    const auto must_have = killed_at - std::chrono::milliseconds(2000);
    std::size_t required = 0;
    while (required < written.size() && written[required] <= must_have) ++required;
    EXPECT_GT(required, 1000u);
    EXPECT_GE(got.size(), required) << "lines written long before the kill are missing";
    ASSERT_LE(got.size(), lines.size());
    for (std::size_t i = 0; i < got.size(); ++i) ASSERT_EQ(got[i], lines[i]) << "line " << i;
    EXPECT_EQ(test::shell("sqlite3 " + logp + " 'select count(*) from raw_lines'"),
              std::to_string(got.size()));
}

}  // namespace
