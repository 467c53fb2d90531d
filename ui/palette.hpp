// Screen palettes: a day palette and a dim night palette for a dark bridge. The map colours
// (margin classes, ground not run yet, gaps, infill, track, picks, labels) come from the one
// colour code shared with the report, src/common/colour_code.hpp; the rest (widgets, series,
// banner) are the screen's own. Contrast figures: docs/screen.md.
#pragma once

#include <cstdint>

#include <imgui.h>

#include "common/colour_code.hpp"

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
    ImU32 not_run_yet = 0;  // ground no pass has reached yet (quiet)
    ImU32 pick = 0;         // anomaly picks (distinct from gaps)
    ImU32 line_label = 0;   // names of planned lines
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
    ImU32 margin_class[colour::kMarginClassCount] = {};  // by colour::MarginClass
    const colour::Scheme* scheme = nullptr;              // the shared colour code behind this

    // Colour of a covered cell with snapshot margin code q (1..255, margin = 1 + (q - 1) / 16, as
    // engine::SnapshotBuilder quantises it): the colour of its margin class. q = 0: transparent.
    ImU32 marginColour(std::uint8_t q) const;
    ImU32 seriesColour(std::size_t i) const { return series[i % 6]; }
};

// The margin of snapshot code q (q >= 1), as engine::SnapshotBuilder fills engine::MarginScale.
inline double marginOfSnapshotCode(std::uint8_t q) { return 1.0 + (static_cast<double>(q) - 1.0) / 16.0; }

// An ImGui colour (alpha 255) from the shared colour code.
constexpr ImU32 toImU32(colour::Rgb8 c) { return IM_COL32(c.r, c.g, c.b, 255); }

const Palette& dayPalette();
const Palette& nightPalette();
inline const Palette& paletteFor(bool night) { return night ? nightPalette() : dayPalette(); }

// Sets ImGui's own widget colours to match the palette.
void applyPaletteToStyle(const Palette& palette, ImGuiStyle& style);

}  // namespace sg::ui
