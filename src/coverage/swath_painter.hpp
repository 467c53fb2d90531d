// Turns the stream of swath samples into swept quadrilaterals on the coverage raster: for each
// sensor, the quad between its previous and current valid sample, with corners at the port and
// starboard swath edges of both samples. An invalid sample breaks that sensor's chain (no quad to
// or from it); so does a step longer than max_step_m (a position jump must not paint a strip).
#pragma once

#include <cstdint>
#include <unordered_map>

#include "coverage/coverage_raster.hpp"
#include "coverage/swath_sample.hpp"

namespace sg::coverage {

class SwathPainter {
public:
    // max_step_m: longest distance between consecutive samples of one sensor that is still
    // painted (m, > 0).
    explicit SwathPainter(CoverageRaster& raster, double max_step_m = 20.0);

    // Feeds one sample (any sensor, in time order per sensor).
    void add(const SwathSample& s);
    // Breaks every chain (e.g. after a seek in replay).
    void reset() { m_last.clear(); }

    struct Counters {
        std::uint64_t samples = 0;
        std::uint64_t invalid = 0;       // samples with valid == false
        std::uint64_t not_detecting = 0; // valid, but centre margin < 1 or both widths 0
        std::uint64_t long_steps = 0;    // chain broken by a step > max_step_m
        std::uint64_t backwards = 0;     // chain broken by time going backwards
        std::uint64_t quads = 0;
    };
    const Counters& counters() const { return m_counters; }

    // The swath edge points of a sample (port, starboard); a non-detecting sample gives its centre.
    static Point portEdge(const SwathSample& s);
    static Point starboardEdge(const SwathSample& s);

private:
    CoverageRaster* m_raster;
    double m_max_step_m;
    std::unordered_map<int, SwathSample> m_last;  // last valid sample per sensor
    Counters m_counters;
};

}  // namespace sg::coverage
