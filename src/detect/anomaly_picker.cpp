// Anomaly picking: running-median trend, peaks over the live threshold, dipole fit per pass,
// merge across passes; see anomaly_picker.hpp.
#include "detect/anomaly_picker.hpp"

#include <algorithm>
#include <cmath>
#include <set>

#include "common/config_section.hpp"

namespace sg::detect {

namespace {

// Detrended samples kept per sensor for widths and fits (s).
constexpr TimeNs kHistoryNs = 60 * kNsPerSecond;
// A sensor whose samples stop for longer than this restarts its trend window (s).
constexpr TimeNs kRestartGapNs = kNsPerSecond;
// Peaks of one pass are at most this far apart in time (s).
constexpr TimeNs kGroupTimeNs = 10 * kNsPerSecond;
// Samples of a fit: this long either side of the strongest peak (s), within fit_half_length_m.
constexpr TimeNs kFitTimeNs = 20 * kNsPerSecond;
// The free-direction fit replaces the induced one only when it explains this much more of the
// profile (fraction of the sum of squares; the team's choice against fitting noise).
constexpr double kFreeFitGain = 0.05;
// Trial positions of the fit: this far to either side of the strongest peak (m).
constexpr double kFitSpread_m = 1.5;

void insertSorted(std::vector<double>& v, double x) {
    v.insert(std::lower_bound(v.begin(), v.end(), x), x);
}
void eraseSorted(std::vector<double>& v, double x) {
    const auto it = std::lower_bound(v.begin(), v.end(), x);
    if (it != v.end() && *it == x) v.erase(it);
}

std::string qualityLabel(double r2, double snr, bool fitted) {
    // docs/picks.md: strong = the dipole explains 80 % of the profile and the peak is 3 thresholds;
    // fair = 50 % and 1.5 thresholds; weak otherwise (the team's grading, not a standard).
    if (fitted && r2 >= 0.8 && snr >= 3.0) return "strong";
    if (fitted && r2 >= 0.5 && snr >= 1.5) return "fair";
    return "weak";
}

}  // namespace

PickSettings parsePickSettings(const config::Section& root) {
    PickSettings p;
    const auto sec = root.optionalTable("picks");
    if (!sec) return p;
    sec->allowOnly({"enabled", "trend_window_s", "min_samples", "group_distance_m",
                    "merge_distance_m", "fit_half_length_m", "group_wait_s"});
    p.enabled = sec->boolean("enabled", true);
    p.trend_window_s = sec->number("trend_window_s", 2.0, 600.0, p.trend_window_s);
    p.min_samples = static_cast<int>(sec->integer("min_samples", 1, 100, p.min_samples));
    p.group_distance_m = sec->number("group_distance_m", 0.5, 100.0, p.group_distance_m);
    p.merge_distance_m = sec->number("merge_distance_m", 0.1, 100.0, p.merge_distance_m);
    p.fit_half_length_m = sec->number("fit_half_length_m", 2.0, 200.0, p.fit_half_length_m);
    p.group_wait_s = sec->number("group_wait_s", 0.5, 60.0, p.group_wait_s);
    return p;
}

AnomalyPicker::AnomalyPicker(PickSettings settings, const GeomagneticField& field,
                             double mass_rule_C, std::size_t sensors)
    : m_set(settings), m_field(field), m_mass_rule_C(mass_rule_C), m_slots(sensors) {}

void AnomalyPicker::add(const PickSample& s) {
    if (s.slot < 0 || static_cast<std::size_t>(s.slot) >= m_slots.size()) return;
    const auto i = static_cast<std::size_t>(s.slot);
    Slot& slot = m_slots[i];
    if (!slot.buf.empty() && s.t_ns - slot.last_t_ns > kRestartGapNs) flushSlot(i);
    slot.buf.push_back(s);
    insertSorted(slot.sorted, s.field_nT);
    slot.last_t_ns = s.t_ns;
    detrendReady(slot, false);
}

void AnomalyPicker::detrendReady(Slot& slot, bool flush) {
    const auto half = static_cast<TimeNs>(m_set.trend_window_s * 0.5 * 1e9);
    const auto idx = static_cast<std::size_t>(&slot - m_slots.data());
    while (slot.centre < slot.buf.size() &&
           (flush || slot.buf.back().t_ns - slot.buf[slot.centre].t_ns >= half)) {
        const TimeNs tc = slot.buf[slot.centre].t_ns;
        while (slot.buf.front().t_ns < tc - half) {
            eraseSorted(slot.sorted, slot.buf.front().field_nT);
            slot.buf.pop_front();
            --slot.centre;
        }
        const std::size_t n = slot.sorted.size();
        const double median =
            n % 2 == 1 ? slot.sorted[n / 2] : 0.5 * (slot.sorted[n / 2 - 1] + slot.sorted[n / 2]);
        DetrendedSample d{slot.buf[slot.centre], slot.buf[slot.centre].field_nT - median};
        ++slot.centre;
        onDetrended(idx, d);
    }
}

void AnomalyPicker::onDetrended(std::size_t i, const DetrendedSample& d) {
    if (m_observer) m_observer(d);
    Slot& slot = m_slots[i];
    slot.history.push_back(d);
    while (!slot.history.empty() && d.s.t_ns - slot.history.front().s.t_ns > kHistoryNs) {
        slot.history.pop_front();
        if (slot.peak_index > 0) --slot.peak_index;  // keep it pointing at the same sample
    }
    m_latest_detrended_ns = std::max(m_latest_detrended_ns, d.s.t_ns);
    const bool over = d.s.usable && d.s.threshold_nT > 0.0 && std::abs(d.residual_nT) >= d.s.threshold_nT;
    const bool same_run = slot.in_peak && slot.history.size() >= 2 &&
                          slot.history[slot.history.size() - 2].s.run == d.s.run;
    if (over && slot.in_peak && same_run) {
        ++slot.above;
        const DetrendedSample& peak = slot.history[slot.peak_index];
        if (std::abs(d.residual_nT) > std::abs(peak.residual_nT)) slot.peak_index = slot.history.size() - 1;
    } else {
        if (slot.in_peak) closePeak(i);
        if (over) {
            slot.in_peak = true;
            slot.above = 1;
            slot.peak_index = slot.history.size() - 1;
        }
    }
    processGroups(false);
}

void AnomalyPicker::closePeak(std::size_t i) {
    Slot& slot = m_slots[i];
    slot.in_peak = false;
    if (slot.above < m_set.min_samples || slot.peak_index >= slot.history.size()) return;
    const auto& h = slot.history;
    const std::size_t p = slot.peak_index;
    const double half = 0.5 * std::abs(h[p].residual_nT);
    std::size_t lo = p, hi = p;
    while (lo > 0 && h[lo - 1].s.run == h[p].s.run && std::abs(h[lo - 1].residual_nT) >= half) --lo;
    while (hi + 1 < h.size() && h[hi + 1].s.run == h[p].s.run && std::abs(h[hi + 1].residual_nT) >= half)
        ++hi;
    Peak peak;
    peak.slot = static_cast<int>(i);
    peak.at = h[p];
    peak.width_m = std::hypot(h[hi].s.easting_m - h[lo].s.easting_m, h[hi].s.northing_m - h[lo].s.northing_m);
    m_pending.push_back(peak);
    ++m_peak_count;
}

void AnomalyPicker::processGroups(bool all) {
    const auto wait = static_cast<TimeNs>(m_set.group_wait_s * 1e9);
    while (!m_pending.empty()) {
        auto first = std::min_element(m_pending.begin(), m_pending.end(), [](const Peak& a, const Peak& b) {
            return a.at.s.t_ns < b.at.s.t_ns || (a.at.s.t_ns == b.at.s.t_ns && a.slot < b.slot);
        });
        if (!all && m_latest_detrended_ns - first->at.s.t_ns < wait) return;
        std::vector<Peak> group{*first};
        m_pending.erase(first);
        // Single-link growth: a peak joins when it is near any member (same run, distance, time).
        bool grew = true;
        while (grew) {
            grew = false;
            for (auto it = m_pending.begin(); it != m_pending.end();) {
                bool join = false;
                for (const Peak& g : group) {
                    if (g.at.s.run == it->at.s.run &&
                        std::abs(g.at.s.t_ns - it->at.s.t_ns) <= kGroupTimeNs &&
                        std::hypot(g.at.s.easting_m - it->at.s.easting_m,
                                   g.at.s.northing_m - it->at.s.northing_m) <= m_set.group_distance_m) {
                        join = true;
                        break;
                    }
                }
                if (join) {
                    group.push_back(*it);
                    it = m_pending.erase(it);
                    grew = true;
                } else {
                    ++it;
                }
            }
        }
        fitGroup(std::move(group));
    }
}

void AnomalyPicker::fitGroup(std::vector<Peak> group) {
    const Peak& strongest = *std::max_element(group.begin(), group.end(), [](const Peak& a, const Peak& b) {
        return std::abs(a.at.residual_nT) < std::abs(b.at.residual_nT);
    });
    PickObservation obs;
    obs.run = strongest.at.s.run;
    obs.t_ns = strongest.at.s.t_ns;
    obs.peak_nT = strongest.at.residual_nT;
    obs.snr = std::abs(strongest.at.residual_nT) / strongest.at.s.threshold_nT;
    obs.width_m = strongest.width_m;
    obs.altitude_m = strongest.at.s.altitude_m;
    std::set<int> sensors;
    for (const Peak& p : group) sensors.insert(p.slot);
    obs.sensors.assign(sensors.begin(), sensors.end());
    obs.easting_m = strongest.at.s.easting_m;
    obs.northing_m = strongest.at.s.northing_m;

    // The profile of every sensor of this pass around the peak.
    std::vector<FitSample> samples;
    for (const Slot& slot : m_slots) {
        for (const DetrendedSample& d : slot.history) {
            if (!d.s.usable || d.s.run != obs.run || std::abs(d.s.t_ns - obs.t_ns) > kFitTimeNs) continue;
            if (std::hypot(d.s.easting_m - obs.easting_m, d.s.northing_m - obs.northing_m) >
                m_set.fit_half_length_m)
                continue;
            samples.push_back({d.s.easting_m, d.s.northing_m, d.s.altitude_m, d.residual_nT});
        }
    }
    const double conv = strongest.at.s.convergence_rad;
    const Vec3 f = ambientFieldUnit(m_field.inclination_deg * kPi / 180.0,
                                    m_field.declination_deg * kPi / 180.0 - conv);
    const double th = strongest.at.s.heading_grid_rad;
    const double across_e = std::cos(th), across_n = -std::sin(th);  // starboard, grid
    auto fit = fitDipole(samples, f, MomentModel::Induced, obs.easting_m, obs.northing_m, across_e,
                         across_n, kFitSpread_m);
    if (obs.sensors.size() >= 2) {
        auto free = fitDipole(samples, f, MomentModel::Free, obs.easting_m, obs.northing_m, across_e,
                              across_n, kFitSpread_m);
        if (free && (!fit || free->r2 > fit->r2 + kFreeFitGain)) fit = free;
    }
    if (fit && fit->r2 > 0.0 &&
        std::hypot(fit->easting_m - obs.easting_m, fit->northing_m - obs.northing_m) <= m_set.fit_half_length_m) {
        obs.fit = fit;
        obs.easting_m = fit->easting_m;
        obs.northing_m = fit->northing_m;
    }
    mergePick(std::move(obs));
}

void AnomalyPicker::mergePick(PickObservation obs) {
    const double depth = obs.altitude_m + (obs.fit ? std::max(0.0, obs.fit->burial_m) : 0.0);
    AnomalyPick* target = nullptr;
    double best = 0.0;
    for (AnomalyPick& p : m_picks) {
        const double d = std::hypot(p.easting_m - obs.easting_m, p.northing_m - obs.northing_m);
        const double gate = m_set.merge_distance_m + 0.5 * std::max(depth, p.depth_below_sensor_m.value_or(p.altitude_m));
        if (d <= gate && (target == nullptr || d < best)) {
            target = &p;
            best = d;
        }
    }
    if (target == nullptr) {
        m_picks.emplace_back();
        target = &m_picks.back();
        target->id = static_cast<int>(m_picks.size());
        target->first_t_ns = obs.t_ns;
    }
    AnomalyPick& p = *target;
    p.observations.push_back(std::move(obs));
    aggregatePick(p, m_mass_rule_C);
}

void AnomalyPicker::flushSlot(std::size_t i) {
    Slot& slot = m_slots[i];
    detrendReady(slot, true);
    if (slot.in_peak) closePeak(i);
    slot.buf.clear();
    slot.sorted.clear();
    slot.centre = 0;
}

void AnomalyPicker::finish() {
    for (std::size_t i = 0; i < m_slots.size(); ++i) flushSlot(i);
    processGroups(true);
}

void aggregatePick(AnomalyPick& p, double mass_rule_C) {
    // Aggregate: position weighted by peak/threshold and fit quality; the fitted figures from the
    // best-fitting observation; amplitude and width from the strongest.
    double we = 0.0, wn = 0.0, w = 0.0;
    const PickObservation* strongest = nullptr;
    const PickObservation* best_fit = nullptr;
    std::set<int> runs, sensors, sessions;
    for (const PickObservation& o : p.observations) {
        const double wi = o.snr * std::max(o.fit ? o.fit->r2 : 0.0, 0.1);
        we += wi * o.easting_m;
        wn += wi * o.northing_m;
        w += wi;
        if (!strongest || std::abs(o.peak_nT) > std::abs(strongest->peak_nT)) strongest = &o;
        if (o.fit && (!best_fit || o.fit->r2 * o.snr > best_fit->fit->r2 * best_fit->snr)) best_fit = &o;
        runs.insert(o.run);
        sessions.insert(o.session);
        sensors.insert(o.sensors.begin(), o.sensors.end());
        p.first_t_ns = std::min(p.first_t_ns, o.t_ns);
    }
    p.easting_m = we / w;
    p.northing_m = wn / w;
    p.peak_nT = strongest->peak_nT;
    p.width_m = strongest->width_m;
    p.altitude_m = strongest->altitude_m;
    p.snr = strongest->snr;
    p.runs.assign(runs.begin(), runs.end());
    p.sensors.assign(sensors.begin(), sensors.end());
    p.sessions.assign(sessions.begin(), sessions.end());
    if (best_fit) {
        const DipoleFit& f = *best_fit->fit;
        p.burial_m = f.burial_m;
        p.depth_below_sensor_m = best_fit->altitude_m + f.burial_m;
        p.moment_Am2 = f.moment_Am2;
        p.angle_to_field_deg = f.angle_to_field_deg;
        p.moment_model = f.model == MomentModel::Free ? "dipole, free direction" : "dipole, induced";
        p.fit_r2 = f.r2;
        // Mass rule A = C W / r^3 (common practice), solved for W at the fitted distance.
        const double r = *p.depth_below_sensor_m;
        p.mass_rule_kg = std::abs(strongest->peak_nT) * r * r * r / mass_rule_C;
    }
    p.quality = qualityLabel(p.fit_r2, p.snr, best_fit != nullptr);
}

std::vector<AnomalyPick> joinSessionPicks(const std::vector<std::vector<AnomalyPick>>& sessions,
                                          const PickSettings& set, double mass_rule_C) {
    std::vector<AnomalyPick> out;
    for (const auto& list : sessions) {
        const std::size_t before = out.size();  // picks of earlier sessions only
        for (const AnomalyPick& q : list) {
            if (q.observations.empty()) continue;
            const double depth = q.depth_below_sensor_m.value_or(q.altitude_m);
            AnomalyPick* target = nullptr;
            double best = 0.0;
            for (std::size_t i = 0; i < before; ++i) {
                AnomalyPick& p = out[i];
                const double d = std::hypot(p.easting_m - q.easting_m, p.northing_m - q.northing_m);
                const double gate = set.merge_distance_m + 0.5 * std::max(depth, p.depth_below_sensor_m.value_or(p.altitude_m));
                if (d <= gate && (target == nullptr || d < best)) {
                    target = &p;
                    best = d;
                }
            }
            if (target == nullptr) {
                out.push_back(q);
                out.back().id = static_cast<int>(out.size());
                aggregatePick(out.back(), mass_rule_C);
                continue;
            }
            for (const auto& o : q.observations) target->observations.push_back(o);
            aggregatePick(*target, mass_rule_C);
        }
    }
    return out;
}

}  // namespace sg::detect
