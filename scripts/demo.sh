#!/usr/bin/env bash
# The main job, end to end on this machine: installs what is missing, builds, then runs the
# invented demo survey "Harrowmere Flats": the simulator sends every instrument to its own UDP
# port on loopback at 20x real time, `swathguard record` acquires them into a SQLite survey log
# (with the screen when a display exists, a status line otherwise), and at the end `swathguard
# gaps` prints the coverage, the gap list and the infill lines and writes the exports, and
# `swathguard report` writes the end-of-site report (PDF, maps, GeoTIFF, CSV) into out/demo/report.
# Usage: bash scripts/demo.sh [SPEED]      (SPEED: simulated seconds per wall second, default 20)
set -euo pipefail
cd "$(dirname "$0")/.."
SPEED="${1:-20}"
bash scripts/install-deps.sh
cmake --preset dev >/dev/null
cmake --build build -j"$(nproc)" --target swathguard swathguard-sim
OUT=out/demo
mkdir -p "$OUT"
rm -f "$OUT"/demo.sglog "$OUT"/demo.sglog-wal "$OUT"/demo.sglog-shm
SCREEN=(--headless)
if [[ -n "${DISPLAY:-}" ]]; then SCREEN=(); fi

echo "demo: recording the simulated survey at ${SPEED}x into $OUT/demo.sglog"
./build/app/swathguard record --config replay_logs/demo/survey.toml --log "$OUT/demo.sglog" "${SCREEN[@]}" &
REC=$!
trap 'kill $REC 2>/dev/null || true' EXIT
sleep 1  # let the UDP readers bind before the first datagram
./build/drivers_sim/swathguard-sim --scenario replay_logs/demo/scenario.toml --out udp \
  --base-port 47000 --speed "$SPEED" --dir "$OUT/sim" | tail -n 9
sleep 2  # the last datagrams reach the log
kill -INT $REC
wait $REC || true
trap - EXIT

echo
./build/app/swathguard gaps "$OUT/demo.sglog" --export "$OUT"
echo
./build/app/swathguard report "$OUT/demo.sglog" --out "$OUT/report"
echo
echo "demo: survey log $OUT/demo.sglog (open it with sqlite3; replay it with"
echo "      ./build/app/swathguard replay $OUT/demo.sglog --speed 20)"
echo "demo: a quicker look in one process: ./build/app/swathguard demo"
