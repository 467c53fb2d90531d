// Day and night palettes and the margin colour ramp.
#include "ui/palette.hpp"

#include <algorithm>
#include <cmath>
#include <iterator>

namespace sg::ui {
namespace {

constexpr ImU32 rgb(int r, int g, int b, int a = 255) { return IM_COL32(r, g, b, a); }

int channel(ImU32 c, int shift) { return static_cast<int>((c >> shift) & 0xFFu); }

ImU32 mix(ImU32 a, ImU32 b, float t) {
    auto lerp = [t](int x, int y) { return static_cast<int>(std::lround(static_cast<float>(x) + (static_cast<float>(y - x)) * t)); };
    return rgb(lerp(channel(a, IM_COL32_R_SHIFT), channel(b, IM_COL32_R_SHIFT)),
               lerp(channel(a, IM_COL32_G_SHIFT), channel(b, IM_COL32_G_SHIFT)),
               lerp(channel(a, IM_COL32_B_SHIFT), channel(b, IM_COL32_B_SHIFT)));
}

Palette makeDay() {
    Palette p;
    p.name = "day";
    p.dark = false;
    p.background = rgb(236, 238, 232);
    p.text = rgb(24, 28, 34);
    p.text_dim = rgb(98, 104, 112);
    p.grid = rgb(210, 213, 206);
    p.axis = rgb(120, 124, 130);
    p.area = rgb(60, 60, 60);
    p.line = rgb(128, 118, 150);
    p.line_active = rgb(208, 64, 160);
    p.tow_track = rgb(40, 40, 40);
    p.vessel = rgb(10, 10, 10);
    p.swath_edge = rgb(0, 120, 190);
    p.gap = rgb(235, 20, 20);
    p.gap_fill = rgb(235, 20, 20, 50);
    p.infill = rgb(230, 130, 0);
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
    // Dark blue -> green-teal -> pale yellow: lightness rises with margin.
    p.ramp[0] = rgb(52, 58, 128);
    p.ramp[1] = rgb(38, 150, 140);
    p.ramp[2] = rgb(226, 232, 120);
    return p;
}

Palette makeNight() {
    Palette p;
    p.name = "night";
    p.dark = true;
    // Low luminance everywhere; no large bright areas that would spoil night vision.
    p.background = rgb(8, 9, 11);
    p.text = rgb(150, 140, 120);
    p.text_dim = rgb(92, 86, 76);
    p.grid = rgb(24, 26, 30);
    p.axis = rgb(70, 70, 72);
    p.area = rgb(110, 104, 96);
    p.line = rgb(78, 72, 96);
    p.line_active = rgb(150, 70, 130);
    p.tow_track = rgb(120, 116, 110);
    p.vessel = rgb(170, 160, 140);
    p.swath_edge = rgb(60, 110, 150);
    p.gap = rgb(200, 40, 30);
    p.gap_fill = rgb(200, 40, 30, 40);
    p.infill = rgb(170, 110, 30);
    p.warn = rgb(160, 115, 20);
    p.alarm = rgb(170, 30, 24);
    p.banner = rgb(150, 24, 20);
    p.banner_stripe = rgb(30, 8, 8);
    p.banner_text = rgb(230, 210, 190);
    p.ok = rgb(50, 110, 60);
    p.caution = rgb(130, 100, 50);
    const ImU32 s[6] = {rgb(70, 110, 160), rgb(160, 96, 40), rgb(60, 130, 90), rgb(130, 80, 140),
                        rgb(120, 100, 70), rgb(150, 70, 100)};
    std::copy(std::begin(s), std::end(s), p.series);
    p.ramp[0] = rgb(28, 30, 70);
    p.ramp[1] = rgb(24, 82, 78);
    p.ramp[2] = rgb(110, 116, 64);
    return p;
}

}  // namespace

ImU32 Palette::marginColour(std::uint8_t q) const {
    if (q == 0) return 0;
    const float t = static_cast<float>(q - 1) / 254.0f;
    return t < 0.5f ? mix(ramp[0], ramp[1], t * 2.0f) : mix(ramp[1], ramp[2], (t - 0.5f) * 2.0f);
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
