#!/bin/sh
# Regenerate testdata/nullmodel/golden.json in place. Needs Debian's
# python3-pyproj, python3-sklearn and python3-numpy (via /usr/bin/python3).
# Output is deterministic; CI runs this and checks `git diff --exit-code`.
set -eu
cd "$(dirname "$0")"
/usr/bin/python3 golden.py
