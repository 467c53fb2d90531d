// The shared colour code (src/common/colour_code.hpp) and the screen palettes built on it,
// measured with the published formulas of colour_measure.hpp (WCAG 2.1 contrast ratio, CIE76
// Delta E*ab), implemented there independently of the code under test.
// Criteria (ours, stated in colour_code.hpp and docs/screen.md): each class and label >= 3:1
// against its background (WCAG 2.1 SC 1.4.11 asks 3:1 for graphical objects); detectable margin
// classes >= 8 L* apart in order; coloured classes >= 20 Delta E76 apart (a just noticeable
// difference is about 2.3, Sharma & Trussell 1997, from memory: 20 is far beyond it).
#include <gtest/gtest.h>

#include <array>
#include <cmath>
#include <cstdio>
#include <string>
#include <utility>
#include <vector>

#include "colour_measure.hpp"
#include "common/colour_code.hpp"
#include "ui/palette.hpp"

namespace {

using sg::colour::Rgb8;

using sg::testui::contrastRatio;
using sg::testui::deltaE76;
using sg::testui::lab;

// The formulas themselves against known values: black/white 21:1 (WCAG 2.1 names this maximum),
// white L* = 100, and a WCAG classic: #777777 on white is 4.48:1.
TEST(ContrastFormula, KnownValues) {
    EXPECT_NEAR(contrastRatio({0, 0, 0}, {255, 255, 255}), 21.0, 1e-9);
    EXPECT_NEAR(contrastRatio({119, 119, 119}, {255, 255, 255}), 4.48, 0.01);
    EXPECT_NEAR(lab({255, 255, 255})[0], 100.0, 0.01);
    EXPECT_NEAR(std::abs(lab({255, 255, 255})[1]) + std::abs(lab({255, 255, 255})[2]), 0.0, 0.02);
    EXPECT_NEAR(deltaE76({0, 0, 0}, {255, 255, 255}), 100.0, 0.01);
}

struct Named {
    const char* name;
    Rgb8 colour;
};

std::vector<Named> foreground(const sg::colour::Scheme& s) {
    std::vector<Named> v;
    for (int k = 0; k < sg::colour::kMarginClassCount; ++k)
        v.push_back({sg::colour::kMarginClassLabels[static_cast<std::size_t>(k)], s.margin[static_cast<std::size_t>(k)]});
    v.push_back({"gap", s.gap});
    v.push_back({"infill", s.infill});
    v.push_back({"track", s.track});
    v.push_back({"pick", s.pick});
    v.push_back({"planned line", s.plan_line});
    v.push_back({"line label", s.line_label});
    v.push_back({"area outline", s.area});
    v.push_back({"text", s.text});
    v.push_back({"secondary text", s.text_dim});
    return v;
}

TEST(ColourCode, EveryClassAndLabelAtLeastThreeToOneAgainstItsBackground) {
    for (const auto* s : {&sg::colour::kLight, &sg::colour::kDark}) {
        std::vector<Rgb8> backgrounds{s->background};
        if (!s->dark) backgrounds.push_back({255, 255, 255});  // the report's paper
        for (const auto& bg : backgrounds)
            for (const auto& f : foreground(*s)) {
                const double cr = contrastRatio(f.colour, bg);
                std::printf("  %-5s on (%3d,%3d,%3d)  %-36s %5.2f:1\n", s->name, bg.r, bg.g, bg.b, f.name, cr);
                EXPECT_GE(cr, 3.0) << s->name << ": " << f.name;
            }
        // Ground not run yet is quiet on purpose: close to the background, not a class colour.
        const double quiet = contrastRatio(s->not_run_yet, s->background);
        std::printf("  %-5s not run yet vs background %.2f:1\n", s->name, quiet);
        EXPECT_LT(quiet, 1.5) << s->name;
        EXPECT_GT(quiet, 1.05) << s->name << ": not run yet must still differ from the background";
    }
}

TEST(ColourCode, MarginClassesOrderedByLightnessAndDistinguishable) {
    using sg::colour::MarginClass;
    for (const auto* s : {&sg::colour::kLight, &sg::colour::kDark}) {
        // Detectable classes: further from the background in L* as the margin grows.
        const double bg_l = lab(s->background)[0];
        double prev = std::abs(lab(s->marginColour(MarginClass::kWeak))[0] - bg_l);
        for (auto c : {MarginClass::kGood, MarginClass::kStrong}) {
            const double d = std::abs(lab(s->marginColour(c))[0] - bg_l);
            std::printf("  %-5s class %d: L* distance from background %.1f (previous %.1f)\n", s->name,
                        static_cast<int>(c), d, prev);
            EXPECT_GE(d - prev, 8.0) << s->name << " class " << static_cast<int>(c);
            prev = d;
        }
        std::vector<Named> coloured;
        for (int k = 0; k < sg::colour::kMarginClassCount; ++k)
            coloured.push_back({sg::colour::kMarginClassShort[static_cast<std::size_t>(k)], s->margin[static_cast<std::size_t>(k)]});
        coloured.push_back({"gap", s->gap});
        coloured.push_back({"infill", s->infill});
        coloured.push_back({"pick", s->pick});
        double worst = 1e9;
        std::string worst_pair;
        for (std::size_t i = 0; i < coloured.size(); ++i)
            for (std::size_t j = i + 1; j < coloured.size(); ++j) {
                const double de = deltaE76(coloured[i].colour, coloured[j].colour);
                EXPECT_GE(de, 20.0) << s->name << ": " << coloured[i].name << " vs " << coloured[j].name;
                if (de < worst) {
                    worst = de;
                    worst_pair = std::string(coloured[i].name) + " / " + coloured[j].name;
                }
            }
        std::printf("  %-5s smallest Delta E76 between coloured classes: %.1f (%s)\n", s->name, worst, worst_pair.c_str());
    }
}

// The screen palettes are the shared code (one table for screen and report): the map colours
// are the scheme's, and a covered cell takes its margin class colour.
TEST(ColourCode, ScreenPalettesUseTheSharedTable) {
    for (const auto* pal : {&sg::ui::dayPalette(), &sg::ui::nightPalette()}) {
        const auto& s = sg::colour::scheme(pal->dark);
        ASSERT_EQ(pal->scheme, &s);
        const auto rgb = [](ImU32 c) {
            return Rgb8{static_cast<std::uint8_t>(c >> IM_COL32_R_SHIFT), static_cast<std::uint8_t>(c >> IM_COL32_G_SHIFT),
                        static_cast<std::uint8_t>(c >> IM_COL32_B_SHIFT)};
        };
        EXPECT_EQ(rgb(pal->background), s.background);
        EXPECT_EQ(rgb(pal->gap), s.gap);
        EXPECT_EQ(rgb(pal->infill), s.infill);
        EXPECT_EQ(rgb(pal->not_run_yet), s.not_run_yet);
        EXPECT_EQ(rgb(pal->pick), s.pick);
        EXPECT_EQ(rgb(pal->tow_track), s.track);
        EXPECT_EQ(rgb(pal->line_label), s.line_label);
        EXPECT_EQ(pal->marginColour(0), 0u);
        // Snapshot code q <-> margin 1 + (q - 1) / 16 (engine::SnapshotBuilder): q = 16 is margin
        // 1.9375, q = 17 is 2.0, q = 49 is 4.0.
        EXPECT_EQ(rgb(pal->marginColour(1)), s.margin[1]);
        EXPECT_EQ(rgb(pal->marginColour(16)), s.margin[1]);
        EXPECT_EQ(rgb(pal->marginColour(17)), s.margin[2]);
        EXPECT_EQ(rgb(pal->marginColour(48)), s.margin[2]);
        EXPECT_EQ(rgb(pal->marginColour(49)), s.margin[3]);
        EXPECT_EQ(rgb(pal->marginColour(255)), s.margin[3]);
    }
}

}  // namespace
