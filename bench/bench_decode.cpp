// Decoder throughput: decodeNmea over a generated 1-million-line mixed NMEA capture (all ten
// decoded types plus unknown sentences and a few bad checksums), and decodeFieldMap over a
// 1-million-line SGM/SGA/SGC capture. One core. Target: >= 5 million NMEA lines/s.
//   bench_decode                          run the benchmarks
//   bench_decode --write-nmea FILE        write the NMEA capture (CR LF) and exit; used by
//                                         bench/bench_decode_vs_gpsdecode.sh to feed gpsdecode
#include <benchmark/benchmark.h>

#include <cmath>
#include <cstdint>
#include <cstdio>
#include <cstring>
#include <fstream>
#include <string>
#include <vector>

#include "decode/field_map.hpp"
#include "decode/nmea.hpp"

namespace {

using namespace sg::decode;

constexpr std::size_t kLines = 1'000'000;

// Deterministic generator (64-bit LCG, Knuth MMIX constants) so every run decodes the same bytes.
class Lcg {
public:
    double uniform() {
        m_s = m_s * 6364136223846793005ULL + 1442695040888963407ULL;
        return static_cast<double>(m_s >> 11) * 0x1.0p-53;
    }

private:
    std::uint64_t m_s = 0x5EED;
};

std::string ddmm(double deg, int deg_digits) {
    const double a = std::fabs(deg);
    const int d = static_cast<int>(a);
    char buf[32];
    std::snprintf(buf, sizeof buf, "%0*d%07.4f", deg_digits, d, (a - d) * 60.0);
    return buf;
}

std::string hhmmss(double tod_s) {
    const int t = static_cast<int>(tod_s);
    char buf[32];
    std::snprintf(buf, sizeof buf, "%02d%02d%05.2f", t / 3600, (t / 60) % 60,
                  std::fmod(tod_s, 60.0));
    return buf;
}

// A survey vessel's receiver, gyro and echo sounder at 10 Hz, all ten decoded types in turn, with
// 1 in 20 an unknown GSV and 1 in 200 a corrupted checksum.
std::vector<std::string> makeNmeaCapture(std::size_t n) {
    Lcg rng;
    std::vector<std::string> lines;
    lines.reserve(n);
    double tod = 3600.0;
    double lat = 54.123456;
    double lon = 7.654321;
    char b[200];
    for (std::size_t i = 0; lines.size() < n; ++i) {
        tod = std::fmod(tod + 0.1, 86400.0);
        lat += 1e-6 * (rng.uniform() - 0.3);
        lon += 1e-6 * (rng.uniform() - 0.3);
        const std::string t = hhmmss(tod);
        const std::string la = ddmm(lat, 2);
        const std::string lo = ddmm(lon, 3);
        const double sog = 4.5 + rng.uniform();
        const double cog = 45.0 + 5 * rng.uniform();
        switch (i % 10) {
            case 0:
                std::snprintf(b, sizeof b, "GNGGA,%s,%s,N,%s,E,4,%d,0.7,%.3f,M,41.2,M,1.0,0042",
                              t.c_str(), la.c_str(), lo.c_str(), 12 + static_cast<int>(rng.uniform() * 8),
                              1.5 + rng.uniform());
                break;
            case 1:
                std::snprintf(b, sizeof b, "GNRMC,%s,A,%s,N,%s,E,%.2f,%.2f,021226,1.2,E,R", t.c_str(),
                              la.c_str(), lo.c_str(), sog, cog);
                break;
            case 2:
                std::snprintf(b, sizeof b, "GNVTG,%.2f,T,%.2f,M,%.2f,N,%.2f,K,R", cog, cog - 1.2, sog,
                              sog * 1.852);
                break;
            case 3: std::snprintf(b, sizeof b, "HEHDT,%.2f,T", cog + 2 * rng.uniform()); break;
            case 4: std::snprintf(b, sizeof b, "GNZDA,%s,02,12,2026,00,00", t.c_str()); break;
            case 5:
                std::snprintf(b, sizeof b, "GNGST,%s,0.9,0.021,0.015,%.1f,0.019,0.017,0.034",
                              t.c_str(), 360 * rng.uniform());
                break;
            case 6:
                std::snprintf(b, sizeof b, "GNGNS,%s,%s,N,%s,E,RRR,%d,0.7,%.3f,41.2,1.0,0042,S",
                              t.c_str(), la.c_str(), lo.c_str(), 20, 1.5 + rng.uniform());
                break;
            case 7:
                std::snprintf(b, sizeof b, "GNGLL,%s,N,%s,E,%s,A,R", la.c_str(), lo.c_str(), t.c_str());
                break;
            case 8: std::snprintf(b, sizeof b, "SDDPT,%.2f,0.50,100", 20 + rng.uniform()); break;
            case 9: {
                const double d = 20 + rng.uniform();
                std::snprintf(b, sizeof b, "SDDBT,%.1f,f,%.2f,M,%.1f,F", d / 0.3048, d, d / 1.8288);
                break;
            }
        }
        std::string line = nmeaWithChecksum(b);
        if (i % 200 == 199) line[line.size() - 1] = line.back() == '0' ? '1' : '0';
        lines.push_back(std::move(line));
        if (i % 20 == 19 && lines.size() < n) {
            lines.push_back(nmeaWithChecksum("GPGSV,3,1,11,03,03,111,00,04,15,270,00,06,01,010,00,13,06,292,00"));
        }
    }
    return lines;
}

std::vector<std::string> makeFieldMapCapture(std::size_t n) {
    Lcg rng;
    std::vector<std::string> lines;
    lines.reserve(n);
    double tod = 3600.0;
    char b[200];
    for (std::size_t i = 0; i < n; ++i) {
        tod = std::fmod(tod + 0.1, 86400.0);
        const std::string t = hhmmss(tod);
        if (i % 10 == 8) {
            std::snprintf(b, sizeof b, "SGA,%s,%.2f", t.c_str(), 4 + rng.uniform());
        } else if (i % 10 == 9) {
            std::snprintf(b, sizeof b, "SGC,%s,%.1f", t.c_str(), 150 + rng.uniform());
        } else {
            std::snprintf(b, sizeof b, "SGM,%d,%s0,%.3f,%d,%.2f,%.2f", static_cast<int>(i % 4),
                          t.c_str(), 48000 + 50 * rng.uniform(), 90 + static_cast<int>(9 * rng.uniform()),
                          12 + rng.uniform(), 4 + rng.uniform());
        }
        lines.push_back(withXorChecksum(b));
    }
    return lines;
}

const std::vector<std::string>& nmeaCapture() {
    static const std::vector<std::string> lines = makeNmeaCapture(kLines);
    return lines;
}

void BM_DecodeNmea(benchmark::State& state) {
    const auto& lines = nmeaCapture();
    std::size_t usable = 0;
    for (auto _ : state) {
        for (const auto& l : lines) {
            const NmeaSentence s = decodeNmea(l);
            usable += isUsable(s.reason) ? 1 : 0;
            benchmark::DoNotOptimize(s);
        }
    }
    state.SetItemsProcessed(static_cast<std::int64_t>(state.iterations() * lines.size()));
    state.counters["usable_fraction"] =
        static_cast<double>(usable) / static_cast<double>(state.iterations() * lines.size());
}
BENCHMARK(BM_DecodeNmea)->Unit(benchmark::kMillisecond)->MinTime(2.0);

void BM_DecodeFieldMap(benchmark::State& state) {
    static const std::vector<std::string> lines = makeFieldMapCapture(kLines);
    const std::vector<FieldMap> maps = defaultFieldMaps();
    std::size_t ok = 0;
    for (auto _ : state) {
        for (const auto& l : lines) {
            const MatchedRecord r = decodeWithMaps(maps, l);
            ok += r.record.reason == Reason::Ok ? 1 : 0;
            benchmark::DoNotOptimize(r);
        }
    }
    state.SetItemsProcessed(static_cast<std::int64_t>(state.iterations() * lines.size()));
    state.counters["ok_fraction"] =
        static_cast<double>(ok) / static_cast<double>(state.iterations() * lines.size());
}
BENCHMARK(BM_DecodeFieldMap)->Unit(benchmark::kMillisecond)->MinTime(2.0);

}  // namespace

int main(int argc, char** argv) {
    if (argc == 3 && std::strcmp(argv[1], "--write-nmea") == 0) {
        std::ofstream out(argv[2], std::ios::binary);
        for (const auto& l : nmeaCapture()) out << l << "\r\n";
        return out ? 0 : 1;
    }
    benchmark::Initialize(&argc, argv);
    if (benchmark::ReportUnrecognizedArguments(argc, argv)) return 1;
    benchmark::RunSpecifiedBenchmarks();
    benchmark::Shutdown();
    return 0;
}
