#!/usr/bin/env bash
# Frames per second of the map window drawing every item as its picture, under Xvfb (Mesa
# llvmpipe, no GPU) at 1280x800, for 2,000 and 10,000 invented pictures (bench_picture_collection),
# side by side with the same map without level of detail (--full-detail: every item, every
# picture at least 8 px, in every frame) and as discs only (--no-pictures). The map is still (--paused) and
# the camera turns the whole time (--turn), so every frame is really drawn and the level of detail
# works as it does while someone turns the map; vsync off. "with pictures" counts only the frames
# after the last picture reached the atlas.
#   bash tests/bench/pictures_fps.sh [build-dir] [frames]
set -euo pipefail
build="${1:-build}"
frames="${2:-400}"
kith="$build/kith"
cmake --build "$build" --target bench_picture_collection >/dev/null
out="$(mktemp -d)"
printf '%-7s | %-9s | %-10s | %-15s | %-9s | %-12s | %s\n' items mode "fps (all)" "fps (pictures)" "median ms" "pictures in" "LOD px at end"
printf -- '--------|-----------|------------|-----------------|-----------|--------------|--------------\n'
for n in 2000 10000; do
  mkdir -p "$out/$n"
  "$build/tests/bench_picture_collection" "$out/$n" "$n" >/dev/null
  for mode in pictures full discs; do
    flag=""
    [ "$mode" = full ] && flag="--full-detail"
    [ "$mode" = discs ] && flag="--no-pictures"
    xvfb-run -a -s '-screen 0 1280x800x24' "$kith" open "$out/$n/items.csv" --fresh --paused --no-panels \
      --frames "$frames" --no-vsync --turn $flag --fps-report "$out/$n-$mode.json" >"$out/$n-$mode.log" 2>&1 ||
      { echo "kith failed, see $out/$n-$mode.log"; exit 1; }
    python3 - "$out/$n-$mode.json" "$mode" <<'PY'
import json, sys
r = json.load(open(sys.argv[1])); mode = sys.argv[2]
with_p = r.get("mean_fps_with_pictures")
med = r.get("median_frame_ms_with_pictures", r["median_frame_ms"])
print(f'{r["items"]:<7} | {mode:<9} | {r["mean_fps"]:<10.1f} | '
      f'{(f"{with_p:.1f}" if with_p is not None else "-"):<15} | {med:<9.1f} | {r["pictures"]:<12} | {r["picture_min_pixels"]:.0f}')
PY
  done
done
echo "load average: $(cut -d' ' -f1-3 /proc/loadavg) on $(nproc) cores"
rm -rf "$out"
