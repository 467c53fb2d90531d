// Line runs: which planned line the vessel is on (picked automatically, or chosen by the operator),
// the signed cross-track deviation from it, and per-run statistics (start, end, corridor coverage,
// altitude, worst deviation, alarm count). Once a run is open it keeps its line: an excursion of
// any size off the line is a deviation on that line, and a new run starts only at a real line
// change (turn or reversal, leaving the line's along-track extent, operator choice, or a break in
// continuity that resumes away from the line).
#pragma once

#include <array>
#include <cstdint>
#include <optional>
#include <vector>

#include "coverage/coverage_raster.hpp"
#include "coverage/survey_plan.hpp"

namespace sg::coverage {

struct LineTrackerOptions {
    double line_spacing_m = 10.0;     // planned spacing; the corridor is line +- spacing/2 (m, > 0)
    double max_offset_m = 0.0;        // farthest cross-track offset at which a run starts on a
                                      // line (acquisition); 0: spacing
    double hysteresis_m = 0.0;        // while settling, a nearer line must be this much nearer to
                                      // take over; also the extra along-track room of an open run
                                      // beyond the line ends; 0: spacing / 4
    double max_angle_deg = 30.0;      // travel within this angle of the line axis (either way)
    double end_margin_m = 0.0;        // along-track tolerance beyond the line ends (m)
    double settle_m = 0.0;            // first metres of an automatic run during which it may move
                                      // to a nearer line (a run-in that starts closer to the
                                      // neighbour); 0: spacing
    double turn_hold_m = 0.0;         // travel outside max_angle_deg (or reversed) before the run
                                      // ends as a turn; 0: spacing
    double continuity_gap_s = 10.0;   // after a break this long in the positions, the run goes on
                                      // only if the vessel is back within max_offset_m of its line
};

struct LineRun {
    int id = 0;                  // run id (0, 1, 2, ...), stored in raster cells
    int session = 0;             // acquisition session (log) of a site it was run in (0: the first)
    int line = -1;               // index into the plan's lines
    bool reversed = false;       // flown end -> start
    bool open = true;
    std::int64_t start_t_ns = 0, end_t_ns = 0;
    Point start_pos, end_pos;
    std::int64_t samples = 0;
    double altitude_sum_m = 0.0;
    std::int64_t altitude_samples = 0;
    std::int64_t altitude_missing = 0;
    double worst_altitude_m = 0.0;      // highest sensor altitude seen (m)
    double worst_deviation_m = 0.0;     // signed deviation of largest magnitude (m, starboard +)
    int alarms = 0;
    double noise_sum_nT = 0.0;          // fourth-difference noise of the sensors' samples (nT)
    std::int64_t noise_samples = 0;
    double worst_noise_nT = 0.0;
    double corridor_covered_pct = 0.0;  // of the line +- spacing/2 corridor, at the last refresh
    double along_min_m = 0.0, along_max_m = 0.0;  // along-track extent passed on its line (m)
    // A run of a proposed infill line the crew chose (LineTracker::steerTo): the line itself
    // (name I<n>, flown start -> end); `line` then indexes the tracker's lines past the plan's.
    std::optional<PlanLine> infill_line;
    double meanAltitude_m() const {
        return altitude_samples > 0 ? altitude_sum_m / static_cast<double>(altitude_samples) : 0.0;
    }
    double meanNoise_nT() const {
        return noise_samples > 0 ? noise_sum_nT / static_cast<double>(noise_samples) : 0.0;
    }
};

class LineTracker {
public:
    LineTracker(std::vector<PlanLine> lines, const LineTrackerOptions& options);

    // Feeds one position (the array reference or sensor 0) with its direction of travel (unit
    // vector) and sensor altitude above the seabed (nullopt when missing). Returns the active run
    // id, or kRunNone when on no line.
    int update(std::int64_t t_ns, Point pos, double dir_e, double dir_n,
               std::optional<double> altitude_m);

    // A site: the runs of earlier sessions (ids 0..n-1, closed), before the first update; new runs
    // continue the numbering and carry `session`. Throws std::logic_error after an update.
    void adoptEarlierRuns(std::vector<LineRun> runs, int session);
    int session() const { return m_session; }

    // Operator choice: force line `index` (it stays active whatever the position, a new run
    // starting when the direction reverses); automatic() returns to automatic selection.
    void choose(int index);
    void automatic();
    bool isAutomatic() const { return m_forced < 0; }

    // Steering to a proposed infill line (docs/helm-output.md, "Steering to an infill line"):
    // `line` (survey CRS, flown start -> end) joins the tracker's lines after the plan's (the same
    // name and ends reuse their index) and becomes the target: while it is set, a new run starts
    // only on it (acquisition as for a planned line, in its own direction), an open run on another
    // line goes on by its own rules. The target ends when a run on it closes (its end passed, a
    // turn), or by steerPlanned(). Clears an operator's choose(). Returns the line's index.
    int steerTo(const PlanLine& line);
    // Back to the planned lines: an open run on the target ends at the next position.
    void steerPlanned();
    // The target line's index (-1: planned lines).
    int target() const { return m_target; }
    // Whether a run has started on the target since steerTo.
    bool targetAcquired() const { return m_target_run != kRunNone; }
    // The run on the target that ended the steering since the last call (kRunNone: none).
    int takeTargetEnded() {
        const int r = m_target_ended;
        m_target_ended = kRunNone;
        return r;
    }
    // Lines of the plan (the first planCount() of lines(); the rest are infill lines steered to).
    int planCount() const { return m_plan_count; }

