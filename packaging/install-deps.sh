#!/usr/bin/env bash
# Installs the Debian 12 packages BudLedger needs to build, test and take
# screenshots. Installs exactly what is missing; runs `apt-get update` only when
# something is missing; prints nothing when everything is already present.
set -euo pipefail

packages=(
  # toolchain
  g++ cmake ninja-build pkgconf
  # libraries
  qt6-base-dev qt6-svg-dev libgl-dev libopencv-dev libsqlite3-dev libtiff-dev
  libfmt-dev libgtest-dev libgmock-dev libcli11-dev nlohmann-json3-dev libssl-dev
  libbenchmark-dev
  # test tools: libtiff's own tools, the live R reference, a display and a font for screenshots
  libtiff-tools r-base-core r-cran-survival xvfb xauth fonts-dejavu-core
)

missing=()
for p in "${packages[@]}"; do
  if ! dpkg-query -W -f='${Status}' "$p" 2>/dev/null | grep -q 'install ok installed'; then
    missing+=("$p")
  fi
done

((${#missing[@]} == 0)) && exit 0

if [[ $(id -u) -ne 0 ]]; then
  echo "install-deps: missing packages: ${missing[*]}" >&2
  echo "install-deps: run as root, or install them with apt-get" >&2
  exit 1
fi

echo "install-deps: installing ${missing[*]}"
export DEBIAN_FRONTEND=noninteractive
apt-get update -qq
apt-get install -y -qq --no-install-recommends "${missing[@]}" >/dev/null
