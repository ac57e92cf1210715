#!/usr/bin/env bash
# A million items in one batch (tests/bench/RESULTS-scale.md): writes 1,000,000 x 50 invented
# items (bench_million) once, then times `kith fit` on them with each stage's time and peak
# memory (--stages) and the whole run's peak (GNU time).
#   bash tests/bench/million.sh [N] [BUILD_DIR]     (default N 1000000, BUILD_DIR build)
set -euo pipefail
cd "$(dirname "$0")/../.."
n="${1:-1000000}"
build="${2:-build}"
cmake --build "$build" --target kith bench_million -j"$(nproc)" >/dev/null
data="${TMPDIR:-/tmp}/kith-million-$n.npy"
[ -f "$data" ] || "$build/tests/bench_million" "$n" "$data"
out="$(mktemp -d)/map.npy"
/usr/bin/time -f 'whole run: %e s wall, %M KB peak resident' \
  "$build/kith" fit "$data" -o "$out" --stages --threads 2
