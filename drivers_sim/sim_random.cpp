// Seeded pseudo-random numbers; see sim_random.hpp.
#include "drivers_sim/sim_random.hpp"

#include <cmath>

namespace sg::sim {

std::uint64_t splitMix64(std::uint64_t x) {
    x += 0x9E3779B97F4A7C15ull;
    x = (x ^ (x >> 30)) * 0xBF58476D1CE4E5B9ull;
    x = (x ^ (x >> 27)) * 0x94D049BB133111EBull;
    return x ^ (x >> 31);
}

SimRandom::SimRandom(std::uint64_t seed, std::uint64_t stream)
    : m_engine(splitMix64(seed ^ splitMix64(stream + 0x5367u))) {}

double SimRandom::uniform01() {
    // The top 53 bits scaled by 2^-53: every value exactly representable, never 1.0.
    return static_cast<double>(m_engine() >> 11) * 0x1.0p-53;
}

double SimRandom::normal() {
    if (m_has_spare) {
        m_has_spare = false;
        return m_spare;
    }
    double u = 0.0;
    double v = 0.0;
    double s = 0.0;
    do {
        u = 2.0 * uniform01() - 1.0;
        v = 2.0 * uniform01() - 1.0;
        s = u * u + v * v;
    } while (s >= 1.0 || s == 0.0);
    const double f = std::sqrt(-2.0 * std::log(s) / s);
    m_spare = v * f;
    m_has_spare = true;
    return u * f;
}

std::uint64_t SimRandom::below(std::uint64_t n) {
    if (n <= 1) return 0;
    // Reject the top partial block so every residue is equally likely.
    const std::uint64_t limit = ~std::uint64_t{0} - (~std::uint64_t{0} % n);
    std::uint64_t x = 0;
    do {
        x = m_engine();
    } while (x >= limit);
    return x % n;
}

}  // namespace sg::sim
