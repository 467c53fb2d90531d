#!/usr/bin/env bash
# Runs one libFuzzer target for a number of seconds (builds the `fuzz` preset first).
# Usage: scripts/fuzz.sh TARGET [SECONDS] [extra libFuzzer flags...]
#   TARGET: nmea | field_map | fieldmap_config (or the full name fuzz_nmea, ...)
# The growing corpus lives in build-fuzz/corpus/TARGET (seeded from fuzz/corpus/TARGET); a crash
# is written to build-fuzz/artifacts/ and the script exits non-zero.
set -euo pipefail
cd "$(dirname "$0")/.."
if [[ $# -lt 1 ]]; then
  echo "usage: $0 TARGET [SECONDS] [libFuzzer flags...]" >&2
  exit 2
fi
name=${1#fuzz_}
secs=${2:-60}
shift $(( $# >= 2 ? 2 : 1 ))
if [[ ! -f fuzz/fuzz_${name}.cpp ]]; then
  echo "fuzz.sh: no target fuzz/fuzz_${name}.cpp" >&2
  exit 2
fi
if [[ -z ${SG_FUZZ_NO_BUILD:-} ]]; then
  cmake --preset fuzz >/dev/null
  cmake --build build-fuzz -j2 --target "fuzz_${name}"
fi
work=build-fuzz/corpus/${name}
mkdir -p "$work" build-fuzz/artifacts
dict=()
[[ -f fuzz/${name}.dict ]] && dict=(-dict="fuzz/${name}.dict")
seeds=()
[[ -d fuzz/corpus/${name} ]] && seeds=("fuzz/corpus/${name}")
exec "build-fuzz/fuzz/fuzz_${name}" -max_total_time="$secs" -max_len=2048 -timeout=5 \
  -print_final_stats=1 -artifact_prefix="build-fuzz/artifacts/${name}-" "${dict[@]}" "$@" \
  "$work" "${seeds[@]}"
