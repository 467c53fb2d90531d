// Live noise estimate of one magnetometer from the fourth difference of its total field over a
// sliding window, and the detection threshold derived from it.
//
// d4[i] = x[i] - 4 x[i-1] + 6 x[i-2] - 4 x[i-3] + x[i-4] removes any cubic trend (the geology and
// the diurnal drift over a few samples). For white noise of standard deviation s the binomial
// weights give var(d4) = (1 + 16 + 36 + 16 + 1) s^2 = 70 s^2, so s = rms(d4) / sqrt(70).
// (Finite differences of white noise: the variance of a weighted sum of independent samples is the
// sum of the squared weights; the fourth-difference noise measure is common practice in the trade.)
#pragma once

#include <cstdint>
#include <vector>

namespace sg::detect {

class FourthDifferenceNoise {
public:
    // window: number of fourth differences averaged, >= 1.
    explicit FourthDifferenceNoise(int window);

    // Adds one total-field sample (nT). O(1).
    void add(double field_nT);
    // Forgets everything (call after a gap in the samples or a loss of lock: differences across a
    // gap are meaningless).
    void reset();

    // Estimated white-noise standard deviation s (nT); 0 until the first difference exists.
    double sigma_nT() const;
    // Root mean square of the fourth differences in the window (nT).
    double rmsFourthDifference_nT() const;
    // True once the window is full (before that the estimate uses fewer differences).
    bool ready() const { return m_count >= static_cast<std::int64_t>(m_d4sq.size()); }
    // Number of fourth differences currently averaged.
    int differences() const;
    int window() const { return static_cast<int>(m_d4sq.size()); }

private:
    std::vector<double> m_d4sq;  // ring of squared fourth differences
    double m_x[4] = {0, 0, 0, 0};  // last four samples, m_x[0] newest
    int m_samples = 0;             // samples seen since reset, capped at 4
    std::int64_t m_count = 0;      // differences seen since reset
    std::size_t m_head = 0;
    double m_sum = 0.0;
    int m_since_resum = 0;
};

// Detection threshold (nT): max(min_anomaly_nT, k * noise_nT).
inline double detectionThreshold_nT(double min_anomaly_nT, double k, double noise_nT) {
    const double t = k * noise_nT;
    return t > min_anomaly_nT ? t : min_anomaly_nT;
}

}  // namespace sg::detect
