// The screen on a replay of a log recorded at 20x (issue #12): the demo survey's simulator sends
// every instrument over UDP at 20x real time into the real `swathguard record` (as
// scripts/demo.sh does, for a 430 s window over the noise burst (1150 s), the cable jump (1300 s)
// and the altitude excursion (1450-1510 s) of replay_logs/demo/scenario.toml), and the log is replayed through LogReplay and the
// SnapshotBuilder as `swathguard replay` does. Checks:
// - the altitude plot has trace pixels (the plots run on the survey clock, like the samples);
// - "next alarm" visits every episode of the log in order, stops at the last, and never goes past
//   the end of the log (no silence alarm the log did not have);
// - no track pixel beyond the tracks' bounding box (the stray line to E 0, N 0);
// - screenshots by day and night at UI scale 1.0 and 2.0 (build/test_ui_out/replay_*.png).
#include <gtest/gtest.h>

#include <algorithm>
#include <csignal>
#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <mutex>
#include <sstream>
#include <thread>

#include <fcntl.h>
#include <spawn.h>
#include <sys/wait.h>
#include <unistd.h>

#include "engine/log_replay.hpp"
#include "engine/snapshot_builder.hpp"
#include "ui/layout.hpp"
#include "ui/plan_view.hpp"
#include "ui/screen.hpp"
#include "png_image.hpp"
#include "screen_render.hpp"
#include "../demo_on_ports.hpp"
#include "../port_block.hpp"

extern char** environ;

