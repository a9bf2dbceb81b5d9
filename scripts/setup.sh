#!/usr/bin/env bash
# Installs what areasweep needs on Debian and is missing: GDAL (with PROJ and
# GEOS) for building and running; with --test also the reference libraries
# and the browser the tests use. Safe to run again: it only installs what is
# missing. Needs root or sudo for apt-get.
set -euo pipefail

want=(libgdal-dev gdal-bin proj-bin pkg-config gcc)
if [ "${1:-}" = "--test" ]; then
  want+=(python3-sklearn python3-scipy python3-numpy python3-pyproj python3-gdal r-cran-proc chromium fonts-liberation2 poppler-utils)
  # The scheduler test starts a one-node SLURM cluster (scripts/slurm-local.sh).
  want+=(slurmctld slurmd slurm-client munge)
fi

missing=()
for p in "${want[@]}"; do
  dpkg-query -W -f='${Status}' "$p" 2>/dev/null | grep -q "install ok installed" || missing+=("$p")
done

if [ ${#missing[@]} -gt 0 ]; then
  echo "setup: installing ${missing[*]}" >&2
  SUDO=""
  [ "$(id -u)" -ne 0 ] && SUDO="sudo"
  export DEBIAN_FRONTEND=noninteractive
  $SUDO apt-get update -qq
  $SUDO apt-get install -y -qq --no-install-recommends "${missing[@]}" >/dev/null
fi

if ! command -v go >/dev/null 2>&1; then
  if [ -x /usr/local/go/bin/go ]; then
    export PATH="/usr/local/go/bin:$PATH"
  else
    echo "setup: Go is not installed; install Go 1.26.8 or newer, the go.mod version (https://go.dev/doc/install), and run again" >&2
    exit 1
  fi
fi
go mod download
