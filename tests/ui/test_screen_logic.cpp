// Screen logic that needs no display: settings file, series decimation, incremental tile textures,
// the snapshot hand-over, and operator input on a GPU-free ImGui frame (ScreenUi with a fake
// texture backend and synthetic mouse input).
#include <gtest/gtest.h>

#include <algorithm>
#include <atomic>
#include <chrono>
#include <cmath>
#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <random>
#include <thread>

#include "synthetic_snapshot.hpp"
#include "ui/plot_draw.hpp"
#include "ui/screen.hpp"
#include "ui/settings.hpp"
#include "ui/tile_textures.hpp"

namespace {

namespace fs = std::filesystem;
using sg::engine::UiCommand;

fs::path outDir() {
    auto d = fs::path(SG_BINARY_DIR) / "test_ui_out";
    fs::create_directories(d);
    return d;
}

// ---- settings -------------------------------------------------------------------------------

TEST(ScreenSettings, RoundTripThroughTheIniFile) {
    const std::string path = (outDir() / "roundtrip" / "screen.ini").string();
    fs::remove_all(outDir() / "roundtrip");
    sg::ui::ScreenSettings s;
    s.night = true;
    s.ui_scale = 1.75f;
    s.plot_minutes = 30;
    s.follow_vessel = false;
    s.hidden_plots = {"Gradient", "Speed"};
    std::string err;
    ASSERT_TRUE(sg::ui::saveSettings(path, s, err)) << err;
    std::vector<std::string> warnings;
    const auto r = sg::ui::loadSettings(path, warnings);
    EXPECT_TRUE(warnings.empty());
    EXPECT_TRUE(r.night);
    EXPECT_FLOAT_EQ(r.ui_scale, 1.75f);
    EXPECT_EQ(r.plot_minutes, 30);
    EXPECT_FALSE(r.follow_vessel);
    EXPECT_EQ(r.hidden_plots, s.hidden_plots);
}

TEST(ScreenSettings, BadValuesNameFileLineAndKeyAndKeepDefaults) {
    const std::string path = (outDir() / "bad_screen.ini").string();
    std::ofstream(path) << "# comment\n[screen]\npalette = dusk\nui_scale = 9\nplot_minutes = 10x\n"
                           "follow_vessel = yes\ncolour = red\nnot a pair\n";
    std::vector<std::string> warnings;
    const auto r = sg::ui::loadSettings(path, warnings);
    const sg::ui::ScreenSettings defaults;
    EXPECT_EQ(r.night, defaults.night);
    EXPECT_EQ(r.ui_scale, defaults.ui_scale);
    EXPECT_EQ(r.plot_minutes, defaults.plot_minutes);
    EXPECT_EQ(r.follow_vessel, defaults.follow_vessel);
    ASSERT_EQ(warnings.size(), 6u);
    EXPECT_NE(warnings[0].find(path + ":3: key 'palette'"), std::string::npos) << warnings[0];
    EXPECT_NE(warnings[1].find(":4: key 'ui_scale'"), std::string::npos) << warnings[1];
    EXPECT_NE(warnings[2].find(":5: key 'plot_minutes'"), std::string::npos) << warnings[2];
    EXPECT_NE(warnings[3].find(":6: key 'follow_vessel'"), std::string::npos) << warnings[3];
    EXPECT_NE(warnings[4].find(":7: key 'colour': unknown"), std::string::npos) << warnings[4];
    EXPECT_NE(warnings[5].find(":8: expected 'key = value'"), std::string::npos) << warnings[5];
}

TEST(ScreenSettings, MissingFileGivesDefaultsAndDefaultPathFollowsXdg) {
    std::vector<std::string> warnings;
    const auto r = sg::ui::loadSettings((outDir() / "does_not_exist.ini").string(), warnings);
    EXPECT_TRUE(warnings.empty());
    EXPECT_EQ(r.plot_minutes, sg::ui::ScreenSettings{}.plot_minutes);
    const char* old = std::getenv("XDG_CONFIG_HOME");
    const std::string saved = old ? old : "";
    setenv("XDG_CONFIG_HOME", "/tmp/xdg-test", 1);
    EXPECT_EQ(sg::ui::defaultSettingsPath(), "/tmp/xdg-test/swathguard/screen.ini");
    if (old) setenv("XDG_CONFIG_HOME", saved.c_str(), 1);
    else unsetenv("XDG_CONFIG_HOME");
}

// ---- decimation -----------------------------------------------------------------------------

TEST(Decimation, MatchesABruteForcePassOverEveryColumn) {
    // Irregular sampling across many small chunks, a window starting and ending inside chunks.
    std::mt19937 rng(7);
    std::uniform_real_distribution<double> dt(0.01, 0.3);
    std::normal_distribution<float> val(0.0f, 5.0f);
    sg::engine::Series s;
    std::vector<sg::engine::SeriesPoint> all;
    double t = 1000.0;
    for (int i = 0; i < 20000; ++i) {
        t += dt(rng);
        all.push_back({t, val(rng)});
        s.points.append(all.back(), 97);
    }
    const double t0 = all[3001].t_s - 0.001, t1 = all[17003].t_s + 0.001;
    const int cols = 333;
    std::vector<sg::ui::Column> out;
    const std::size_t visited = sg::ui::decimateSeries(s, t0, t1, cols, out);
    ASSERT_EQ(out.size(), static_cast<std::size_t>(cols));
    EXPECT_EQ(visited, 17003u - 3001u + 1u);
    // Brute force.
    std::vector<float> lo(cols, 1e30f), hi(cols, -1e30f);
    std::vector<int> n(cols, 0);
    for (const auto& p : all) {
        if (p.t_s < t0 || p.t_s > t1) continue;
        const int c = std::min(cols - 1, static_cast<int>((p.t_s - t0) * cols / (t1 - t0)));
        lo[c] = std::min(lo[c], p.value);
        hi[c] = std::max(hi[c], p.value);
        ++n[c];
    }
    for (int c = 0; c < cols; ++c) {
        ASSERT_EQ(out[c].count, n[c]) << c;
        if (n[c] == 0) continue;
        EXPECT_EQ(out[c].lo, lo[c]) << c;
        EXPECT_EQ(out[c].hi, hi[c]) << c;
    }
    float a = 0, b = 0;
    ASSERT_TRUE(sg::ui::columnsRange(out, a, b));
    EXPECT_EQ(a, *std::min_element(lo.begin(), lo.end()));
    EXPECT_EQ(b, *std::max_element(hi.begin(), hi.end()));
}

TEST(Decimation, BlockSummariesGiveTheSameColumnsAsSamples) {
    // 10 Hz for an hour in 4096-sample chunks, 100 columns: about 360 samples per column, so most
    // of the window is merged from block summaries.
    sg::engine::Series s;
    std::mt19937 rng(3);
    std::normal_distribution<float> val(0.0f, 5.0f);
    for (int i = 0; i < 36000; ++i) s.points.append({i * 0.1, val(rng)}, 4096);
    std::vector<sg::ui::Column> plain, merged;
    sg::ui::SeriesSummaryCache cache;
    const double t0 = 123.45, t1 = 3333.3;
    const auto n1 = sg::ui::decimateSeries(s, t0, t1, 100, plain);
    const auto n2 = sg::ui::decimateSeries(s, t0, t1, 100, merged, &cache);
    EXPECT_EQ(n1, n2);
    EXPECT_GT(cache.size(), 0u);
    ASSERT_EQ(plain.size(), merged.size());
    for (std::size_t c = 0; c < plain.size(); ++c) {
        EXPECT_EQ(plain[c].count, merged[c].count) << c;
        EXPECT_EQ(plain[c].lo, merged[c].lo) << c;
        EXPECT_EQ(plain[c].hi, merged[c].hi) << c;
        EXPECT_EQ(plain[c].first, merged[c].first) << c;
        EXPECT_EQ(plain[c].last, merged[c].last) << c;
        EXPECT_EQ(plain[c].t_first, merged[c].t_first) << c;
        EXPECT_EQ(plain[c].t_last, merged[c].t_last) << c;
    }
}

TEST(Decimation, EmptyWindowVisitsNothing) {
    sg::engine::Series s;
    for (int i = 0; i < 100; ++i) s.points.append({static_cast<double>(i), 1.0f}, 16);
    std::vector<sg::ui::Column> out;
    EXPECT_EQ(sg::ui::decimateSeries(s, 200.0, 300.0, 50, out), 0u);
    float a = 0, b = 0;
    EXPECT_FALSE(sg::ui::columnsRange(out, a, b));
}

TEST(NiceTicks, OneTwoFiveSteps) {
    EXPECT_EQ(sg::ui::niceTicks(0.0, 10.0, 5), (std::vector<double>{0, 2, 4, 6, 8, 10}));
    EXPECT_EQ(sg::ui::niceTicks(-0.3, 0.3, 3), (std::vector<double>{-0.2, 0.0, 0.2}));
    EXPECT_EQ(sg::ui::formatUtcTime(1767225600.0 + 3723.9), "01:02:03");
}

// ---- tile textures ---------------------------------------------------------------------------

struct FakeBackend final : sg::ui::TextureBackend {
    int created = 0, uploaded = 0, destroyed = 0;
    std::vector<ImU32> last;
    ImTextureID create(int) override { return reinterpret_cast<ImTextureID>(static_cast<std::uintptr_t>(++created)); }
    void upload(ImTextureID, int, const std::vector<ImU32>& rgba) override {
        ++uploaded;
        last = rgba;
    }
    void destroy(ImTextureID) override { ++destroyed; }
};

TEST(TileTextures, UploadOnlyWhenGenerationOrPaletteChangesAndEvictUnused) {
    auto backend = std::make_unique<FakeBackend>();
    FakeBackend& fb = *backend;
    sg::ui::TileTextureCache cache(std::move(backend), 3);
    sg::engine::CoverageTileView t;
    t.size_cells = 2;
    t.generation = 5;
    t.margin_q = std::make_shared<std::vector<std::uint8_t>>(std::vector<std::uint8_t>{0, 1, 200, 255});
    const auto& day = sg::ui::dayPalette();
    EXPECT_NE(cache.textureFor(t, day), nullptr);
    EXPECT_EQ(fb.uploaded, 1);
    // Raster row 0 (south) becomes the bottom row of the texture.
    ASSERT_EQ(fb.last.size(), 4u);
    EXPECT_EQ(fb.last[2], 0u);  // q = 0: transparent
    EXPECT_EQ(fb.last[3], day.marginColour(1));
    EXPECT_EQ(fb.last[0], day.marginColour(200));
    EXPECT_EQ(fb.last[1], day.marginColour(255));
    for (int i = 0; i < 3; ++i) {
        cache.endFrame();
        cache.textureFor(t, day);
    }
    EXPECT_EQ(fb.uploaded, 1);  // unchanged tile: never re-uploaded
    t.generation = 6;
    cache.textureFor(t, day);
    EXPECT_EQ(fb.uploaded, 2);
    cache.textureFor(t, sg::ui::nightPalette());
    EXPECT_EQ(fb.uploaded, 3);
    EXPECT_EQ(fb.created, 1);
    for (int i = 0; i < 5; ++i) cache.endFrame();  // not drawn for longer than 3 frames
    EXPECT_EQ(fb.destroyed, 1);
    EXPECT_EQ(cache.residentTiles(), 0u);
}

// Margin classes step away from the background as the margin grows: darker by day, lighter by
// night (Rec. 709 luma on the 8-bit values; the WCAG figures are in test_palette.cpp).
TEST(Palette, MarginClassesMoveAwayFromTheBackgroundWithMargin) {
    const auto luma = [](ImU32 c) {
        return 0.2126 * (c & 0xFF) + 0.7152 * ((c >> 8) & 0xFF) + 0.0722 * ((c >> 16) & 0xFF);
    };
    for (const auto* pal : {&sg::ui::dayPalette(), &sg::ui::nightPalette()}) {
        double prev = -1;
        int steps = 0;
        for (int q = 1; q <= 255; q += 6) {
            const double d = std::abs(luma(pal->marginColour(static_cast<std::uint8_t>(q))) - luma(pal->background));
            EXPECT_GE(d, prev) << pal->name << " q=" << q;
            steps += d > prev + 1.0 && prev >= 0 ? 1 : 0;
            prev = d;
        }
        EXPECT_EQ(steps, 2) << pal->name << ": three classes, two steps";
        EXPECT_EQ(pal->marginColour(0), 0u);
    }
}

// ---- snapshot hand-over ----------------------------------------------------------------------

TEST(SnapshotBox, ProducerNeverWaitsForAReaderHoldingASnapshot) {
    sg::ui::SnapshotBox box;
    std::atomic<bool> holding{false}, release{false};
    std::thread reader([&] {
        box.publish(std::make_shared<sg::engine::Snapshot>());
        auto held = box.latest();  // a screen drawing this snapshot for a long time
        holding = true;
        while (!release) std::this_thread::sleep_for(std::chrono::milliseconds(1));
    });
    while (!holding) std::this_thread::yield();
    for (std::uint64_t i = 1; i <= 10000; ++i) {
        auto s = std::make_shared<sg::engine::Snapshot>();
        s->seq = i;
        box.publish(std::move(s));
    }
    // Reaching this line at all is the point: all publishes done while the reader holds its copy.
    EXPECT_EQ(box.latest()->seq, 10000u);
    EXPECT_EQ(box.publishedCount(), 10001u);
    release = true;
    reader.join();
}

TEST(CommandQueue, DrainsInOrder) {
    sg::ui::CommandQueue q;
    q.send({UiCommand::Kind::kAcknowledgeAlarm, 7, 0.0, {}});
    q.send({UiCommand::Kind::kExportInfill, 0, 0.0, "gpx"});
    const auto got = q.drain();
    ASSERT_EQ(got.size(), 2u);
    EXPECT_EQ(got[0].id, 7u);
    EXPECT_EQ(got[1].text, "gpx");
    EXPECT_TRUE(q.drain().empty());
}

// ---- operator input on a GPU-free frame ------------------------------------------------------

struct NullBackend final : sg::ui::TextureBackend {
    ImTextureID create(int) override { return reinterpret_cast<ImTextureID>(std::uintptr_t{1}); }
    void upload(ImTextureID, int, const std::vector<ImU32>&) override {}
    void destroy(ImTextureID) override {}
};

class HeadlessScreen : public ::testing::Test {
protected:
    void SetUp() override {
        ImGui::CreateContext();
        ImGuiIO& io = ImGui::GetIO();
        io.IniFilename = nullptr;
        io.DisplaySize = {1600, 1000};
        io.DeltaTime = 1.0f / 30.0f;
        io.BackendFlags |= ImGuiBackendFlags_RendererHasVtxOffset;  // as the OpenGL3 backend sets it
        sg::ui::ScreenSettings s;
        s.follow_vessel = true;
        m_ui = std::make_unique<sg::ui::ScreenUi>(s, m_commands, m_textures);
        m_ui->prepareFonts();
        unsigned char* px = nullptr;
        int w = 0, h = 0;
        io.Fonts->GetTexDataAsRGBA32(&px, &w, &h);
    }
    void TearDown() override {
        m_ui.reset();
        ImGui::DestroyContext();
    }
    void frame(const sg::engine::Snapshot* s, ImVec2 mouse, bool down) {
        ImGuiIO& io = ImGui::GetIO();
        io.MousePos = mouse;
        io.MouseDown[0] = down;
        m_ui->frame(s, 0.0);  // wall time 0: the banner is at a known phase of its pulse
    }
    sg::ui::CommandQueue m_commands;
    sg::ui::TileTextureCache m_textures{std::make_unique<NullBackend>()};
    std::unique_ptr<sg::ui::ScreenUi> m_ui;
};

TEST_F(HeadlessScreen, ClickOnBannerAcknowledgesAlarmsButNotWarnings) {
    const auto snap = sg::testdata::makeSyntheticSnapshot({});
    frame(snap.get(), {-100, -100}, false);
    ASSERT_TRUE(m_ui->bannerShown());
    // The synthetic survey's only unacknowledged episode is an alarm: its button, "Acknowledge
    // alarms", is the rightmost, centred in the banner's body (above the 12 px stripe band).
    const auto& l = m_ui->layout();
    const ImVec2 at{l.banner.max.x - 30.0f, l.banner.min.y + (l.banner.height() - 12.0f) * 0.5f};
    frame(snap.get(), at, false);
    frame(snap.get(), at, true);
    frame(snap.get(), at, false);
    const auto cmds = m_commands.drain();
    ASSERT_EQ(cmds.size(), 1u);
    EXPECT_EQ(cmds[0].kind, UiCommand::Kind::kAcknowledgeAlarms);
}

// Issue #12: the banner's coming and going moved every panel ~70 px, so a click could land on
// the wrong control. Its strip is now always reserved.
TEST_F(HeadlessScreen, AlarmBannerNeverMovesThePanels) {
    sg::testdata::SyntheticOptions acked;
    acked.acknowledge_alarm = true;
    const auto with = sg::testdata::makeSyntheticSnapshot({});
    const auto without = sg::testdata::makeSyntheticSnapshot(acked);
    frame(with.get(), {-100, -100}, false);
    ASSERT_TRUE(m_ui->bannerShown());
    const sg::ui::Layout a = m_ui->layout();
    frame(without.get(), {-100, -100}, false);
    ASSERT_FALSE(m_ui->bannerShown());
    const sg::ui::Layout b = m_ui->layout();
    for (const auto& [ra, rb] : {std::pair{a.plan, b.plan}, {a.plots, b.plots}, {a.tabs, b.tabs}, {a.status, b.status}}) {
        EXPECT_EQ(ra.min.x, rb.min.x);
        EXPECT_EQ(ra.min.y, rb.min.y);
        EXPECT_EQ(ra.max.x, rb.max.x);
        EXPECT_EQ(ra.max.y, rb.max.y);
    }
}

TEST_F(HeadlessScreen, KeysAcknowledgeApartStepAlarmsAndOpenTheHelp) {
    sg::testdata::SyntheticOptions o;
    o.replay = true;
    const auto snap = sg::testdata::makeSyntheticSnapshot(o);
    frame(snap.get(), {-100, -100}, false);
    auto press = [&](int key) {
        ImGuiIO& io = ImGui::GetIO();
        io.KeysDown[key] = true;
        frame(snap.get(), {-100, -100}, false);
        io.KeysDown[key] = false;
        frame(snap.get(), {-100, -100}, false);
    };
    press('A');
    press('W');
    press('N');
    const auto cmds = m_commands.drain();
    ASSERT_EQ(cmds.size(), 3u);
    EXPECT_EQ(cmds[0].kind, UiCommand::Kind::kAcknowledgeAlarms);
    EXPECT_EQ(cmds[1].kind, UiCommand::Kind::kAcknowledgeWarnings);
    EXPECT_EQ(cmds[2].kind, UiCommand::Kind::kReplayNextAlarm);
    EXPECT_FALSE(m_ui->helpShown());
    press(290);  // GLFW_KEY_F1
    EXPECT_TRUE(m_ui->helpShown());
    press(256);  // GLFW_KEY_ESCAPE
    EXPECT_FALSE(m_ui->helpShown());
    const bool follow = m_ui->settings().follow_vessel;
    press('V');
    EXPECT_NE(m_ui->settings().follow_vessel, follow);
    // Every binding is listed in the help (one table drives both).
    EXPECT_GE(sg::ui::keyBindings().size(), 8u);
}

TEST_F(HeadlessScreen, DraggingThePlanStopsFollowingTheVessel) {
    sg::testdata::SyntheticOptions o;
    o.acknowledge_alarm = true;
    const auto snap = sg::testdata::makeSyntheticSnapshot(o);
    frame(snap.get(), {-100, -100}, false);
    const auto& plan = m_ui->layout().plan;
    const ImVec2 c{(plan.min.x + plan.max.x) / 2, (plan.min.y + plan.max.y) / 2 + 100};
    EXPECT_TRUE(m_ui->settings().follow_vessel);
    frame(snap.get(), c, false);
    frame(snap.get(), c, true);
    frame(snap.get(), {c.x + 40, c.y + 20}, true);
    frame(snap.get(), {c.x + 40, c.y + 20}, false);
    EXPECT_FALSE(m_ui->settings().follow_vessel);
    EXPECT_TRUE(m_ui->takeSettingsChanged());
    EXPECT_TRUE(m_commands.drain().empty());
}

}  // namespace

