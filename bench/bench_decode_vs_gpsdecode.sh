#!/usr/bin/env bash
# Side by side on one generated 1-million-line NMEA capture (bench_decode writes it): our
# decodeNmea in process (Google Benchmark), and two whole programs reading the same file and
# printing one JSON object per line / report: `swathguard inspect CAPTURE` and gpsd's
# `gpsdecode -j` (package gpsd-clients; reads NMEA on stdin, prints gpsd JSON reports). Both write
# to /dev/null. The two programs run alternately, ROUNDS times each, in this one run, so a busy
# shared machine disturbs both alike; the figure is the ratio of whole-process wall times
# (gpsdecode / inspect), best of the rounds and median of the per-round ratios. CPU time
# (user + sys) is printed beside it.
# With BASELINE (another swathguard binary, e.g. from main) its inspect is timed in the same rounds
# and its output is compared with ours object by object (parsed JSON, so the number spelling does
# not matter; the summary's keys added since are ignored).
# Not run in CI. Usage: bench/bench_decode_vs_gpsdecode.sh [BUILD_DIR] [BASELINE] [ROUNDS]
#   (defaults: build, none, 5)
set -euo pipefail
cd "$(dirname "$0")/.."
build=${1:-build}
baseline=${2:-}
rounds=${3:-5}
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

python3 - "$cap" "$tmp" "$build/app/swathguard" "$(gpsdecode -V 2>&1 | head -1)" "$rounds" \
  "$baseline" <<'PY'
import json, os, resource, statistics, subprocess, sys, time
cap, tmp, swathguard, gpsd_version, rounds, baseline = sys.argv[1:7]
rounds = int(rounds)
lines = sum(1 for _ in open(cap, "rb"))

def run(cmd, stdin_path=None, out_path=os.devnull):
    before = resource.getrusage(resource.RUSAGE_CHILDREN)
    t0 = time.perf_counter()
    with open(stdin_path or os.devnull, "rb") as fin, open(out_path, "wb") as fout:
        subprocess.run(cmd, stdin=fin, stdout=fout, stderr=subprocess.DEVNULL, check=True)
    wall = time.perf_counter() - t0
    after = resource.getrusage(resource.RUSAGE_CHILDREN)
    cpu = (after.ru_utime - before.ru_utime) + (after.ru_stime - before.ru_stime)
    return wall, cpu

progs = {"inspect": ([swathguard, "inspect", cap], None),
         "gpsdecode -j": (["gpsdecode", "-j"], cap)}
if baseline:
    progs["baseline inspect"] = ([baseline, "inspect", cap], None)
res = {k: [] for k in progs}
for r in range(rounds):
    order = list(progs) if r % 2 == 0 else list(reversed(progs))  # alternate who goes first
    for k in order:
        res[k].append(run(*progs[k]))

def best(k, i): return min(x[i] for x in res[k])
ours = json.load(open(os.path.join(tmp, "ours.json")))["benchmarks"][0]["items_per_second"]
print(f"capture: {lines} NMEA lines, {os.path.getsize(cap)} bytes; {gpsd_version}; "
      f"{rounds} alternating rounds, output to /dev/null")
print(f"decodeNmea (in process)  {ours/1e6:8.2f} M lines/s CPU")
for k in progs:
    w, c = best(k, 0), best(k, 1)
    print(f"{k:24s} best wall {w:6.3f} s  best CPU {c:6.3f} s  ({lines/w/1e6:5.2f} M lines/s wall)"
          f"  walls: {' '.join(f'{x[0]:.3f}' for x in res[k])}")
pair = [g[0] / i[0] for g, i in zip(res["gpsdecode -j"], res["inspect"])]
print(f"ratio gpsdecode -j / inspect, whole-process wall: best-of {best('gpsdecode -j',0)/best('inspect',0):5.2f}x,"
      f" median of rounds {statistics.median(pair):5.2f}x (rounds: {' '.join(f'{p:.2f}' for p in pair)})")
print(f"ratio gpsdecode -j / inspect, CPU (best-of): {best('gpsdecode -j',1)/best('inspect',1):5.2f}x")
print(f"ratio decodeNmea in process / gpsdecode -j (lines/s, CPU): {ours/(lines/best('gpsdecode -j',1)):5.1f}x")
if baseline:
    bpair = [b[0] / i[0] for b, i in zip(res["baseline inspect"], res["inspect"])]
    print(f"ratio baseline inspect / inspect, wall: median {statistics.median(bpair):5.2f}x")
    a, b = os.path.join(tmp, "a.jsonl"), os.path.join(tmp, "b.jsonl")
    run(progs["inspect"][0], None, a)
    run(progs["baseline inspect"][0], None, b)
    n = 0
    with open(a) as fa, open(b) as fb:
        for la, lb in zip(fa, fb):
            ja, jb = json.loads(la), json.loads(lb)
            if "summary" in ja:
                for key in ("records", "bom_skipped"):
                    ja["summary"].pop(key, None)
            if ja != jb:
                print(f"OUTPUT DIFFERS at object {n + 1}:\n  ours     {la.strip()}\n  baseline {lb.strip()}")
                sys.exit(1)
            n += 1
    same_text = open(a, "rb").read().replace(b',"records":' + str(n - 1).encode(), b'') == open(b, "rb").read()
    print(f"output: {n} JSON objects, same content as the baseline; byte-identical text: {same_text}")
PY
