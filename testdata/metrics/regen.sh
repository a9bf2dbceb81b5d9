#!/bin/sh
# Regenerate the golden files of package areasweep/metrics in place.
# Needs Debian's python3-sklearn, python3-scipy (via /usr/bin/python3) and
# r-cran-proc (Rscript). Output is deterministic; CI runs this and checks
# `git diff --exit-code`.
set -eu
cd "$(dirname "$0")"
/usr/bin/python3 golden.py
/usr/bin/python3 random_null.py
Rscript golden.R
