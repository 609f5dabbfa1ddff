#!/usr/bin/env bash
# Installs the Debian 12 packages machcut needs (only the missing ones).
# Usage: bash scripts/install-deps.sh
set -euo pipefail
PKGS=(
  build-essential cmake pkg-config ninja-build
  libassimp-dev libcgal-dev libgmp-dev libmpfr-dev libeigen3-dev libboost-dev
  libimgui-dev libglfw3-dev libgl-dev libegl-dev libgles-dev libgl1-mesa-dri libegl-mesa0
  catch2 libbenchmark-dev libcli11-dev nlohmann-json3-dev
  libcairo2-dev libmeshoptimizer-dev libtbb-dev
  assimp-testmodels
  xvfb xauth xdotool
  clang libclang-rt-14-dev
  python3-dev pybind11-dev python3-numpy python3-pytest python3-matplotlib
)
missing=()
for p in "${PKGS[@]}"; do
  dpkg-query -W -f='${Status}' "$p" 2>/dev/null | grep -q "install ok installed" || missing+=("$p")
done
if [ ${#missing[@]} -eq 0 ]; then
  echo "install-deps: all ${#PKGS[@]} packages present"
  exit 0
fi
SUDO=""
if [ "$(id -u)" -ne 0 ]; then SUDO="sudo"; fi
echo "install-deps: installing ${missing[*]}"
export DEBIAN_FRONTEND=noninteractive
$SUDO apt-get update -q
$SUDO apt-get install -y -q --no-install-recommends "${missing[@]}"
