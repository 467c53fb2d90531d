// Builds the screen's Snapshot (snapshot.hpp) from the survey engine: keeps the history the
// screen plots (tracks thinned to 0.5 m, time series, per-run profiles) as samples are
// processed, converts changed coverage tiles only, and recomputes gaps and infill every
// `gap_interval_s` of survey time. Runs on the thread that feeds the engine; the snapshot it
// returns is immutable and shared with the screen thread.
#pragma once

#include <cstdint>
#include <map>
#include <memory>
#include <optional>
#include <string>
#include <vector>

#include "engine/line_decoder.hpp"
#include "engine/snapshot.hpp"
#include "engine/survey_engine.hpp"
#include "engine/survey_summary.hpp"

namespace sg::engine {

class SnapshotBuilder {
public:
    // Registers itself as the engine's sample observer; `engine` must outlive the builder.
    explicit SnapshotBuilder(SurveyEngine& engine, double gap_interval_s = 30.0);
    ~SnapshotBuilder();
    SnapshotBuilder(const SnapshotBuilder&) = delete;
    SnapshotBuilder& operator=(const SnapshotBuilder&) = delete;

    // A new immutable snapshot of the state now. `force_gaps` recomputes gaps and infill.
    std::shared_ptr<const Snapshot> build(bool force_gaps = false);
    // Per-input health (rate, age, errors) from this decoder's counters; optional, must outlive
    // the builder.
    void setInputCounters(const LineDecoder* decoder) { m_decoder = decoder; }
    // Replay state shown by the replay strip.
    void setReplay(const ReplayView& replay) { m_replay = replay; }
    // Profiles of this run index (into runs), -1 = the current run.
    void chooseProfileRun(int run_index) { m_profile_run = run_index; }
    // The latest summary computed for gaps/infill (for exports from the screen).
    const SurveySummary* lastSummary() const { return m_summary ? &*m_summary : nullptr; }

private:
    void onSample(const SensorState& s);
    void updateTiles();
    // Converts the tiles of `raster` changed since `gen` into `views` (layer as given).
    static void convertTiles(const coverage::CoverageRaster& raster, int layer, std::uint64_t& gen,
                             std::map<std::uint64_t, CoverageTileView>& views);
    void updateGaps(bool force);
    void buildHelm(Snapshot& s) const;
    void buildInputs(Snapshot& s);
    std::shared_ptr<const Series> series(const std::string& key) const;

    SurveyEngine& m_engine;
    double m_gap_interval_s;
    std::uint64_t m_seq = 0;
    ReplayView m_replay;
    int m_profile_run = -1;

    // History.
    struct SensorHistory {
        Chunked<PointEN> track;
        std::optional<PointEN> last_kept;
        double last_alt_t = 0.0, last_noise_t = 0.0;
    };
    std::map<int, SensorHistory> m_sensor_hist;
    Chunked<PointEN> m_ref_track;
    std::optional<PointEN> m_ref_last;
    std::map<std::string, std::shared_ptr<Series>> m_series;  // mutable while building
    double m_last_dev_t = 0.0;
    // Profiles: per run id, per sensor: along-track distance and field.
    struct ProfileHistory {
        std::map<int, std::vector<float>> along, field;
        std::map<int, std::optional<PointEN>> last_pos;
        std::map<int, double> dist;
    };
    std::map<int, ProfileHistory> m_profiles;

    // Tiles: converted views by tile key, and the raster generation they reflect.
    std::map<std::uint64_t, CoverageTileView> m_tiles;
    std::uint64_t m_tiles_gen = 0;
    std::map<std::uint64_t, CoverageTileView> m_session_tiles;  // a site: this session's own
    std::uint64_t m_session_tiles_gen = 0;

    // Mean position of the sensors (or the vessel) when each episode was first seen (by id).
    std::map<std::uint64_t, PointEN> m_episode_where;
    // Input health: the decoder's counters, and each input's line count some seconds ago.
    const LineDecoder* m_decoder = nullptr;
    struct RateMark {
        TimeNs t_ns = 0;
        std::uint64_t lines = 0;
        double rate_hz = -1.0;  // not measured yet
    };
    std::map<std::string, RateMark> m_rates;

    // Gaps.
    double m_last_gap_s = -1e18;
    std::optional<SurveySummary> m_summary;
    std::vector<GapView> m_gap_views;
    std::vector<InfillView> m_infill_views;
    std::vector<std::vector<PointEN>> m_not_run;
    std::string m_not_run_message;

    // Picks (snapshot_picks.hpp): the last copy and when (survey clock) it was made.
    static constexpr double kPicksInterval_s = 2.0;
    std::shared_ptr<const PicksView> m_picks_view;
    double m_last_picks_s = -1e18;
};

}  // namespace sg::engine
