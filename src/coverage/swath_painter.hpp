// Turns the stream of swath samples into swept quadrilaterals on the coverage raster: for each
// sensor, the quad between consecutive valid samples, with corners at the port and starboard swath
// edges of both samples. An invalid sample breaks that sensor's chain (no quad to or from it); so
// does a step longer than max_step_m (a position jump must not paint a strip) or time going back.
//
// Merging: a sample that lies on the straight chord (within an eighth of a cell), with the same
// half-widths (within an eighth of a cell), the same margin code and the same direction (corner
// shift within an eighth of a cell) as the chain so far is not painted on its own: the chain is
// extended and painted as one longer quad (at most max_merge_m long). The painted region is
// unchanged to within a quarter cell, and dense sampling (10 Hz at 2 m/s = 0.2 m) no longer pays
// the per-row cost of a 0.2 m quad. The latest stretch (< max_merge_m) is painted on flush(),
// reset(), a chain break, or when the painter is destroyed.
#pragma once

#include <cstdint>
#include <unordered_map>
#include <vector>

#include "coverage/coverage_raster.hpp"
#include "coverage/swath_sample.hpp"

namespace sg::coverage {

class SwathPainter {
public:
    // max_step_m: longest distance between consecutive samples of one sensor that is still painted
    // (m, > 0). max_merge_m: longest quad made by merging samples (m, >= 0; 0 disables merging).
    explicit SwathPainter(CoverageRaster& raster, double max_step_m = 20.0, double max_merge_m = 10.0);
    ~SwathPainter();
    SwathPainter(const SwathPainter&) = delete;
    SwathPainter& operator=(const SwathPainter&) = delete;

    // Feeds one sample (any sensor, in time order per sensor).
    void add(const SwathSample& s);
    // Paints every pending stretch (call before reading the raster for gaps or a snapshot).
    void flush();
    // Flushes, then breaks every chain (e.g. after a seek in replay, or between synthetic lines).
    void reset();

    struct Counters {
        std::uint64_t samples = 0;
        std::uint64_t invalid = 0;       // samples with valid == false
        std::uint64_t not_detecting = 0; // valid, but centre margin < 1 or both widths 0
        std::uint64_t long_steps = 0;    // chain broken by a step > max_step_m
        std::uint64_t backwards = 0;     // chain broken by time going backwards
        std::uint64_t merged = 0;        // samples folded into a longer quad
        std::uint64_t quads = 0;
    };
    const Counters& counters() const { return m_counters; }

    // The swath edge points of a sample (port, starboard); a non-detecting sample gives its centre.
    static Point portEdge(const SwathSample& s);
    static Point starboardEdge(const SwathSample& s);

private:
    struct Chain {
        SwathSample painted;               // last sample painted up to
        bool has_pending = false;
        SwathSample pending;               // latest sample, not painted yet
        std::vector<Point> skipped;        // positions folded in since `painted`
    };
    void paint(const SwathSample& a, const SwathSample& b);
    void flushChain(Chain& c);
    bool canMerge(const Chain& c, const SwathSample& s) const;

    CoverageRaster* m_raster;
    double m_max_step_m;
    double m_max_merge_m;
    std::unordered_map<int, Chain> m_chains;  // per sensor
    Counters m_counters;
};

}  // namespace sg::coverage
