// Verification strip: known items that name the lines laid to pass them ([[known_item]] lines).
// Passes on other lines are reported apart and left out of the verdict; a bad `lines` key is a
// config error naming the file and the key; a name that is no plan line gets a note. This is the
// strip's bookkeeping: the measured peaks are set here as multiples of the model's own prediction
// (the physics of the prediction is checked in test_target_model.cpp and tests/engine/
// test_picks_demo.cpp against the simulator's independent dipole code).
#include <gtest/gtest.h>

#include <algorithm>
#include <cmath>
#include <string>
#include <vector>

#include "common/config_section.hpp"
#include "detect/verification_strip.hpp"

namespace {

using namespace sg::detect;

TargetClass shellClass() {
    TargetClass c;
    c.name = "shell";
    c.model = ModelKind::MassRule;
    c.mass_kg = 50.0;
    c.burial_m = 0.0;
    return c;
}

std::vector<KnownItem> parse(const std::string& text, const std::string& file = "strip.toml") {
    const toml::table t = sg::config::parseText(text, file);
    return parseKnownItems(sg::config::Section(t, file), t, {shellClass()});
}

// One pass of three sensors (cross-track 0, 1, 2 m east of the item) flying north over an item at
// the origin on line run `run`; at the closest approach each sensor measures `factor` times what
// the model predicts there, elsewhere nothing.
void fly(VerificationStrip& strip, const TargetModel& model, int run, double factor) {
    const double altitude = 3.0;
    for (int slot = 0; slot < 3; ++slot) {
        const double east = static_cast<double>(slot);
        for (int k = -20; k <= 20; ++k) {
            DetrendedSample d;
            d.s.t_ns = (static_cast<std::int64_t>(run) * 1000 + k + 20) * 100'000'000LL;
            d.s.slot = slot;
            d.s.easting_m = east;
            d.s.northing_m = 0.5 * k;
            d.s.altitude_m = altitude;
            d.s.threshold_nT = 0.5;
            d.s.heading_grid_rad = 0.0;
            d.s.run = run;
            d.s.usable = true;
            // The item lies `east` m to port of a northbound pass: offset -east (starboard positive).
            d.residual_nT = k == 0 ? factor * model.peakAnomalyDirect_nT(altitude, -east, 0.0) : 0.0;
            strip.add(d);
        }
    }
}

TEST(VerificationLines, PassesOnOtherLinesAreReportedApartAndLeftOutOfTheVerdict) {
    const TargetModel model(shellClass(), GeomagneticField{}, kMassRuleC_nTm3_per_kg, nullptr);
    const auto run_lines = std::vector<std::string>{"BB07", "BB08"};
    const auto plan_lines = std::vector<std::string>{"BB06", "BB07", "BB08"};
    const std::string item = "[[target]]\nname = \"shell\"\n[[known_item]]\nname = \"K1\"\ntarget = \"shell\"\n"
                             "grid_m = [0.0, 0.0]\n";

    // Named line BB07 (run 0): measured = predicted; line BB08 (run 1): half of it.
    auto items = parse(item + "lines = [\"BB07\"]\n");
    ASSERT_EQ(items.size(), 1u);
    EXPECT_EQ(items[0].lines, std::vector<std::string>{"BB07"});
    VerificationStrip strip(items);
    strip.place(0, 0.0, 0.0);
    fly(strip, model, 0, 1.0);
    fly(strip, model, 1, 0.5);
    const auto r = strip.result({model}, run_lines, plan_lines);
    ASSERT_EQ(r.passes.size(), 6u);
    for (const auto& p : r.passes) {
        EXPECT_EQ(p.line, p.run == 0 ? "BB07" : "BB08");
        EXPECT_EQ(p.on_named_line, p.run == 0);
    }
    ASSERT_EQ(r.verdicts.size(), 1u);
    EXPECT_EQ(r.verdicts[0].verdict, "confirmed");
    EXPECT_EQ(r.verdicts[0].passes_used, 3);
    EXPECT_NEAR(r.verdicts[0].median_ratio, 1.0, 1e-9);
    ASSERT_EQ(r.notes.size(), 1u);
    EXPECT_NE(r.notes[0].find("3 pass(es) on line BB08"), std::string::npos) << r.notes[0];
    EXPECT_NE(r.notes[0].find("not used in the verdict"), std::string::npos) << r.notes[0];

    // The same passes with no lines named: all six count, median 0.75: too optimistic.
    VerificationStrip every(parse(item));
    every.place(0, 0.0, 0.0);
    fly(every, model, 0, 1.0);
    fly(every, model, 1, 0.5);
    const auto all = every.result({model}, run_lines, plan_lines);
    EXPECT_TRUE(all.notes.empty());
    ASSERT_EQ(all.verdicts.size(), 1u);
    EXPECT_EQ(all.verdicts[0].verdict, "too_optimistic");
    EXPECT_EQ(all.verdicts[0].passes_used, 6);
    EXPECT_NEAR(all.verdicts[0].median_ratio, 0.75, 1e-9);
}

TEST(VerificationLines, ANameThatIsNoPlanLineGetsANoteNamingFileAndKey) {
    const TargetModel model(shellClass(), GeomagneticField{}, kMassRuleC_nTm3_per_kg, nullptr);
    VerificationStrip strip(parse("[[target]]\nname = \"shell\"\n[[known_item]]\nname = \"K1\"\ntarget = \"shell\"\n"
                                  "grid_m = [0.0, 0.0]\nlines = [\"BB07\", \"BB99\"]\n",
                                  "site/survey.toml"));
    strip.place(0, 0.0, 0.0);
    const auto r = strip.result({model}, {"BB07"}, {"BB06", "BB07"});
    ASSERT_EQ(r.notes.size(), 1u);
    EXPECT_NE(r.notes[0].find("site/survey.toml"), std::string::npos) << r.notes[0];
    EXPECT_NE(r.notes[0].find("known_item[0].lines"), std::string::npos) << r.notes[0];
    EXPECT_NE(r.notes[0].find("'BB99'"), std::string::npos) << r.notes[0];
}

TEST(VerificationLines, BadLinesKeyIsAConfigErrorNamingFileAndKey) {
    const std::string head = "[[target]]\nname = \"shell\"\n[[known_item]]\nname = \"K1\"\ntarget = \"shell\"\n"
                             "grid_m = [0.0, 0.0]\n";
    for (const std::string bad : {"lines = []", "lines = \"BB07\"", "lines = [\"BB07\", \"BB07\"]",
                                  "lines = [\"\"]", "lines = [7]"}) {
        SCOPED_TRACE(bad);
        try {
            parse(head + bad + "\n", "strip.toml");
            ADD_FAILURE() << "accepted";
        } catch (const sg::config::ConfigError& e) {
            const std::string msg = e.what();
            EXPECT_NE(msg.find("strip.toml"), std::string::npos) << msg;
            EXPECT_NE(msg.find("lines"), std::string::npos) << msg;
        }
    }
}

}  // namespace
