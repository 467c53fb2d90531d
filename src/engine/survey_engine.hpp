// The processing core after decoding: navigation, detection, coverage, line runs and live checks.
// Fed typed, time-aligned values (UTC nanoseconds) by the Pipeline; holds the survey state that
// the screen, the status line, `gaps` and the report read. Single-threaded, no I/O of its own.
//
// Per magnetometer sample: sensor pose (layback along the travelled path), altitude, fourth-
// difference noise and threshold, detectable half-widths of the coverage target class, a swath
// sample painted into the coverage raster, the line run, and the checks.
#pragma once

#include <cstdint>
#include <deque>
#include <functional>
#include <map>
#include <memory>
#include <optional>
#include <string>
#include <vector>

#include "checks/check_set.hpp"
#include "coverage/coverage_config.hpp"
#include "coverage/coverage_raster.hpp"
#include "coverage/gap_names.hpp"
#include "coverage/gaps.hpp"
#include "coverage/infill.hpp"
#include "coverage/line_runs.hpp"
#include "coverage/run_profiles.hpp"
#include "coverage/survey_plan.hpp"
#include "coverage/survey_coverage.hpp"
#include "coverage/swath_painter.hpp"
#include "detect/anomaly_picker.hpp"
#include "detect/fourth_difference_noise.hpp"
#include "detect/target_model.hpp"
#include "detect/verification_strip.hpp"
#include "engine/site_history.hpp"
#include "engine/survey_config.hpp"
#include "log/log_schema.hpp"
#include "nav/positioner.hpp"
#include "nav/survey_crs.hpp"

namespace sg::engine {

// What the engine knows of one sensor at its latest sample.
struct SensorState {
    int index = 0;
    TimeNs t_ns = 0;
    nav::SensorPose pose;
    std::optional<double> field_nT;
    std::optional<double> quality;
    double noise_nT = 0.0;
    double threshold_nT = 0.0;
    detect::HalfWidths half_widths;  // of the coverage target class
    double centre_margin = 0.0;
    bool valid = false;              // painted coverage
    std::uint64_t samples = 0;
    std::uint64_t invalid_samples = 0;
};

// What a site adds to a new session before its first line: the earlier logs' coverage (joined
// into the site raster by `merge_into`), their runs (ids 0..n-1), alarms, outages and sessions.
struct SiteSeed {
    std::optional<int> epsg;  // CRS of the earlier logs (when the config names none)
    // Joins the earlier coverage into the site raster, in session (time) order; may fill in each
    // session's added_m2. Calls `joined(k)` after session k is joined (the gap names are
    // committed there, so that a site's names do not depend on which command opened it).
    std::function<void(coverage::CoverageRaster&, std::vector<SessionInfo>&,
                       const std::function<void(std::size_t)>& joined)>
        merge_into;
    std::vector<coverage::LineRun> runs;
    std::vector<AlarmSummary> alarms;
    std::vector<OutageSummary> outages;
    std::vector<SessionInfo> sessions;
    // Anomaly picks of each earlier session (its own list, runs in site ids, observations tagged
    // with the session) and their verification passes (docs/picks.md "A site").
    std::vector<std::vector<detect::AnomalyPick>> picks;
    std::vector<detect::VerificationPass> verification_passes;
    // Per session (same order): the names it recorded at its end, when they hold for the config in
    // force. After session k is joined its gaps are matched against these instead of the previous
    // commit, so every gap gets the name the session gave it live; without them, the one commit.
    std::vector<std::optional<coverage::GapNamer::Committed>> names;
};

// A forming gap, located: on which line and side, how wide, how far along the line, and where.
struct FormingGapSpot {
    int line = -1;               // index into the plan's lines
    std::string line_name;
    bool starboard = false;      // side of the direction of travel
    double width_m = 0.0;        // from the outer sensor's swath edge to the neighbouring coverage
                                 // (or the area edge; the whole search distance when none is near)
    double along_m = 0.0;        // of the gap's middle, along the line from its start (m)
    coverage::Point at;          // middle of the gap across track, survey CRS (m)
    double lon_deg = 0.0, lat_deg = 0.0;  // the same in WGS84
    TimeNs t_ns = 0;             // sample time it was measured at
    // "line L07, starboard, 6.2 m wide, at 840 m along the line"
    std::string text() const;
};

class SurveyEngine {
public:
    // `next_event_id` hands out ids for the events table (LogWriter::nextEventId live, a counter
    // in replay). Throws config::ConfigError / coverage::PlanError for a bad config or plan.
    SurveyEngine(const SurveyConfig& config, std::function<std::int64_t()> next_event_id);
    ~SurveyEngine();
    SurveyEngine(const SurveyEngine&) = delete;
    SurveyEngine& operator=(const SurveyEngine&) = delete;

