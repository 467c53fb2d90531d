// Screen settings that persist between runs in a small ini file (default
// $XDG_CONFIG_HOME/swathguard/screen.ini, else ~/.config/swathguard/screen.ini).
//
// Format: one "key = value" per line under a "[screen]" header; '#' or ';' start a comment.
// A bad line or value never stops the screen: it is reported (file, line, key) in `warnings`
// and the default is kept.
#pragma once

#include <string>
#include <vector>

namespace sg::ui {

// The screen's text font: DejaVu Sans from Debian's fonts-dejavu-core (scripts/install-deps.sh).
inline constexpr const char* kDefaultFontFile = "/usr/share/fonts/truetype/dejavu/DejaVuSans.ttf";
// Text height at UI scale 1, pixels; the font is rasterised at round(kBaseFontPx * ui_scale).
inline constexpr float kBaseFontPx = 14.0f;

struct ScreenSettings {
    bool night = false;          // palette: false = day, true = night
    float ui_scale = 1.0f;       // 0.75 .. 3.0, scales fonts and sizes for large displays
    std::string font_file = kDefaultFontFile;  // a TrueType font file; missing -> built-in font + message
    int plot_minutes = 10;       // time window of the time plots, 1 .. 720 minutes
    bool follow_vessel = true;   // plan view keeps the vessel in view
    bool show_picks = true;      // plan view draws the anomaly picks
    std::vector<std::string> hidden_plots;  // titles of time plots the operator switched off
    std::string tab = "Alarms";  // the tab shown under the plots: Alarms, Runs & infill, Profiles, Anomalies
    // A site: show only this session's runs and coverage (not saved: a choice of the moment).
    bool hide_earlier_sessions = false;
};

// Default path as described above; empty when neither XDG_CONFIG_HOME nor HOME is set.
std::string defaultSettingsPath();

// Reads `path`. A missing file gives the defaults without a warning.
ScreenSettings loadSettings(const std::string& path, std::vector<std::string>& warnings);

// Writes `path` (creating its folder). Returns false and fills `error` on failure.
bool saveSettings(const std::string& path, const ScreenSettings& settings, std::string& error);

}  // namespace sg::ui
