#!/bin/sh
# regen.sh - regenerate the golden files of testdata/geodesy in place.
set -eu
exec sh "$(dirname "$0")/golden.sh"