    // Inputs, each at its aligned time t_ns (UTC ns). Angles in degrees, lengths in metres.
    void onFix(TimeNs t_ns, double lon_deg, double lat_deg, int quality);
    void onSpeed(TimeNs t_ns, double sog_mps);
    // `input`: the [[input]] the value came from, named by the pose_inputs alarm when it stops.
    void onHeading(TimeNs t_ns, double true_heading_deg, std::string_view input = {});
    void onWaterDepth(TimeNs t_ns, double depth_below_transducer_m, std::optional<double> offset_m);
    void onPositionError(TimeNs t_ns, double horizontal_error_m);
    void onCableOut(TimeNs t_ns, double cable_out_m, std::string_view input = {});
    void onAltitude(TimeNs t_ns, double altitude_m);
    void onSensorDepth(TimeNs t_ns, double depth_m, std::string_view input = {});
    void onMagSample(TimeNs t_ns, int sensor, std::optional<double> field_nT,
                     std::optional<double> quality, std::optional<double> depth_m,
                     std::optional<double> altitude_m, std::string_view input = {});
    // The survey clock (docs/checks.md, "The survey clock"): the silence checks run on the time
    // of the instruments, not on the receive clock, so a simulation sent faster than real time
    // sees the same silences as the survey did. Survey time S is the latest aligned time of any
    // processed line; while no line moves it, S advances with the receive clock from the
    // receive time of the line that last set it (all inputs silent: the alarm still fires).
    // Silence checks are evaluated at every whole second of S (so live ticks and a replay of
    // the same lines give the same alarm times).
    //
    // Receive-clock time has reached recv_utc_ns (each line's receive time before it is
    // decoded; live also about every 100 ms): S moves on by the receive time elapsed.
    void advanceTo(TimeNs recv_utc_ns);
    // A line with aligned (instrument) time t_ns, received at recv_utc_ns, is about to be
    // processed: S moves to t_ns if that is later (the seconds in between are judged without
    // the line).
    void advanceSurveyClock(TimeNs t_ns, TimeNs recv_utc_ns);
    // An input's datagrams dropped by the kernel before they were read (`count` new ones,
    // reported at recv_utc_ns): feeds the input_drops check at the survey clock.
    void onInputDrops(const std::string& input, std::uint64_t count, TimeNs recv_utc_ns);

    // A site: joins the earlier sessions' coverage, runs and history before the first line (the
    // CRS and plan are set up from seed.epsg when the config names none). From then on raster()
    // is the site's and the line runs continue the site's numbering. Throws config::ConfigError
    // when the seed's CRS differs from the config's.
    void seedSite(SiteSeed seed);
    bool isSite() const { return m_site_seeded; }
    const std::vector<AlarmSummary>& priorAlarms() const { return m_prior_alarms; }
    const std::vector<OutageSummary>& priorOutages() const { return m_prior_outages; }
    const std::vector<SessionInfo>& priorSessions() const { return m_prior_sessions; }
    // Instrument time of the first and last magnetometer samples processed (0 before any).
    TimeNs firstSample_ns() const { return m_first_sample_ns; }
    TimeNs lastSample_ns() const { return m_last_sample_ns; }

    // Called after every processed magnetometer sample (the snapshot builder keeps history).
    void setSampleObserver(std::function<void(const SensorState&)> fn) { m_observer = std::move(fn); }
    // Last antenna fix in the survey CRS and the vessel heading (grid, radians), when known.
    std::optional<coverage::Point> vesselPosition() const { return m_vessel_pos; }
    // The array reference (mean of the sensors' positions, survey CRS) at the latest sample of
    // sensor slot 0: the position line runs and the deviation use; empty while poses are bad.
    std::optional<coverage::Point> arrayReference() const { return m_last_ref_pos; }

    // Operator actions (logged as events).
    bool acknowledge(std::uint64_t episode_id, TimeNs t_ns);
    int acknowledgeAll(TimeNs t_ns, std::optional<checks::Level> only = std::nullopt);
    void chooseLine(int index);  // -1: automatic

