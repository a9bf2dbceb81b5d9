#!/bin/sh
# Regenerates golden.json in place from sklearn, scipy and proj's geod.
set -eu
cd "$(dirname "$0")"
/usr/bin/python3 golden.py
