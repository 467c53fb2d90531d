// Fourth-difference noise over a sliding window; see fourth_difference_noise.hpp.
#include "detect/fourth_difference_noise.hpp"

#include <algorithm>
#include <cmath>
#include <numeric>
#include <stdexcept>

namespace sg::detect {

namespace {
constexpr double kSqrt70 = 8.366600265340756;  // sqrt(1 + 16 + 36 + 16 + 1)
}

FourthDifferenceNoise::FourthDifferenceNoise(int window) {
    if (window < 1) throw std::invalid_argument("fourth-difference noise window must be >= 1");
    m_d4sq.assign(static_cast<std::size_t>(window), 0.0);
}

void FourthDifferenceNoise::reset() {
    std::fill(m_d4sq.begin(), m_d4sq.end(), 0.0);
    m_samples = 0;
    m_count = 0;
    m_head = 0;
    m_sum = 0.0;
    m_since_resum = 0;
}

void FourthDifferenceNoise::add(double x) {
    if (m_samples == 4) {
        const double d4 = x - 4.0 * m_x[0] + 6.0 * m_x[1] - 4.0 * m_x[2] + m_x[3];
        const double sq = d4 * d4;
        m_sum += sq - m_d4sq[m_head];
        m_d4sq[m_head] = sq;
        if (++m_head == m_d4sq.size()) m_head = 0;
        ++m_count;
        // The running sum drifts by rounding; re-add the window once per turn (O(1) amortised).
        if (++m_since_resum >= static_cast<int>(m_d4sq.size())) {
            m_sum = std::accumulate(m_d4sq.begin(), m_d4sq.end(), 0.0);
            m_since_resum = 0;
        }
    } else {
        ++m_samples;
    }
    m_x[3] = m_x[2];
    m_x[2] = m_x[1];
    m_x[1] = m_x[0];
    m_x[0] = x;
}

int FourthDifferenceNoise::differences() const {
    return static_cast<int>(std::min<std::int64_t>(m_count, static_cast<std::int64_t>(m_d4sq.size())));
}

double FourthDifferenceNoise::rmsFourthDifference_nT() const {
    const int n = differences();
    if (n == 0) return 0.0;
    return std::sqrt(std::max(0.0, m_sum) / n);
}

double FourthDifferenceNoise::sigma_nT() const { return rmsFourthDifference_nT() / kSqrt70; }

}  // namespace sg::detect
