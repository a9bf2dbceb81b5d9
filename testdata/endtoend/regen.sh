#!/bin/sh
# Regenerate testdata/endtoend/golden.json in place (the end-to-end check of
# cmd/areasweep's TestEndToEndGolden). Needs Debian's python3-gdal,
# python3-numpy, python3-sklearn, python3-scipy and python3-pyproj (via
# /usr/bin/python3). Output is deterministic; CI runs this and checks
# `git diff --exit-code`.
set -eu
cd "$(dirname "$0")"
/usr/bin/python3 golden.py
