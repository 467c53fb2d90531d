// Stable gap names: a gap keeps its number ("G7") for the life of a site. Each evaluation is
// matched against the last committed one by overlapping cells: every earlier gap passes its number
// to the new gap that holds most of its cells (a gap that splits keeps its number on the largest
// piece); a new gap that inherits several numbers (a merge) keeps the oldest (lowest); a gap that
// inherits none takes the next free number. Numbers of closed or merged gaps are never reused.
// Deterministic: the same sequence of commits gives the same names (docs/coverage.md, "Gap names").
#pragma once

#include <cstdint>
#include <vector>

#include "coverage/gaps.hpp"

namespace sg::coverage {

class GapNamer {
public:
    // One run of cells of a committed gap (raster row, cells i0..i1-1) and the gap's number.
    struct NamedRun {
        std::int64_t row, i0, i1;
        int number;
    };
    // The last committed state: the named runs (sorted by row, then i0) and the next free number.
    struct Committed {
        int next = 1;
        std::vector<NamedRun> runs;
    };

    // Sets report.gaps[k].id to the stable number of each gap (and nothing else). With `commit`,
    // this report becomes the state later evaluations are matched against.
    void name(GapReport& report, bool commit);
    // The number the next new gap will take (1-based; numbers below it were given out).
    int nextNumber() const { return m_next; }
    std::size_t commits() const { return m_commits; }
    Committed committed() const { return {m_next, m_runs}; }
    // Takes `c` as the state the next evaluation is matched against (the names a session recorded
    // at its end, docs/site.md "Gap names across sessions"); the next free number becomes the larger
    // of both, so no number is given twice.
    void adopt(const Committed& c);

private:
    int m_next = 1;
    std::size_t m_commits = 0;
    std::vector<NamedRun> m_runs;  // the last committed gaps, sorted by row, then i0
};

}  // namespace sg::coverage
