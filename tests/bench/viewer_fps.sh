#!/usr/bin/env bash
# Frames per second of the map window under Xvfb (Mesa llvmpipe, no GPU), at 1,000, 10,000 and
# 100,000 generated items, with the live engine running and, side by side as the reference, with
# it paused. The camera turns slowly the whole time so every frame is really drawn; vsync off.
#   bash tests/bench/viewer_fps.sh [path/to/kith] [frames]
set -euo pipefail
kith="${1:-build/kith}"
frames="${2:-300}"
out="$(mktemp -d)"
printf '%-8s | %-14s | %-14s | %-16s | %-14s | %s\n' items "fps (running)" "fps (paused)" "median ms (run)" "p90 ms (run)" "engine it/s"
printf -- '---------|----------------|----------------|------------------|----------------|------------\n'
for n in 1000 10000 100000; do
  for mode in running paused; do
    flag=""
    [ "$mode" = paused ] && flag="--paused"
    xvfb-run -a -s '-screen 0 1280x800x24' "$kith" open --generate "$n" --frames "$frames" --no-vsync --turn $flag \
      --fps-report "$out/$n-$mode.json" >"$out/$n-$mode.log" 2>&1 || { echo "kith failed, see $out/$n-$mode.log"; exit 1; }
  done
  python3 - "$out/$n-running.json" "$out/$n-paused.json" <<'PY'
import json, sys
r = json.load(open(sys.argv[1])); p = json.load(open(sys.argv[2]))
live = "" if r["live"] else " (still map: no engine in this build)"
print(f'{r["items"]:<8} | {r["mean_fps"]:<14.1f} | {p["mean_fps"]:<14.1f} | {r["median_frame_ms"]:<16.1f} | '
      f'{r["p90_frame_ms"]:<14.1f} | {r["iterations_per_second"]:.0f}{live}')
PY
done
echo "load average: $(cut -d' ' -f1-3 /proc/loadavg) on $(nproc) cores"
rm -rf "$out"
