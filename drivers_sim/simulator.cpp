// The simulated survey; see simulator.hpp. Magnetometer values are
//   main field + diurnal + sum of the targets' dipole anomalies + heading error + noise,
// with the anomalies computed by the simulator's own dipole code (planted_field.hpp, Blakely 1995),
// independent of the detector's.
#include "drivers_sim/simulator.hpp"

#include <algorithm>
#include <cmath>
#include <stdexcept>

#include "drivers_sim/planted_field.hpp"
#include "drivers_sim/sentences.hpp"

namespace sg::sim {

namespace {

constexpr double kDeg = M_PI / 180.0;
constexpr double kKnotPerMps = 1.0 / 0.514444;

nav::SurveyCrs makeCrs(const SiteSpec& site) {
    if (site.epsg != 0) return nav::SurveyCrs(site.epsg);
    return nav::SurveyCrs::utmForLonLat(site.origin_lon_deg, site.origin_lat_deg);
}

TimeNs periodNs(double rate_hz) { return static_cast<TimeNs>(std::llround(1e9 / rate_hz)); }

double wrap360(double deg) {
    double d = std::fmod(deg, 360.0);
    if (d < 0.0) d += 360.0;
    return d;
}

}  // namespace

const char* channelName(Channel c) {
    switch (c) {
    case Channel::Gnss: return "gnss";
    case Channel::Gyro: return "gyro";
    case Channel::Sounder: return "sounder";
    case Channel::Mag: return "mag";
    case Channel::Altimeter: return "altimeter";
    case Channel::Cable: return "cable";
    }
    return "?";
}

std::optional<Channel> channelFromName(const std::string& name) {
    for (int i = 0; i < kChannelCount; ++i) {
        if (name == channelName(static_cast<Channel>(i))) return static_cast<Channel>(i);
    }
    return std::nullopt;
}

Simulator::Simulator(Scenario scenario, SimOptions options)
    : m_sc(std::move(scenario)), m_opt(options), m_flight(flightPlan(m_sc)), m_crs(makeCrs(m_sc.site)),
      m_seabed(m_sc.seabed), m_rng_gnss(options.seed, 1), m_rng_gyro(options.seed, 2),
      m_rng_sounder(options.seed, 3), m_rng_mag(options.seed, 4), m_rng_alt(options.seed, 5),
      m_rng_faults(options.seed, 6), m_rng_random(options.seed, 7) {
    const nav::EastNorth o = m_crs.forward(m_sc.site.origin_lon_deg, m_sc.site.origin_lat_deg);
    if (!std::isfinite(o.easting_m) || !std::isfinite(o.northing_m))
        throw std::invalid_argument(m_sc.file + ": the site origin cannot be projected to EPSG:" +
                                    std::to_string(m_crs.epsg()));
    m_origin = {o.easting_m, o.northing_m};
    m_convergence_deg = m_crs.convergence_deg(m_sc.site.origin_lon_deg, m_sc.site.origin_lat_deg);
    m_route = std::make_unique<Route>(m_flight);
    m_model = std::make_unique<VesselModel>(m_sc, *m_route, m_seabed, m_convergence_deg,
                                            options.seed);
    m_start_ns = options.start_utc_ns.value_or(m_sc.site.start_utc_ns);
    m_end_s = options.duration_s ? options.duration_s : m_sc.duration_s;
    m_faults = m_sc.faults;
    m_fault_state.assign(m_faults.size(), 0);
    auto sched = [&](double hz) { return Schedule{periodNs(hz), m_start_ns + periodNs(hz)}; };
    m_gga = sched(m_sc.gnss.rate_hz);
    m_gst = sched(m_sc.gnss.gst_rate_hz);
    m_zda = sched(m_sc.gnss.zda_rate_hz);
    m_hdt = sched(m_sc.gyro.rate_hz);
    m_dpt = sched(m_sc.sounder.rate_hz);
    m_mag = sched(m_sc.mag.rate_hz);
    m_sga = sched(m_sc.altimeter.rate_hz);
    m_sgc = sched(m_sc.cable.rate_hz);
}

Simulator::~Simulator() = default;

bool Simulator::done() const {
    if (m_end_s) return elapsed_s() >= *m_end_s;
    return m_model->finished();
}

bool Simulator::active(FaultKind k, double t_s, const FaultSpec** which) const {
    for (const FaultSpec& f : m_faults) {
        if (f.kind == k && t_s >= f.start_s && t_s < f.start_s + f.duration_s) {
            if (which != nullptr) *which = &f;
            return true;
        }
    }
    return false;
}

bool Simulator::activeOn(FaultKind k, Channel c, double t_s, const FaultSpec** which) const {
    for (const FaultSpec& f : m_faults) {
        if (f.kind == k && f.channel == channelName(c) && t_s >= f.start_s &&
            t_s < f.start_s + f.duration_s) {
            if (which != nullptr) *which = &f;
            return true;
        }
    }
    return false;
}

double Simulator::targetsAnomaly_nT(Vec2 p_m, double depth_m) const {
    // The simulator's own dipole code (planted_field.hpp), not the detector's: the tests compare
    // the core against a world it did not compute.
    const auto& g = m_sc.geomag;
    const DirectionCosines field = directionFromAngles(g.inclination_deg, g.declination_deg);
    // The dipole frame is true north-east-down; the grid is rotated from it by the convergence.
    const double c = std::cos(m_convergence_deg * kDeg);
    const double s = std::sin(m_convergence_deg * kDeg);
    double sum = 0.0;
    for (const TargetSpec& t : m_sc.targets) {
        const Vec2 d = p_m - t.position_m;
        const double target_depth = m_seabed.depth_m(t.position_m) + t.burial_m;
        const DirectionCosines moment =
            t.moment_inclination_deg
                ? directionFromAngles(*t.moment_inclination_deg, *t.moment_declination_deg)
                : field;
        sum += plantedDipoleAnomaly_nT(-d.e * s + d.n * c, d.e * c + d.n * s, depth_m - target_depth,
                                       t.moment_Am2, moment, field);
    }
    return sum;
}

void Simulator::emit(Channel c, TimeNs t, std::string text) {
    const FaultSpec* f = nullptr;
    if (activeOn(FaultKind::BadChecksum, c, elapsed_s(), &f) &&
        m_rng_faults.uniform01() < f->probability) {
        text = spoilChecksum(text, 1u + static_cast<unsigned>(m_rng_faults.below(255)));
    }
    m_out.lines.push_back({c, t, std::move(text), false});
}

void Simulator::drawRandomFaults(double t_s) {
    const RandomFaultSpec& r = m_sc.random_faults;
    if (r.per_hour <= 0.0 || r.kinds.empty()) return;
    const double p = r.per_hour / 3600.0 * static_cast<double>(kTickNs) * 1e-9;
    if (m_rng_random.uniform01() >= p) return;
    FaultSpec f;
    f.kind = r.kinds[m_rng_random.below(r.kinds.size())];
    f.start_s = t_s;
    f.duration_s = std::clamp(-r.mean_duration_s * std::log(1.0 - m_rng_random.uniform01()), 1.0,
                              5.0 * r.mean_duration_s);
    f.channel = channelName(static_cast<Channel>(m_rng_random.below(kChannelCount)));
    f.probability = 0.5;
    f.sigma_m = 2.5;
    f.noise_nT = 2.0;
    m_faults.push_back(f);
    m_fault_state.push_back(0);
}

void Simulator::emitGnss(TimeNs t, double t_s, bool gga, bool gst, bool zda) {
    const GnssSpec& g = m_sc.gnss;
    const FaultSpec* loss = nullptr;
    const bool lost = active(FaultKind::GnssLoss, t_s, &loss);
    const FaultSpec* deg = nullptr;
    const bool degraded = !lost && active(FaultKind::DegradedFix, t_s, &deg);
    if (lost && !loss->no_fix) return;  // the receiver is silent

    const VesselState& v = m_model->vessel();
    const double sigma = degraded ? deg->sigma_m : g.position_std_m;
    if (degraded != m_was_degraded) {
        // The solution changes type at once: a new error of the new size, not a slow drift.
        m_gnss_err_m = {sigma * m_rng_gnss.normal(), sigma * m_rng_gnss.normal()};
        m_was_degraded = degraded;
    }
    if (gga) {
        // Position error: first-order Gauss-Markov, 20 s correlation (a wandering fix).
        const double a = std::exp(-1.0 / (g.rate_hz * 20.0));
        const double k = sigma * std::sqrt(1.0 - a * a);
        m_gnss_err_m = {a * m_gnss_err_m.e + k * m_rng_gnss.normal(),
                        a * m_gnss_err_m.n + k * m_rng_gnss.normal()};
    }
    const int quality = lost ? 0 : (degraded ? 1 : g.fix_quality);
    const char mode = quality == 4 ? 'R' : quality == 5 ? 'F' : quality == 2 ? 'D' : 'A';
    const Vec2 p = m_origin + v.antenna_m + m_gnss_err_m;
    const nav::LonLat ll = m_crs.inverse(p.e, p.n);
    const double sog_kn = length(v.velocity_mps) * kKnotPerMps;
    const double cog = wrap360(bearingOf(v.velocity_mps) / kDeg + m_convergence_deg);
    const double variation = m_sc.geomag.declination_deg;
    if (gga) {
        GgaFields f;
        f.utc_ns = t;
        f.lat_deg = ll.lat_deg;
        f.lon_deg = ll.lon_deg;
        f.quality = quality;
        f.satellites = lost ? 0 : degraded ? 6 + static_cast<int>(m_rng_gnss.below(3))
                                           : g.satellites - static_cast<int>(m_rng_gnss.below(2));
        f.hdop = degraded ? 2.4 : g.hdop;
        f.altitude_m = m_sc.vessel.antenna_height_m + v.heave_m +
                       m_rng_gnss.normal(0.0, 2.0 * sigma);
        f.geoid_separation_m = g.geoid_separation_m;
        if (quality == 2 || quality == 4 || quality == 5) {
            f.diff_age_s = 1.0;
            f.station = 101;
        }
        emit(Channel::Gnss, t, ggaSentence(g.talker, f));
        RmcFields r;
        r.utc_ns = t;
        r.valid = !lost;
        r.lat_deg = ll.lat_deg;
        r.lon_deg = ll.lon_deg;
        r.sog_kn = sog_kn;
        r.cog_true_deg = cog;
        r.variation_deg = variation;
        r.mode = mode;
        emit(Channel::Gnss, t, rmcSentence(g.talker, r));
        emit(Channel::Gnss, t, vtgSentence(g.talker, !lost, cog, variation, sog_kn, mode));
    }
    if (gst && !lost) {
        const double lat_e = sigma * (0.9 + 0.2 * m_rng_gnss.uniform01());
        const double lon_e = sigma * (0.9 + 0.2 * m_rng_gnss.uniform01());
        emit(Channel::Gnss, t,
             gstSentence(g.talker, t, degraded ? 4.0 * sigma : 0.4 + 5.0 * sigma,
                         std::max(lat_e, lon_e) * 1.1, std::min(lat_e, lon_e) * 0.9,
                         std::floor(m_rng_gnss.uniform(0.0, 180.0)), lat_e, lon_e, 2.0 * lat_e));
    }
    if (zda) emit(Channel::Gnss, t, zdaSentence(g.talker, t));
}

void Simulator::emitMag(TimeNs t, double t_s) {
    const MagSpec& m = m_sc.mag;
    const GeomagSpec& g = m_sc.geomag;
    const FishState& fish = m_model->fish();
    const double hour = static_cast<double>(t % (86400 * kNsPerSecond)) * 1e-9 / 3600.0;
    const double diurnal = g.diurnal_amplitude_nT * std::cos(2.0 * M_PI * (hour - g.diurnal_peak_utc_h) / 24.0);
    const double fish_heading_true = fish.heading_rad / kDeg + m_convergence_deg;
    const double heading_term =
        g.heading_error_nT * std::cos((fish_heading_true - g.heading_error_phase_deg) * kDeg);
    const Vec2 fwd = bearingUnit(fish.heading_rad);
    const Vec2 stbd{fwd.n, -fwd.e};
    // One fish altimeter for the whole array.
    const double alt_reading = fish.altitude_m + m_rng_mag.normal(0.0, m.altitude_std_m);
    for (std::size_t i = 0; i < m.sensors.size(); ++i) {
        const int sensor = static_cast<int>(i);
        const Vec2 p = fish.position_m + m.sensors[i].cross_m * stbd + m.sensors[i].along_m * fwd;
        MagTruth tr;
        tr.utc_ns = t;
        tr.sensor = sensor;
        tr.easting_m = m_origin.e + p.e;
        tr.northing_m = m_origin.n + p.n;
        tr.depth_m = fish.depth_m;
        tr.altitude_m = m_seabed.depth_m(p) - fish.depth_m;
        tr.ambient_nT = g.intensity_nT + diurnal;
        tr.heading_nT = heading_term;
        tr.anomaly_nT = targetsAnomaly_nT(p, fish.depth_m);
        const FaultSpec* burst = nullptr;
        for (const FaultSpec& f : m_faults) {
            if (f.kind == FaultKind::NoiseBurst && (f.sensor < 0 || f.sensor == sensor) &&
                t_s >= f.start_s && t_s < f.start_s + f.duration_s)
                burst = &f;
        }
        const bool noisy = burst != nullptr;
        // Draw every number whether or not the line is sent, so a fault never shifts the noise
        // of later samples.
        const double white = m_rng_mag.normal(0.0, m.noise_nT);
        const double extra = m_rng_mag.normal();
        const double depth_reading = fish.depth_m + m_rng_mag.normal(0.0, m.depth_std_m);
        const int jitter = static_cast<int>(m_rng_mag.below(4));
        tr.noise_nT = white + (noisy ? burst->noise_nT * extra : 0.0);
        tr.field_nT = tr.ambient_nT + tr.heading_nT + tr.anomaly_nT + tr.noise_nT;
        const int quality = noisy ? std::max(0, 30 + 5 * jitter) : std::max(0, m.quality - jitter);
        bool dropped = false;
        for (const FaultSpec& f : m_faults) {
            if (f.kind == FaultKind::MagDropout && (f.sensor < 0 || f.sensor == sensor) &&
                t_s >= f.start_s && t_s < f.start_s + f.duration_s)
                dropped = true;
        }
        tr.sent = !dropped;
        if (!dropped) {
            emit(Channel::Mag, t,
                 sgmString(sensor, t, tr.field_nT, quality, depth_reading,
                           m.send_altitude ? std::max(0.0, alt_reading) : -1.0));
        }
        m_out.mag.push_back(tr);
    }
}

const StepOutput& Simulator::step() {
    m_out.lines.clear();
    m_out.events.clear();
    m_out.mag.clear();
    ++m_tick;
    const TimeNs t = now_utc_ns();
    const double t_s = elapsed_s();
    const double dt_s = static_cast<double>(kTickNs) * 1e-9;
    m_out.utc_ns = t;

    drawRandomFaults(t_s);
    for (std::size_t i = 0; i < m_faults.size(); ++i) {
        const FaultSpec& f = m_faults[i];
        const int state = t_s < f.start_s ? 0 : (t_s < f.start_s + f.duration_s ? 1 : 2);
        if (f.kind == FaultKind::PortClose) {
            if (const auto c = channelFromName(f.channel)) {
                if (m_fault_state[i] == 0 && state >= 1) m_out.events.push_back({*c, t, false});
                if (m_fault_state[i] <= 1 && state == 2) m_out.events.push_back({*c, t, true});
            }
        }
        m_fault_state[i] = state;
    }

    const FaultSpec* f = nullptr;
    const double altitude_offset = active(FaultKind::AltitudeExcursion, t_s, &f) ? f->delta_m : 0.0;
    double cable_real = 0.0;
    double cable_reading = 0.0;
    if (active(FaultKind::CableJump, t_s, &f)) (f->real ? cable_real : cable_reading) = f->delta_m;
    m_model->step(t_s, dt_s, altitude_offset, cable_real);

    const VesselState& v = m_model->vessel();
    const FishState& fish = m_model->fish();
    NavTruth& n = m_out.nav;
    n.utc_ns = t;
    n.antenna_m = v.antenna_m;
    n.tow_point_m = v.tow_point_m;
    n.fish_m = fish.position_m;
    n.heading_true_deg = wrap360((v.heading_rad + v.yaw_rad) / kDeg + m_convergence_deg);
    n.fish_depth_m = fish.depth_m;
    n.fish_altitude_m = fish.altitude_m;
    n.cable_out_m = fish.cable_out_m;
    n.layback_m = fish.layback_m;
    n.cross_track_m = v.cross_track_m;
    n.line = m_route->lineAt(v.route_s_m);

    const bool gga = m_gga.due(t);
    const bool gst = m_gst.due(t);
    const bool zda = m_zda.due(t);
    if (gga || gst || zda) emitGnss(t, t_s, gga, gst, zda);
    if (m_hdt.due(t)) {
        emit(Channel::Gyro, t,
             hdtSentence(m_sc.gyro.talker,
                         n.heading_true_deg + m_rng_gyro.normal(0.0, m_sc.gyro.std_deg)));
    }
    if (m_dpt.due(t)) {
        const Vec2 p = v.antenna_m + [&] {
            const Vec2 fw = bearingUnit(v.heading_rad);
            const Vec2 sb{fw.n, -fw.e};
            return m_sc.vessel.sounder_m[0] * fw + m_sc.vessel.sounder_m[1] * sb;
        }();
        const double depth = m_seabed.depth_m(p) - m_sc.vessel.sounder_draft_m + v.heave_m +
                             m_rng_sounder.normal(0.0, m_sc.sounder.std_m);
        emit(Channel::Sounder, t,
             dptSentence(m_sc.sounder.talker, depth, m_sc.vessel.sounder_draft_m,
                         m_sc.sounder.range_m));
    }
    if (m_mag.due(t)) emitMag(t, t_s);
    if (m_sga.due(t)) {
        emit(Channel::Altimeter, t,
             sgaString(t, std::max(0.0, fish.altitude_m + m_rng_alt.normal(0.0, m_sc.altimeter.std_m))));
    }
    if (m_sgc.due(t)) {
        emit(Channel::Cable, t,
             sgcString(t, fish.cable_out_m + cable_reading +
                              m_rng_alt.normal(0.0, m_sc.cable.std_m)));
    }
    // Garbage bursts: random bytes (any value but CR and LF) on a channel, as a line of their own.
    for (int c = 0; c < kChannelCount; ++c) {
        const FaultSpec* g = nullptr;
        if (!activeOn(FaultKind::Garbage, static_cast<Channel>(c), t_s, &g)) continue;
        if (m_rng_faults.uniform01() >= g->per_s * dt_s) continue;
        std::string bytes;
        for (int i = 0; i < g->bytes; ++i) {
            char ch = '\n';
            while (ch == '\n' || ch == '\r') ch = static_cast<char>(m_rng_faults.below(256));
            bytes.push_back(ch);
        }
        m_out.lines.push_back({static_cast<Channel>(c), t, std::move(bytes), true});
    }
    return m_out;
}

}  // namespace sg::sim
