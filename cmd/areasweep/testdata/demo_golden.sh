#!/usr/bin/env bash
# Writes demo.sha256: the SHA-256 of the demo's results.json and scores.csv
# as the areasweep built from this tree writes them (`areasweep demo --out
# demo`, run from an empty folder so the recorded input paths are
# demo/inputs/...). TestDemoOutputsUnchanged compares a fresh demo run with
# this file, so a change of code that changes these outputs fails until the
# file is regenerated on purpose, in the same commit, with the reason in
# its message.
#
# The committed file was first written by this script at commit 84c59ed,
# before the pipeline moved out of cmd/areasweep (issue 9), and rewritten
# by it at the merge of issue 11 (the distance-only null's bounded cells:
# the sorting-bias background is tallied from bracket midpoints and binned
# on the float's bits, so its means and medians moved by at most 0.03%).
set -euo pipefail
here="$(cd "$(dirname "$0")" && pwd)"
root="$(cd "$here/../../.." && pwd)"
[ -x /usr/local/go/bin/go ] && export PATH="/usr/local/go/bin:$PATH"
tmp="$(mktemp -d)"
trap 'rm -rf "$tmp"' EXIT
(cd "$root" && go build -o "$tmp/areasweep" ./cmd/areasweep)
(cd "$tmp" && ./areasweep demo --out demo --quiet >/dev/null)
(cd "$tmp/demo" && sha256sum results.json scores.csv) > "$here/demo.sha256"
cat "$here/demo.sha256"
