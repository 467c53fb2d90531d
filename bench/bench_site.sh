#!/usr/bin/env bash
# Opening a site of many 12-hour survey days (docs/site.md, issue #11): DAYS logs of the invented
# 12-hour day (replay_logs/day12h) flown with different simulator seeds (the same block re-run:
# every day's coverage overlaps the others', the worst case for the join), in one site folder.
# Prints, measured side by side in one run:
#   - rebuilding every session summary with every core, and with one (SWATHGUARD_JOBS=1);
#   - opening the site with current summaries: `gaps SITE --json` whole process (the first gap
#     list) and `replay SITE --speed max --headless` up to the first line (the first screen: the
#     seeded engine), wall time and peak RSS;
#   - the same answer the slow way for comparison: one day replayed alone (times DAYS);
#   - bytes of peak RSS per touched cell of the site raster.
# The logs (about 540 MB each) are built once into out/site_days/ (not committed).
#
# Usage: bench/bench_site.sh [build-dir]      DAYS=n (default 30), PAR=n parallel builds (default 2)
set -euo pipefail
BUILD=${1:-build}
DAYS=${DAYS:-30}
PAR=${PAR:-2}
BIN="$BUILD/app/swathguard"
[[ -x "$BIN" ]] || { echo "build swathguard first: cmake --build $BUILD --target swathguard" >&2; exit 2; }
[[ -x /usr/bin/time ]] || { echo "needs /usr/bin/time (Debian package time)" >&2; exit 2; }
SRC=replay_logs/day12h
SITE=out/site_days/site
mkdir -p "$SITE/logs"
cp "$SRC/survey.toml" "$SRC/plan_area.geojson" "$SRC/plan_lines.geojson" "$SITE/"

# --- the logs, built once -------------------------------------------------------------------
build_day() {
  local d=$1
  local name
  name=$(printf '202606%02dT070000Z' "$d")
  local log="$SITE/logs/$name.sglog"
  [[ -f "$log" ]] && return 0
  local tmp="out/site_days/tmp$d"
  rm -rf "$tmp"
  "$BIN" demo --scenario "$SRC/scenario.toml" --config "$SRC/survey.toml" --seed "$d" --out "$tmp" \
    --headless > /dev/null
  mv "$tmp/demo.sglog" "$log"
  rm -rf "$tmp"
}
export -f build_day
export BIN SRC SITE
t0=$(date +%s.%N)
seq 1 "$DAYS" | xargs -P "$PAR" -I{} bash -c 'build_day {}'
t1=$(date +%s.%N)
awk -v a="$t0" -v b="$t1" -v n="$DAYS" 'BEGIN { printf "logs: %d days ready (%.0f s to build the missing ones)\n", n, b - a }'
echo "logs: $(du -sh "$SITE/logs" | cut -f1) in $SITE/logs"

TMP=$(mktemp -d)
trap 'rm -rf "$TMP"' EXIT
# timed NAME CMD... : wall seconds and peak RSS (MB) of one whole process, stdout kept.
timed() {
  local name=$1; shift
  /usr/bin/time -v -o "$TMP/$name.tv" "$@" > "$TMP/$name.out" 2> "$TMP/$name.err"
  awk -F': ' '/Elapsed \(wall clock\)/ { n = split($2, p, ":"); s = 0; for (i = 1; i <= n; i++) s = s * 60 + p[i];
              printf "%.2f", s }' "$TMP/$name.tv" > "$TMP/$name.wall"
  awk -F': ' '/Maximum resident/ { printf "%.0f", $2 / 1024 }' "$TMP/$name.tv" > "$TMP/$name.rss"
}

# --- rebuilding every summary: every core, then one ------------------------------------------
rm -f "$SITE"/logs/*.sgsum
timed rebuild_all "$BIN" gaps "$SITE" --json
rm -f "$SITE"/logs/*.sgsum
SWATHGUARD_JOBS=1 timed rebuild_one "$BIN" gaps "$SITE" --json
# --- opening with current summaries ------------------------------------------------------------
timed open_gaps "$BIN" gaps "$SITE" --json
timed open_gaps2 "$BIN" gaps "$SITE" --json
# The first screen: `record --site` up to the moment its engine holds the whole site (it then
# acquires for 0.2 s and stops; the empty log it made is removed again).
before=$(ls "$SITE/logs")
timed first_screen "$BIN" record --site "$SITE" --headless --duration 0.2
for f in "$SITE"/logs/*; do grep -qxF "$(basename "$f")" <<< "$before" || rm -f "$f"; done
timed replay_one "$BIN" replay "$SITE/logs/$(printf '202606%02dT070000Z' 1).sglog" --speed max --headless

cells=$(python3 -c "import json,sys; j=json.load(open('$TMP/open_gaps.out')); print(j['raster_covered_cells'])")
hash_all=$(python3 -c "import json; print(json.load(open('$TMP/rebuild_all.out'))['raster_hash'])")
hash_open=$(python3 -c "import json; print(json.load(open('$TMP/open_gaps.out'))['raster_hash'])")
w() { cat "$TMP/$1.wall"; }
r() { cat "$TMP/$1.rss"; }
echo
echo "site: $DAYS logs, covered cells $cells, raster hash $hash_open (rebuild $hash_all)"
printf '%-44s %8s %8s\n' "step (whole process)" "wall s" "RSS MB"
printf '%-44s %8s %8s\n' "rebuild every summary, all cores ($(nproc))" "$(w rebuild_all)" "$(r rebuild_all)"
printf '%-44s %8s %8s\n' "rebuild every summary, one core" "$(w rebuild_one)" "$(r rebuild_one)"
printf '%-44s %8s %8s\n' "open the site: gaps SITE --json" "$(w open_gaps)" "$(r open_gaps)"
printf '%-44s %8s %8s\n' "open again" "$(w open_gaps2)" "$(r open_gaps2)"
printf '%-44s %8s %8s\n' "first screen: record --site, 0.2 s acquiring" "$(w first_screen)" "$(r first_screen)"
printf '%-44s %8s %8s\n' "one day replayed alone" "$(w replay_one)" "$(r replay_one)"
awk -v a="$(w rebuild_one)" -v b="$(w rebuild_all)" 'BEGIN { printf "rebuild speed-up with every core: %.2fx\n", a / b }'
awk -v a="$(w replay_one)" -v b="$(w open_gaps)" -v n="$DAYS" \
  'BEGIN { printf "opening vs replaying every day: %.0fx faster (%.1f s against %d x %.1f s)\n", n * a / b, b, n, a }'
awk -v rss="$(r open_gaps)" -v c="$cells" 'BEGIN { printf "peak RSS per covered cell when opening: %.2f B\n", rss * 1048576 / c }'
[[ "$hash_all" == "$hash_open" ]] && echo "same raster after a rebuild and after an opening: yes" || echo "RASTER DIFFERS"
