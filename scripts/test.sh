#!/usr/bin/env bash
# The project's tests: installs what they need if missing, regenerates the
# golden values from the reference libraries (scikit-learn, SciPy, R's pROC,
# PROJ's geod) and fails if they differ from the committed ones, then runs
# gofmt, go vet and every Go test, the end-to-end and browser tests included,
# then the race detector on the packages that run work concurrently.
set -euo pipefail
cd "$(dirname "$0")/.."
[ -x /usr/local/go/bin/go ] && export PATH="/usr/local/go/bin:$PATH"
scripts/setup.sh --test

echo "== golden values regenerated from the reference libraries"
for r in testdata/*/regen.sh cmd/*/testdata/regen.sh cmd/internal/*/testdata/regen.sh; do
  [ -f "$r" ] || continue
  echo "-- $r"
  bash "$r"
done
if ! git diff --exit-code --stat -- testdata cmd/*/testdata cmd/internal/*/testdata; then
  echo "golden values changed when regenerated: the reference libraries disagree with the committed files" >&2
  exit 1
fi

echo "== gofmt"
unformatted=$(gofmt -l .)
if [ -n "$unformatted" ]; then
  echo "not gofmt-formatted (run gofmt -w on them):" >&2
  echo "$unformatted" >&2
  exit 1
fi
echo "== go vet"
go vet ./...
echo "== go test"
# Test artefacts (the report screenshot from the browser test) are kept here.
export AREASWEEP_ARTEFACTS="$PWD/test-artefacts"
mkdir -p "$AREASWEEP_ARTEFACTS"
go test -count=1 -timeout 30m ./...
echo "test artefacts: $AREASWEEP_ARTEFACTS"
echo "== go test -race (the packages whose work runs on several goroutines)"
# Outputs must be byte-identical on any number of cores: the race detector
# checks the packages that share work between goroutines (the streaming
# pass and the null's field, the family build, the pipeline's stages, the
# batch scheduler, the output folder's guard, the shard files). -short
# keeps it to about four minutes on 2 cores (the null's package, about 200 s, the longest).
go test -race -short -count=1 -timeout 30m ./cmd/internal/pass/ ./extent/nullmodel/ ./extent/ ./cmd/internal/pipeline/ ./cmd/internal/batchrun/ ./cmd/internal/batch/ ./cmd/internal/outdir/ ./cmd/internal/shardfile/
