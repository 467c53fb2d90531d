// The one colour code of swathguard, shared by the screen (ui/palette.cpp) and the report
// (report/map_render.cpp): margin classes, ground not run yet, gaps, infill, track, picks and the
// labels, for a light scheme (day screen, paper) and a dark one (night screen). Plain data, no
// dependency: ui/ and report/ both include it and neither depends on the other.
//
// The colours are the team's own. Rules they were chosen to (checked in tests/ui/test_palette.cpp
// with the WCAG 2.1 contrast ratio and the CIE76 colour difference; figures in docs/screen.md):
// - every margin class, gap, infill, pick, track and label colour has a contrast ratio of at
//   least 3:1 against the scheme's background (and, for the light scheme, against white paper);
// - the detectable margin classes get further from the background in lightness as the margin
//   grows (darker by day, lighter by night), at least 8 L* apart, so the order reads without hue;
// - any two of the coloured classes (margin classes, gap, infill, pick) are at least 20 CIE76
//   Delta E apart;
// - ground not run yet is quiet: close to the background on purpose (below 1.5:1).
#pragma once

#include <array>
#include <cstdint>

namespace sg::colour {

struct Rgb8 {
    std::uint8_t r = 0, g = 0, b = 0;
    constexpr bool operator==(const Rgb8&) const = default;
};

// Margin classes, weakest first. The margin is the peak anomaly over the detection threshold
// (dimensionless, docs/detection-model.md); class k holds margins in [kMarginEdges[k-1],
// kMarginEdges[k]).
enum class MarginClass : int { kBelow = 0, kWeak = 1, kGood = 2, kStrong = 3 };
inline constexpr int kMarginClassCount = 4;
inline constexpr std::array<double, 3> kMarginEdges{1.0, 2.0, 4.0};
inline constexpr std::array<const char*, kMarginClassCount> kMarginClassLabels{
    "seen, margin < 1 (not detectable)", "margin 1 - 2", "margin 2 - 4", "margin >= 4"};
inline constexpr std::array<const char*, kMarginClassCount> kMarginClassShort{"< 1", "1-2", "2-4", ">= 4"};

// Class of a margin (0 .. 3). A margin below 1 is not detectable: the cell was seen, nothing at
// the class's size would stand out from the noise there.
constexpr MarginClass marginClassOf(double margin) {
    if (margin < kMarginEdges[0]) return MarginClass::kBelow;
    if (margin < kMarginEdges[1]) return MarginClass::kWeak;
    if (margin < kMarginEdges[2]) return MarginClass::kGood;
    return MarginClass::kStrong;
}

struct Scheme {
    const char* name;
    bool dark;
    Rgb8 background;    // what the map is drawn on (screen plan view; the report uses white paper)
    Rgb8 not_run_yet;   // ground inside the area no pass has reached yet: quiet
    std::array<Rgb8, kMarginClassCount> margin;  // by MarginClass
    Rgb8 gap;           // missed ground: outline and label
    Rgb8 infill;        // proposed infill lines and their names
    Rgb8 track;         // tow point track
    Rgb8 pick;          // anomaly picks (a marker distinct from gaps)
    Rgb8 plan_line;     // planned lines
    Rgb8 line_label;    // names of planned lines
    Rgb8 area;          // area of interest outline
    Rgb8 text;          // labels and read-outs
    Rgb8 text_dim;      // secondary text (still >= 3:1)

    constexpr Rgb8 marginColour(MarginClass c) const { return margin[static_cast<std::size_t>(c)]; }
};

// Light scheme: day screen and the printed report. Classes darken as the margin grows.
inline constexpr Scheme kLight{
    "day",
    false,
    {236, 238, 232},
    {214, 212, 204},
    {{{178, 82, 0}, {20, 128, 104}, {38, 84, 176}, {60, 20, 96}}},
    {204, 0, 48},
    {150, 40, 180},
    {34, 34, 38},
    {0, 92, 40},
    {96, 88, 130},
    {60, 52, 110},
    {40, 40, 44},
    {24, 28, 34},
    {84, 90, 98},
};

// Dark scheme: night screen. Classes lighten as the margin grows; nothing brighter than needed.
inline constexpr Scheme kDark{
    "night",
    true,
    {8, 9, 11},
    {30, 32, 38},
    {{{176, 104, 40}, {36, 108, 92}, {56, 122, 180}, {142, 134, 198}}},
    {255, 84, 84},
    {214, 120, 255},
    {190, 182, 166},
    {200, 230, 60},
    {110, 104, 140},
    {176, 166, 220},
    {150, 144, 132},
    {170, 160, 140},
    {130, 122, 108},
};

constexpr const Scheme& scheme(bool dark) { return dark ? kDark : kLight; }

}  // namespace sg::colour
