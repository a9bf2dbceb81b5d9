#!/usr/bin/env bash
# One command from a fresh Debian machine to the demo report: installs GDAL if
# missing, builds areasweep into bin/, and runs the demo analysis.
# Usage: scripts/demo.sh [OUTPUT_DIR]   (default: areasweep-demo in the
# repository; a relative OUTPUT_DIR is taken from the current folder)
set -euo pipefail
caller="$(pwd)"
cd "$(dirname "$0")/.."
[ -x /usr/local/go/bin/go ] && export PATH="/usr/local/go/bin:$PATH"
scripts/setup.sh
out="${1:-areasweep-demo}"
if [ $# -ge 1 ] && [ "${out#/}" = "$out" ]; then
  # A folder given by the user is where they are, not in the repository.
  out="$caller/$out"
fi
go build -o bin/areasweep ./cmd/areasweep
bin/areasweep demo --out "$out" --force
echo "open $(cd "$out" && pwd)/report.html in a browser"
