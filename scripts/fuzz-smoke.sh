#!/usr/bin/env bash
# CI smoke run of every libFuzzer target: builds the `fuzz` preset (clang) and runs each target
# for a few seconds (about 20 s in all). Exits non-zero on any finding (crash, leak, undefined
# behaviour, timeout) or build failure. Long runs: scripts/fuzz.sh TARGET SECONDS.
set -euo pipefail
cd "$(dirname "$0")/.."
targets=()
for f in fuzz/fuzz_*.cpp; do
  n=$(basename "$f" .cpp)
  targets+=("${n#fuzz_}")
done
total=${SG_FUZZ_SMOKE_SECONDS:-20}
per=$(( total / ${#targets[@]} ))
(( per < 2 )) && per=2
cmake --preset fuzz >/dev/null
cmake --build build-fuzz -j"$(nproc)" --target "${targets[@]/#/fuzz_}"
status=0
for t in "${targets[@]}"; do
  echo "fuzz-smoke: fuzz_${t} for ${per} s"
  if ! SG_FUZZ_NO_BUILD=1 bash scripts/fuzz.sh "$t" "$per" >"build-fuzz/fuzz_${t}.smoke.log" 2>&1; then
    echo "fuzz-smoke: fuzz_${t} FOUND A PROBLEM; last lines of its log:" >&2
    tail -n 40 "build-fuzz/fuzz_${t}.smoke.log" >&2
    status=1
  else
    grep -E "stat::number_of_executed_units" "build-fuzz/fuzz_${t}.smoke.log" || true
  fi
done
exit $status
