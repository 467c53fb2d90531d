// The screen's anomaly picks (docs/picks.md, docs/screen.md "Anomalies"): the plan view's pick
// marker, the text of the "Anomalies" tab's rows, and the verification strip's rows and verdict
// words. The text functions are pure (tested headless in tests/ui/test_picks_screen.cpp).
#pragma once

#include <string>
#include <vector>

#include <imgui.h>

#include "engine/snapshot.hpp"
#include "ui/palette.hpp"

namespace sg::ui {

// One row of the picks table, rounded to what each figure can mean (docs/screen.md).
struct PickRow {
    std::string id;          // "P7"
    std::string first_seen;  // survey clock, "hh:mm:ss" UTC
    std::string position;    // "E 500123.4  N 5700456.7" (0.1 m)
    std::string peak;        // "+12.3 nT" (0.1 nT, signed)
    std::string depth;       // "1.2 m (4.3 m)": burial below the seabed (depth below the sensor); "-"
    std::string size;        // "2.1 A m², ~45 kg" (two significant figures); "-" without a fit
    std::string quality;     // "strong, r² 0.93, 4.1x thr"
    std::string runs;        // "L03 run 1, L04 run 2"
};
PickRow pickRow(const engine::PickView& p);

// The plan's label of a pick: "P7".
std::string pickLabel(const engine::PickView& p);

// A value to `digits` significant figures without an exponent: 2.14 -> "2.1", 1234 -> "1200".
std::string significant(double v, int digits);

struct VerificationRow {
    std::string time;  // closest approach, survey clock "hh:mm:ss" UTC
    std::string item, run, sensor, offset, altitude, predicted, measured, ratio, model_sees, seen;
};
VerificationRow verificationRow(const engine::VerificationPassView& p);
// The report's table skips passes far from the item (prediction under a tenth of the threshold
// and nothing measured); the screen does the same.
bool verificationPassShown(const engine::VerificationPassView& p);

// The passes the screen lists, newest first (closest approach on the survey clock), so a pass
// just run is the top row while the passes are run; the sensors of one pass (one item, one line
// run) together, the one with the largest prediction (nearest the item) first.
std::vector<const engine::VerificationPassView*> shownPassesNewestFirst(const engine::PicksView& v);

// One line for the newest pass the verdict counts (the model predicts a detection there; else
// the newest listed pass): "latest pass 08:12:03  shell B, HF03 run 1, sensor 2 at -1.2 m, 8.7 m
// up: predicted 9.00 nT, measured 6.30 nT, ratio 0.70, seen (model: seen)". Empty when no pass
// is listed.
std::string latestPassText(const engine::PicksView& v);

// The known-item check's header, readable while collapsed: "Known-item check: small shell too
// optimistic, ratio 0.70 (6 passes)"; one entry per class, "; " between them.
std::string verificationHeadline(const engine::PicksView& v);

// "confirmed", "too optimistic", "conservative", "not enough passes": the words the report's
// verdict sentences use (detect/verification_strip.cpp).
std::string verdictWords(const std::string& verdict);

// The pick marker: a diamond in the pick colour on a halo of the map background (so it reads on
// any margin colour); filled for strong and fair picks, hollow for weak ones. Distinct from the
// gaps (outlines) and the forming gap (a ring with a cross). Half the diamond's diagonal, pixels.
float pickMarkerRadius(float scale);
void drawPickMarker(ImDrawList* dl, ImVec2 centre, float scale, const Palette& pal, bool filled);

}  // namespace sg::ui