    // The crew's steering choice (docs/helm-output.md, "Steering to an infill line"): the text of
    // a line of the reserved source "@crew" (Pipeline::kCrewSource), so that a replay of the log
    // makes the same choice at the same place in the stream. "steer I7": the proposed infill line
    // named I7 (as the gaps and infill of this moment name it) becomes the helm's target and the
    // only line a new run can start on; "steer planned": back to the planned lines. Each outcome
    // is an event (kind "steer", or "steer_refused" with the reason) and is returned as text.
    struct CrewOutcome {
        bool accepted = false;
        std::string text;  // the event's detail
    };
    CrewOutcome onCrewCommand(std::string_view text);
    // The infill line the helm steers to (index into lines()->lines()), -1: the planned lines.
    int steerTarget() const { return m_cov ? m_cov->lines().target() : -1; }
    // The infill lines proposed now (ranked, best first; names and ends as the gaps of this
    // moment name them; empty without a plan or when there is too much ground to plan over).
    std::vector<coverage::InfillLine> proposedInfill();
    // Their names only.
    std::vector<std::string> proposedInfillNames();

    // Rows for the log produced since the last call (alarm events, ends, acknowledgements).
    void takeRows(log::Batch& batch);

    // State.
    const SurveyConfig& config() const { return m_cfg; }
    bool hasCrs() const { return m_crs != nullptr; }
    const nav::SurveyCrs* crs() const { return m_crs.get(); }
    // Coverage needs a [plan]; without one these are null / an empty raster.
    const coverage::SurveyPlan* plan() const { return m_cov ? &m_cov->plan() : nullptr; }
    const coverage::CoverageRaster& raster() const { return m_cov ? m_cov->raster() : m_no_raster; }
    coverage::SurveyCoverage* coverage() { return m_cov.get(); }
    // Paints pending swath stretches (call before reading the raster for gaps or a snapshot).
    void flushCoverage();
    // End of the data: processes the magnetometer samples still waiting for a fix after their
    // time (they are placed held at the last fix, or stale). summarise() calls it.
    void finishPending();
    std::size_t pendingSamples() const { return m_pending.size(); }
    const coverage::LineTracker* lines() const { return m_cov ? &m_cov->lines() : nullptr; }
    const checks::CheckSet& checks() const { return m_checks; }
    const std::vector<SensorState>& sensors() const { return m_sensors; }
    // Altitude, deviation and noise along each line run of this session, in one-metre bins (the
    // report's line profiles; a site's earlier sessions have none).
    const coverage::RunProfiles& runProfiles() const { return m_profiles; }
    const InvalidCounts& invalidCounts() const { return m_invalid; }
    // Samples by sensor index that matches no [[sensor]] (index -> samples).
    const std::map<int, std::uint64_t>& unknownSensorSamples() const { return m_unknown_samples; }
    // Samples that carried a total-field value, over every sensor (configured or not).
    std::uint64_t fieldSamples() const { return m_field_samples; }
    // Why fixes were refused: the first fix lies far outside the survey CRS's area of use
    // (empty when every fix was used).
    const std::string& crsProblem() const { return m_crs_problem; }
    // The vessel's (antenna) positions, one every few metres, while its samples could not be
    // placed (pose problem or no altitude): ground run over that no line run records.
    const std::vector<coverage::Point>& vesselTrack() const { return m_track; }
    const detect::TargetModel& coverageModel() const { return m_models[m_coverage_model]; }
    const std::vector<detect::TargetModel>& models() const { return m_models; }
    std::optional<double> speed_mps() const { return m_speed; }
    std::optional<double> deviation_m() const { return m_deviation; }
    std::optional<double> formingGap_m() const { return m_forming_gap; }
    // Where the widest forming gap is, while the forming-gap check reads above 0 (docs/checks.md).
    const std::optional<FormingGapSpot>& formingGapSpot() const { return m_forming_spot; }
    // Stable gap names (docs/coverage.md, "Gap names"): committed at every run's end and after
    // each earlier session of a site is joined.
    const coverage::GapNamer& gapNamer() const { return m_namer; }
    // The end of a live session: its gaps, as a finished log's (gapReport(true)), are committed
    // (like at a run's end) and the committed state returned, to be recorded in the session's own log (site::recordGapNames).
    coverage::GapNamer::Committed endSessionNames();
    // The latest GGA's quality indicator, satellites used and HDOP (for the helm panel; the
    // checks use the quality through fix_quality). Empty before the first GGA.
    struct GnssStatus {
        int quality = 0;
        std::optional<int> satellites;
        std::optional<double> hdop;
        TimeNs t_ns = 0;
    };
    void onGnssStatus(TimeNs t_ns, int quality, std::optional<int> satellites, std::optional<double> hdop) {
        m_gnss = GnssStatus{quality, satellites, hdop, t_ns};
    }
    const std::optional<GnssStatus>& gnssStatus() const { return m_gnss; }
    // The latest cable out received (m), for the helm panel.
    std::optional<double> cableOut_m() const { return m_cable_out; }
    // Receive clock (UTC receive time of the latest line or tick): replay pacing and seeking.
    TimeNs clock_ns() const { return m_clock_ns; }
    // Survey clock (instrument time, see advanceTo); 0 before the first aligned line.
    TimeNs surveyClock_ns() const { return m_survey_ns; }
    // Datagrams dropped by the kernel, per input, as reported by the readers.
    const std::map<std::string, std::uint64_t>& inputDrops() const { return m_input_drops; }
    // The altitude limit derived from the detection model (the highest altitude at which the
    // swaths of adjacent lines still meet), or nullopt when there is no plan spacing.
    std::optional<double> maxOverlapAltitude_m() const { return m_max_overlap_altitude; }
    // Predicted detectable half-width of the coverage class at the planned altitude (m).
    double plannedHalfWidth_m() const;

