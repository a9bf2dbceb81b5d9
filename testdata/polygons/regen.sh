#!/bin/sh
# Regenerate testdata/polygons/golden.json in place (TestPolygonGolden in
# extent). Needs Debian's python3-gdal, python3-scipy and python3-numpy
# (via /usr/bin/python3). Output is deterministic; CI runs this and checks
# `git diff --exit-code`.
set -eu
cd "$(dirname "$0")"
/usr/bin/python3 golden.py
