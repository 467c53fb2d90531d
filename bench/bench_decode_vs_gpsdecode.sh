#!/usr/bin/env bash
# Side-by-side decoder throughput on one generated 1-million-line NMEA capture (bench_decode
# writes it): our decodeNmea in process, `swathguard inspect` as a whole program (read, frame,
# decode, print one JSON object per line), and gpsd's `gpsdecode` (package gpsd-clients; reads
# NMEA on stdin, prints gpsd JSON reports). Rates use CPU time (user + sys, best of 3 runs), so a
# busy shared machine disturbs them less than wall time; wall time is printed too.
# Not run in CI. Usage: bench/bench_decode_vs_gpsdecode.sh [BUILD_DIR]   (default: build)
set -euo pipefail
cd "$(dirname "$0")/.."
build=${1:-build}
if ! command -v gpsdecode >/dev/null; then
  echo "gpsdecode not found: apt-get install gpsd-clients" >&2
  exit 1
fi
cmake --build "$build" -j2 --target bench_decode swathguard >/dev/null
tmp=$(mktemp -d)
trap 'rm -rf "$tmp"' EXIT
cap=$tmp/capture.nmea
"$build/bench/bench_decode" --write-nmea "$cap"
"$build/bench/bench_decode" --benchmark_filter=BM_DecodeNmea --benchmark_format=json \
  >"$tmp/ours.json" 2>/dev/null

python3 - "$cap" "$tmp/ours.json" "$build/app/swathguard" "$(gpsdecode -V 2>&1 | head -1)" <<'PY'
import json, os, resource, subprocess, sys, time
cap, ours_json, swathguard, gpsd_version = sys.argv[1:5]
lines = sum(1 for _ in open(cap, "rb"))

def run(cmd, stdin_path=None):
    best_cpu, best_wall = float("inf"), float("inf")
    for _ in range(3):
        before = resource.getrusage(resource.RUSAGE_CHILDREN)
        t0 = time.perf_counter()
        with open(stdin_path or os.devnull, "rb") as fin, open(os.devnull, "wb") as fout:
            subprocess.run(cmd, stdin=fin, stdout=fout, stderr=subprocess.DEVNULL, check=True)
        wall = time.perf_counter() - t0
        after = resource.getrusage(resource.RUSAGE_CHILDREN)
        cpu = (after.ru_utime - before.ru_utime) + (after.ru_stime - before.ru_stime)
        best_cpu, best_wall = min(best_cpu, cpu), min(best_wall, wall)
    return best_cpu, best_wall

ours = json.load(open(ours_json))["benchmarks"][0]["items_per_second"]
insp_cpu, insp_wall = run([swathguard, "inspect", cap])
gpsd_cpu, gpsd_wall = run(["gpsdecode"], cap)
gpsd = lines / gpsd_cpu
insp = lines / insp_cpu
print(f"capture: {lines} NMEA lines, {os.path.getsize(cap)} bytes; gpsdecode {gpsd_version}")
print(f"decodeNmea (in process)   {ours/1e6:8.2f} M lines/s CPU")
print(f"swathguard inspect        {insp/1e6:8.2f} M lines/s CPU  ({insp_cpu:.2f} s CPU, {insp_wall:.2f} s wall)")
print(f"gpsdecode                 {gpsd/1e6:8.2f} M lines/s CPU  ({gpsd_cpu:.2f} s CPU, {gpsd_wall:.2f} s wall)")
print(f"ratio decodeNmea / gpsdecode:          {ours/gpsd:6.1f}x")
print(f"ratio swathguard inspect / gpsdecode:  {insp/gpsd:6.1f}x")
PY
