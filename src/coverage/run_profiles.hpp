// Per-run profiles for the report's line plots (docs/report.md, "Line profiles"): along each line
// run, the sensor altitude, the cross-track deviation and the magnetometer noise, kept in bins of
// one metre along the line. Each bin keeps the WORST value that fell in it (highest altitude,
// deviation of largest magnitude, highest noise of any sensor), so a short excursion still shows
// on a plot that cannot draw every sample. Plain data, fed by engine::SurveyEngine.
#pragma once

#include <cstdint>
#include <optional>
#include <vector>

namespace sg::coverage {

struct ProfileBin {
    double along_m = 0.0;               // along the line from its start (m), of the first sample
    std::int64_t t_ns = 0;              // survey time of the first sample in the bin (UTC ns)
    std::optional<double> altitude_m;   // highest altitude above the seabed (m) of the sample driving the runs
    std::optional<double> deviation_m;  // signed cross-track deviation of largest magnitude (m, starboard +)
    std::optional<double> noise_nT;     // highest fourth-difference noise of any sensor (nT)
};

struct RunProfile {
    int run = -1;   // line run id (coverage::LineRun::id)
    int line = -1;  // plan line index
    std::vector<ProfileBin> bins;  // in the order they were run
};

class RunProfiles {
public:
    static constexpr double kBin_m = 1.0;  // bin length along the line (m)

    // The array reference at survey time t_ns is `along_m` along plan line `line` on run `run`
    // (kRunNone / negative: off any run, nothing kept), with its altitude and deviation (the values
    // LineTracker::update and crossTrack see, so a run's worst bin equals its LineRun figure). A run
    // that changes line (settling) starts its bins again.
    void addPosition(int run, int line, std::int64_t t_ns, double along_m, std::optional<double> altitude_m,
                     std::optional<double> deviation_m);
    // A sensor's noise estimate (nT) while the array was on run `run`: kept in that run's current bin.
    void addNoise(int run, double noise_nT);

    const std::vector<RunProfile>& profiles() const { return m_profiles; }

private:
    RunProfile* find(int run);
    std::vector<RunProfile> m_profiles;  // by first appearance (run ids ascend)
};

}  // namespace sg::coverage
