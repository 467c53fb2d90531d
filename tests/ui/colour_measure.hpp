// Colour measurements shared by the screen's contrast tests (test_palette.cpp, test_picks_screen.cpp),
// published formulas implemented here, independently of the code under test:
// - contrast ratio and relative luminance: W3C, Web Content Accessibility Guidelines (WCAG) 2.1,
//   definitions "contrast ratio" and "relative luminance" (https://www.w3.org/TR/WCAG21/#dfn-contrast-ratio,
//   #dfn-relative-luminance): L = 0.2126 R + 0.7152 G + 0.0722 B on linearised sRGB channels,
//   ratio = (L1 + 0.05) / (L2 + 0.05) with L1 the lighter. WCAG 2.1 writes the linearisation
//   threshold as 0.03928; the sRGB standard (IEC 61966-2-1) has 0.04045; no 8-bit value lies
//   between them, so both give the same figures.
// - CIELAB and the CIE76 colour difference Delta E*ab (Euclidean distance in L*a*b*): CIE 15:2004
//   Colorimetry, D65 white; sRGB -> XYZ matrix from IEC 61966-2-1.
#pragma once

#include <algorithm>
#include <array>
#include <cmath>
#include <cstdint>

#include <imgui.h>

#include "common/colour_code.hpp"

namespace sg::testui {

inline double linear(std::uint8_t c8) {
    const double c = c8 / 255.0;
    return c <= 0.04045 ? c / 12.92 : std::pow((c + 0.055) / 1.055, 2.4);  // IEC 61966-2-1
}

inline double relativeLuminance(colour::Rgb8 c) {  // WCAG 2.1 "relative luminance"
    return 0.2126 * linear(c.r) + 0.7152 * linear(c.g) + 0.0722 * linear(c.b);
}

inline double contrastRatio(colour::Rgb8 a, colour::Rgb8 b) {  // WCAG 2.1 "contrast ratio"
    const double la = relativeLuminance(a), lb = relativeLuminance(b);
    return (std::max(la, lb) + 0.05) / (std::min(la, lb) + 0.05);
}

inline std::array<double, 3> lab(colour::Rgb8 c) {  // CIE 15:2004, D65
    const double r = linear(c.r), g = linear(c.g), b = linear(c.b);
    const double x = 0.4124 * r + 0.3576 * g + 0.1805 * b;
    const double y = 0.2126 * r + 0.7152 * g + 0.0722 * b;
    const double z = 0.0193 * r + 0.1192 * g + 0.9505 * b;
    const auto f = [](double t) {
        const double d = 6.0 / 29.0;
        return t > d * d * d ? std::cbrt(t) : t / (3 * d * d) + 4.0 / 29.0;
    };
    const double fx = f(x / 0.95047), fy = f(y / 1.0), fz = f(z / 1.08883);
    return {116 * fy - 16, 500 * (fx - fy), 200 * (fy - fz)};
}

inline double deltaE76(colour::Rgb8 a, colour::Rgb8 b) {
    const auto p = lab(a), q = lab(b);
    return std::sqrt((p[0] - q[0]) * (p[0] - q[0]) + (p[1] - q[1]) * (p[1] - q[1]) + (p[2] - q[2]) * (p[2] - q[2]));
}

// An ImGui colour (ImU32 or the style's ImVec4) as 8-bit sRGB.
inline colour::Rgb8 rgb8(ImU32 c) {
    return {static_cast<std::uint8_t>(c >> IM_COL32_R_SHIFT), static_cast<std::uint8_t>(c >> IM_COL32_G_SHIFT),
            static_cast<std::uint8_t>(c >> IM_COL32_B_SHIFT)};
}
inline colour::Rgb8 rgb8(const ImVec4& c) { return rgb8(ImGui::ColorConvertFloat4ToU32(c)); }

}  // namespace sg::testui
