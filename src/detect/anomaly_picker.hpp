// Anomaly picking: per sensor, the ambient trend is removed with a running median, peaks above
// the live detection threshold are found, the peaks of one source seen by several sensors of one
// pass are grouped and fitted with a point dipole (dipole_fit.hpp), and the picks of the same
// source from several passes (line runs) are merged within a distance gate. Single-threaded, fed
// the same samples live and in replay, so the pick list is the same in both.
//
// Trend: a centred running median of the total field over `trend_window_s` seconds (a median
// ignores a short anomaly as long as it covers less than half the window; the team's choice).
// A pick is a list entry to look at, not a clearance: the project's risk assessment, local
// regulations and licensed specialists decide what is done about it.
#pragma once

#include <cstdint>
#include <deque>
#include <functional>
#include <optional>
#include <string>
#include <vector>

#include "common/received_line.hpp"
#include "detect/dipole_fit.hpp"
#include "detect/target_model.hpp"

namespace sg::config {
class Section;
}

namespace sg::detect {

// [picks] in the survey config (docs/config.md).
struct PickSettings {
    bool enabled = true;
    double trend_window_s = 20.0;   // running-median window, centred, [2, 600]
    int min_samples = 3;            // consecutive samples at or over the threshold, [1, 100]
    double group_distance_m = 6.0;  // peaks of one pass on several sensors joined within this
    double merge_distance_m = 3.0;  // picks of several passes joined within this (plus 1/2 depth)
    double fit_half_length_m = 12.0;  // profile used by the fit: this far around the peak
    double group_wait_s = 8.0;      // a pass's peaks are fitted this long after the first one
                                    // (time for the profile past the peak to be detrended)
};
PickSettings parsePickSettings(const config::Section& root);

// One magnetometer sample as the picker sees it (from the engine, in each sensor's time order).
struct PickSample {
    TimeNs t_ns = 0;
    int slot = 0;                 // sensor slot (order of [[sensor]])
    double field_nT = 0.0;
    double threshold_nT = 0.0;    // the live detection threshold at this sample
    double easting_m = 0.0;       // sensor position, survey grid
    double northing_m = 0.0;
    double altitude_m = 0.0;      // above the seabed
    double heading_grid_rad = 0.0;
    double convergence_rad = 0.0; // true heading - grid heading
    int run = -1;                 // line run (coverage::kRunNone when off line)
    bool usable = false;          // pose, altitude and noise estimate valid, on a line run
};

// A sample with its trend removed (what detection, the fit and the verification strip read).
struct DetrendedSample {
    PickSample s;
    double residual_nT = 0.0;
};

// One pass over a source (one group of peaks on one line run).
struct PickObservation {
    int run = -1;
    TimeNs t_ns = 0;              // time of the strongest peak
    double peak_nT = 0.0;         // signed residual of largest magnitude
    double snr = 0.0;             // |peak| / threshold there
    double width_m = 0.0;         // along-track width at half the peak magnitude
    double altitude_m = 0.0;      // sensor altitude at the peak
    std::vector<int> sensors;     // slots that peaked
    std::optional<DipoleFit> fit;
    double easting_m = 0.0;       // the fit's position, else the strongest peak's
    double northing_m = 0.0;
    int session = 0;              // site session (log) of the pass (0 for one log alone)
};

struct AnomalyPick {
    int id = 0;                    // 1, 2, ... in order of first detection
    double easting_m = 0.0;        // survey grid: weighted mean over the observations
    double northing_m = 0.0;
    double peak_nT = 0.0;          // of the strongest observation
    double width_m = 0.0;
    double altitude_m = 0.0;       // sensor altitude at that peak
    std::optional<double> burial_m;    // fitted depth below the seabed (best-fitting observation)
    std::optional<double> depth_below_sensor_m;  // altitude + burial
    std::optional<double> moment_Am2;
    std::optional<double> angle_to_field_deg;
    std::string moment_model;      // "dipole, induced" or "dipole, free direction" ("" no fit)
    std::optional<double> mass_rule_kg;  // equivalent mass by the mass rule at the fitted distance
    double fit_r2 = 0.0;           // best observation's fit (0 without one)
    double snr = 0.0;              // best |peak| / threshold
    std::string quality;           // "strong", "fair" or "weak" (docs/picks.md)
    std::vector<int> runs;         // line runs that saw it, ascending
    std::vector<int> sensors;      // sensor slots that peaked, ascending
    std::vector<PickObservation> observations;
    TimeNs first_t_ns = 0;
    std::vector<int> sessions;     // site sessions (logs) whose passes saw it, ascending
};

// Recomputes a pick's figures from its observations (step 5 of docs/picks.md): position weighted
// by peak/threshold and fit quality, the fitted figures from the best-fitting observation,
// amplitude and width from the strongest; runs, sensors and sessions joined. `mass_rule_C` in
// nT m^3/kg. The pick must have at least one observation.
void aggregatePick(AnomalyPick& p, double mass_rule_C);

// The picks of a site (docs/picks.md "A site"): each session's own pick list, in session (time)
// order, observations tagged with their session and runs in site ids. The first session's picks
// are kept as they are (ids 1..n); a pick of a later session within the picker's merge gate
// (merge_distance_m + half the larger depth below the sensor) of an earlier one is the same item:
// its passes join that pick (figures recomputed over all passes, the earlier id kept); otherwise
// it takes the next id. Ids therefore never change when a later session is added.
std::vector<AnomalyPick> joinSessionPicks(const std::vector<std::vector<AnomalyPick>>& sessions,
                                          const PickSettings& set, double mass_rule_C);

class AnomalyPicker {
public:
    // `field`: the survey's geomagnetic field (true north); mass_rule_C in nT m^3/kg.
    AnomalyPicker(PickSettings settings, const GeomagneticField& field, double mass_rule_C,
                  std::size_t sensors);

