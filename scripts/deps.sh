#!/usr/bin/env bash
# Installs the Debian packages socmap needs to build and test, if missing.
# As root: runs `apt-get update` once, then `apt-get install`. Otherwise it
# prints the exact command to run and fails.
set -euo pipefail
pkgs=(libhdf5-dev hdf5-tools libfftw3-dev pkg-config python3-numpy python3-scipy python3-h5py "$@")
missing=()
for p in "${pkgs[@]}"; do
  if ! dpkg-query -W -f='${Status}' "$p" 2>/dev/null | grep -q "install ok installed"; then
    missing+=("$p")
  fi
done
if [ ${#missing[@]} -eq 0 ]; then
  exit 0
fi
cmd="apt-get install -y --no-install-recommends ${missing[*]}"
if [ "$(id -u)" -eq 0 ]; then
  echo "deps: installing ${missing[*]}" >&2
  export DEBIAN_FRONTEND=noninteractive
  apt-get update -qq
  $cmd
else
  echo "deps: missing Debian packages: ${missing[*]}" >&2
  echo "deps: run as root:  apt-get update && $cmd" >&2
  exit 1
fi
