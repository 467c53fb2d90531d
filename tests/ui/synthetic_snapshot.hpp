// TEST DATA ONLY: an invented survey snapshot for the screen's tests and benchmark, built without
// the engine. Six east-west lines 100 m apart over a 1000 m x 600 m area, every line painted into
// 1 m coverage cells with a +/-55 m swath, except line L04 between 400 m and 600 m east (a GNSS
// dropout), which leaves one gap (E 400..600, N 305..395, relative to the origin) with one infill
// proposal along its middle. One altitude alarm is active and (unless asked) unacknowledged.
#pragma once

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <numbers>
#include <cstdint>
#include <memory>
#include <string>
#include <vector>

#include "engine/snapshot.hpp"

namespace sg::testdata {

struct SyntheticOptions {
    double hours = 1.0;          // length of the recorded track and time series
    int sensors = 4;             // 1..6
    double field_rate_hz = 10.0; // total field, gradient and noise series
    double nav_rate_hz = 1.0;    // altitude, deviation, speed series and tracks
    bool acknowledge_alarm = false;
    bool replay = false;
};

constexpr double kOriginE = 500000.0;   // invented UTM-like origin, metres
constexpr double kOriginN = 5700000.0;
constexpr double kAreaW = 1000.0, kAreaH = 600.0;
constexpr int kTileCells = 128;
constexpr double kCell = 1.0;
constexpr double kHalfSwath = 55.0;
constexpr double kGapE0 = 400.0, kGapE1 = 600.0, kGapN0 = 305.0, kGapN1 = 395.0;  // relative
constexpr double kStartS = 1767225600.0;  // 2026-01-01T00:00:00Z

inline double lineNorth(int k) { return 50.0 + 100.0 * k; }

// Quantised margin at cross-track distance d (metres, |d| <= kHalfSwath): 255 on the line, 55 at the edge.
inline std::uint8_t marginAt(double d) {
    return static_cast<std::uint8_t>(std::lround(255.0 - std::fabs(d) / kHalfSwath * 200.0));
}

// Expected quantised margin of the cell containing (e, n) relative to the origin; 0 = uncovered.
inline std::uint8_t expectedMargin(double e, double n) {
    if (e < 0 || n < 0 || e >= kAreaW || n >= kAreaH) return 0;
    std::uint8_t best = 0;
    for (int k = 0; k < 6; ++k) {
        if (k == 3 && e >= kGapE0 && e < kGapE1) continue;
        const double d = n - lineNorth(k);
        if (std::fabs(d) <= kHalfSwath) best = std::max(best, marginAt(d));
    }
    return best;
}

class Lcg {  // small deterministic noise source
public:
    explicit Lcg(std::uint64_t seed) : m_s(seed) {}
    double uniform() {
        m_s = m_s * 6364136223846793005ull + 1442695040888963407ull;
        return static_cast<double>(m_s >> 11) * (1.0 / 9007199254740992.0);
    }
    double noise(double sd) { return (uniform() + uniform() + uniform() - 1.5) * 2.0 * sd; }

private:
    std::uint64_t m_s;
};

inline std::shared_ptr<engine::Series> makeSeries(const std::string& name, double t0, double t1, double rate,
                                                  double break_after_s, std::uint64_t seed, double base,
                                                  double amp, double sd) {
    auto s = std::make_shared<engine::Series>();
    s->name = name;
    s->break_after_s = break_after_s;
    Lcg r(seed);
    const auto n = static_cast<std::size_t>((t1 - t0) * rate);
    std::vector<engine::SeriesPoint> chunk;
    constexpr std::size_t kChunk = 8192;
    chunk.reserve(kChunk);
    for (std::size_t i = 0; i < n; ++i) {
        const double t = t0 + static_cast<double>(i) / rate;
        chunk.push_back({t, static_cast<float>(base + amp * std::sin(t / 97.0 + static_cast<double>(seed)) + r.noise(sd))});
        if (chunk.size() == kChunk) {
            s->points.chunks.push_back(std::make_shared<const std::vector<engine::SeriesPoint>>(std::move(chunk)));
            chunk = {};
            chunk.reserve(kChunk);
        }
    }
    if (!chunk.empty()) s->points.chunks.push_back(std::make_shared<const std::vector<engine::SeriesPoint>>(std::move(chunk)));
    return s;
}

inline std::shared_ptr<engine::Snapshot> makeSyntheticSnapshot(const SyntheticOptions& o = {}) {
    using engine::PointEN;
    auto snap = std::make_shared<engine::Snapshot>();
    auto& s = *snap;
    const double duration = o.hours * 3600.0;
    s.seq = 1;
    s.now_s = kStartS + duration;
    auto P = [](double e, double n) { return PointEN{kOriginE + e, kOriginN + n}; };

    s.area.push_back({P(0, 0), P(kAreaW, 0), P(kAreaW, kAreaH), P(0, kAreaH)});
    for (int k = 0; k < 6; ++k) {
        char name[8];
        std::snprintf(name, sizeof name, "L%02d", k + 1);
        s.lines.push_back({name, {P(-50, lineNorth(k)), P(kAreaW + 50, lineNorth(k))}});
    }
    s.active_line = 5;

    // Coverage tiles.
    const int ntx = static_cast<int>(std::ceil(kAreaW / (kTileCells * kCell)));
    const int nty = static_cast<int>(std::ceil(kAreaH / (kTileCells * kCell)));
    for (int ty = 0; ty < nty; ++ty)
        for (int tx = 0; tx < ntx; ++tx) {
            engine::CoverageTileView t;
            t.tx = tx;
            t.ty = ty;
            t.size_cells = kTileCells;
            t.cell_m = kCell;
            t.origin_e = kOriginE + tx * kTileCells * kCell;
            t.origin_n = kOriginN + ty * kTileCells * kCell;
            t.generation = static_cast<std::uint64_t>(1 + tx + ty * ntx);
            auto q = std::make_shared<std::vector<std::uint8_t>>(static_cast<std::size_t>(kTileCells * kTileCells));
            for (int row = 0; row < kTileCells; ++row)
                for (int col = 0; col < kTileCells; ++col)
                    (*q)[static_cast<std::size_t>(row * kTileCells + col)] =
                        expectedMargin((tx * kTileCells + col + 0.5) * kCell, (ty * kTileCells + row + 0.5) * kCell);
            t.margin_q = std::move(q);
            s.tiles.push_back(std::move(t));
        }
    s.margin = {0.0, 20.0, "dB"};

    engine::GapView gap;
    gap.id = 1;
    gap.rings.push_back({P(kGapE0, kGapN0), P(kGapE1, kGapN0), P(kGapE1, kGapN1), P(kGapE0, kGapN1)});
    gap.area_m2 = (kGapE1 - kGapE0) * (kGapN1 - kGapN0);
    gap.centroid = P((kGapE0 + kGapE1) / 2, (kGapN0 + kGapN1) / 2);
    s.gaps.push_back(gap);
    s.infill.push_back({1, "IF-01", {P(kGapE0 - 50, 350), P(kGapE1 + 50, 350)}, kGapE1 - kGapE0 + 100, {1}});

    // Tracks: boustrophedon over the six lines at 2 m/s, repeated for the whole duration.
    const int nsens = std::max(1, std::min(o.sensors, 6));
    s.sensors.resize(static_cast<std::size_t>(nsens));
    const double speed = 2.0, pass_len = kAreaW + 100.0;
    auto towAt = [&](double t, double& heading) {
        const double along_total = t * speed;
        const double cycle = 6 * pass_len;
        const double a = std::fmod(along_total, cycle);
        const int k = static_cast<int>(a / pass_len);
        const double x = std::fmod(a, pass_len);
        const bool east = k % 2 == 0;
        heading = east ? std::numbers::pi / 2 : 3 * std::numbers::pi / 2;
        return P(east ? -50 + x : kAreaW + 50 - x, lineNorth(k));
    };
    const auto nav_n = static_cast<std::size_t>(duration * o.nav_rate_hz);
    double heading = 0;
    for (std::size_t i = 0; i < nav_n; ++i) {
        const double t = static_cast<double>(i) / o.nav_rate_hz;
        const PointEN tow = towAt(t, heading);
        s.tow_track.append(tow, 8192);
        for (int j = 0; j < nsens; ++j) {
            const double cross = (j - (nsens - 1) / 2.0) * 6.0;  // metres to starboard
            const double dir = std::sin(heading) > 0 ? 1.0 : -1.0;
            s.sensors[static_cast<std::size_t>(j)].track.append({tow.e_m - dir * 30.0, tow.n_m - dir * cross}, 8192);
        }
    }
    const PointEN tow_now = towAt(duration, heading);
    s.heading_rad = heading;
    s.speed_mps = speed;
    s.tow_point = tow_now;
    const double dir = std::sin(heading) > 0 ? 1.0 : -1.0;
    s.vessel = {tow_now.e_m + dir * 25.0, tow_now.n_m};
    for (int j = 0; j < nsens; ++j) {
        auto& sv = s.sensors[static_cast<std::size_t>(j)];
        sv.name = "mag" + std::to_string(j + 1);
        const double cross = (j - (nsens - 1) / 2.0) * 6.0;
        sv.position = {tow_now.e_m - dir * 30.0, tow_now.n_m - dir * cross};
        sv.altitude_m = 3.5;
        sv.swath_left = {sv.position.e_m, sv.position.n_m + dir * 20.0};
        sv.swath_right = {sv.position.e_m, sv.position.n_m - dir * 20.0};
    }

    // Time series.
    const double t0 = kStartS, t1 = s.now_s;
    auto group = [&](std::string title, std::string unit) -> engine::PlotGroup& {
        s.plots.push_back({std::move(title), std::move(unit), {}, {}});
        return s.plots.back();
    };
    std::uint64_t seed = 11;
    auto& alt = group("Altitude", "m");
    for (int j = 0; j < nsens; ++j)
        alt.series.push_back(makeSeries("mag" + std::to_string(j + 1), t0, t1, o.nav_rate_hz, 5, seed++, 3.6, 0.8, 0.15));
    alt.limits = {{5.5, checks::Level::kWarn, "warn"}, {6.0, checks::Level::kAlarm, "max altitude"}};
    auto& dev = group("Deviation", "m");
    dev.series.push_back(makeSeries("tow point", t0, t1, o.nav_rate_hz, 5, seed++, 0.0, 2.0, 0.4));
    dev.limits = {{5.0, checks::Level::kAlarm, "tolerance"}, {-5.0, checks::Level::kAlarm, "tolerance"}};
    auto& fld = group("Total field", "nT");
    for (int j = 0; j < nsens; ++j)
        fld.series.push_back(makeSeries("mag" + std::to_string(j + 1), t0, t1, o.field_rate_hz, 2, seed++, 49210.0 + j * 3, 6.0, 0.05));
    auto& grd = group("Gradient", "nT/m");
    for (int j = 0; j + 1 < nsens; j += 2)
        grd.series.push_back(makeSeries("mag" + std::to_string(j + 1) + "-mag" + std::to_string(j + 2), t0, t1,
                                        o.field_rate_hz, 2, seed++, 0.0, 0.2, 0.02));
    auto& noi = group("Noise", "nT");
    for (int j = 0; j < nsens; ++j)
        noi.series.push_back(makeSeries("mag" + std::to_string(j + 1), t0, t1, o.field_rate_hz, 2, seed++, 0.05, 0.01, 0.005));
    noi.limits = {{0.2, checks::Level::kAlarm, "noise limit"}};
    auto& spd = group("Speed", "m/s");
    spd.series.push_back(makeSeries("SOG", t0, t1, o.nav_rate_hz, 5, seed++, 2.0, 0.2, 0.05));
    spd.limits = {{1.0, checks::Level::kWarn, "min"}, {3.0, checks::Level::kWarn, "max"}};

    // Profiles of the current run: a dipole-like bump near 600 m, strongest on mag2.
    s.profiles.run_index = 5;
    s.profiles.run_name = "L06 run 1";
    for (int j = 0; j < nsens; ++j) {
        engine::ProfileTrace tr;
        tr.sensor = "mag" + std::to_string(j + 1);
        Lcg r(static_cast<std::uint64_t>(100 + j));
        for (int i = 0; i < 5500; ++i) {
            const double x = i * 0.2;
            const double d = (x - 600.0) / (6.0 + 3.0 * std::abs(j - 1));
            tr.along_m.push_back(static_cast<float>(x));
            tr.residual_nT.push_back(static_cast<float>(8.0 / (1 + std::abs(j - 1)) * (1 - 2 * d * d) * std::exp(-d * d) + r.noise(0.05)));
        }
        s.profiles.traces.push_back(std::move(tr));
    }

    // Runs.
    for (int k = 0; k < 6; ++k) {
        engine::RunView r;
        r.name = s.lines[static_cast<std::size_t>(k)].name + " run 1";
        r.line_index = k;
        r.start_s = kStartS + k * 600.0;
        r.end_s = k == 5 ? r.start_s : r.start_s + 550.0;
        r.percent_covered = k == 3 ? 81.8 : (k == 5 ? 42.0 : 100.0);
        r.mean_altitude_m = 3.6;
        r.worst_altitude_m = k == 5 ? 7.4 : 4.9;
        r.worst_deviation_m = 2.8;
        r.alarm_count = k == 5 ? 1 : 0;
        r.active = k == 5;
        s.runs.push_back(r);
    }

    // Alarms: the active altitude alarm first, then a past acknowledged warning.
    engine::AlarmView active;
    active.episode.check = "altitude mag3";
    active.episode.start_ns = static_cast<TimeNs>((s.now_s - 90.0) * 1e9);
    active.episode.peak_level = checks::Level::kAlarm;
    active.episode.peak_value = 7.4;
    active.episode.id = 2;
    if (o.acknowledge_alarm) active.episode.ack_ns = static_cast<TimeNs>((s.now_s - 10.0) * 1e9);
    active.unit = "m";
    active.text = "mag3 altitude 7.4 m above 6.0 m";
    s.alarms.push_back(active);
    engine::AlarmView past;
    past.episode.check = "deviation";
    past.episode.start_ns = static_cast<TimeNs>((s.now_s - 1500.0) * 1e9);
    past.episode.end_ns = static_cast<TimeNs>((s.now_s - 1440.0) * 1e9);
    past.episode.ack_ns = static_cast<TimeNs>((s.now_s - 1430.0) * 1e9);
    past.episode.peak_level = checks::Level::kWarn;
    past.episode.peak_value = 4.6;
    past.episode.id = 1;
    past.unit = "m";
    past.text = "tow point 4.6 m off line L05";
    s.alarms.push_back(past);

    s.replay.is_replay = o.replay;
    s.replay.t_start_s = kStartS;
    s.replay.t_end_s = s.now_s + 600.0;
    s.replay.t_s = s.now_s;
    s.replay.speed = 5.0;
    s.crs_name = "EPSG:32631 (test data)";
    s.status = {"gnss RTK", "mag 10 Hz"};
    return snap;
}

}  // namespace sg::testdata
