#!/usr/bin/env bash
# Installs the Debian packages undertow builds and tests with, only those that are missing.
# Usage: cmake/install-deps.sh            (as root, or prints the apt-get line to run)
set -euo pipefail

packages=(
  cmake ninja-build g++ pkg-config
  libboost-dev libeigen3-dev libhdf5-dev hdf5-tools libcli11-dev catch2
  libtomlplusplus-dev liberfa-dev libgsl-dev libbenchmark-dev libnlopt-cxx-dev libnanoflann-dev
  libplplot-dev plplot-driver-cairo libfontconfig-dev fonts-dejavu-core
  libcfitsio-dev libyaml-cpp-dev
  libpng-dev poppler-utils
  clang libclang-rt-14-dev libomp-14-dev
  python3-numpy python3-h5py python3-astropy python3-scipy python3-emcee
  slurm-wlm munge
)

missing=()
for p in "${packages[@]}"; do
  if ! dpkg-query -W -f='${Status}' "$p" 2>/dev/null | grep -q "install ok installed"; then
    missing+=("$p")
  fi
done

if [ ${#missing[@]} -eq 0 ]; then
  echo "install-deps: all ${#packages[@]} packages present"
  exit 0
fi

echo "install-deps: missing: ${missing[*]}"
if [ "$(id -u)" -ne 0 ]; then
  echo "install-deps: not root; please run:" >&2
  echo "  sudo apt-get update && sudo apt-get install -y --no-install-recommends ${missing[*]}" >&2
  exit 1
fi

export DEBIAN_FRONTEND=noninteractive
# A package that apt cannot see yet means the package lists are stale or absent.
if ! apt-get install -y --no-install-recommends "${missing[@]}" >/tmp/undertow-apt.log 2>&1; then
  apt-get update -qq
  apt-get install -y --no-install-recommends "${missing[@]}"
fi
echo "install-deps: installed ${#missing[@]} packages"