    // Anomaly picks and the verification strip (docs/picks.md) as they stand now: the picker's
    // state is copied and its last samples detrended with the window they have, so asking (the
    // screen does, every few seconds) never changes what a later question gets; live and replay
    // therefore agree. Empty when [picks] enabled = false.
    struct PicksNow {
        std::vector<detect::AnomalyPick> picks;
        detect::VerificationResult verification;
        std::uint64_t peaks = 0;  // single-sensor peaks found
    };
    PicksNow picksNow() const;
    bool picksEnabled() const { return m_picker.has_value(); }
    const detect::PickSettings& pickSettings() const { return m_pick_settings; }

    // Gaps in the area now, and the infill lines that close them.
    // (Both need a plan: without one the report is empty.)
    // `final`: the survey is over (a finished log): the open run counts as ended.
    coverage::GapReport gapReport(bool final = false);
    // Plans the infill and proves it by flying it over a copy of the raster.
    coverage::SurveyCoverage::Infill infillPlan(const coverage::GapReport& report) const;
    coverage::InfillOptions infillOptions() const;

private:
    void logSteer(const char* kind, std::string detail);
    // After every position: a steering that ended (its run closed, or its line no longer proposed).
    void checkSteering(bool run_ended);
    void ensureCrs(double lon_deg, double lat_deg);
    void loadPlan();
    void updateChecks(TimeNs t_ns);
    // A magnetometer sample as it arrived, waiting for a fix at or after its time.
    struct PendingSample {
        TimeNs t_ns = 0;
        std::size_t slot = 0;
        std::optional<double> field_nT, quality;
        double noise_nT = 0.0;
        bool warmed_up = false;  // the noise window was filled when it arrived
        TimeNs arrival_clock_ns = 0;  // survey clock when it arrived
    };
    void processPending(const PendingSample& p);
    // Processes waiting samples in order: those at or before up_to_ns, or (by_fix) those that
    // now have a fix at or after their time.
    void releasePending(TimeNs up_to_ns, bool by_fix);
    void processSample(SensorState& s, TimeNs t_ns, bool warmed_up);
    std::optional<FormingGapSpot> probeFormingGap(const SensorState& outer, bool starboard) const;
    void commitGapNames();
    coverage::SwathSample swathSample(const SensorState& s) const;
    std::vector<double> sensorCross() const;
    double planningThreshold_nT() const;
    void drainEpisodes();
    double magSilence_s(TimeNs at) const;
    void updateSetupChecks(std::size_t slot, TimeNs t_ns, const nav::SensorPose& pose);
    void countPoseReasons(std::uint32_t flags);

