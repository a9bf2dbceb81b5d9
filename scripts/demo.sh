#!/usr/bin/env bash
# One command from a fresh Debian machine to the demo report: installs GDAL if
# missing, builds areasweep into bin/, and runs the demo analysis.
# Usage: scripts/demo.sh [OUTPUT_DIR]   (default: areasweep-demo)
set -euo pipefail
cd "$(dirname "$0")/.."
[ -x /usr/local/go/bin/go ] && export PATH="/usr/local/go/bin:$PATH"
scripts/setup.sh
out="${1:-areasweep-demo}"
go build -o bin/areasweep ./cmd/areasweep
bin/areasweep demo --out "$out" --force
echo "open $(cd "$out" && pwd)/report.html in a browser"