    void add(const PickSample& s);
    // End of the data: the trend of the last samples from the window they have, pending groups
    // fitted. Further add() calls start afresh.
    void finish();
    // Called for every detrended sample, in each sensor's time order (verification strip).
    void setDetrendedObserver(std::function<void(const DetrendedSample&)> fn) {
        m_observer = std::move(fn);
    }

    const std::vector<AnomalyPick>& picks() const { return m_picks; }
    const PickSettings& settings() const { return m_set; }
    std::uint64_t peaks() const { return m_peak_count; }  // single-sensor peaks found

private:
    struct Peak {
        int slot = 0;
        DetrendedSample at;
        double width_m = 0.0;
    };
    struct Slot {
        std::deque<PickSample> buf;   // samples from the window's start to the newest
        std::size_t centre = 0;       // index in buf of the next sample to detrend
        std::vector<double> sorted;   // values of buf, sorted
        std::deque<DetrendedSample> history;  // detrended, last kHistory seconds
        // Current excursion over the threshold.
        int above = 0;
        std::size_t peak_index = 0;   // index in history
        bool in_peak = false;
        TimeNs last_t_ns = 0;
    };
    void detrendReady(Slot& slot, bool flush);
    void onDetrended(std::size_t slot, const DetrendedSample& d);
    void closePeak(std::size_t slot);
    void processGroups(bool all);
    void fitGroup(std::vector<Peak> group);
    void mergePick(PickObservation obs);
    void flushSlot(std::size_t slot);

    PickSettings m_set;
    GeomagneticField m_field;
    double m_mass_rule_C;
    std::vector<Slot> m_slots;
    std::vector<Peak> m_pending;
    TimeNs m_latest_detrended_ns = 0;
    std::vector<AnomalyPick> m_picks;
    std::uint64_t m_peak_count = 0;
    std::function<void(const DetrendedSample&)> m_observer;
};

}  // namespace sg::detect
