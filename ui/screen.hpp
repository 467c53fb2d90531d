// The swathguard screen: public API.
//
//   sg::ui::SnapshotBox box;        // the engine side publishes immutable snapshots here
//   sg::ui::CommandQueue commands;  // and drains the operator's commands from here
//   sg::ui::ScreenOptions opt;      // window size, settings file, screenshot
//   int rc = sg::ui::runScreen(box, commands, opt);  // on the thread that owns the window
//
// runScreen opens a GLFW window with an OpenGL 3.3 core context, draws the latest snapshot at up
// to max_fps (idle_fps when nothing changes), and returns when the window is closed, `stop` is set,
// or a requested screenshot has been written. It never blocks the producer: it only copies a
// shared_ptr out of the box. Without a display it throws ScreenError before touching GLFW state
// that could abort (check screenAvailable() first for a clean message).
//
// ScreenUi is the GPU-free part (builds the ImGui frame from a snapshot) used by runScreen, the
// benchmark and tests.
#pragma once

#include <atomic>
#include <cstdint>
#include <functional>
#include <optional>
#include <memory>
#include <stdexcept>
#include <string>
#include <vector>

#include "ui/layout.hpp"
#include "ui/panel.hpp"
#include "ui/settings.hpp"
#include "ui/snapshot_box.hpp"

namespace sg::ui {

class ScreenError : public std::runtime_error {
public:
    using std::runtime_error::runtime_error;
};

struct ScreenOptions {
    std::string title = "swathguard";
    int width = 1600;   // window size, pixels
    int height = 1000;
    // Settings ini file; empty = defaultSettingsPath(); "none" = neither read nor write.
    std::string settings_path;
    // When set, the window is written to this PNG after `after_frames` frames (if > 0) or else
    // after `after_seconds` seconds of wall time, and runScreen returns.
    std::string screenshot_path;
    double after_seconds = 2.0;
    int after_frames = 0;
    double max_fps = 30.0;   // cap while something changes (no vsync under Xvfb)
    double idle_fps = 10.0;  // when nothing changes
    // Optional hook on the screen thread before each frame (frame number from 0); tests use it.
    std::function<void(std::uint64_t frame)> frame_hook;
    // Optional: set to true from any thread to close the screen.
    const std::atomic<bool>* stop = nullptr;
};

// Empty when a screen can be opened here, else the reason (e.g. "DISPLAY is not set").
std::string screenUnavailableReason();

// Runs the screen until closed; returns 0. Throws ScreenError when no window can be opened or the
// screenshot cannot be written.
int runScreen(SnapshotBox& box, CommandSink& commands, const ScreenOptions& options);

// The safety caution shown when the snapshot brings none.
const char* defaultCaution();

class ScreenUi {
public:
    ScreenUi(ScreenSettings settings, CommandSink& commands, TileTextureSource& textures);
    ~ScreenUi();
    ScreenUi(const ScreenUi&) = delete;
    ScreenUi& operator=(const ScreenUi&) = delete;

    // Call before ImGui::NewFrame (outside a frame): rebuilds the font atlas when the UI scale
    // changed. Returns true when the atlas was rebuilt, so the renderer must re-create its font
    // texture (ImGui_ImplOpenGL3_DestroyFontsTexture + CreateFontsTexture).
    bool prepareFonts();

    // Builds one frame (ImGui::NewFrame .. ImGui::Render) for `snapshot` (may be null).
    // Needs a current ImGui context with io.DisplaySize and io.DeltaTime set.
    // wall_s: steady seconds, used for animation.
    void frame(const engine::Snapshot* snapshot, double wall_s);

    ScreenSettings& settings() { return m_settings; }
    // True once after a panel changed a setting (the caller saves the file).
    bool takeSettingsChanged();
    const Layout& layout() const { return m_layout; }
    const Palette& palette() const { return paletteFor(m_settings.night); }
    bool bannerShown() const { return m_banner_shown; }
    // Why the configured font could not be used (the built-in font is then in use), else empty.
    const std::string& fontProblem() const { return m_font_problem; }
    bool helpShown() const { return m_help; }

private:
    ScreenSettings m_settings;
    CommandSink& m_commands;
    TileTextureSource& m_textures;
    std::vector<std::unique_ptr<Panel>> m_panels;
    Layout m_layout{};
    float m_font_scale = 0.0f;
    std::string m_font_file;
    std::string m_font_problem;
    float m_style_scale = 0.0f;
    bool m_style_night = false;
    bool m_settings_changed = false;
    bool m_banner_shown = false;
    int m_tab_frames = 0;
    int m_last_unacked = 0;
    std::optional<engine::PointEN> m_focus;
    bool m_help = false;  // the key help overlay is open

    // Keys pressed this frame -> commands, settings and view requests.
    void handleKeys(const engine::Snapshot* s, FrameContext& ctx);
    void drawHelp(const Palette& pal, float scale);
};

}  // namespace sg::ui
