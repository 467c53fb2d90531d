// What every panel of the screen sees: the frame context (latest snapshot, palette, settings,
// command sink, tile textures) and the Panel interface. Panels are registered in one place
// (panels.cpp) and placed by the screen layout (layout.hpp).
#pragma once

#include <memory>
#include <optional>
#include <string>
#include <vector>

#include <imgui.h>

#include "engine/snapshot.hpp"
#include "ui/palette.hpp"
#include "ui/settings.hpp"
#include "ui/snapshot_box.hpp"

namespace sg::ui {

// Turns coverage tiles into textures. The OpenGL implementation re-uploads a tile only when its
// generation (or the palette) changed; tests and benchmarks use implementations without a GPU.
class TileTextureSource {
public:
    virtual ~TileTextureSource() = default;
    // A texture showing the tile in the palette's margin colours, or nullptr when none is available.
    virtual ImTextureID textureFor(const engine::CoverageTileView& tile, const Palette& palette) = 0;
    // Called once per frame after drawing: lets the source release tiles no longer shown.
    virtual void endFrame() {}
};

// Fills `rgba` (size_cells^2 RGBA8 pixels, top row first, as textures are drawn) for a tile.
void colourTile(const engine::CoverageTileView& tile, const Palette& palette, std::vector<ImU32>& rgba);

struct FrameContext {
    const engine::Snapshot* snapshot = nullptr;  // may be null before the first snapshot
    const Palette* palette = nullptr;
    ScreenSettings* settings = nullptr;
    CommandSink* commands = nullptr;
    TileTextureSource* textures = nullptr;
    double wall_s = 0.0;  // steady wall-clock seconds, for animation only
    float scale = 1.0f;   // UI scale
    // A panel may ask the plan view to centre on a point (e.g. "show gap").
    std::optional<engine::PointEN> focus_request;
    // The keyboard asked the plan view to fit the whole survey (key F).
    bool fit_request = false;
    bool settings_changed = false;  // a panel changed a setting that should be saved

    void send(engine::UiCommand c) const {
        if (commands) commands->send(std::move(c));
    }
};

enum class Slot {
    kToolbar,  // the strip at the top
    kPlan,     // the large left area
    kHelm,     // the right column, top: the helm's numbers in large print
    kPlots,    // the right column, upper part
    kTab,      // tabs in the right column, lower part
    kReplay,   // strip above the status bar, only while replaying
    kStatus,   // the bottom strip
    kOverlay,  // drawn last, above everything (the alarm banner)
};

class Panel {
public:
    virtual ~Panel() = default;
    virtual const char* name() const = 0;
    // A tab's label when the full names of all tabs do not fit in one row (large UI scales on a
    // narrow window): ImGui would shrink the tabs and cut their labels.
    virtual const char* shortName() const { return name(); }
    virtual Slot slot() const = 0;
    // Draws into the current ImGui window (the screen opens it), except kOverlay panels, which
    // open their own window inside `area`.
    virtual void draw(FrameContext& ctx, ImVec2 area_min, ImVec2 area_max) = 0;
};

// Shared drawing helpers (alarms_panel.cpp).
void drawLevelSymbol(ImDrawList* dl, ImVec2 p, float size, checks::Level level, bool active, const Palette& pal);
std::string formatDuration(double seconds);

// Every panel of the screen, in drawing order (defined in panels.cpp, the one registration place).
std::vector<std::unique_ptr<Panel>> makePanels();

// Panel factories, one per file.
std::unique_ptr<Panel> makeToolbar();
std::unique_ptr<Panel> makePlanView();
std::unique_ptr<Panel> makeTimePlots();
std::unique_ptr<Panel> makeAlarmsPanel();
std::unique_ptr<Panel> makeRunsPanel();
std::unique_ptr<Panel> makeProfilesPanel();
std::unique_ptr<Panel> makePicksPanel();
std::unique_ptr<Panel> makeReplayBar();
std::unique_ptr<Panel> makeStatusBar();
std::unique_ptr<Panel> makeAlarmBanner();
std::unique_ptr<Panel> makeHelmPanel();
// Height (pixels) the helm panel's window needs to show `s` whole at `width` pixels (window
// width) with the current font and this UI scale (its rows wrap when narrow).
float helmPanelHeight(const engine::Snapshot* s, float width, float scale);

// The screen's keys (GLFW key codes, which the GLFW backend uses to fill io.KeysDown), in one table
// for the keyboard handler and the help overlay (screen_ui.cpp).
struct KeyBinding {
    int key;
    const char* key_name;
    const char* action;
};
const std::vector<KeyBinding>& keyBindings();

}  // namespace sg::ui
