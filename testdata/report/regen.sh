#!/bin/sh
# Regenerate the test inputs and golden values of package report in place.
# Deterministic (fixed seeds); CI runs this and then `git diff --exit-code`.
set -eu
cd "$(dirname "$0")"
/usr/bin/python3 gen_sample.py
/usr/bin/python3 golden.py