    // Counts an alarm against run `run` (ignored for kRunNone or an unknown run).
    void addAlarm(int run);
    // Adds one sensor sample's noise estimate (nT) to run `run`'s statistics (same rule).
    void addNoise(int run, double noise_nT);
    // Closes the open run (end of survey).
    void closeRun(std::int64_t t_ns);
    // Recomputes corridor coverage of every run from the raster (flush the painter first).
    void refreshCoverage(const CoverageRaster& raster);
    // The same for one run (e.g. when it closes, or once a second for the open run).
    void refreshRun(const CoverageRaster& raster, int run);

    int activeLine() const { return m_active_line; }
    int activeRun() const { return m_open_run; }
    const std::vector<LineRun>& runs() const { return m_runs; }
    const std::vector<PlanLine>& lines() const { return m_lines; }
    const LineTrackerOptions& options() const { return m_opt; }

    // Signed cross-track deviation of `pos` from line `index`, starboard positive for a vessel
    // travelling along (dir_e, dir_n) (m).
    double crossTrack(int index, Point pos, double dir_e, double dir_n) const;
    // Cross-track deviation from the active line (nullopt when no line is active): the value the
    // live deviation check compares with its limits.
    std::optional<double> activeCrossTrack(Point pos, double dir_e, double dir_n) const {
        if (m_active_line < 0) return std::nullopt;
        return crossTrack(m_active_line, pos, dir_e, dir_n);
    }
    // Along-track position of `pos` on line `index` from its start (m).
    double alongTrack(int index, Point pos) const;

    // The planned line next to line `index` on one side (starboard of travel along dir when
    // `starboard`, else port), roughly parallel to it (within max_angle_deg), whose along-track
    // span contains the projection of `pos`, and no farther than 1.5 spacings from line
    // `index`; -1 when there is none (line `index` is the outermost on that side here).
    int neighbourLine(int index, Point pos, double dir_e, double dir_n, bool starboard) const;
    // Whether a run other than the open one, on line `index`, has already passed the along-track
    // position of `pos` (its ground has been gone by, whatever its coverage).
    bool passedBy(int index, Point pos) const;

    // Ground not run yet (docs/coverage.md, "Not run yet and missed"): for every stretch of a
    // planned line that no run (the open one included) has passed, the ground that line's own pass
    // is still expected to cover, as convex quadrilaterals in the survey CRS. On each side the
    // stretch claims min(d, max(d/2, W)) across track, d the offset of the neighbouring line on
    // that side (neighbourLine) and W `planned_half_width_m` (>= 0); with no neighbour on a side,
    // everything to `bounds` (the area's box). A stretch touching a line end reaches along track to
    // `bounds` too. Unpassed stretches shorter than half a spacing are ignored (a run acquired a
    // few metres into its line has run it). See docs/coverage.md for the whole rule.
    struct PendingGround {
        std::vector<std::array<Point, 4>> quads;  // counter-clockwise corners
        int lines_total = 0;                      // planned lines
        std::vector<int> lines_pending;           // lines with a stretch not run yet (indices)
    };
    // A line is run once its closed runs have passed at least half its length (`final`: the open
    // run counts as closed, the survey is over); its stretches not passed are then missed ground.
    // `track`: positions the vessel went by with samples that could not be placed (one every
    // `track_step_m`); within half a spacing of a line they count as closed passes of it.
    PendingGround pendingGround(double planned_half_width_m, const Box& bounds, bool final = false,
                                const std::vector<Point>* track = nullptr, double track_step_m = 5.0) const;

private:
    bool directionMatches(int index, double dir_e, double dir_n, bool& reversed) const;
    void startRun(int line, bool reversed, std::int64_t t_ns, Point pos);
    // Nearest line whose direction matches, inside its along-track span and within max_offset_m
    // of pos; -1 when none.
    int nearestLine(Point pos, double dir_e, double dir_n, bool& reversed, double& dist) const;
    // Whether the open run goes on at this position (see the file comment).
    bool keepsRun(Point pos, double dir_e, double dir_n, double step_m, std::int64_t gap_ns);
    // Index of `line` among the infill lines already added (same name and ends), else appends it.
    int addLine(const PlanLine& line);

    std::vector<PlanLine> m_lines;
    LineTrackerOptions m_opt;
    std::vector<double> m_length_m;  // length_m() of each line
    double m_cos_max_angle = 0.0;    // cos(max_angle_deg)
    std::vector<LineRun> m_runs;
    int m_active_line = -1;
    int m_open_run = kRunNone;
    int m_forced = -1;
    int m_plan_count = 0;
    int m_target = -1;               // infill line steered to (index into m_lines), -1: none
    int m_target_run = kRunNone;     // run on the target since steerTo
    int m_target_ended = kRunNone;   // see takeTargetEnded
    int m_session = 0;
    bool m_reacquire = false;  // back to automatic: the open run ends at the next position
    bool m_have_last = false;
    Point m_last_pos;
    std::int64_t m_last_t_ns = 0;
    double m_run_travel_m = 0.0;  // travelled since the open run started
    double m_off_axis_m = 0.0;    // travelled since the direction last matched the open run's
};

// Fraction (0..100 %) of the cells of the corridor line +- half_width_m whose margin >= 1.
double corridorCoveragePercent(const CoverageRaster& raster, const PlanLine& line, double half_width_m);

}  // namespace sg::coverage
