// Screen tests that need a display: render the synthetic (test-data) snapshot to a PNG through the
// real window, OpenGL context and ImGui backends, and check pixels where the test data puts a
// covered strip, the gap, and the alarm banner; and a stall test showing that a paused screen never
// blocks a producer. Without DISPLAY the test starts its own Xvfb (it picks a free display number
// itself with -displayfd) and stops it afterwards.
#include <gtest/gtest.h>

#include <atomic>
#include <chrono>
#include <csignal>
#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <string>
#include <thread>

#include <fcntl.h>
#include <sys/prctl.h>
#include <sys/wait.h>
#include <unistd.h>

#include "drivers_sim/pipeline_feed.hpp"
#include "drivers_sim/simulator.hpp"
#include "engine/pipeline.hpp"
#include "engine/snapshot_builder.hpp"
#include "synthetic_snapshot.hpp"
#include "ui/layout.hpp"
#include "ui/plan_view.hpp"
#include "ui/screen.hpp"
#include "png_image.hpp"
#include "screen_render.hpp"

namespace {

namespace fs = std::filesystem;
using sg::testdata::kOriginE;
using sg::testdata::kOriginN;

class XvfbEnvironment : public ::testing::Environment {
public:
    void SetUp() override {
        if (const char* d = std::getenv("DISPLAY"); d && *d) return;
        int fds[2];
        ASSERT_EQ(pipe(fds), 0);
        m_pid = fork();
        ASSERT_GE(m_pid, 0);
        if (m_pid == 0) {
            close(fds[0]);
            // Die with the test process, and keep the test's stdout/stderr free.
            prctl(PR_SET_PDEATHSIG, SIGTERM);
            const int devnull = open("/dev/null", O_RDWR);
            dup2(devnull, 1);
            dup2(devnull, 2);
            const std::string fd = std::to_string(fds[1]);
            execlp("Xvfb", "Xvfb", "-displayfd", fd.c_str(), "-screen", "0", "1600x1000x24", "-nolisten", "tcp",
                   static_cast<char*>(nullptr));
            _exit(127);
        }
        close(fds[1]);
        // Xvfb writes the display number it chose once it accepts connections.
        std::string number;
        char c = 0;
        while (read(fds[0], &c, 1) == 1 && c != '\n') number += c;
        close(fds[0]);
        ASSERT_FALSE(number.empty()) << "Xvfb did not start (is the xvfb package installed?)";
        setenv("DISPLAY", (":" + number).c_str(), 1);
    }
    void TearDown() override {
        if (m_pid > 0) {
            kill(m_pid, SIGTERM);
            waitpid(m_pid, nullptr, 0);
            unsetenv("DISPLAY");
        }
    }

private:
    pid_t m_pid = -1;
};

[[maybe_unused]] auto* const g_xvfb = ::testing::AddGlobalTestEnvironment(new XvfbEnvironment);

using sg::testui::Image;
using sg::testui::loadPng;
using sg::testui::fractionNear;
using sg::testui::near;

class ScreenTest : public ::testing::Test {
protected:
    void SetUp() override {
        m_dir = fs::path(SG_BINARY_DIR) / "test_ui_out";
        fs::create_directories(m_dir);
        const std::string name = ::testing::UnitTest::GetInstance()->current_test_info()->name();
        m_ini = (m_dir / (name + ".ini")).string();
        // Fixed view: no following, so the plan view fits the survey area (day palette, scale 1).
        std::ofstream(m_ini) << "[screen]\npalette = day\nui_scale = 1.0\nfollow_vessel = false\n";
    }
    // Renders `snap` to <name>.png after a few frames and loads it.
    Image render(std::shared_ptr<const sg::engine::Snapshot> snap, const std::string& name) {
        return sg::testui::renderSnapshotWith(std::move(snap), m_ini, (m_dir / (name + ".png")).string());
    }
    fs::path m_dir;
    std::string m_ini;
};

TEST_F(ScreenTest, CoverageColourInsideCoveredStripAndNotInGap) {
    const auto snap = sg::testdata::makeSyntheticSnapshot({});
    const Image img = render(snap, "coverage");
    ASSERT_EQ(img.w, 1600);
    ASSERT_EQ(img.h, 1000);
    const auto layout = sg::ui::computeLayout({1600, 1000}, 1.0f, false, /*banner=*/true);
    const auto t = sg::ui::fitTransform(sg::ui::surveyBounds(*snap), layout.plan);
    const auto& pal = sg::ui::dayPalette();
    // Blocks centred 30 m north of lines L01, L02 and L05, away from the tracks (on the lines and
    // up to 9 m off them) and the labels. Each pixel must show the colour of the cell under it,
    // as the test data's own margin rule gives it.
    for (auto [e, n] : {std::pair{250.0, 80.0}, {700.0, 180.0}, {500.0, 480.0}}) {
        const ImVec2 c = t.toScreen({kOriginE + e, kOriginN + n});
        ASSERT_TRUE(layout.plan.contains(c));
        int hit = 0, all = 0;
        for (int dy = -4; dy <= 4; ++dy)
            for (int dx = -4; dx <= 4; ++dx) {
                const ImVec2 px{std::floor(c.x) + static_cast<float>(dx) + 0.5f, std::floor(c.y) + static_cast<float>(dy) + 0.5f};
                const auto w = t.toWorld(px);
                const ImU32 expected = pal.marginColour(sg::testdata::expectedMargin(w.e_m - kOriginE, w.n_m - kOriginN));
                ++all;
                // Tolerance: a pixel straddling two cells may show either neighbour (q differs by ~4).
                hit += near(img.at(static_cast<int>(px.x), static_cast<int>(px.y)), expected, 12) ? 1 : 0;
            }
        EXPECT_GT(static_cast<double>(hit) / all, 0.9) << "no coverage colour at E+" << e << " N+" << n;
        // And it is not the background.
        EXPECT_LT(fractionNear(img, c, 4, pal.background, 2), 0.05);
    }
    // Inside the gap (south half, away from the infill line): the background, no coverage colour.
    const ImVec2 g = t.toScreen({kOriginE + 520.0, kOriginN + 322.0});
    EXPECT_GT(fractionNear(img, g, 3, pal.background, 2), 0.8);
    for (int q : {55, 128, 200, 255})
        EXPECT_LT(fractionNear(img, g, 3, pal.marginColour(static_cast<std::uint8_t>(q)), 20), 0.05);
}

TEST_F(ScreenTest, GapOutlineDrawnAtTheKnownGap) {
    const auto snap = sg::testdata::makeSyntheticSnapshot({});
    const Image img = render(snap, "gap");
    const auto layout = sg::ui::computeLayout({1600, 1000}, 1.0f, false, /*banner=*/true);
    const auto t = sg::ui::fitTransform(sg::ui::surveyBounds(*snap), layout.plan);
    const auto& pal = sg::ui::dayPalette();
    // Midpoints of the gap's west and east edges and of its south edge.
    for (auto [e, n] : {std::pair{sg::testdata::kGapE0, 330.0}, {sg::testdata::kGapE1, 330.0}, {450.0, sg::testdata::kGapN0}}) {
        const ImVec2 p = t.toScreen({kOriginE + e, kOriginN + n});
        EXPECT_GT(fractionNear(img, p, 2, pal.gap, 40), 0.1) << "no gap outline at E+" << e << " N+" << n;
    }
    // And not in a fully covered place far from the gap.
    const ImVec2 far = t.toScreen({kOriginE + 150.0, kOriginN + 480.0});
    EXPECT_EQ(fractionNear(img, far, 2, pal.gap, 40), 0.0);
}

// Fraction of the banner's always-covered band (the top part of its smallest pulse) in banner colour.
double bannerFraction(const Image& img, const sg::ui::Layout& l, ImU32 banner) {
    int hit = 0, all = 0;
    for (int y = static_cast<int>(l.banner.min.y) + 4; y < static_cast<int>(l.banner.min.y) + 40; y += 2)
        for (int x = 0; x < img.w; x += 3) {
            ++all;
            hit += near(img.at(x, y), banner, 2) ? 1 : 0;
        }
    return static_cast<double>(hit) / all;
}

TEST_F(ScreenTest, AlarmBannerWhileUnacknowledgedAndGoneAfterAcknowledgement) {
    const auto layout = sg::ui::computeLayout({1600, 1000}, 1.0f, false, /*banner=*/true);
    const auto& pal = sg::ui::dayPalette();
    const Image on = render(sg::testdata::makeSyntheticSnapshot({}), "banner_on");
    EXPECT_GT(bannerFraction(on, layout, pal.banner), 0.4);
    sg::testdata::SyntheticOptions acked;
    acked.acknowledge_alarm = true;
    const Image off = render(sg::testdata::makeSyntheticSnapshot(acked), "banner_off");
    EXPECT_LT(bannerFraction(off, layout, pal.banner), 0.01);
}

TEST_F(ScreenTest, LargeUiScaleRebuildsFontsAndGrowsTheBanner) {
    std::ofstream(m_ini, std::ios::trunc) << "[screen]\nui_scale = 1.5\nfollow_vessel = false\n";
    const Image img = render(sg::testdata::makeSyntheticSnapshot({}), "scale_1_5");
    const auto big = sg::ui::computeLayout({1600, 1000}, 1.5f, false, true);
    EXPECT_GT(bannerFraction(img, big, sg::ui::dayPalette().banner), 0.4);
    // Row 110: below the banner body's smallest extent at scale 1 (toolbar 30 + 70 % of 86 - 12
    // stripe px = 78), inside it at scale 1.5 (45 + 70 % of 129 - 18 = 117).
    int hit = 0, all = 0;
    for (int x = 0; x < img.w; x += 3, ++all) hit += near(img.at(x, 110), sg::ui::dayPalette().banner, 2) ? 1 : 0;
    EXPECT_GT(static_cast<double>(hit) / all, 0.3);
}

double meanLuminance(const Image& img) {
    // Rec. 709 luma weights.
    double sum = 0;
    for (std::size_t i = 0; i + 2 < img.rgb.size(); i += 3)
        sum += 0.2126 * img.rgb[i] + 0.7152 * img.rgb[i + 1] + 0.0722 * img.rgb[i + 2];
    return img.rgb.empty() ? 0.0 : sum / (static_cast<double>(img.rgb.size()) / 3);
}

TEST_F(ScreenTest, NightPaletteIsMuchDimmerThanDay) {
    sg::testdata::SyntheticOptions o;
    o.acknowledge_alarm = true;
    const Image day = render(sg::testdata::makeSyntheticSnapshot(o), "day");
    std::ofstream(m_ini, std::ios::trunc) << "[screen]\npalette = night\nfollow_vessel = false\n";
    const Image night = render(sg::testdata::makeSyntheticSnapshot(o), "night");
    const double d = meanLuminance(day), n = meanLuminance(night);
    EXPECT_GT(d, 150.0);
    // The synthetic survey is mostly covered at the strongest margin class, and every class must
    // keep 3:1 against the night background (test_palette.cpp): that floor puts the covered area
    // at a luma of about 100-140, so the mean cannot go as low as a plain dark screen; it must
    // still stay under a third of the day screen's.
    EXPECT_LT(n, 50.0);
    EXPECT_LT(n, 0.3 * d);
}

// The saved tab is the one shown: the Profiles tab fills the tab area with the sensors' traces
// (series colours), the Runs tab does not; the replay strip is on screen in both
// (build/test_ui_out/tab_*.png are also for a person to look at).
int seriesPixels(const Image& img, const sg::ui::Rect& r) {
    const auto& pal = sg::ui::dayPalette();
    int n = 0;
    for (int y = static_cast<int>(r.min.y); y < static_cast<int>(r.max.y); ++y)
        for (int x = static_cast<int>(r.min.x); x < static_cast<int>(r.max.x); ++x)
            for (int k = 0; k < 4; ++k)
                if (near(img.at(x, y), pal.seriesColour(static_cast<std::size_t>(k)), 10)) {
                    ++n;
                    break;
                }
    return n;
}

TEST_F(ScreenTest, SavedTabIsShownAndReplayStripRenders) {
    sg::testdata::SyntheticOptions o;
    o.acknowledge_alarm = true;
    o.replay = true;
    const auto layout = sg::ui::computeLayout({1600, 1000}, 1.0f, /*replay=*/true, /*banner=*/true);
    int counts[2] = {0, 0};
    int i = 0;
    for (const char* tab : {"Profiles", "Runs & infill"}) {
        std::ofstream(m_ini, std::ios::trunc) << "[screen]\nfollow_vessel = false\ntab = " << tab << "\n";
        const Image img = render(sg::testdata::makeSyntheticSnapshot(o), std::string("tab_") + (i == 0 ? "profiles" : "runs"));
        ASSERT_EQ(img.w, 1600);
        counts[i++] = seriesPixels(img, layout.tabs);
        std::vector<std::string> warnings;
        EXPECT_EQ(sg::ui::loadSettings(m_ini, warnings).tab, tab);  // not overwritten by the screen
    }
    // Four sensor lanes, each trace at least 200 px long in the tab (the tab is about 620 px wide
    // at this size; the helm panel and the reserved alert strip leave it shorter than it was).
    EXPECT_GT(counts[0], 4 * 200) << "profile traces not drawn";
    EXPECT_LT(counts[1], counts[0] / 5);
}

TEST_F(ScreenTest, PausedScreenNeverBlocksTheProducer) {
    sg::ui::SnapshotBox box;
    sg::ui::CommandQueue commands;
    const auto base = sg::testdata::makeSyntheticSnapshot({});
    box.publish(base);
    constexpr int kPublishes = 2000;  // enough to overrun any queue; fits the pause under the sanitizers too
    constexpr auto kPause = std::chrono::milliseconds(1500);
    std::atomic<bool> paused{false}, producer_done{false}, stop{false};
    std::atomic<int> published{0};
    std::atomic<long long> worst_publish_ns{0};
    std::uint64_t seen_after_pause = 0;
    bool done_during_pause = false;
    std::thread producer;

    sg::ui::ScreenOptions o;
    o.settings_path = m_ini;
    o.max_fps = 200;
    o.stop = &stop;
    o.frame_hook = [&](std::uint64_t frame) {
        if (frame == 2) {
            // Pause the screen thread and let the producer publish at full speed meanwhile.
            paused = true;
            producer = std::thread([&] {
                for (int i = 1; i <= kPublishes; ++i) {
                    auto s = std::make_shared<sg::engine::Snapshot>(*base);  // shares the big chunks
                    s->seq = static_cast<std::uint64_t>(i) + 1;
                    const auto t0 = std::chrono::steady_clock::now();
                    box.publish(std::move(s));
                    const auto ns = std::chrono::duration_cast<std::chrono::nanoseconds>(
                                        std::chrono::steady_clock::now() - t0).count();
                    if (ns > worst_publish_ns) worst_publish_ns = ns;
                    ++published;
                }
                producer_done = true;
            });
            std::this_thread::sleep_for(kPause);
            done_during_pause = producer_done.load();
            paused = false;
        }
        if (frame == 3) {
            seen_after_pause = box.latest()->seq;
            stop = true;
        }
    };
    sg::ui::runScreen(box, commands, o);
    producer.join();
    // Every publish completed while the screen thread was asleep, none waited for the screen
    // (a blocked publish would have taken about the whole pause), and the screen then got the
    // newest state.
    EXPECT_TRUE(done_during_pause);
    EXPECT_EQ(published.load(), kPublishes);
    EXPECT_EQ(box.publishedCount(), static_cast<std::uint64_t>(kPublishes) + 1);
    EXPECT_LT(worst_publish_ns.load(), std::chrono::duration_cast<std::chrono::nanoseconds>(kPause).count() / 10);
    EXPECT_EQ(seen_after_pause, static_cast<std::uint64_t>(kPublishes) + 1);
}

}  // namespace

