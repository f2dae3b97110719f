#!/bin/sh
# Install the Debian packages that eigenframe's build, demo and tests need, when missing.
# Runs apt-get update first, then apt-get install -y (through sudo when not root).
set -eu
PKGS="build-essential pkg-config libarpack2-dev liblapacke-dev libopenblas-dev libhdf5-dev
      libsuitesparse-dev libfyaml-dev libcmocka-dev python3 python3-numpy python3-scipy
      python3-h5py python3-yaml python3-pytest"
missing=""
for p in $PKGS; do
    dpkg-query -W -f='${Status}' "$p" 2>/dev/null | grep -q "install ok installed" || missing="$missing $p"
done
if [ -z "$missing" ]; then
    echo "install-deps: all packages present"
    exit 0
fi
SUDO=""
[ "$(id -u)" -eq 0 ] || SUDO="sudo"
echo "install-deps: installing:$missing"
$SUDO apt-get update
DEBIAN_FRONTEND=noninteractive $SUDO apt-get install -y --no-install-recommends $missing
