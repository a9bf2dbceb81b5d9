# Conveniences for contributors; the README's scripts are what users and CI run.
GO ?= go

.PHONY: build test bench demo
build:
	$(GO) build -o bin/areasweep ./cmd/areasweep
test:
	scripts/test.sh
bench:
	$(GO) test -run '^$$' -bench . -benchmem ./metrics/ ./extent/... ./cmd/pass/
demo:
	scripts/demo.sh
