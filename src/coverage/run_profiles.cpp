// Per-run profiles in one-metre bins; see run_profiles.hpp.
#include "coverage/run_profiles.hpp"

#include <cmath>

namespace sg::coverage {

RunProfile* RunProfiles::find(int run) {
    if (run < 0) return nullptr;
    // Runs arrive in order: the one asked for is nearly always the last.
    for (auto it = m_profiles.rbegin(); it != m_profiles.rend(); ++it)
        if (it->run == run) return &*it;
    return nullptr;
}

void RunProfiles::addPosition(int run, int line, std::int64_t t_ns, double along_m, std::optional<double> altitude_m,
                              std::optional<double> deviation_m) {
    if (run < 0 || line < 0 || !std::isfinite(along_m)) return;
    RunProfile* p = find(run);
    if (p == nullptr) {
        m_profiles.push_back(RunProfile{run, line, {}});
        p = &m_profiles.back();
    } else if (p->line != line) {
        // The run changed its line while settling (LineTracker's run-in): the few metres kept
        // were measured along the other line; start again on this one.
        p->line = line;
        p->bins.clear();
    }
    const auto bin = [](double a) { return std::floor(a / kBin_m); };
    if (p->bins.empty() || bin(p->bins.back().along_m) != bin(along_m)) {
        ProfileBin b;
        b.along_m = along_m;
        b.t_ns = t_ns;
        p->bins.push_back(b);
    }
    auto& b = p->bins.back();
    if (altitude_m && (!b.altitude_m || *altitude_m > *b.altitude_m)) b.altitude_m = altitude_m;
    if (deviation_m && (!b.deviation_m || std::abs(*deviation_m) > std::abs(*b.deviation_m))) b.deviation_m = deviation_m;
}

void RunProfiles::addNoise(int run, double noise_nT) {
    RunProfile* p = find(run);
    if (p == nullptr || p->bins.empty() || !std::isfinite(noise_nT)) return;
    auto& b = p->bins.back();
    if (!b.noise_nT || noise_nT > *b.noise_nT) b.noise_nT = noise_nT;
}

}  // namespace sg::coverage
