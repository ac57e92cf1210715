#!/usr/bin/env bash
# kith's set-up, build and run in one step. Idempotent: installs only what is missing, builds
# only what changed.
#   bash scripts/quick.sh demo   set up, build, run the demo (a window, or a PNG with no display)
#   bash scripts/quick.sh test   set up, build, run every test
#   bash scripts/quick.sh build  set up and build only
set -euo pipefail
cd "$(dirname "$0")/.."
what="${1:-demo}"
shift || true

# Debian 12 packages kith needs to build, test and run.
packages=(cmake g++ make pkg-config
  libglfw3-dev libimgui-dev libstb-dev libglm-dev libeigen3-dev doctest-dev libepoxy-dev
  libhnswlib-dev libsqlite3-dev nlohmann-json3-dev
  libgl1-mesa-dri libegl-mesa0 libegl-dev libgl-dev
  xvfb xauth
  libcairo2-dev poppler-utils librsvg2-bin
  python3-numpy python3-sklearn python3-skimage python3-dask python3-distributed
  chromium)

# One dpkg-query for all of them keeps the "everything is there" case fast.
installed="$(dpkg-query -W -f='${Package} ${Status}\n' "${packages[@]}" 2>/dev/null || true)"
missing=()
for p in "${packages[@]}"; do
  grep -Fqx "$p install ok installed" <<<"$installed" || missing+=("$p")
done
if [ ${#missing[@]} -gt 0 ]; then
  echo "kith set-up: installing ${missing[*]}"
  sudo_cmd=""
  [ "$(id -u)" -eq 0 ] || sudo_cmd="sudo"
  $sudo_cmd apt-get update -qq
  DEBIAN_FRONTEND=noninteractive $sudo_cmd apt-get install -y -qq --no-install-recommends "${missing[@]}" >/dev/null
fi

build_dir="${KITH_BUILD_DIR:-build}"
if [ ! -f "$build_dir/CMakeCache.txt" ]; then
  cmake -S . -B "$build_dir" -DCMAKE_BUILD_TYPE=Release >/dev/null
fi
cmake --build "$build_dir" -j"$(nproc)"

case "$what" in
  build) ;;
  test)
    ctest --test-dir "$build_dir" --output-on-failure -j"$(nproc)" "$@"
    ;;
  demo)
    exec "$build_dir/kith" demo "$@"
    ;;
  *)
    echo "usage: bash scripts/quick.sh demo|test|build" >&2
    exit 2
    ;;
esac
