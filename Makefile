# Conveniences for contributors; the README's scripts are what users and CI run.
GO ?= go
# Flags for the whole-sweep benchmark, e.g. BENCHFLAGS='-cells 1e9 -extents 20'.
BENCHFLAGS ?=

.PHONY: build test bench microbench demo
build:
	$(GO) build -o bin/areasweep ./cmd/areasweep
test:
	scripts/test.sh
# The micro-benchmarks beside the code, then the whole sweep against a bare
# GDAL read of the same rasters (cmd/sweepbench; 25M and 100M cells by default).
bench: microbench build
	$(GO) run ./cmd/sweepbench $(BENCHFLAGS)
microbench:
	$(GO) test -run '^$$' -bench . -benchmem ./metrics/ ./extent/... ./cmd/internal/pass/ ./cmd/internal/shardfile/ ./cmd/internal/inputs/ ./report/
demo:
	scripts/demo.sh
