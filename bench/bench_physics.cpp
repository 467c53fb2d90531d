// Per-sample navigation and detection cost: for every magnetometer epoch of a 4-sensor array,
// interpolate the tow-point path, apply layback along it and the sensor offsets, look up the
// altitude, update each sensor's fourth-difference noise and compute the port/starboard
// half-widths and the centre margin of 3 target classes. Target: >= 1 million epochs/s on one
// core. Side by side: positioning alone, one table half-width vs one direct computation.
#include <benchmark/benchmark.h>

#include <cmath>
#include <random>
#include <vector>

#include "detect/fourth_difference_noise.hpp"
#include "detect/target_model.hpp"
#include "nav/positioner.hpp"

namespace {

using namespace sg;

constexpr std::int64_t kS = 1'000'000'000;
constexpr double kPi = 3.14159265358979323846;

struct Rig {
    nav::Positioner positioner;
    std::vector<detect::TargetModel> models;
    std::vector<detect::FourthDifferenceNoise> noise;
    std::vector<double> field;
    std::int64_t t_begin = 0;
    std::int64_t t_end = 0;

    static nav::NavConfig navConfig() {
        nav::NavConfig c;
        c.vessel.antenna_m = {10.0, 0.0, 8.0};
        c.vessel.tow_point_m = {-15.0, 1.0, 2.0};
        c.sensors = {{0, -3.0, 0.0}, {1, -1.0, 0.0}, {2, 1.0, 0.0}, {3, 3.0, 0.0}};
        return c;
    }
    static detect::DetectionConfig detConfig() {
        detect::DetectionConfig d;
        d.field = {66.0, 1.0, 50000.0};
        detect::TargetClass a;
        a.name = "mass";
        a.mass_kg = 250.0;
        a.burial_m = 1.0;
        detect::TargetClass b;
        b.name = "induced";
        b.model = detect::ModelKind::Dipole;
        b.moment_Am2 = 3.0;
        b.orientation = detect::Orientation::Induced;
        detect::TargetClass c = b;
        c.name = "worst";
        c.orientation = detect::Orientation::Worst;
        d.targets = {a, b, c};
        return d;
    }

    Rig() : positioner(navConfig(), nullptr), models(detect::makeModels(detConfig())) {
        // 20 minutes of a gently turning track at 2.5 m/s: fixes and heading at 10 Hz,
        // cable and depth at 1 Hz, altimeter at 5 Hz.
        double e = 500000.0;
        double n = 6000000.0;
        for (int i = 0; i <= 12000; ++i) {
            const std::int64_t t = i * kS / 10;
            const double heading = 0.3 * std::sin(i / 3000.0);
            e += 0.25 * std::sin(heading);
            n += 0.25 * std::cos(heading);
            positioner.addHeading(t, heading * 180.0 / kPi);
            positioner.addFixProjected(t, e, n, 4, 0.0);
            if (i % 10 == 0) {
                positioner.addCableOut(t, 60.0);
                positioner.addSensorDepth(t, 20.0);
                positioner.addWaterDepth(t, 25.0);
            }
            if (i % 2 == 0) positioner.addAltitude(t, 4.0 + 0.5 * std::sin(i / 50.0));
        }
        t_begin = 600 * kS;
        t_end = 1190 * kS;
        for (int s = 0; s < 4; ++s) noise.emplace_back(200);
        std::mt19937 rng(9);
        std::normal_distribution<double> nd(0.0, 0.05);
        for (int i = 0; i < 4096; ++i) field.push_back(50000.0 + nd(rng));
    }
};

Rig& rig() {
    static Rig r;
    return r;
}

void BM_FullEpoch4Sensors3Classes(benchmark::State& state) {
    Rig& r = rig();
    std::vector<nav::SensorPose> poses;
    std::int64_t t = r.t_begin;
    std::size_t k = 0;
    double sink = 0.0;
    for (auto _ : state) {
        r.positioner.posesAt(t, poses);
        for (std::size_t s = 0; s < poses.size(); ++s) {
            detect::FourthDifferenceNoise& nz = r.noise[s];
            nz.add(r.field[k++ & 4095]);
            const double threshold = detect::detectionThreshold_nT(1.0, 3.0, nz.sigma_nT());
            const nav::SensorPose& p = poses[s];
            for (const detect::TargetModel& m : r.models) {
                const double vertical = p.altitude_m + m.targetClass().burial_m;
                const detect::HalfWidths w = m.halfWidths(vertical, p.heading_true_rad, threshold);
                sink += w.port_m + w.starboard_m +
                        m.margin(vertical, 0.0, p.heading_true_rad, threshold);
            }
        }
        t += 10'000'000;  // 100 Hz
        if (t > r.t_end) t = r.t_begin;
    }
    benchmark::DoNotOptimize(sink);
    state.SetItemsProcessed(state.iterations());
}
BENCHMARK(BM_FullEpoch4Sensors3Classes);

void BM_PositionOnly4Sensors(benchmark::State& state) {
    Rig& r = rig();
    std::vector<nav::SensorPose> poses;
    std::int64_t t = r.t_begin;
    for (auto _ : state) {
        r.positioner.posesAt(t, poses);
        benchmark::DoNotOptimize(poses.data());
        t += 10'000'000;
        if (t > r.t_end) t = r.t_begin;
    }
    state.SetItemsProcessed(state.iterations());
}
BENCHMARK(BM_PositionOnly4Sensors);

void BM_HalfWidthTable(benchmark::State& state) {
    const detect::TargetModel& m = rig().models[1];
    double h = 1.0;
    double sink = 0.0;
    for (auto _ : state) {
        const detect::HalfWidths w = m.halfWidths(h, 1.3, 1.2);
        sink += w.port_m;
        h = h > 7.0 ? 1.0 : h + 0.01;
    }
    benchmark::DoNotOptimize(sink);
    state.SetItemsProcessed(state.iterations());
}
BENCHMARK(BM_HalfWidthTable);

void BM_HalfWidthDirect(benchmark::State& state) {
    const detect::TargetModel& m = rig().models[1];
    double h = 1.0;
    double sink = 0.0;
    for (auto _ : state) {
        const detect::HalfWidths w = m.halfWidthsDirect(h, 1.3, 1.2);
        sink += w.port_m;
        h = h > 7.0 ? 1.0 : h + 0.37;
    }
    benchmark::DoNotOptimize(sink);
    state.SetItemsProcessed(state.iterations());
}
BENCHMARK(BM_HalfWidthDirect);

void BM_NoiseUpdate(benchmark::State& state) {
    detect::FourthDifferenceNoise nz(200);
    const auto& f = rig().field;
    std::size_t k = 0;
    for (auto _ : state) {
        nz.add(f[k++ & 4095]);
        benchmark::DoNotOptimize(nz.sigma_nT());
    }
    state.SetItemsProcessed(state.iterations());
}
BENCHMARK(BM_NoiseUpdate);

}  // namespace

BENCHMARK_MAIN();