namespace {

// A missing font file is never silent: prepareFonts says why, the built-in font is used at the
// same pixel size, and the message is drawn on the screen (found in the frame's draw data).
TEST(ScreenFonts, MissingFontFileFallsBackWithAMessage) {
    ImGui::CreateContext();
    ImGuiIO& io = ImGui::GetIO();
    io.IniFilename = nullptr;
    io.DisplaySize = {1280, 800};
    io.DeltaTime = 1.0f / 30.0f;
    sg::ui::CommandQueue commands;
    sg::ui::TileTextureCache textures{std::make_unique<NullBackend>()};
    sg::ui::ScreenSettings s;
    s.ui_scale = 1.5f;
    s.font_file = (outDir() / "no_such_font.ttf").string();
    {
        sg::ui::ScreenUi ui(s, commands, textures);
        ASSERT_TRUE(ui.prepareFonts());
        EXPECT_NE(ui.fontProblem().find("cannot open font file"), std::string::npos) << ui.fontProblem();
        EXPECT_NE(ui.fontProblem().find("no_such_font.ttf"), std::string::npos);
        ASSERT_EQ(io.Fonts->Fonts.Size, 1);
        EXPECT_FLOAT_EQ(io.Fonts->Fonts[0]->FontSize, std::round(sg::ui::kBaseFontPx * 1.5f));
        unsigned char* px = nullptr;
        int w = 0, h = 0;
        io.Fonts->GetTexDataAsRGBA32(&px, &w, &h);
        ui.frame(nullptr, 0.0);
        // The foreground draw list carries the message's glyphs: count its vertices.
        const ImDrawData* dd = ImGui::GetDrawData();
        ASSERT_NE(dd, nullptr);
        int fg_vertices = 0;
        for (int i = 0; i < dd->CmdListsCount; ++i)
            if (dd->CmdLists[i] == ImGui::GetForegroundDrawList()) fg_vertices = dd->CmdLists[i]->VtxBuffer.Size;
        EXPECT_GT(fg_vertices, 4 * 40) << "no message drawn";
        // A file that is there but not a font is refused as well.
        const std::string bogus = (outDir() / "not_a_font.ttf").string();
        std::ofstream(bogus) << "hello";
        ui.settings().font_file = bogus;
        ASSERT_TRUE(ui.prepareFonts());
        EXPECT_NE(ui.fontProblem().find("not a TrueType/OpenType font file"), std::string::npos) << ui.fontProblem();
        // The real DejaVu Sans loads without a problem.
        ui.settings().font_file = sg::ui::kDefaultFontFile;
        ASSERT_TRUE(ui.prepareFonts());
        EXPECT_TRUE(ui.fontProblem().empty()) << ui.fontProblem();
        EXPECT_FALSE(ui.prepareFonts());  // nothing changed: no rebuild
    }
    ImGui::DestroyContext();
}

}  // namespace
