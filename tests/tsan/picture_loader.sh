#!/usr/bin/env bash
# Builds tests/tsan/picture_loader_race.cpp with ThreadSanitizer (the loader, the atlas and the
# picture decoder only) and runs it over 300 invented pictures; any race report fails it.
#   bash tests/tsan/picture_loader.sh [build-dir]
set -euo pipefail
build="${1:-build}"
src="$(cd "$(dirname "$0")/../.." && pwd)"
out="$(mktemp -d)"
cmake --build "$build" --target bench_picture_collection >/dev/null
"$build/tests/bench_picture_collection" "$out" 300 >/dev/null
g++ -std=c++17 -O1 -g -fsanitize=thread -I"$src" -I/usr/include/stb "$src/tests/tsan/picture_loader_race.cpp" \
  "$src/viewer/scene/picture_loader.cpp" "$src/viewer/scene/picture_atlas.cpp" "$src/solver/features/picture_file.cpp" \
  -lstb -o "$out/race"
TSAN_OPTIONS="halt_on_error=1 exitcode=66" "$out/race" "$out"
rm -rf "$out"