    SurveyConfig m_cfg;
    std::function<std::int64_t()> m_next_event_id;
    std::unique_ptr<nav::SurveyCrs> m_crs;
    std::unique_ptr<nav::Positioner> m_positioner;
    std::vector<detect::TargetModel> m_models;
    std::size_t m_coverage_model = 0;
    std::vector<detect::FourthDifferenceNoise> m_noise;
    std::vector<SensorState> m_sensors;
    std::vector<nav::SensorPose> m_poses;  // every sensor's pose at slot 0's latest sample
    std::map<int, std::size_t> m_sensor_slot;  // sensor index -> slot in m_sensors
    std::unique_ptr<coverage::SurveyCoverage> m_cov;
    coverage::CoverageRaster m_no_raster;
    checks::CheckSet m_checks;
    InvalidCounts m_invalid;

    std::optional<double> m_speed;
    std::optional<double> m_deviation;
    std::optional<double> m_forming_gap;
    std::optional<FormingGapSpot> m_forming_spot;
    coverage::GapNamer m_namer;
    std::optional<GnssStatus> m_gnss;
    std::optional<double> m_cable_out;
    std::optional<double> m_max_overlap_altitude;
    std::optional<coverage::Point> m_last_ref_pos;
    void setSurveyClock(TimeNs s_ns);
    void evaluateSilences(TimeNs at_ns);
    double recentDrops(TimeNs at_ns);
    TimeNs m_clock_ns = 0;           // receive clock (UTC receive time of the line being fed)
    TimeNs m_survey_ns = 0;          // survey clock S (0: no aligned line yet)
    TimeNs m_anchor_recv_ns = 0;     // receive time of the line that last moved S
    TimeNs m_anchor_survey_ns = 0;   // the S it set
    std::map<std::string, std::uint64_t> m_input_drops;
    std::vector<std::pair<TimeNs, std::uint64_t>> m_drop_reports;  // (S, count), last 10 s
    std::optional<TimeNs> m_last_fix_ns;
    std::optional<TimeNs> m_last_mag_ns;
    std::optional<TimeNs> m_first_mag_ns;
    std::map<std::size_t, TimeNs> m_last_mag_by_slot;  // survey clock of each sensor's last field
    std::optional<TimeNs> m_last_altitude_ns;
    int m_run_of_last_sample = coverage::kRunNone;
    std::deque<PendingSample> m_pending;            // in arrival order
    std::map<std::size_t, TimeNs> m_last_arrival_ns;  // aligned time of each slot's last sample

    bool m_site_seeded = false;
    std::vector<AlarmSummary> m_prior_alarms;
    std::vector<OutageSummary> m_prior_outages;
    std::vector<SessionInfo> m_prior_sessions;
    std::vector<std::vector<detect::AnomalyPick>> m_prior_picks;      // per earlier session
    std::vector<detect::VerificationPass> m_prior_passes;
    TimeNs m_first_sample_ns = 0, m_last_sample_ns = 0;

    std::map<std::uint64_t, std::int64_t> m_episode_event;  // episode id -> events.id
    std::function<void(const SensorState&)> m_observer;
    std::optional<coverage::Point> m_vessel_pos;
    log::Batch m_rows;

    // Setup checks (unknown_sensor, pose_inputs, crs_area).
    std::map<int, std::uint64_t> m_unknown_samples;
    std::map<int, TimeNs> m_unknown_last_ns;          // unknown index -> its latest sample time
    std::vector<std::optional<TimeNs>> m_pose_bad_since;  // per slot: start of the setup problem
    std::vector<double> m_pose_bad_s;                 // per slot: its length at the last sample
    std::uint64_t m_field_samples = 0;
    bool m_seen_heading = false;  // an HDT arrived
    bool m_seen_cable = false;    // a cable-out value arrived
    bool m_seen_depth = false;    // a sensor depth arrived
    // Where and when each pose input last arrived (survey time), for a value that stops.
    struct LastInput {
        std::optional<TimeNs> at_ns;
        std::string input;
    };
    LastInput m_last_heading, m_last_cable, m_last_depth;
    bool m_crs_checked = false;
    bool m_crs_refused = false;
    std::string m_crs_problem;
    std::vector<coverage::Point> m_track;

    // Anomaly picks and the verification strip.
    void feedPicker(const SensorState& s, std::size_t slot);
    detect::PickSettings m_pick_settings;
    std::optional<detect::AnomalyPicker> m_picker;
    detect::VerificationStrip m_strip;
    coverage::RunProfiles m_profiles;
    bool m_strip_placed = false;
};

}  // namespace sg::engine