// The real thing: the invented demo survey simulated to 1480 s (inside the altitude excursion
// of replay_logs/demo/scenario.toml, 1450-1510 s) through the whole core, its snapshot drawn.
std::shared_ptr<const sg::engine::Snapshot> demoSnapshotAt(double seconds) {
    const std::string dir = std::string(SG_SOURCE_DIR) + "/replay_logs/demo/";
    const auto cfg = sg::engine::loadSurveyConfig(dir + "survey.toml");
    sg::sim::SimOptions so;
    so.duration_s = seconds;
    sg::sim::Simulator sim(sg::sim::loadScenario(dir + "scenario.toml"), so);
    std::int64_t id = 1;
    sg::engine::Pipeline pipe(cfg, [&] { return id++; });
    sg::engine::SnapshotBuilder builder(pipe.engine());
    sg::sim::feedToEnd(sim, pipe);
    return builder.build(/*force_gaps=*/true);
}

TEST_F(ScreenTest, DemoSurveyShowsCoverageGapAndAlarmWherePlaced) {
    const auto snap = demoSnapshotAt(1480.0);
    ASSERT_FALSE(snap->tiles.empty());
    ASSERT_FALSE(snap->gaps.empty());
    ASSERT_TRUE(snap->hasUnacknowledgedAlarm());
    const Image img = render(snap, "demo_replay");
    const auto layout = sg::ui::computeLayout({1600, 1000}, 1.0f, false, /*banner=*/true);
    const auto t = sg::ui::fitTransform(sg::ui::surveyBounds(*snap), layout.plan);
    const auto& pal = sg::ui::dayPalette();

    // A covered cell deep inside a strip (every cell within 3 m covered too): its margin colour
    // shows there, not the background.
    int checked = 0;
    for (const auto& tile : snap->tiles) {
        if (checked >= 3) break;
        const int n = tile.size_cells;
        for (int row = 6; row < n - 6 && checked < 3; row += 7)
            for (int col = 6; col < n - 6 && checked < 3; col += 7) {
                bool all = true;
                for (int dr = -6; dr <= 6 && all; ++dr)
                    for (int dc = -6; dc <= 6 && all; ++dc)
                        all = (*tile.margin_q)[static_cast<std::size_t>((row + dr) * n + col + dc)] > 0;
                if (!all) continue;
                const std::uint8_t q = (*tile.margin_q)[static_cast<std::size_t>(row * n + col)];
                const ImVec2 c = t.toScreen({tile.origin_e + (col + 0.5) * tile.cell_m,
                                             tile.origin_n + (row + 0.5) * tile.cell_m});
                if (!layout.plan.contains(c)) continue;
                EXPECT_LT(fractionNear(img, c, 1, pal.background, 2), 0.2) << "background at a covered cell";
                EXPECT_GT(fractionNear(img, c, 1, pal.marginColour(q), 60), 0.3) << "no margin colour";
                ++checked;
            }
    }
    EXPECT_EQ(checked, 3);

    // The outline colour on the edge of the largest gap the core found.
    const auto& ring = snap->gaps.front().rings.front();
    ASSERT_GE(ring.size(), 3u);
    int outlined = 0;
    for (std::size_t i = 0; i < ring.size(); ++i) {
        const auto& a = ring[i];
        const auto& b = ring[(i + 1) % ring.size()];
        const ImVec2 mid = t.toScreen({(a.e_m + b.e_m) / 2, (a.n_m + b.n_m) / 2});
        if (!layout.plan.contains(mid)) continue;
        outlined += fractionNear(img, mid, 2, pal.gap, 40) > 0.1 ? 1 : 0;
    }
    EXPECT_GE(outlined, 1);

    // The altitude alarm of the excursion is active and unacknowledged: the banner shows.
    EXPECT_GT(bannerFraction(img, layout, pal.banner), 0.4);
}

