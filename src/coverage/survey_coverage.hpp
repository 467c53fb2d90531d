// SurveyCoverage: the coverage module's state for one survey, in one place for the engine, the
// replay and gaps subcommands and the live checks: the plan, the raster, the swath painter, the
// line tracker and the gap/infill options. No threads: the caller feeds it in time order.
#pragma once

#include <algorithm>
#include <cstdint>
#include <memory>
#include <optional>

#include "common/config_section.hpp"
#include "coverage/coverage_config.hpp"
#include "coverage/coverage_raster.hpp"
#include "coverage/gaps.hpp"
#include "coverage/infill.hpp"
#include "coverage/line_runs.hpp"
#include "coverage/survey_plan.hpp"
#include "coverage/swath_painter.hpp"

namespace sg::coverage {

// Outcome of probing beyond one swath edge for the neighbouring coverage (the "forming gap"
// check): found == false when nothing covered lies within the search distance (for example the
// first line of a block); gap_m = distance from the edge to the first covered cell of another
// run (about 0 when the swaths meet or overlap).
struct EdgeProbe {
    bool found = false;
    double gap_m = 0.0;
    int run = kRunNone;  // run that covers the neighbouring cell
};

// Probes outward from the port (starboard == false) or starboard edge of `s`, in half-cell steps,
// up to search_m beyond the edge (m, > 0). Cells of run s.run are ignored.
EdgeProbe probeEdge(const CoverageRaster& raster, const SwathSample& s, bool starboard, double search_m);

class SurveyCoverage {
public:
    // The raster origin is the south-west corner of the area, rounded down to 100 m.
    SurveyCoverage(SurveyPlan plan, const CoverageOptions& coverage, const GapOptions& gaps);
    // Reads [plan], [coverage] and [gaps] from the root table of the survey config.
    static SurveyCoverage fromConfig(const config::Section& root, const LonLatToGrid& to_grid);

    // Line tracking from the reference position (array centre or sensor 0): returns the active
    // run id (kRunNone when on no planned line). Call once per epoch, before addSample.
    int updatePosition(std::int64_t t_ns, Point pos, double dir_e, double dir_n,
                       std::optional<double> altitude_m);
    // Paints one sensor's swath sample (its `run` should be the id updatePosition returned).
    void addSample(const SwathSample& s) { m_painter.add(s); }
    // Paints pending stretches (before reading the raster directly).
    void flush() {
        m_painter.flush();
        syncSite();
    }
    // Breaks every sensor chain (replay seek).
    void breakChains() { m_painter.reset(); }

    const SurveyPlan& plan() const { return m_plan; }
    // The coverage the survey reads (gaps, checks, screen): the site's when seeded, else this
    // session's own.
    const CoverageRaster& raster() const { return m_site ? *m_site : m_raster; }
    // This session's own painting (equal to raster() without a site).
    const CoverageRaster& sessionRaster() const { return m_raster; }
    // A site: returns the site raster (same cell size and origin, empty) for the caller to join
    // the earlier sessions into; from then on every tile this session paints is joined into it
    // (syncSite(), called by updatePosition, flush, gaps and contentHash).
    CoverageRaster& beginSite();
    bool isSite() const { return m_site != nullptr; }
    void syncSite();
    LineTracker& lines() { return m_tracker; }
    const LineTracker& lines() const { return m_tracker; }
    const SwathPainter::Counters& painterCounters() const { return m_painter.counters(); }
    const GapOptions& gapOptions() const { return m_gap_options; }

    // Flushes, then finds the gaps of the area and refreshes every run's corridor coverage. Ground
    // of planned lines not run yet (LineTracker::pendingGround) is in no gap: only missed ground is.
    // `final`: the survey is over, the open run counts as ended (LineTracker::pendingGround).
    GapReport gaps(bool final = false);
    // The predicted half-width of a planned pass (m, >= 0), for the ground a line not run yet is
    // expected to cover (default 0: half the spacing to each neighbour).
    void setPlannedHalfWidth(double half_width_m) { m_planned_half_width_m = std::max(0.0, half_width_m); }
    double plannedHalfWidth_m() const { return m_planned_half_width_m; }
    // Where the vessel went with samples that could not be placed (the engine's decimated track,
    // one point every `step_m`): ground gone by though no run records it. The vector must outlive
    // this object (nullptr: none).
    void setVesselTrack(const std::vector<Point>* track, double step_m) {
        m_track = track;
        m_track_step_m = step_m;
    }
    LineTracker::PendingGround pendingGround(const LineTracker& tracker, bool final) const {
        return tracker.pendingGround(m_planned_half_width_m, bounds(m_plan.area), final, m_track, m_track_step_m);
    }
    // The gaps of `raster` with the ground not run yet of `tracker`'s runs left out (the site's
    // earlier sessions, replayed one by one for the gap names).
    GapReport gapsWith(const CoverageRaster& raster, const LineTracker& tracker, bool final = false) const;
    // Plans infill over `report` and proves it by flying it over a copy of the raster.
    struct Infill {
        InfillPlan plan;
        GapReport after;  // gaps left after flying the plan (none when the plan is complete)
    };
    Infill infill(const GapReport& report, const InfillOptions& options) const;
    // Stable hash of the raster (flushes first): equal for a live session and its replay.
    std::uint64_t contentHash();

private:
    SurveyPlan m_plan;
    GapOptions m_gap_options;
    CoverageRaster m_raster;
    std::unique_ptr<CoverageRaster> m_site;
    SwathPainter m_painter;
    LineTracker m_tracker;
    double m_planned_half_width_m = 0.0;
    bool m_last_final = false;
    const std::vector<Point>* m_track = nullptr;
    double m_track_step_m = 5.0;  // of the last gaps(): infill() leaves out the same ground
};

}  // namespace sg::coverage
