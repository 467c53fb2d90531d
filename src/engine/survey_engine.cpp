// Navigation, detection, coverage, line runs and checks per sample; see survey_engine.hpp.
#include "engine/survey_engine.hpp"

#include <algorithm>
#include <cmath>
#include <limits>

#include <fmt/format.h>

#include "detect/swath_plan.hpp"
#include "engine/section_or_empty.hpp"

namespace sg::engine {

namespace {

constexpr double kPi = 3.14159265358979323846;
constexpr double kDegToRad = kPi / 180.0;

// Gap in one sensor's samples after which the fourth difference restarts (its differences across
// a dropout would measure the dropout, not the noise).
constexpr TimeNs kNoiseResetGapNs = kNsPerSecond;
// Differences needed before the noise estimate is trusted (or the window, if smaller).
constexpr int kNoiseWarmupDifferences = 16;
// Silence checks are evaluated at most this many whole seconds per advance (a seek or a jump of
// the clock does not loop for hours).
constexpr int kMaxSilenceSteps = 120;
// A first fix further than this outside the survey CRS's area of use (degrees) is refused: the
// data and the CRS belong to different places (a wrong EPSG code or UTM zone), and distances
// there would be distorted. Half a UTM zone; the team's choice.
constexpr double kCrsRefuseOutside_deg = 3.0;
// An unconfigured sensor index counts for the unknown_sensor check this long after its sample.
constexpr TimeNs kUnknownSensorWindowNs = 5 * kNsPerSecond;
// Vessel track of unplaceable samples kept for the gap causes: one point every this many metres.
constexpr double kTrackStep_m = 5.0;
// Pose flags that point at the setup (a value the position needs was never there).
constexpr std::uint32_t kSetupPoseFlags = nav::kNoFix | nav::kNoHeading | nav::kNoCableOut |
                                          nav::kNoSensorDepth;

}  // namespace

SurveyEngine::SurveyEngine(const SurveyConfig& config, std::function<std::int64_t()> next_event_id)
    : m_cfg(config), m_next_event_id(std::move(next_event_id)) {
    const auto root = m_cfg.root();
    m_models = detect::makeModels(m_cfg.detection);
    // The coverage class: the one named in [survey], else the hardest to detect (smallest
    // detection range at the minimum threshold, heading north).
    m_coverage_model = 0;
    double best_range = std::numeric_limits<double>::infinity();
    for (std::size_t i = 0; i < m_models.size(); ++i) {
        const auto& cls = m_models[i].targetClass();
        if (!m_cfg.survey.coverage_class.empty()) {
            if (cls.name == m_cfg.survey.coverage_class) m_coverage_model = i;
            continue;
        }
        const double range = m_models[i].detectionRange_m(0.0, m_cfg.detection.detection.min_anomaly_nT) -
                             cls.burial_m;
        if (range < best_range) {
            best_range = range;
            m_coverage_model = i;
        }
    }

    m_pick_settings = detect::parsePickSettings(root);
    m_strip = detect::VerificationStrip(detect::parseKnownItems(root, *m_cfg.table, m_cfg.detection.targets));
    if (m_pick_settings.enabled) {
        m_picker.emplace(m_pick_settings, m_cfg.detection.field, m_cfg.detection.detection.mass_rule_C,
                         m_cfg.nav.sensors.size());
        m_picker->setDetrendedObserver([this](const detect::DetrendedSample& d) { m_strip.add(d); });
    }

    for (const auto& s : m_cfg.nav.sensors) {
        m_sensor_slot[s.index] = m_sensors.size();
        SensorState st;
        st.index = s.index;
        m_sensors.push_back(st);
        m_noise.emplace_back(m_cfg.detection.detection.noise_window);
    }
    m_pose_bad_since.resize(m_sensors.size());
    m_pose_bad_s.assign(m_sensors.size(), 0.0);

    // Limits derived from the detection model: the altitude at which adjacent lines stop meeting
    // (detect::planClass, at the noise warn limit and the worst of the line's two directions).
    std::map<std::string, checks::Limits> derived;
    m_checks = checks::CheckSet::fromConfig(root);  // configured noise limit, for the threshold
    const auto plan_sec = root.optionalTable("plan");
    const double spacing = plan_sec ? plan_sec->number("line_spacing_m", 0.1, 10000.0, 0.0) : 0.0;
    if (spacing > 0.0) {
        const double heading = plan_sec->number("survey_heading_deg", 0.0, 360.0, 0.0) * kDegToRad;
        std::optional<double> lowest;
        for (double h : {heading, heading + kPi}) {
            const auto plan = detect::planClass(m_models[m_coverage_model], sensorCross(), 3.0, h,
                                                planningThreshold_nT(), spacing);
            const double alt = plan.max_altitude_for_spacing_m.value_or(0.0);
            lowest = std::min(lowest.value_or(alt), alt);
        }
        m_max_overlap_altitude = lowest;
        if (*lowest > 0.0) {
            checks::Limits l = m_checks.check("altitude").limits();
            l.alarm = *lowest;
            l.warn = std::max(0.0, *lowest - 0.5);
            derived["altitude"] = l;
        }
    }
    m_checks = checks::CheckSet::fromConfig(root, derived);

    if (m_cfg.survey.epsg) {
        m_crs = std::make_unique<nav::SurveyCrs>(*m_cfg.survey.epsg);
        m_positioner = std::make_unique<nav::Positioner>(m_cfg.nav, m_crs.get());
        loadPlan();
    }
}

SurveyEngine::~SurveyEngine() = default;

void SurveyEngine::ensureCrs(double lon_deg, double lat_deg) {
    if (m_crs) return;
    m_crs = std::make_unique<nav::SurveyCrs>(nav::SurveyCrs::utmForLonLat(lon_deg, lat_deg));
    m_positioner = std::make_unique<nav::Positioner>(m_cfg.nav, m_crs.get());
    loadPlan();
}

void SurveyEngine::loadPlan() {
    const auto root = m_cfg.root();
    const auto plan_sec = root.optionalTable("plan");
    if (!plan_sec) return;
    auto plan = coverage::loadPlan(*plan_sec, coverage::toGridWith(*m_crs));
    const auto cov = coverage::loadCoverageOptions(sectionOrEmpty(root, "coverage"));
    const auto gaps = coverage::loadGapOptions(sectionOrEmpty(root, "gaps"), plan.surveyHeadingDeg());
    m_cov = std::make_unique<coverage::SurveyCoverage>(std::move(plan), cov, gaps);
    // The ground a line not run yet is expected to cover (docs/coverage.md, "Not run yet and missed").
    m_cov->setPlannedHalfWidth(plannedHalfWidth_m());
    m_cov->setVesselTrack(&m_track, kTrackStep_m);
}

std::string FormingGapSpot::text() const {
    return fmt::format("line {}, {}, {:.1f} m wide, at {:.0f} m along the line", line_name,
                       starboard ? "starboard" : "port", width_m, along_m);
}

void SurveyEngine::commitGapNames() {
    if (!m_cov) return;
    auto rep = m_cov->gaps();
    m_namer.name(rep, true);
}

void SurveyEngine::onFix(TimeNs t_ns, double lon_deg, double lat_deg, int quality) {
    m_checks.update("fix_quality", t_ns, checks::fixQualityRank(quality));
    if (quality <= 0) {
        drainEpisodes();
        return;
    }
    ensureCrs(lon_deg, lat_deg);
    // Zone plausibility: the fixes must lie in (or near) the survey CRS's area of use.
    const double outside = m_crs->degreesOutsideAreaOfUse(lon_deg, lat_deg);
    std::string crs_detail;
    if (outside > 0.0) {
        const auto a = m_crs->areaOfUse();
        crs_detail = fmt::format(
            "fix at lon {:.4f} lat {:.4f} lies {:.1f} deg outside the area of use of EPSG:{} ({}: "
            "lon {:.1f}..{:.1f}, lat {:.1f}..{:.1f}); set [survey] epsg to the CRS of the survey "
            "area, or remove it to use the UTM zone of the first fix",
            lon_deg, lat_deg, outside, m_crs->epsg(), a ? a->name : m_crs->name(),
            a ? a->west_deg : 0.0, a ? a->east_deg : 0.0, a ? a->south_deg : 0.0,
            a ? a->north_deg : 0.0);
    }
    m_checks.update("crs_area", t_ns, outside, crs_detail);
    if (!m_crs_checked) {
        m_crs_checked = true;
        if (outside > kCrsRefuseOutside_deg) {
            m_crs_refused = true;
            m_crs_problem = "positions refused: the first " + crs_detail;
        }
    }
    if (m_crs_refused) {
        drainEpisodes();
        return;
    }
    const auto en = m_positioner->addFix(t_ns, lon_deg, lat_deg, quality);  // projected once
    releasePending(t_ns, true);  // samples waiting for a fix after them
    if (std::isfinite(en.easting_m)) m_vessel_pos = coverage::Point{en.easting_m, en.northing_m};
    // Silence is measured on the survey clock, which this fix has already moved on.
    m_last_fix_ns = m_survey_ns;
    m_checks.update("gnss_silence", m_survey_ns, 0.0);
    drainEpisodes();
}

void SurveyEngine::onSpeed(TimeNs t_ns, double sog_mps) {
    m_speed = sog_mps;
    m_checks.update("speed_high", t_ns, sog_mps);
    m_checks.update("speed_low", t_ns, sog_mps);
    drainEpisodes();
}

void SurveyEngine::onHeading(TimeNs t_ns, double true_heading_deg, std::string_view input) {
    m_seen_heading = true;
    m_last_heading = {t_ns, std::string(input)};
    if (m_positioner) m_positioner->addHeading(t_ns, true_heading_deg);
}

void SurveyEngine::onWaterDepth(TimeNs t_ns, double depth_below_transducer_m,
                                std::optional<double> offset_m) {
    if (!m_positioner) return;
    m_positioner->addWaterDepth(
        t_ns, nav::waterDepthBelowSurface_m(depth_below_transducer_m, offset_m, m_cfg.nav.vessel));
}

void SurveyEngine::onPositionError(TimeNs t_ns, double horizontal_error_m) {
    m_checks.update("position_error", t_ns, horizontal_error_m);
    drainEpisodes();
}

void SurveyEngine::onCableOut(TimeNs t_ns, double cable_out_m, std::string_view input) {
    m_seen_cable = true;
    m_last_cable = {t_ns, std::string(input)};
    m_cable_out = cable_out_m;
    if (m_positioner) m_positioner->addCableOut(t_ns, cable_out_m);
}

void SurveyEngine::onAltitude(TimeNs t_ns, double altitude_m) {
    if (m_positioner) m_positioner->addAltitude(t_ns, altitude_m);
}

void SurveyEngine::onSensorDepth(TimeNs t_ns, double depth_m, std::string_view input) {
    m_seen_depth = true;
    m_last_depth = {t_ns, std::string(input)};
    if (m_positioner) m_positioner->addSensorDepth(t_ns, depth_m);
}

void SurveyEngine::onMagSample(TimeNs t_ns, int sensor, std::optional<double> field_nT,
                               std::optional<double> quality, std::optional<double> depth_m,
                               std::optional<double> altitude_m, std::string_view input) {
    if (field_nT) ++m_field_samples;
    // Sensor indices with no [[sensor]]: counted, and the unknown_sensor check (it also ends
    // here, on the configured sensors' samples, once none was seen for a while).
    const auto slot_it = m_sensor_slot.find(sensor);
    if (slot_it == m_sensor_slot.end()) {
        ++m_unknown_samples[sensor];
        ++m_invalid.unknown_sensor;
        m_unknown_last_ns[sensor] = t_ns;
    }
    {
        int recent = 0;
        std::string which;
        for (const auto& [index, last] : m_unknown_last_ns)
            if (t_ns - last <= kUnknownSensorWindowNs) {
                ++recent;
                which += (which.empty() ? "" : ", ") + std::to_string(index);
            }
        std::string detail;
        if (recent > 0) {
            std::string configured;
            for (const auto& c : m_cfg.nav.sensors)
                configured += (configured.empty() ? "" : ", ") + std::to_string(c.index);
            detail = fmt::format(
                "magnetometer sensor {} has no configured offsets (no [[sensor]] with that index; "
                "configured: {}): add [[sensor]] index = {} with its cross_m/along_m, or correct "
                "the sensor field of the field map",
                which, configured, which);
        }
        m_checks.update("unknown_sensor", t_ns, static_cast<double>(recent), detail);
    }
    if (slot_it == m_sensor_slot.end()) {
        drainEpisodes();
        return;  // not a configured sensor: its samples cannot be placed
    }
    const std::size_t slot = slot_it->second;
    if (m_positioner) {
        // One fish carries the array: its depth and altitude come with every sensor's string.
        if (depth_m) m_positioner->addSensorDepth(t_ns, *depth_m);
        if (depth_m) {
            m_seen_depth = true;
            m_last_depth = {t_ns, std::string(input)};
        }
        if (altitude_m) m_positioner->addAltitude(t_ns, *altitude_m);
    }
    auto& noise = m_noise[slot];
    const auto prev = m_last_arrival_ns.find(slot);
    if (!field_nT || (prev != m_last_arrival_ns.end() && t_ns - prev->second > kNoiseResetGapNs)) noise.reset();
    if (field_nT) noise.add(*field_nT);
    m_last_arrival_ns[slot] = t_ns;
    if (field_nT) {
        // Silence is per sensor: one sensor's dropout counts even while the others report.
        m_last_mag_ns = m_survey_ns;
        if (!m_first_mag_ns) m_first_mag_ns = m_survey_ns;
        m_last_mag_by_slot[slot] = m_survey_ns;
        m_checks.update("mag_silence", m_survey_ns, magSilence_s(m_survey_ns));
    }
    const int needed = std::min(kNoiseWarmupDifferences, noise.window());
    const PendingSample p{t_ns, slot, field_nT, quality, noise.sigma_nT(), noise.differences() >= needed, m_survey_ns};
    // Positions are interpolated, never extrapolated by default: a sample later than the last fix
    // waits for the next fix (live, one fix interval at most), so that it is placed between two
    // fixes. One that no fix follows within fix_max_age_s is placed then: held at the last fix
    // (or carried on for [vessel] extrapolation_s), and stale beyond.
    releasePending(t_ns - static_cast<TimeNs>(m_cfg.nav.vessel.fix_max_age_s * 1e9), false);
    if (m_positioner && m_positioner->pathPoints() > 0 && !m_positioner->hasFixAtOrAfter(t_ns)) {
        m_pending.push_back(p);
    } else {
        releasePending(t_ns, false);
        processPending(p);
    }
    drainEpisodes();
}

void SurveyEngine::seedSite(SiteSeed seed) {
    if (seed.epsg) {
        if (m_crs && m_crs->epsg() != *seed.epsg)
            throw config::ConfigError(fmt::format(
                "{}: key 'survey.epsg': the site's earlier logs are in EPSG:{}, this config in EPSG:{}; "
                "logs of one site share one CRS",
                m_cfg.file, *seed.epsg, m_crs->epsg()));
        if (!m_crs) {
            m_crs = std::make_unique<nav::SurveyCrs>(*seed.epsg);
            m_positioner = std::make_unique<nav::Positioner>(m_cfg.nav, m_crs.get());
            loadPlan();
        }
    }
    m_site_seeded = true;
    m_prior_alarms = std::move(seed.alarms);
    m_prior_outages = std::move(seed.outages);
    m_prior_sessions = std::move(seed.sessions);
    m_prior_picks = std::move(seed.picks);
    m_prior_passes = std::move(seed.verification_passes);
    if (!m_cov) return;  // no [plan]: no coverage to join
    auto& site = m_cov->beginSite();
    // Gap names: after each earlier session is joined, its gaps (with the ground its and the
    // earlier sessions' runs had not run yet left out) are committed, in time order.
    const auto joined = [&](std::size_t k) {
        std::vector<coverage::LineRun> upto;
        for (const auto& r : seed.runs)
            if (r.session <= static_cast<int>(k)) upto.push_back(r);
        coverage::LineTracker tracker(m_cov->plan().lines, m_cov->lines().options());
        tracker.adoptEarlierRuns(std::move(upto), static_cast<int>(k) + 1);
        auto rep = m_cov->gapsWith(site, tracker);
        if (k < seed.names.size() && seed.names[k]) m_namer.adopt(*seed.names[k]);
        m_namer.name(rep, true);
    };
    if (seed.merge_into) seed.merge_into(site, m_prior_sessions, joined);
    m_cov->lines().adoptEarlierRuns(std::move(seed.runs), static_cast<int>(m_prior_sessions.size()));
}

void SurveyEngine::processPending(const PendingSample& p) {
    SensorState& s = m_sensors[p.slot];
    s.t_ns = p.t_ns;
    s.field_nT = p.field_nT;
    s.quality = p.quality;
    ++s.samples;
    s.noise_nT = p.noise_nT;
    processSample(s, p.t_ns, p.warmed_up);
    if (m_picker) feedPicker(s, p.slot);
    if (p.slot == 0) updateChecks(p.t_ns);
    if (m_observer) m_observer(s);
}

void SurveyEngine::feedPicker(const SensorState& s, std::size_t slot) {
    if (!s.field_nT) return;
    if (!m_strip_placed && m_crs) {
        // Known items are placed in the survey grid once the CRS is known.
        for (std::size_t i = 0; i < m_strip.items().size(); ++i) {
            const auto& it = m_strip.items()[i];
            if (it.grid_e_m) {
                m_strip.place(i, *it.grid_e_m, *it.grid_n_m);
            } else {
                const auto en = m_crs->forward(*it.lon_deg, *it.lat_deg);
                if (std::isfinite(en.easting_m) && std::isfinite(en.northing_m))
                    m_strip.place(i, en.easting_m, en.northing_m);
            }
        }
        m_strip_placed = true;
    }
    detect::PickSample ps;
    ps.t_ns = s.t_ns;
    ps.slot = static_cast<int>(slot);
    ps.field_nT = *s.field_nT;
    ps.threshold_nT = s.threshold_nT;
    ps.easting_m = s.pose.easting_m;
    ps.northing_m = s.pose.northing_m;
    ps.altitude_m = s.pose.altitude_m;
    ps.heading_grid_rad = s.pose.heading_grid_rad;
    ps.convergence_rad = s.pose.heading_true_rad - s.pose.heading_grid_rad;
    ps.run = m_run_of_last_sample;
    // Picks are made on line runs only (turns and run-ins change the heading error faster than
    // the trend window follows), from samples that painted coverage.
    ps.usable = s.valid && s.pose.ok() && s.pose.altitude_source != nav::AltitudeSource::None &&
                ps.run != coverage::kRunNone;
    m_picker->add(ps);
}

SurveyEngine::PicksNow SurveyEngine::picksNow() const {
    PicksNow out;
    if (!m_picker) return out;
    detect::AnomalyPicker picker = *m_picker;
    detect::VerificationStrip strip = m_strip;
    picker.setDetrendedObserver([&strip](const detect::DetrendedSample& d) { strip.add(d); });
    picker.finish();
    out.picks = picker.picks();
    out.peaks = picker.peaks();
    std::vector<std::string> run_lines, plan_lines;
    if (const auto* tracker = lines()) {
        const auto& ls = tracker->lines();
        for (const auto& l : ls) plan_lines.push_back(l.name);
        for (const auto& r : tracker->runs())
            run_lines.push_back(r.line >= 0 && static_cast<std::size_t>(r.line) < ls.size()
                                    ? ls[static_cast<std::size_t>(r.line)].name
                                    : std::string());
    }
    const int session = static_cast<int>(m_prior_sessions.size());
    out.verification = strip.result(m_models, run_lines, plan_lines, m_prior_passes, session);
    if (!m_site_seeded) return out;
    // A site: the earlier sessions' picks joined with this session's (docs/picks.md "A site").
    for (auto& k : out.picks)
        for (auto& o : k.observations) o.session = session;
    auto lists = m_prior_picks;
    lists.push_back(std::move(out.picks));
    out.picks = detect::joinSessionPicks(lists, m_pick_settings, m_cfg.detection.detection.mass_rule_C);
    return out;
}

void SurveyEngine::releasePending(TimeNs up_to_ns, bool by_fix) {
    while (!m_pending.empty()) {
        const PendingSample& p = m_pending.front();
        const bool placed = by_fix ? m_positioner->hasFixAtOrAfter(p.t_ns) : p.t_ns <= up_to_ns;
        if (!placed) break;
        const PendingSample q = p;
        m_pending.pop_front();
        processPending(q);
    }
}

void SurveyEngine::finishPending() {
    releasePending(std::numeric_limits<TimeNs>::max(), false);
    drainEpisodes();
}

void SurveyEngine::processSample(SensorState& s, TimeNs t_ns, bool warmed_up) {
    const std::size_t slot = m_sensor_slot[s.index];
    if (m_first_sample_ns == 0) m_first_sample_ns = t_ns;
    m_last_sample_ns = std::max(m_last_sample_ns, t_ns);
    const auto& det = m_cfg.detection.detection;
    s.threshold_nT = detect::detectionThreshold_nT(det.min_anomaly_nT, det.k, s.noise_nT);
    bool valid = true;
    if (!s.field_nT) {
        valid = false;
        ++m_invalid.no_field;
    }
    if (!m_positioner) {
        s.pose = nav::SensorPose{};
        s.pose.flags = nav::kNoFix;
    } else if (slot == 0) {
        // Slot 0 also needs every sensor's pose at its time (the array reference below): one
        // posesAt gives both. Slots follow the order of [[sensor]], as the Positioner's poses do,
        // and posesAt places each sensor exactly as poseAt would.
        m_positioner->posesAt(t_ns, m_poses);
        s.pose = m_poses[slot];
    } else {
        s.pose = m_positioner->poseAt(t_ns, s.index);
    }
    if (!s.pose.ok()) {
        valid = false;
        ++m_invalid.pose;
        countPoseReasons(s.pose.flags);
    }
    updateSetupChecks(slot, t_ns, s.pose);
    // Where the vessel was while its samples could not be placed (no line run records that).
    if (slot == 0 && m_vessel_pos && (!s.pose.ok() || s.pose.altitude_source == nav::AltitudeSource::None) &&
        (m_track.empty() ||
         std::hypot(m_vessel_pos->e_m - m_track.back().e_m, m_vessel_pos->n_m - m_track.back().n_m) >= kTrackStep_m))
        m_track.push_back(*m_vessel_pos);
    if (s.pose.altitude_source == nav::AltitudeSource::None) {
        valid = false;
        ++m_invalid.no_altitude;
    } else {
        m_last_altitude_ns = m_survey_ns;
        m_checks.update("altitude_lost", m_survey_ns, 0.0);
    }
    if (s.field_nT && !warmed_up) {
        valid = false;
        ++m_invalid.noise_warmup;
    }
    const auto& noise_limits = m_checks.check("noise").limits();
    if (noise_limits.enabled && s.noise_nT > noise_limits.alarm) {
        valid = false;
        ++m_invalid.noisy;
    }
    const auto& q_limits = m_checks.check("signal_quality").limits();
    if (q_limits.enabled && s.quality && *s.quality < q_limits.alarm) {
        valid = false;
        ++m_invalid.low_quality;
    }

    const auto& model = m_models[m_coverage_model];
    s.half_widths = {};
    s.centre_margin = 0.0;
    if (s.pose.altitude_source != nav::AltitudeSource::None && s.pose.ok()) {
        const double vertical = std::max(0.01, s.pose.altitude_m + model.targetClass().burial_m);
        s.half_widths = model.halfWidths(vertical, s.pose.heading_true_rad, s.threshold_nT);
        s.centre_margin = model.margin(vertical, 0.0, s.pose.heading_true_rad, s.threshold_nT);
    }
    s.valid = valid;
    if (!valid) ++s.invalid_samples;

    // The array reference (mean of the sensors) drives line runs and deviation, on sensor slot 0.
    if (slot == 0 && m_positioner && s.pose.ok()) {
        coverage::Point ref{0.0, 0.0};
        int n = 0;
        for (const auto& p : m_poses)
            if (p.ok()) {
                ref.e_m += p.easting_m;
                ref.n_m += p.northing_m;
                ++n;
            }
        if (n > 0) {
            ref.e_m /= n;
            ref.n_m /= n;
            const double dir_e = std::sin(s.pose.heading_grid_rad);
            const double dir_n = std::cos(s.pose.heading_grid_rad);
            std::optional<double> alt;
            if (s.pose.altitude_source != nav::AltitudeSource::None) alt = s.pose.altitude_m;
            if (m_cov) {
                const int before = m_cov->lines().activeRun();
                m_run_of_last_sample = m_cov->updatePosition(t_ns, ref, dir_e, dir_n, alt);
                // A run ended: its gaps get their names for good.
                const bool run_ended = before != coverage::kRunNone && m_cov->lines().activeRun() != before;
                if (run_ended) commitGapNames();
                checkSteering(run_ended);
                const auto& lines = m_cov->lines();
                const int line = lines.activeLine();
                if (line >= 0) m_deviation = lines.crossTrack(line, ref, dir_e, dir_n);
                else m_deviation.reset();
                // The report's line profiles (coverage/run_profiles.hpp).
                if (line >= 0 && m_run_of_last_sample != coverage::kRunNone)
                    m_profiles.addPosition(m_run_of_last_sample, line, t_ns, lines.alongTrack(line, ref), alt,
                                           m_deviation);
            }
            if (m_last_ref_pos) {
                const double step = std::hypot(ref.e_m - m_last_ref_pos->e_m, ref.n_m - m_last_ref_pos->n_m);
                m_checks.update("sample_spacing", t_ns, step);
            }
            m_last_ref_pos = ref;
        }
    } else if (slot == 0) {
        m_last_ref_pos.reset();
    }

    if (m_cov) {
        m_cov->addSample(swathSample(s));
        // Per-run noise (for the report's line table): warmed-up estimates only.
        if (s.field_nT && warmed_up) {
            m_cov->lines().addNoise(m_run_of_last_sample, s.noise_nT);
            m_profiles.addNoise(m_run_of_last_sample, s.noise_nT);
        }
    }
}

coverage::SwathSample SurveyEngine::swathSample(const SensorState& s) const {
    coverage::SwathSample sw;
    sw.t_ns = s.t_ns;
    sw.e_m = s.pose.easting_m;
    sw.n_m = s.pose.northing_m;
    sw.dir_e = std::sin(s.pose.heading_grid_rad);
    sw.dir_n = std::cos(s.pose.heading_grid_rad);
    sw.left_m = s.half_widths.port_m;
    sw.right_m = s.half_widths.starboard_m;
    sw.centre_margin = static_cast<float>(s.centre_margin);
    sw.valid = s.valid && s.pose.ok();
    sw.sensor = s.index;
    sw.run = m_run_of_last_sample;
    return sw;
}

std::optional<FormingGapSpot> SurveyEngine::probeFormingGap(const SensorState& outer, bool starboard) const {
    if (!outer.valid || !m_cov || !m_last_ref_pos) return std::nullopt;
    const auto sw = swathSample(outer);
    const double spacing = m_cov->plan().line_spacing_m;
    const double search_m = spacing > 0 ? spacing : 20.0;
    const auto& lines = m_cov->lines();
    const int line = lines.activeLine();
    if (line < 0) return std::nullopt;
    // A gap forms only against ground a pass has already gone by. With a planned line beside this
    // one on that side, that is a run of that line abreast of here: until it is run, the strip
    // between is simply not surveyed yet (no alarm). Once it was, the gap is the distance to its
    // coverage, or the whole search distance when none is near (its swath failed here too).
    const double dir_e = sw.dir_e, dir_n = sw.dir_n;
    const double side_e = starboard ? dir_n : -dir_n;
    const double side_n = starboard ? -dir_e : dir_e;
    const double hw = starboard ? sw.right_m : sw.left_m;
    // The gap lies beyond the swath edge, `width` wide: its middle is where it is reported.
    const auto spot = [&](double width) {
        FormingGapSpot f;
        f.line = line;
        f.line_name = lines.lines()[static_cast<std::size_t>(line)].name;
        f.starboard = starboard;
        f.width_m = width;
        f.at = {sw.e_m + side_e * (hw + 0.5 * width), sw.n_m + side_n * (hw + 0.5 * width)};
        f.along_m = lines.alongTrack(line, f.at);
        if (m_crs) {
            const auto ll = m_crs->inverse(f.at.e_m, f.at.n_m);
            f.lon_deg = ll.lon_deg;
            f.lat_deg = ll.lat_deg;
        }
        f.t_ns = outer.t_ns;
        return f;
    };
    const int neighbour = lines.neighbourLine(line, *m_last_ref_pos, sw.dir_e, sw.dir_n, starboard);
    if (neighbour >= 0) {
        if (!lines.passedBy(neighbour, *m_last_ref_pos)) return std::nullopt;
        const auto probe = coverage::probeEdge(m_cov->raster(), sw, starboard, search_m);
        return spot(probe.found ? probe.gap_m : search_m);
    }
    // The outermost line on that side: coverage of another run, else the area edge if it is
    // within the search distance, is the neighbour.
    const auto probe = coverage::probeEdge(m_cov->raster(), sw, starboard, search_m);
    if (probe.found) return spot(probe.gap_m);
    const double cell = m_cov->raster().cellSize();
    const int steps = static_cast<int>(search_m / cell) + 1;
    for (int k = 1; k <= steps; ++k) {
        const double d = k * cell;
        const coverage::Point q{sw.e_m + side_e * (hw + d), sw.n_m + side_n * (hw + d)};
        if (!coverage::contains(m_cov->plan().area, q)) return spot(d - cell);
    }
    return std::nullopt;
}

void SurveyEngine::updateChecks(TimeNs t_ns) {
    std::optional<double> alt, noise, quality;
    const SensorState* port_most = nullptr;
    const SensorState* stbd_most = nullptr;
    double port_cross = 0.0, stbd_cross = 0.0;
    for (std::size_t i = 0; i < m_sensors.size(); ++i) {
        const auto& s = m_sensors[i];
        if (s.samples == 0) continue;
        if (s.pose.altitude_source != nav::AltitudeSource::None)
            alt = std::max(alt.value_or(-1e9), s.pose.altitude_m);
        const int needed = std::min(kNoiseWarmupDifferences, m_noise[i].window());
        if (m_noise[i].differences() >= needed) noise = std::max(noise.value_or(0.0), s.noise_nT);
        if (s.quality) quality = std::min(quality.value_or(1e9), *s.quality);
        const double cross = m_cfg.nav.sensors[i].cross_m;
        if (!port_most || cross < port_cross) {
            port_most = &s;
            port_cross = cross;
        }
        if (!stbd_most || cross > stbd_cross) {
            stbd_most = &s;
            stbd_cross = cross;
        }
    }
    m_checks.update("altitude", t_ns, alt);
    m_checks.update("noise", t_ns, noise);
    m_checks.update("signal_quality", t_ns, quality);
    m_checks.update("deviation", t_ns,
                    m_deviation ? std::optional<double>(std::abs(*m_deviation)) : std::nullopt);
    // Forming gap: only while on a planned line; off line it reads 0 so an episode can end.
    double gap = 0.0;
    std::optional<FormingGapSpot> where;
    if (m_cov && m_cov->lines().activeRun() >= 0 && port_most && stbd_most) {
        const auto p = probeFormingGap(*port_most, false);
        const auto s = probeFormingGap(*stbd_most, true);
        // The wider side is the one reported (port on a tie).
        if (p && p->width_m > 0.0) where = p;
        if (s && s->width_m > 0.0 && (!where || s->width_m > where->width_m)) where = s;
        if (where) gap = where->width_m;
    }
    m_forming_gap = gap;
    m_forming_spot = where;
    m_checks.update("forming_gap", t_ns, gap, where ? where->text() : std::string());
}

void SurveyEngine::countPoseReasons(std::uint32_t flags) {
    if (flags & nav::kNoFix) ++m_invalid.pose_no_fix;
    if (flags & (nav::kStaleFix | nav::kBeforeHistory)) ++m_invalid.pose_stale_fix;
    if (flags & nav::kNoHeading) ++m_invalid.pose_no_heading;
    if (flags & nav::kNoCableOut) ++m_invalid.pose_no_cable_out;
    if (flags & nav::kNoSensorDepth) ++m_invalid.pose_no_sensor_depth;
    if (flags & (nav::kCableShorterThanDrop | nav::kLaybackBeyondHistory | nav::kUnknownSensor))
        ++m_invalid.pose_other;
}

void SurveyEngine::updateSetupChecks(std::size_t slot, TimeNs t_ns, const nav::SensorPose& pose) {
    // A value the position needs that is missing: a first fix, a heading, cable out, sensor
    // depth, or any altitude at all since the start (a later loss is the altitude_lost check).
    // Only inputs that never arrived count (a start-up transient, e.g. the fish still laid back
    // over track sailed before the first heading, or a value that later goes stale, is not a
    // setup problem; the silence checks watch data that stops).
    std::uint32_t missing = pose.flags & kSetupPoseFlags;
    if (m_seen_heading || m_cfg.nav.vessel.heading_source != nav::HeadingSource::Hdt)
        missing &= ~static_cast<std::uint32_t>(nav::kNoHeading);
    if (m_seen_cable) missing &= ~static_cast<std::uint32_t>(nav::kNoCableOut);
    if (m_seen_depth) missing &= ~static_cast<std::uint32_t>(nav::kNoSensorDepth);
    const bool never_altitude = pose.altitude_source == nav::AltitudeSource::None && !m_last_altitude_ns;
    // A value that arrived and then stopped: the pose lacks it and its last value is older than
    // the age the pose may bridge (a start-up transient has fresh values, so it does not count).
    // Altitude that stops is the altitude_lost check's.
    std::uint32_t stopped = 0;
    std::string stopped_what;
    const auto stoppedInput = [&](std::uint32_t flag, const LastInput& last, double max_age_s,
                                  const char* quantity) {
        if (!(pose.flags & flag) || !last.at_ns) return;
        const double age_s = toSeconds(t_ns - *last.at_ns);
        if (age_s <= max_age_s) return;
        stopped |= flag;
        stopped_what += fmt::format("{}{} stopped arriving{} (last value {:.1f} s ago; the position "
                                    "needs it)",
                                    stopped_what.empty() ? "" : "; ", quantity,
                                    last.input.empty() ? std::string()
                                                       : fmt::format(" from input '{}'", last.input),
                                    age_s);
    };
    if (m_cfg.nav.vessel.heading_source == nav::HeadingSource::Hdt ||
        m_cfg.nav.vessel.heading_source == nav::HeadingSource::Auto)
        stoppedInput(nav::kNoHeading, m_last_heading, m_cfg.nav.vessel.heading_max_age_s, "heading (HDT)");
    stoppedInput(nav::kNoCableOut, m_last_cable, m_cfg.nav.tow.cable_max_age_s, "cable out");
    stoppedInput(nav::kNoSensorDepth, m_last_depth, m_cfg.nav.tow.depth_max_age_s, "sensor depth");
    auto& since = m_pose_bad_since[slot];
    if (missing == 0 && !never_altitude && stopped == 0) {
        since.reset();
        m_pose_bad_s[slot] = 0.0;
    } else {
        if (!since) since = t_ns;
        m_pose_bad_s[slot] = toSeconds(t_ns - *since);
    }
    const double worst = *std::max_element(m_pose_bad_s.begin(), m_pose_bad_s.end());
    std::string detail;
    if (worst > 0.0 && m_pose_bad_s[slot] == worst) {
        std::string what;
        const auto add = [&what](const char* w) { what += (what.empty() ? "" : "; ") + std::string(w); };
        if (missing & nav::kNoFix)
            add(m_crs_refused ? "no usable position fix (refused: far outside the survey CRS)"
                              : "no position fix (check the GNSS input and its clock)");
        if (missing & nav::kNoHeading) add("no heading (check the heading input or [vessel] heading_source)");
        if (missing & nav::kNoCableOut)
            add("no cable out (set [tow] cable_out_m, add a cable input, or set [tow] "
                "sensor_at_antenna = true)");
        if (missing & nav::kNoSensorDepth)
            add("no sensor depth (set [tow] sensor_depth_m, or a depth_m field in the field map)");
        if (never_altitude)
            add("no altitude (an altimeter field, or an echo sounder plus sensor depth)");
        if (!stopped_what.empty()) add(stopped_what.c_str());
        detail = fmt::format("magnetometer sensor {}: {}", m_sensors[slot].index, what);
    }
    m_checks.update("pose_inputs", t_ns, worst, detail);
}

double SurveyEngine::magSilence_s(TimeNs at) const {
    // The longest silence of any sensor that has reported; a configured sensor that never
    // reported counts from the first sample of any sensor.
    double worst = 0.0;
    for (std::size_t i = 0; i < m_sensors.size(); ++i) {
        const auto it = m_last_mag_by_slot.find(i);
        const TimeNs last = it != m_last_mag_by_slot.end() ? it->second : m_first_mag_ns.value_or(at);
        worst = std::max(worst, toSeconds(at - last));
    }
    return worst;
}

void SurveyEngine::evaluateSilences(TimeNs at) {
    if (m_last_mag_ns) m_checks.update("mag_silence", at, magSilence_s(at));
    if (m_last_fix_ns) m_checks.update("gnss_silence", at, toSeconds(at - *m_last_fix_ns));
    if (m_last_altitude_ns) {
        // A sample waiting for the fix after it has its altitude judged when it is placed:
        // until then its altitude does not count as lost (else every GNSS gap would raise it).
        TimeNs last = *m_last_altitude_ns;
        if (!m_pending.empty()) last = std::max(last, m_pending.back().arrival_clock_ns);
        m_checks.update("altitude_lost", at, toSeconds(at - last));
    }
    if (!m_drop_reports.empty()) m_checks.update("input_drops", at, recentDrops(at));
}

void SurveyEngine::setSurveyClock(TimeNs s_ns) {
    if (s_ns <= m_survey_ns) return;
    if (m_survey_ns == 0) {
        m_survey_ns = s_ns;
        evaluateSilences(s_ns);
        drainEpisodes();
        return;
    }
    TimeNs b = (m_survey_ns / kNsPerSecond + 1) * kNsPerSecond;
    if ((s_ns - b) / kNsPerSecond > kMaxSilenceSteps) b = (s_ns / kNsPerSecond - kMaxSilenceSteps) * kNsPerSecond;
    for (; b <= s_ns; b += kNsPerSecond) evaluateSilences(b);
    m_survey_ns = s_ns;
    drainEpisodes();
}

void SurveyEngine::advanceTo(TimeNs recv_utc_ns) {
    if (recv_utc_ns <= m_clock_ns) return;
    m_clock_ns = recv_utc_ns;
    // No line has moved S since the anchor: S follows the receive clock from there.
    if (m_survey_ns != 0) setSurveyClock(m_anchor_survey_ns + (recv_utc_ns - m_anchor_recv_ns));
}

void SurveyEngine::advanceSurveyClock(TimeNs t_ns, TimeNs recv_utc_ns) {
    if (t_ns <= m_survey_ns) return;
    setSurveyClock(t_ns);
    m_anchor_survey_ns = t_ns;
    m_anchor_recv_ns = recv_utc_ns;
}

double SurveyEngine::recentDrops(TimeNs at) {
    // Datagrams dropped in the 10 s of survey time up to `at`.
    constexpr TimeNs kWindowNs = 10 * kNsPerSecond;
    std::erase_if(m_drop_reports, [&](const auto& r) { return r.first <= at - kWindowNs; });
    std::uint64_t n = 0;
    for (const auto& r : m_drop_reports) n += r.second;
    return static_cast<double>(n);
}

void SurveyEngine::onInputDrops(const std::string& input, std::uint64_t count, TimeNs recv_utc_ns) {
    if (count == 0) return;
    m_input_drops[input] += count;
    // Before any line has set the survey clock, the report's receive time dates it.
    const TimeNs at = m_survey_ns != 0 ? m_survey_ns : recv_utc_ns;
    m_drop_reports.emplace_back(at, count);
    m_checks.update("input_drops", at, recentDrops(at));
    drainEpisodes();
}

bool SurveyEngine::acknowledge(std::uint64_t episode_id, TimeNs t_ns) {
    const bool ok = m_checks.acknowledge(episode_id, t_ns);
    drainEpisodes();
    return ok;
}

int SurveyEngine::acknowledgeAll(TimeNs t_ns, std::optional<checks::Level> only) {
    const int n = m_checks.acknowledgeAll(t_ns, only);
    drainEpisodes();
    return n;
}

void SurveyEngine::chooseLine(int index) {
    if (!m_cov) return;
    if (index < 0) m_cov->lines().automatic();
    else m_cov->lines().choose(index);
}

std::vector<coverage::InfillLine> SurveyEngine::proposedInfill() {
    if (!m_cov) return {};
    try {
        // The same names the screen and `gaps` show: gaps named as committed, infill after them.
        return coverage::planInfill(gapReport(false), infillOptions()).lines;
    } catch (const std::exception&) {
        return {};  // too much uncovered ground to plan over (InfillOptions::max_cells)
    }
}

std::vector<std::string> SurveyEngine::proposedInfillNames() {
    std::vector<std::string> out;
    for (const auto& l : proposedInfill()) out.push_back(l.name);
    return out;
}

void SurveyEngine::logSteer(const char* kind, std::string detail) {
    log::EventRow row;
    row.id = m_next_event_id();
    row.kind = kind;
    row.source = "crew";
    row.start_utc_ns = m_survey_ns != 0 ? m_survey_ns : m_clock_ns;
    row.detail = std::move(detail);
    m_rows.events.push_back(std::move(row));
}

SurveyEngine::CrewOutcome SurveyEngine::onCrewCommand(std::string_view text) {
    // Words separated by blanks; the first is the verb.
    std::vector<std::string> words;
    std::size_t i = 0;
    while (i < text.size()) {
        while (i < text.size() && (text[i] == ' ' || text[i] == '\t' || text[i] == '\r')) ++i;
        std::size_t j = i;
        while (j < text.size() && text[j] != ' ' && text[j] != '\t' && text[j] != '\r') ++j;
        if (j > i) words.emplace_back(text.substr(i, j - i));
        i = j;
    }
    std::string detail;
    if (words.size() != 2 || words[0] != "steer") {
        detail = fmt::format("'{}' is not a crew command (steer I<n> | steer planned)", text);
        logSteer("steer_refused", detail);
        return {false, detail};
    }
    if (!m_cov) {
        detail = "no lines to steer to yet (no [plan], or no position has placed the survey grid)";
        logSteer("steer_refused", detail);
        return {false, detail};
    }
    auto& tracker = m_cov->lines();
    if (words[1] == "planned") {
        const int t = tracker.target();
        detail = t >= 0 ? fmt::format("planned lines (the crew ended the steering to {})",
                                      tracker.lines()[static_cast<std::size_t>(t)].name)
                        : std::string("planned lines");
        tracker.steerPlanned();
        logSteer("steer", detail);
        return {true, detail};
    }
    const auto proposed = proposedInfill();
    const auto it = std::find_if(proposed.begin(), proposed.end(),
                                 [&](const coverage::InfillLine& l) { return l.name == words[1]; });
    if (it == proposed.end()) {
        std::string names;
        for (const auto& l : proposed) names += (names.empty() ? "" : ", ") + l.name;
        detail = fmt::format("{} is not a proposed infill line (proposed now: {})", words[1],
                             names.empty() ? "none" : names);
        logSteer("steer_refused", detail);
        return {false, detail};
    }
    coverage::PlanLine line;
    line.name = it->name;
    line.start = it->start;
    line.end = it->end;
    tracker.steerTo(line);
    detail = fmt::format("infill line {} (gap G{}), {:.0f} m, E {:.1f} N {:.1f} -> E {:.1f} N {:.1f}", it->name,
                         it->main_gap_id, it->length_m, it->start.e_m, it->start.n_m, it->end.e_m, it->end.n_m);
    logSteer("steer", detail);
    return {true, detail};
}

void SurveyEngine::checkSteering(bool run_ended) {
    auto& tracker = m_cov->lines();
    if (const int r = tracker.takeTargetEnded(); r != coverage::kRunNone) {
        const auto& run = tracker.runs()[static_cast<std::size_t>(r)];
        const auto& l = tracker.lines()[static_cast<std::size_t>(run.line)];
        const bool to_end = run.along_max_m >= l.length_m() - 0.5 * tracker.options().line_spacing_m;
        logSteer("steer", fmt::format("planned lines: the run of {} ended ({})", l.name,
                                      to_end ? "its end passed" : fmt::format("left it {:.0f} m before its end",
                                                                               l.length_m() - run.along_max_m)));
        return;
    }
    // Not yet reached: at every run's end (the gaps are committed there), is it still proposed?
    const int t = tracker.target();
    if (!run_ended || t < 0 || tracker.targetAcquired()) return;
    const std::string name = tracker.lines()[static_cast<std::size_t>(t)].name;
    const auto names = proposedInfillNames();
    if (std::find(names.begin(), names.end(), name) != names.end()) return;
    tracker.steerPlanned();
    logSteer("steer", fmt::format("planned lines: {} is no longer proposed (its gap closed)", name));
}

void SurveyEngine::drainEpisodes() {
    for (auto& change : m_checks.drainChanges()) {
        const auto& ep = change.episode;
        using Kind = checks::EpisodeChange::Kind;
        switch (change.kind) {
        case Kind::kStarted: {
            log::EventRow row;
            row.id = m_next_event_id();
            row.kind = "alarm." + ep.check;
            row.start_utc_ns = ep.start_ns;
            row.value = ep.peak_value;
            row.detail = checks::levelName(ep.peak_level);
            if (!ep.detail.empty()) row.detail += ": " + ep.detail;
            m_episode_event[ep.id] = row.id;
            m_rows.events.push_back(std::move(row));
            if (m_cov) m_cov->lines().addAlarm(m_cov->lines().activeRun());
            break;
        }
        case Kind::kEscalated: {
            log::EventRow row;
            row.id = m_next_event_id();
            row.kind = "alarm_escalated." + ep.check;
            row.start_utc_ns = ep.end_ns.value_or(m_survey_ns);
            row.value = ep.peak_value;
            row.detail = std::string(checks::levelName(ep.peak_level)) + " (alarm event " +
                         std::to_string(m_episode_event[ep.id]) + ")";
            m_rows.events.push_back(std::move(row));
            break;
        }
        case Kind::kEnded:
            m_rows.event_ends.push_back({m_episode_event[ep.id], *ep.end_ns, ep.peak_value});
            break;
        case Kind::kAcknowledged:
            m_rows.event_acks.push_back({m_episode_event[ep.id], *ep.ack_ns});
            break;
        }
    }
}

void SurveyEngine::takeRows(log::Batch& batch) {
    for (auto& e : m_rows.events) batch.events.push_back(std::move(e));
    for (auto& e : m_rows.event_ends) batch.event_ends.push_back(e);
    for (auto& e : m_rows.event_acks) batch.event_acks.push_back(e);
    m_rows.events.clear();
    m_rows.event_ends.clear();
    m_rows.event_acks.clear();
}

void SurveyEngine::flushCoverage() {
    if (!m_cov) return;
    m_cov->flush();
    m_cov->lines().refreshCoverage(m_cov->raster());
}

std::vector<double> SurveyEngine::sensorCross() const {
    std::vector<double> cross;
    for (const auto& s : m_cfg.nav.sensors) cross.push_back(s.cross_m);
    return cross;
}

double SurveyEngine::planningThreshold_nT() const {
    // Planning assumes the noise at its warn limit: the swath the crew can count on while no
    // noise warning is raised.
    const auto& det = m_cfg.detection.detection;
    return detect::detectionThreshold_nT(det.min_anomaly_nT, det.k, m_checks.check("noise").limits().warn);
}

double SurveyEngine::plannedHalfWidth_m() const {
    const auto* p = plan();
    const double altitude = p && p->planned_altitude_m > 0 ? p->planned_altitude_m : 3.0;
    const double heading = (p ? p->surveyHeadingDeg() : 0.0) * kDegToRad;
    double worst = std::numeric_limits<double>::infinity();
    const auto cross = sensorCross();
    for (double h : {heading, heading + kPi}) {
        const auto sw = detect::arraySwathAt(m_models[m_coverage_model], cross, altitude, h,
                                             planningThreshold_nT());
        worst = std::min({worst, sw.port_m, sw.starboard_m});
    }
    return std::max(0.0, worst);
}

coverage::InfillOptions SurveyEngine::infillOptions() const {
    const double heading = plan() ? plan()->surveyHeadingDeg() : 0.0;
    return coverage::loadInfillOptions(sectionOrEmpty(m_cfg.root(), "infill"), heading,
                                       std::max(0.1, plannedHalfWidth_m()));
}

coverage::GapNamer::Committed SurveyEngine::endSessionNames() {
    if (m_cov) {
        finishPending();
        flushCoverage();
        auto rep = m_cov->gaps(true);
        m_namer.name(rep, true);
    }
    return m_namer.committed();
}

coverage::GapReport SurveyEngine::gapReport(bool final) {
    if (!m_cov) return {};
    auto rep = m_cov->gaps(final);
    m_namer.name(rep, false);  // names as committed; gaps new since the last run's end preview theirs
    return rep;
}

coverage::SurveyCoverage::Infill SurveyEngine::infillPlan(const coverage::GapReport& report) const {
    if (!m_cov) return {};
    return m_cov->infill(report, infillOptions());
}

}  // namespace sg::engine