// The demo at UI scales 1.0 and 2.0, day and night, through the real window (these screenshots
// are docs/images/demo-screen*.png): covered cells show their margin class colour of the shared
// colour code at every scale and palette, and the night screen is the darker one.
TEST_F(ScreenTest, DemoAtTwoScalesDayAndNight) {
    const auto snap = demoSnapshotAt(1480.0);
    double mean[2][2] = {};
    for (int si = 0; si < 2; ++si)
        for (int night = 0; night < 2; ++night) {
            const float scale = si == 0 ? 1.0f : 2.0f;
            std::ofstream(m_ini, std::ios::trunc) << "[screen]\npalette = " << (night ? "night" : "day")
                                                  << "\nui_scale = " << scale << "\nfollow_vessel = false\n";
            const std::string name = std::string("demo-screen-") + (si == 0 ? "1.0" : "2.0") + (night ? "-night" : "-day");
            const Image img = render(snap, name);
            ASSERT_EQ(img.w, 1600);
            mean[si][night] = meanLuminance(img);
            const auto layout = sg::ui::computeLayout({1600, 1000}, scale, false, /*banner=*/true);
            const auto t = sg::ui::fitTransform(sg::ui::surveyBounds(*snap), layout.plan);
            const auto& pal = sg::ui::paletteFor(night != 0);
            int checked = 0;
            for (const auto& tile : snap->tiles) {
                const int n = tile.size_cells;
                for (int row = 8; row < n - 8 && checked < 5; row += 9)
                    for (int col = 8; col < n - 8 && checked < 5; col += 9) {
                        bool same = true;  // a cell whose 17 x 17 neighbourhood is all one class
                        const std::uint8_t q = (*tile.margin_q)[static_cast<std::size_t>(row * n + col)];
                        for (int dr = -8; dr <= 8 && same; ++dr)
                            for (int dc = -8; dc <= 8 && same; ++dc)
                                same = q > 0 && pal.marginColour((*tile.margin_q)[static_cast<std::size_t>((row + dr) * n + col + dc)]) ==
                                                    pal.marginColour(q);
                        if (!same) continue;
                        const ImVec2 c = t.toScreen({tile.origin_e + (col + 0.5) * tile.cell_m,
                                                     tile.origin_n + (row + 0.5) * tile.cell_m});
                        if (!layout.plan.contains(c)) continue;
                        // Tracks and labels may cross a cell: most of the block must show the colour.
                        if (fractionNear(img, c, 1, pal.marginColour(q), 3) < 0.5) continue;
                        ++checked;
                    }
            }
            EXPECT_GE(checked, 3) << name << ": margin class colours not found at covered cells";
        }
    EXPECT_LT(mean[0][1], 0.5 * mean[0][0]);
    EXPECT_LT(mean[1][1], 0.5 * mean[1][0]);
}
