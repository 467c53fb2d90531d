// Seeded pseudo-random numbers for the simulator, portable across standard libraries.
// std::mt19937_64 is fully specified by the C++ standard, but std::*_distribution are not, so the
// uniform and normal draws are implemented here: the same seed gives the same numbers everywhere
// (up to the last bit of libm's log/sqrt, which glibc computes correctly rounded).
#pragma once

#include <cstdint>
#include <random>

namespace sg::sim {

class SimRandom {
public:
    // `stream` selects an independent sequence for the same seed (one per noise source), so that
    // adding a fault or a sensor does not shift the numbers every other source draws.
    explicit SimRandom(std::uint64_t seed = 0, std::uint64_t stream = 0);

    std::uint64_t next() { return m_engine(); }
    // Uniform in [0, 1) with 53 random bits.
    double uniform01();
    // Uniform in [lo, hi).
    double uniform(double lo, double hi) { return lo + (hi - lo) * uniform01(); }
    // Standard normal (Marsaglia polar method; Marsaglia & Bray 1964).
    double normal();
    double normal(double mean, double std_dev) { return mean + std_dev * normal(); }
    // Uniform integer in [0, n) without modulo bias (rejection); n > 0.
    std::uint64_t below(std::uint64_t n);

private:
    std::mt19937_64 m_engine;
    double m_spare = 0.0;
    bool m_has_spare = false;
};

// SplitMix64 finaliser (Steele, Lea & Flood 2014): spreads a seed over all 64 bits.
std::uint64_t splitMix64(std::uint64_t x);

}  // namespace sg::sim
