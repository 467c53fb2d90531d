// Verification strip: known items laid or surveyed beforehand ([[known_item]] in the survey
// config) and, for every pass of every sensor near one, the peak the detection model predicts at
// the measured altitude and cross-track offset against the peak measured in the detrended field
// (anomaly_picker.hpp), their ratio, and whether the item was detected. From the passes where the
// model claims a detection, a verdict per target class: the model is confirmed, too optimistic
// (measured below prediction: the claimed coverage must shrink; the corrected moment or mass is
// offered) or conservative.
//
// Prediction: TargetModel::peakAnomalyDirect_nT (Blakely 1995 point dipole, or the mass rule;
// see target_model.hpp), the peak along an infinite straight pass at the pass's heading.
// Verdict tolerance: the median ratio within 15 % of 1 is "confirmed" (the team's choice, about
// the scatter of altitude and offset errors at 3 m altitude). A confirmed model is evidence for
// this vessel and this day only; clearance still follows the project's risk assessment, local
// regulations and licensed specialists.
#pragma once

#include <map>
#include <optional>
#include <string>
#include <tuple>
#include <vector>

#include <toml++/toml.h>

#include "detect/anomaly_picker.hpp"
#include "detect/target_model.hpp"

namespace sg::config {
class Section;
}

namespace sg::detect {

// [[known_item]] in the survey config (docs/config.md).
struct KnownItem {
    std::string name;
    std::optional<double> lon_deg, lat_deg;          // lon_lat_deg = [lon, lat], or
    std::optional<double> grid_e_m, grid_n_m;        // grid_m = [easting, northing] (survey CRS)
    std::string target_class;                        // name of a [[target]]
    double burial_m = 0.0;                           // below the seabed (default: the class's)
    // lines = ["BB07", "BB08"]: the plan lines laid to pass it (the strip's own lines). Empty:
    // every line counts. Passes on other lines are reported apart and left out of the verdict.
    std::vector<std::string> lines;
    std::string key;                                 // "known_item[i]" in `file`, for messages
    std::string file;
};
// Throws config::ConfigError naming the file and key when a position is missing or doubled, the
// class names no [[target]], or `lines` is not an array of distinct non-empty strings.
// `raw`: the parsed TOML root that `root` reads (for the string arrays of `lines`).
std::vector<KnownItem> parseKnownItems(const config::Section& root, const toml::table& raw,
                                       const std::vector<TargetClass>& classes);

inline constexpr double kVerificationTolerance = 0.15;
// Passes whose closest approach is further than this (m, horizontal) are not recorded.
inline constexpr double kVerificationGate_m = 25.0;

struct VerificationPass {
    std::string item;
    std::string target_class;
    int run = -1;
    int sensor_slot = 0;
    TimeNs t_ns = 0;               // closest approach
    double offset_m = 0.0;         // item's cross-track offset from the pass, starboard positive
    double altitude_m = 0.0;       // measured sensor altitude at the closest approach
    double vertical_m = 0.0;       // altitude + burial
    double heading_true_deg = 0.0;
    double threshold_nT = 0.0;
    double predicted_nT = 0.0;     // model's peak |anomaly|
    double measured_nT = 0.0;      // largest |detrended field| near the item on this pass
    double ratio = 0.0;            // measured / predicted
    bool predicted_detected = false;  // predicted >= threshold
    bool detected = false;            // measured >= threshold
    std::string line;                 // plan line of the run ("" off plan or unknown)
    // false: the item names its lines and this pass is on another one (reported apart, not in
    // the verdict).
    bool on_named_line = true;
    int session = 0;                  // site session (log) of the pass (0 for one log alone)
};

struct ClassVerdict {
    std::string target_class;
    int passes_used = 0;           // passes where the model predicts a detection
    int passes_detected = 0;       // of those, detected
    double median_ratio = 0.0;
    // "confirmed", "too_optimistic", "conservative" or "not_enough_passes" (fewer than 3).
    std::string verdict;
    std::string correction;        // the corrected parameter in words ("" when none)
    std::optional<double> corrected_moment_Am2;
    std::optional<double> corrected_mass_kg;
    std::string text;              // one sentence for people
};

struct VerificationResult {
    std::vector<VerificationPass> passes;  // by item, run, sensor
    std::vector<ClassVerdict> verdicts;    // one per class with known items
    std::vector<std::string> unplaced;     // items that could not be placed (no CRS)
    // Messages: passes on lines the item does not name, names in `lines` that are no plan line.
    std::vector<std::string> notes;
};

class VerificationStrip {
public:
    VerificationStrip() = default;
    explicit VerificationStrip(std::vector<KnownItem> items) : m_items(std::move(items)) {}
    bool empty() const { return m_items.empty(); }
    const std::vector<KnownItem>& items() const { return m_items; }
    // Positions in the survey grid (call once the CRS is known; lon/lat items need it).
    void place(std::size_t item, double easting_m, double northing_m);
    bool placed(std::size_t item) const { return item < m_pos.size() && m_pos[item].has_value(); }

    void add(const DetrendedSample& d);
    // `models`: the survey's models, in the order of the config's [[target]]. `run_lines`: the
    // plan line name of each run id ("" off plan); `plan_lines`: every line name of the plan
    // (empty without a plan: names in `lines` are then not checked).
    // `prior`: passes of a site's earlier sessions (from their session summaries), listed
    // before this session's and counted in the verdicts with them. `session`: this session's
    // index, given to its passes.
    VerificationResult result(const std::vector<TargetModel>& models,
                              const std::vector<std::string>& run_lines = {},
                              const std::vector<std::string>& plan_lines = {},
                              const std::vector<VerificationPass>& prior = {}, int session = 0) const;

private:
    struct Track {
        double min_dist_m = 1e300;
        DetrendedSample closest;
        double max_abs_nT = 0.0;
    };
    std::vector<KnownItem> m_items;
    std::vector<std::optional<std::pair<double, double>>> m_pos;
    std::map<std::tuple<std::size_t, int, int>, Track> m_tracks;  // (item, run, slot)
};

}  // namespace sg::detect
