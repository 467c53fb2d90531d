#!/usr/bin/env bash
# Rasterises the same swath quads with swathguard's coverage raster and with gdal_rasterize
# (gdal-bin) at the same cell size (0.5 m) in the same run; prints both times, their ratio and
# the covered cell counts (which must agree within 0.5 %).
# Usage: bench/bench_coverage_gdal.sh [build-dir]   (needs bench_coverage built)
set -euo pipefail
BUILD=${1:-build}
BIN="$BUILD/bench/bench_coverage"
[[ -x "$BIN" ]] || { echo "build bench_coverage first: cmake --build $BUILD --target bench_coverage" >&2; exit 2; }
OUT=$(mktemp -d)
trap 'rm -rf "$OUT"' EXIT

"$BIN" --gdal-export "$OUT"
# shellcheck disable=SC1091
source "$OUT/params.sh"

calc() { awk "BEGIN { printf \"%.6f\", $1 }"; }

best=""
for _ in 1 2 3; do
  t0=$(date +%s.%N)
  gdal_rasterize -q -l swaths -burn 1 -init 0 -ot Byte -of GTiff -tr "$CELL" "$CELL" \
    -te "$XMIN" "$YMIN" "$XMAX" "$YMAX" "$OUT/swaths.geojson" "$OUT/gdal.tif"
  t1=$(date +%s.%N)
  t=$(calc "$t1 - $t0")
  if [[ -z "$best" ]] || [[ $(calc "($t < $best) ? 1 : 0") == 1.000000 ]]; then best=$t; fi
  rm -f "$OUT/gdal.tif.aux.xml"
done
# gdal_rasterize burns a pixel when its centre is inside a polygon (the same rule as ours).
# Histogram bucket 1 (value 1) = burnt pixels.
GDAL_CELLS=$(gdalinfo -hist "$OUT/gdal.tif" | awk '/buckets from/ {getline; print $2; exit}')

diff_pct=$(calc "100 * ($OURS_CELLS - $GDAL_CELLS) / $GDAL_CELLS")
abs_diff=${diff_pct#-}
printf 'quads: %s, cell 0.5 m\n' "$QUADS"
printf 'covered cells: swathguard %s, gdal_rasterize %s, difference %.4f %%\n' "$OURS_CELLS" "$GDAL_CELLS" "$diff_pct"
printf 'time: swathguard fill %.4f s, swathguard read GeoJSON + fill %.4f s, gdal_rasterize (read + burn) %.4f s\n' \
  "$OURS_FILL_S" "$OURS_PARSE_FILL_S" "$best"
printf 'ratio gdal_rasterize / swathguard: %.1fx (fill only), %.1fx (both reading the GeoJSON)\n' \
  "$(calc "$best / $OURS_FILL_S")" "$(calc "$best / $OURS_PARSE_FILL_S")"
if [[ $(calc "($abs_diff > 0.5) ? 1 : 0") == 1.000000 ]]; then
  echo "FAIL: covered cell counts differ by more than 0.5 %" >&2
  exit 1
fi
echo "OK: counts agree within 0.5 %"
