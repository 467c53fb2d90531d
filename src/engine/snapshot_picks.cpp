#include "engine/snapshot_picks.hpp"

#include <string>

#include "engine/picks_summary.hpp"

namespace sg::engine {
namespace {

std::string runName(int run, const std::vector<RunView>& runs) {
    if (run >= 0 && static_cast<std::size_t>(run) < runs.size()) return runs[static_cast<std::size_t>(run)].name;
    return "run " + std::to_string(run + 1);
}

}  // namespace

PicksView makePicksView(const SurveyEngine::PicksNow& now, bool enabled, const std::vector<RunView>& runs) {
    PicksView v;
    v.enabled = enabled;
    v.caution = kPicksCaution;
    v.picks.reserve(now.picks.size());
    for (const auto& k : now.picks) {
        PickView p;
        p.id = k.id;
        p.first_s = toSeconds(k.first_t_ns);
        p.at = {k.easting_m, k.northing_m};
        p.peak_nT = k.peak_nT;
        p.width_m = k.width_m;
        p.altitude_m = k.altitude_m;
        p.burial_m = k.burial_m;
        p.depth_below_sensor_m = k.depth_below_sensor_m;
        p.moment_Am2 = k.moment_Am2;
        p.mass_rule_kg = k.mass_rule_kg;
        p.moment_model = k.moment_model;
        p.fit_r2 = k.fit_r2;
        p.snr = k.snr;
        p.quality = k.quality;
        for (int r : k.runs) p.runs.push_back(runName(r, runs));
        v.picks.push_back(std::move(p));
    }
    const auto& ver = now.verification;
    for (const auto& x : ver.passes) {
        VerificationPassView p;
        p.item = x.item;
        p.target_class = x.target_class;
        p.run = runName(x.run, runs);
        p.sensor_slot = x.sensor_slot;
        p.t_s = toSeconds(x.t_ns);
        p.offset_m = x.offset_m;
        p.altitude_m = x.altitude_m;
        p.threshold_nT = x.threshold_nT;
        p.predicted_nT = x.predicted_nT;
        p.measured_nT = x.measured_nT;
        p.ratio = x.ratio;
        p.predicted_detected = x.predicted_detected;
        p.detected = x.detected;
        v.passes.push_back(std::move(p));
    }
    for (const auto& c : ver.verdicts)
        v.verdicts.push_back({c.target_class, c.verdict, c.text, c.passes_used, c.passes_detected, c.median_ratio});
    v.unplaced = ver.unplaced;
    return v;
}

}  // namespace sg::engine