namespace {

namespace fs = std::filesystem;
constexpr double kFrom_s = 1130.0, kTo_s = 1560.0;  // simulated seconds since the demo's start

// Records the demo window at 20x through the real binaries, once per test process.
const std::string& demoLog20x() {
    static std::once_flag once;
    static std::string log;
    std::call_once(once, [] {
        const std::string src = SG_SOURCE_DIR;
        const std::string bin = SG_BINARY_DIR;
        // One folder per test process: ctest runs each test of this file in a process of its
        // own, in parallel, and a shared log would be locked by (or removed under) another.
        const fs::path dir =
            fs::path(bin) / "test_ui_out" / ("replay20x-" + std::to_string(::getpid()));
        fs::remove_all(dir);
        fs::create_directories(dir);
        static const struct RemoveAtExit {
            fs::path d;
            ~RemoveAtExit() {
                std::error_code ec;
                fs::remove_all(d, ec);
            }
        } remove_at_exit{dir};
        // Ports of our own (parallel test runs must not share them), plan files by absolute path.
        static const sg::testdata::PortBlock ports(6);
        const int base = ports.base();
        std::string cfg = sg::testdata::demoConfigOnPorts(base);
        std::ofstream(dir / "survey.toml") << cfg;
        const std::string path = (dir / "demo20x.sglog").string();
        const std::string rec_bin = bin + "/app/swathguard";
        const std::string cfg_path = (dir / "survey.toml").string();
        const char* argv[] = {rec_bin.c_str(), "record", "--config", cfg_path.c_str(), "--log", path.c_str(),
                              "--headless", nullptr};
        posix_spawn_file_actions_t fa;
        posix_spawn_file_actions_init(&fa);
        posix_spawn_file_actions_addopen(&fa, 1, "/dev/null", O_WRONLY, 0);
        pid_t rec = -1;
        if (posix_spawn(&rec, rec_bin.c_str(), &fa, nullptr, const_cast<char**>(argv), environ) != 0) return;
        posix_spawn_file_actions_destroy(&fa);
        std::this_thread::sleep_for(std::chrono::milliseconds(1500));  // readers bound
        const std::string sim = bin + "/drivers_sim/swathguard-sim --scenario " + src +
                                "/replay_logs/demo/scenario.toml --out udp --base-port " + std::to_string(base) +
                                " --speed 20 --from " + std::to_string(kFrom_s) + " --to " + std::to_string(kTo_s) +
                                " --dir " + (dir / "sim").string() + " > /dev/null";
        const int sim_rc = std::system(sim.c_str());
        std::this_thread::sleep_for(std::chrono::milliseconds(1500));  // last datagrams logged
        ::kill(rec, SIGINT);
        int status = 0;
        ::waitpid(rec, &status, 0);
        if (sim_rc == 0 && WIFEXITED(status) && WEXITSTATUS(status) == 0) log = path;
    });
    return log;
}

using sg::testui::Image;
using sg::testui::loadPng;
using sg::testui::near;

class ReplayScreen : public ::testing::Test {
protected:
    void SetUp() override {
        m_dir = fs::path(SG_BINARY_DIR) / "test_ui_out";
        fs::create_directories(m_dir);
        ASSERT_FALSE(demoLog20x().empty()) << "recording the demo at 20x failed";
    }
    // The replayed survey at survey time first + offset_s (the snapshot the screen would get).
    std::shared_ptr<const sg::engine::Snapshot> replayAt(double offset_s, std::vector<sg::TimeNs>* episodes = nullptr) {
        sg::engine::LogReplay replay(demoLog20x(), std::nullopt);
        sg::engine::SnapshotBuilder builder(replay.pipeline().engine());
        builder.setInputCounters(&replay.pipeline().decoder());
        replay.runUntilSurvey(replay.surveyFirst() + static_cast<sg::TimeNs>(offset_s * 1e9));
        if (episodes) *episodes = replay.episodeStarts();
        return builder.build(/*force_gaps=*/true);
    }
    Image render(std::shared_ptr<const sg::engine::Snapshot> snap, const std::string& name, const std::string& ini) {
        return sg::testui::renderSnapshot(std::move(snap), m_dir, name, ini);
    }
    fs::path m_dir;
};

TEST_F(ReplayScreen, LogRecordedAt20xPlotsAltitudeOnTheSurveyClock) {
    const auto snap = replayAt(350.0);  // inside the altitude excursion (1450-1510 s)
    // The survey clock, not the receive clock: 100 s into a log that took 9 s to record.
    ASSERT_FALSE(snap->plots.empty());
    ASSERT_EQ(snap->plots.front().title, "Altitude");
    ASSERT_FALSE(snap->plots.front().series.empty());
    const auto& first = snap->plots.front().series.front()->points;
    ASSERT_FALSE(first.empty());
    const double last_t = first.chunks.back()->back().t_s;
    EXPECT_NEAR(snap->now_s, last_t, 2.0) << "screen time is not the samples' time";
    // 350 survey seconds after the first line, though the log took 22 receive seconds to record.
    EXPECT_NEAR(snap->now_s - first.chunks.front()->front().t_s, 350.0, 15.0);

    // Only the altitude plot shown: it fills the plot slot; count pixels in the series colours.
    const Image img = render(snap, "replay_altitude",
                             "[screen]\npalette = day\nui_scale = 1.0\nfollow_vessel = false\n"
                             "hidden_plots = Deviation, Total field, Gradient, Noise, Speed\n");
    ASSERT_EQ(img.w, 1600);
    const auto l = sg::ui::computeLayout({1600, 1000}, 1.0f, false, true);
    const auto& pal = sg::ui::dayPalette();
    int trace = 0;
    for (int y = static_cast<int>(l.plots.min.y); y < static_cast<int>(l.plots.max.y); ++y)
        for (int x = static_cast<int>(l.plots.min.x); x < static_cast<int>(l.plots.max.x); ++x)
            for (std::size_t k = 0; k < 4; ++k)
                if (near(img.at(x, y), pal.seriesColour(k), 12)) {
                    ++trace;
                    break;
                }
    EXPECT_GT(trace, 400) << "no altitude trace in the plot";
}

TEST_F(ReplayScreen, NextAlarmVisitsEveryEpisodeInOrderAndStopsAtTheLast) {
    sg::engine::LogReplay replay(demoLog20x(), std::nullopt);
    sg::engine::EpisodeCursor cursor(replay.episodeStarts());
    const auto& starts = cursor.starts();
    ASSERT_GE(starts.size(), 2u) << "the window should hold several episodes";
    for (std::size_t i = 0; i < starts.size(); ++i) {
        const auto got = replay.nextEpisode(cursor);
        ASSERT_TRUE(got.has_value()) << "episode " << i;
        EXPECT_EQ(*got, i);
        // It stands at the episode: at or just after its start (one line at most), on the survey
        // clock, inside the log.
        EXPECT_GE(replay.surveyNow(), starts[i]);
        EXPECT_LT(replay.surveyNow() - starts[i], 1'000'000'000) << "episode " << i;
        EXPECT_LE(replay.surveyNow(), replay.surveyLast());
    }
    // After the last: it stays where it is.
    const sg::TimeNs at_last = replay.surveyNow();
    const std::uint64_t fed = replay.linesFed();
    EXPECT_FALSE(replay.nextEpisode(cursor).has_value());
    EXPECT_EQ(replay.surveyNow(), at_last);
    EXPECT_EQ(replay.linesFed(), fed);
    // Playing on past the end of the log (a minute beyond): the clock stops at the log's end and
    // no episode starts after it (before the fix two silence warnings appeared there).
    replay.runUntilSurvey(replay.surveyLast() + 60'000'000'000);
    EXPECT_FALSE(replay.nextTime().has_value());
    EXPECT_LE(replay.surveyNow(), replay.surveyLast() + 1'000'000'000);
    for (const auto& ep : replay.pipeline().engine().checks().episodes())
        EXPECT_LE(ep.start_ns, replay.surveyLast()) << ep.check << " started after the end of the log";
    // The replay's own episodes are the log's (same starts, same order).
    std::vector<sg::TimeNs> replayed;
    for (const auto& ep : replay.pipeline().engine().checks().episodes()) replayed.push_back(ep.start_ns);
    std::sort(replayed.begin(), replayed.end());
    EXPECT_EQ(replayed, starts);
}

TEST_F(ReplayScreen, NoTrackPixelBeyondTheTracksBoundingBox) {
    const auto snap = replayAt(120.0);
    // The core: no track point far from the others (the first epoch once averaged in sensors
    // with no sample yet, at E 0, N 0).
    double e0 = 1e300, e1 = -1e300, n0 = 1e300, n1 = -1e300;
    std::size_t points = 0;
    auto add = [&](const sg::engine::Chunked<sg::engine::PointEN>& t) {
        t.forEach([&](const sg::engine::PointEN& p) {
            e0 = std::min(e0, p.e_m);
            e1 = std::max(e1, p.e_m);
            n0 = std::min(n0, p.n_m);
            n1 = std::max(n1, p.n_m);
            ++points;
        });
    };
    add(snap->tow_track);
    for (const auto& s : snap->sensors) add(s.track);
    ASSERT_GT(points, 100u);
    // 120 s at 2-3 m/s: every track lies within a few hundred metres.
    EXPECT_LT(e1 - e0, 1000.0);
    EXPECT_LT(n1 - n0, 1000.0);

    // The screen: render with and without the tracks; every pixel that differs lies inside the
    // tracks' bounding box on screen (plus the line width).
    const std::string ini = "[screen]\npalette = night\nui_scale = 1.0\nfollow_vessel = false\n";
    const Image with = render(snap, "replay_tracks", ini);
    auto bare = std::make_shared<sg::engine::Snapshot>(*snap);
    bare->tow_track = {};
    for (auto& s : bare->sensors) s.track = {};
    const Image without = render(bare, "replay_no_tracks", ini);
    ASSERT_EQ(with.w, without.w);
    const auto l = sg::ui::computeLayout({1600, 1000}, 1.0f, false, true);
    const auto t = sg::ui::fitTransform(sg::ui::surveyBounds(*snap), l.plan);
    const ImVec2 a = t.toScreen({e0, n1}), b = t.toScreen({e1, n0});
    const float margin = 4.0f;
    int inside = 0, outside = 0;
    for (int y = static_cast<int>(l.plan.min.y) + 2; y < static_cast<int>(l.plan.max.y) - 2; ++y)
        for (int x = static_cast<int>(l.plan.min.x) + 2; x < static_cast<int>(l.plan.max.x) - 2; ++x) {
            if (near(with.at(x, y), without.at(x, y), 3)) continue;
            const float fx = static_cast<float>(x), fy = static_cast<float>(y);
            const bool in = fx >= std::min(a.x, b.x) - margin && fx <= std::max(a.x, b.x) + margin &&
                            fy >= std::min(a.y, b.y) - margin && fy <= std::max(a.y, b.y) + margin;
            (in ? inside : outside) += 1;
        }
    EXPECT_GT(inside, 200) << "the tracks were not drawn";
    EXPECT_EQ(outside, 0) << "track pixels beyond the tracks' bounding box";
}

TEST_F(ReplayScreen, ScreenshotsByDayAndNightAtTwoScales) {
    const auto snap = replayAt(350.0);
    ASSERT_TRUE(snap->hasUnacknowledgedActiveAlarm()) << "the altitude excursion should be on";
    double mean[2][2] = {};
    int pi = 0;
    for (const char* palette : {"day", "night"}) {
        int si = 0;
        for (const char* scale : {"1.0", "2.0"}) {
            const std::string name = std::string("replay_") + palette + "_" + (si == 0 ? "1" : "2");
            const Image img = render(snap, name,
                                     std::string("[screen]\npalette = ") + palette + "\nui_scale = " + scale +
                                         "\nfollow_vessel = false\n");
            ASSERT_EQ(img.w, 1600);
            double sum = 0;  // Rec. 709 luma
            for (std::size_t i = 0; i + 2 < img.rgb.size(); i += 3)
                sum += 0.2126 * img.rgb[i] + 0.7152 * img.rgb[i + 1] + 0.0722 * img.rgb[i + 2];
            mean[pi][si] = sum / (static_cast<double>(img.rgb.size()) / 3);
            // The alarm banner is up (an active, unacknowledged alarm), in its reserved strip.
            const auto l = sg::ui::computeLayout({1600, 1000}, si == 0 ? 1.0f : 2.0f, false, true);
            const auto& pal = sg::ui::paletteFor(pi == 1);
            int hit = 0, all = 0;
            for (int x = 0; x < img.w; x += 3, ++all)
                hit += near(img.at(x, static_cast<int>(l.banner.min.y) + 3), pal.banner, 2) ? 1 : 0;
            EXPECT_GT(static_cast<double>(hit) / all, 0.3) << name;
            ++si;
        }
        ++pi;
    }
    EXPECT_LT(mean[1][0], mean[0][0] / 2) << "night is not much dimmer than day";
}

}  // namespace
