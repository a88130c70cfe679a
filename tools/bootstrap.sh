#!/bin/sh
# bootstrap.sh - install the Debian 12 packages dwell builds and tests with.
# Runs apt-get update first; uses sudo when not root.  Safe to run twice.
set -eu
pkgs="meson ninja-build pkg-config gcc libopenblas-dev liblapacke-dev libyaml-dev
      libgmp-dev libmpfr-dev python3 python3-numpy python3-scipy python3-mpmath
      libquantum-dev"
if [ "$(id -u)" -ne 0 ]; then SUDO=sudo; else SUDO=; fi
missing=
for p in $pkgs; do
	dpkg -s "$p" >/dev/null 2>&1 || missing="$missing $p"
done
if [ -n "$missing" ]; then
	$SUDO apt-get update
	DEBIAN_FRONTEND=noninteractive $SUDO apt-get install -y --no-install-recommends $missing
fi
