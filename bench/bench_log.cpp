// Raw-line logging throughput into SQLite with batched transactions (target >= 300,000 lines/s
// sustained). Compares, side by side in one run: one transaction per line (the naive way, for
// the ratio), batched transactions through LogStore, and the full path through the LogWriter
// thread (post from a producer, commit every 500 ms). Lines are typical 70-byte NMEA sentences.
#include <benchmark/benchmark.h>

#include <ctime>
#include <filesystem>
#include <random>

#include "decode/nmea.hpp"
#include "io/log_writer.hpp"
#include "log/log_store.hpp"

namespace {

using namespace sg;

std::string tempLog(const char* name) {
    std::random_device rd;
    auto p = std::filesystem::temp_directory_path() / (std::string(name) + std::to_string(rd()) + ".sqlite");
    return p.string();
}

void removeLog(const std::string& p) {
    for (const char* suffix : {"", "-wal", "-shm"}) std::filesystem::remove(p + suffix);
}

std::vector<log::RawRow> sampleRows(std::size_t n) {
    std::vector<log::RawRow> rows;
    rows.reserve(n);
    for (std::size_t i = 0; i < n; ++i) {
        log::RawRow r;
        r.source = i % 3 == 0 ? "mag" : "gnss";
        r.mono_ns = static_cast<TimeNs>(i) * 1000;
        r.utc_ns = 1'796'083'200'000'000'000 + r.mono_ns;
        r.bytes = decode::nmeaWithChecksum(
            "GPGGA,123519." + std::to_string(i % 100) +
            ",5212.3456,N,00430.1234,E,1,08,0.9,10.0,M,47.0,M,,");
        r.status = log::DecodeStatus::Ok;
        rows.push_back(std::move(r));
    }
    return rows;
}

// Batched: `batch` lines per transaction; synchronous FULL (as `record` uses) when the second
// argument is 1, NORMAL when 0.
void BM_StoreBatched(benchmark::State& state) {
    const auto batch = static_cast<std::size_t>(state.range(0));
    const bool full = state.range(1) != 0;
    const auto rows = sampleRows(batch);
    const auto path = tempLog("bench_store");
    {
        log::LogStore store(path, log::OpenMode::Create, log::StoreOptions{full});
        for (auto _ : state) {
            log::Batch b;
            b.raw = rows;
            store.write(b);
        }
    }
    removeLog(path);
    state.SetItemsProcessed(state.iterations() * static_cast<std::int64_t>(batch));
}
BENCHMARK(BM_StoreBatched)
    ->Args({1, 1})
    ->Args({1000, 1})
    ->Args({50000, 1})
    ->Args({50000, 0})
    ->Unit(benchmark::kMillisecond)
    ->UseRealTime();

// The whole path: a producer posts 1000-line batches to the writer thread, which commits every
// 500 ms; the clock stops when stop() has committed the last line.
// Process CPU time (all threads), seconds: on a shared machine wall time measures the neighbours
// too, so the writer's figure is also given per CPU second.
double processCpuS() {
    timespec ts{};
    clock_gettime(CLOCK_PROCESS_CPUTIME_ID, &ts);
    return static_cast<double>(ts.tv_sec) + static_cast<double>(ts.tv_nsec) * 1e-9;
}

void BM_WriterThread(benchmark::State& state) {
    const auto rows = sampleRows(1000);
    constexpr int kBatches = 500;  // 500,000 lines per iteration
    const double cpu0 = processCpuS();
    for (auto _ : state) {
        state.PauseTiming();
        const auto path = tempLog("bench_writer");
        state.ResumeTiming();
        {
            io::LogWriter w(path, {500, true});
            for (int i = 0; i < kBatches; ++i) {
                log::Batch b;
                b.raw = rows;
                w.post(std::move(b));
            }
            w.stop();
        }
        state.PauseTiming();
        removeLog(path);
        state.ResumeTiming();
    }
    state.SetItemsProcessed(state.iterations() * kBatches * 1000);
    state.counters["lines_per_cpu_s"] =
        static_cast<double>(state.iterations() * kBatches * 1000) / (processCpuS() - cpu0);
}
BENCHMARK(BM_WriterThread)->Unit(benchmark::kMillisecond)->UseRealTime()->Iterations(3);

}  // namespace

BENCHMARK_MAIN();
