// Day and night palettes: the shared colour code for the map, the screen's own widget colours.
#include "ui/palette.hpp"

#include <algorithm>
#include <cmath>
#include <iterator>

namespace sg::ui {
namespace {

constexpr ImU32 rgb(int r, int g, int b, int a = 255) { return IM_COL32(r, g, b, a); }

// The map colours from the shared colour code (src/common/colour_code.hpp).
void applyScheme(Palette& p, const colour::Scheme& c) {
    p.scheme = &c;
    p.background = toImU32(c.background);
    p.text = toImU32(c.text);
    p.text_dim = toImU32(c.text_dim);
    p.area = toImU32(c.area);
    p.line = toImU32(c.plan_line);
    p.line_label = toImU32(c.line_label);
    p.tow_track = toImU32(c.track);
    p.gap = toImU32(c.gap);
    p.gap_fill = (toImU32(c.gap) & ~IM_COL32_A_MASK) | (static_cast<ImU32>(c.dark ? 40 : 50) << IM_COL32_A_SHIFT);
    p.infill = toImU32(c.infill);
    p.not_run_yet = toImU32(c.not_run_yet);
    p.pick = toImU32(c.pick);
    for (int k = 0; k < colour::kMarginClassCount; ++k)
        p.margin_class[k] = toImU32(c.margin[static_cast<std::size_t>(k)]);
}

Palette makeDay() {
    Palette p;
    p.name = "day";
    p.dark = false;
    applyScheme(p, colour::kLight);
    p.grid = rgb(210, 213, 206);
    p.axis = rgb(120, 124, 130);
    p.line_active = rgb(176, 40, 130);
    p.vessel = rgb(10, 10, 10);
    p.swath_edge = rgb(0, 110, 170);
    p.warn = rgb(214, 150, 0);
    p.alarm = rgb(200, 24, 24);
    p.banner = rgb(200, 24, 24);
    p.banner_stripe = rgb(40, 12, 12);
    p.banner_text = rgb(255, 255, 255);
    p.ok = rgb(40, 140, 70);
    p.caution = rgb(120, 70, 0);
    const ImU32 s[6] = {rgb(31, 100, 180), rgb(214, 96, 20), rgb(30, 150, 90), rgb(150, 60, 170),
                        rgb(120, 90, 50), rgb(200, 60, 110)};
    std::copy(std::begin(s), std::end(s), p.series);
    return p;
}

Palette makeNight() {
    Palette p;
    p.name = "night";
    p.dark = true;
    // Low luminance everywhere; no large bright areas that would spoil night vision.
    applyScheme(p, colour::kDark);
    p.grid = rgb(24, 26, 30);
    p.axis = rgb(90, 90, 92);
    p.line_active = rgb(230, 120, 200);
    p.vessel = rgb(200, 190, 170);
    p.swath_edge = rgb(90, 150, 200);
    p.warn = rgb(160, 115, 20);
    p.alarm = rgb(205, 55, 45);  // text too (alarm lists, limits, verdicts): >= 3:1 on the window
    p.banner = rgb(150, 24, 20);
    p.banner_stripe = rgb(30, 8, 8);
    p.banner_text = rgb(230, 210, 190);
    p.ok = rgb(50, 110, 60);
    p.caution = rgb(130, 100, 50);
    const ImU32 s[6] = {rgb(70, 110, 160), rgb(160, 96, 40), rgb(60, 130, 90), rgb(130, 80, 140),
                        rgb(120, 100, 70), rgb(150, 70, 100)};
    std::copy(std::begin(s), std::end(s), p.series);
    return p;
}

}  // namespace

ImU32 Palette::marginColour(std::uint8_t q) const {
    if (q == 0) return 0;
    return margin_class[static_cast<int>(colour::marginClassOf(marginOfSnapshotCode(q)))];
}

const Palette& dayPalette() {
    static const Palette p = makeDay();
    return p;
}

const Palette& nightPalette() {
    static const Palette p = makeNight();
    return p;
}

void applyPaletteToStyle(const Palette& palette, ImGuiStyle& style) {
    if (palette.dark) {
        ImGui::StyleColorsDark(&style);
        // Dim every widget colour: a dark bridge needs low luminance.
        for (ImVec4& c : style.Colors) {
            c.x *= 0.55f;
            c.y *= 0.55f;
            c.z *= 0.55f;
        }
        style.Colors[ImGuiCol_Text] = ImGui::ColorConvertU32ToFloat4(palette.text);
        style.Colors[ImGuiCol_TextDisabled] = ImGui::ColorConvertU32ToFloat4(palette.text_dim);
        style.Colors[ImGuiCol_WindowBg] = ImVec4(0.035f, 0.04f, 0.045f, 1.0f);
        style.Colors[ImGuiCol_ChildBg] = ImVec4(0.035f, 0.04f, 0.045f, 1.0f);
        style.Colors[ImGuiCol_PopupBg] = ImVec4(0.05f, 0.05f, 0.06f, 1.0f);
    } else {
        ImGui::StyleColorsLight(&style);
        style.Colors[ImGuiCol_WindowBg] = ImVec4(0.95f, 0.95f, 0.93f, 1.0f);
    }
    style.WindowRounding = 0.0f;
    style.FrameRounding = 2.0f;
}

}  // namespace sg::ui
