// CPU cost of one screen frame (ScreenUi::frame: ImGui::NewFrame .. ImGui::Render, i.e. building
// every panel's draw lists) without the GL driver: textures go to a backend that only colours
// tiles in memory. Test data: the synthetic survey of tests/ui (TEST DATA), with 4 sensors and
// 1 or 12 hours of tracks and series (10 Hz field, 1 Hz navigation); each frame one coverage tile
// changes generation (as during acquisition), so the incremental re-colouring is included.
//
// Reports per-frame median and 99th percentile of this thread's CPU time (counters p50_ms, p99_ms) for both lengths side by
// side, so the ratio 12 h / 1 h shows whether the cost grows with the survey. Target: < 4 ms.
#include <benchmark/benchmark.h>

#include <algorithm>
#include <ctime>
#include <memory>
#include <vector>

#include "../tests/ui/synthetic_snapshot.hpp"
#include "ui/screen.hpp"
#include "ui/tile_textures.hpp"

namespace {

struct MemoryBackend final : sg::ui::TextureBackend {
    std::vector<std::vector<ImU32>> textures;
    ImTextureID create(int) override {
        textures.emplace_back();
        return reinterpret_cast<ImTextureID>(textures.size());
    }
    void upload(ImTextureID t, int, const std::vector<ImU32>& rgba) override {
        textures[reinterpret_cast<std::uintptr_t>(t) - 1] = rgba;  // the copy a driver would make
    }
    void destroy(ImTextureID) override {}
};

// CPU time of this thread in milliseconds: the machine may be shared, wall time would count others.
double threadCpuMs() {
    timespec ts{};
    clock_gettime(CLOCK_THREAD_CPUTIME_ID, &ts);
    return static_cast<double>(ts.tv_sec) * 1e3 + static_cast<double>(ts.tv_nsec) * 1e-6;
}

std::shared_ptr<sg::engine::Snapshot> cachedSnapshot(double hours) {
    static std::shared_ptr<sg::engine::Snapshot> one, twelve;
    auto& slot = hours > 6 ? twelve : one;
    if (!slot) {
        sg::testdata::SyntheticOptions o;
        o.hours = hours;
        o.sensors = 4;
        slot = sg::testdata::makeSyntheticSnapshot(o);
    }
    return slot;
}

// state.range(0): hours of data; state.range(1): plot window in minutes; state.range(2): 1 = follow
// the vessel, 0 = fixed view; state.range(3): 1 = whole survey in view, 0 = zoomed to about 300 m;
// state.range(4): 0 = tracks left out (to show their share).
void BM_ScreenFrame(benchmark::State& state) {
    auto snap = std::make_shared<sg::engine::Snapshot>(*cachedSnapshot(static_cast<double>(state.range(0))));
    if (state.range(4) == 0) {
        snap->tow_track = {};
        for (auto& sensor : snap->sensors) sensor.track = {};
    }
    ImGui::CreateContext();
    ImGuiIO& io = ImGui::GetIO();
    io.IniFilename = nullptr;
    io.DisplaySize = {1600, 1000};
    io.DeltaTime = 1.0f / 30.0f;
    io.BackendFlags |= ImGuiBackendFlags_RendererHasVtxOffset;  // as the OpenGL3 backend sets it
    io.MousePos = {400, 500};  // over the plan view: the cursor read-out is drawn too
    sg::ui::CommandQueue commands;
    sg::ui::TileTextureCache textures(std::make_unique<MemoryBackend>());
    sg::ui::ScreenSettings settings;
    settings.plot_minutes = static_cast<int>(state.range(1));
    settings.follow_vessel = state.range(2) != 0;
    {
        sg::ui::ScreenUi ui(settings, commands, textures);
        ui.prepareFonts();
        unsigned char* px = nullptr;
        int w = 0, h = 0;
        io.Fonts->GetTexDataAsRGBA32(&px, &w, &h);
        for (int i = 0; i < 3; ++i) ui.frame(snap.get(), 0.0);  // settle layout, first uploads
        if (state.range(3) == 0) {
            // Zoom in: wheel over the plan view, as an operator would.
            io.MouseWheel = 6.0f;
            ui.frame(snap.get(), 0.0);
            io.MouseWheel = 0.0f;
        }

        std::vector<double> ms;
        std::size_t k = 0;
        double wall = 0.0;
        for (auto _ : state) {
            snap->tiles[k++ % snap->tiles.size()].generation += 1000;  // one tile repainted
            const double t0 = threadCpuMs();
            ui.frame(snap.get(), wall);
            ms.push_back(threadCpuMs() - t0);
            wall += 1.0 / 30.0;
        }
        std::sort(ms.begin(), ms.end());
        auto pct = [&](double p) { return ms[std::min(ms.size() - 1, static_cast<std::size_t>(p * static_cast<double>(ms.size())))]; };
        state.counters["p50_ms"] = pct(0.50);
        state.counters["p99_ms"] = pct(0.99);
        state.counters["vertices"] = ImGui::GetDrawData()->TotalVtxCount;
        state.counters["uploads"] = static_cast<double>(textures.uploads());
        textures.clear();
    }
    ImGui::DestroyContext();
}

BENCHMARK(BM_ScreenFrame)
    ->ArgNames({"hours", "window_min", "follow", "whole", "tracks"})
    ->Args({1, 10, 0, 1, 1})
    ->Args({12, 10, 0, 1, 1})
    ->Args({12, 10, 0, 1, 0})
    ->Args({12, 60, 0, 1, 1})
    ->Args({12, 10, 1, 0, 1})
    ->Unit(benchmark::kMillisecond)
    ->MinTime(2.0);

}  // namespace

BENCHMARK_MAIN();
