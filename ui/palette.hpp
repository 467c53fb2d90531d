// Screen palettes: a day palette and a dim night palette for a dark bridge, plus the colour ramp
// for the detection margin of covered cells. Colours are the team's own choice; the margin ramp
// rises monotonically in lightness so it still reads for colour-blind operators.
#pragma once

#include <cstdint>

#include <imgui.h>

namespace sg::ui {

struct Palette {
    const char* name = "";
    bool dark = false;
    ImU32 background = 0;   // plan view and plot backgrounds
    ImU32 text = 0;
    ImU32 text_dim = 0;
    ImU32 grid = 0;
    ImU32 axis = 0;
    ImU32 area = 0;         // area of interest outline
    ImU32 line = 0;         // planned lines
    ImU32 line_active = 0;  // the active planned line
    ImU32 tow_track = 0;
    ImU32 vessel = 0;
    ImU32 swath_edge = 0;
    ImU32 gap = 0;          // gap outlines
    ImU32 gap_fill = 0;
    ImU32 infill = 0;       // proposed infill lines
    ImU32 warn = 0;
    ImU32 alarm = 0;
    ImU32 banner = 0;       // alarm banner body
    ImU32 banner_stripe = 0;
    ImU32 banner_text = 0;
    ImU32 ok = 0;
    ImU32 caution = 0;      // the safety caution text
    ImU32 series[6] = {};   // per-sensor / per-series colours
    ImU32 ramp[3] = {};     // margin ramp: just detectable, middle, strong

    // Colour of a covered cell with quantised margin q (1..255); q = 0 is transparent.
    ImU32 marginColour(std::uint8_t q) const;
    ImU32 seriesColour(std::size_t i) const { return series[i % 6]; }
};

const Palette& dayPalette();
const Palette& nightPalette();
inline const Palette& paletteFor(bool night) { return night ? nightPalette() : dayPalette(); }

// Sets ImGui's own widget colours to match the palette.
void applyPaletteToStyle(const Palette& palette, ImGuiStyle& style);

}  // namespace sg::ui
