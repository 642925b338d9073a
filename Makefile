# The two set-up commands of the README: `make run` and `make test`.
GO ?= go

.PHONY: run run-cli test deps check-imports bench bench-publish fuzz-short

# Fuzz targets run briefly in every `make test` (their committed seeds run
# in plain `go test` too): package:target:executions. The budgets are
# counts (about 5 s each on two cores), not durations: with a duration,
# Go 1.26's fuzz coordinator can report its own stop as a failure
# ("context deadline exceeded", golang/go#75804, fixed in Go 1.27).
FUZZ_TARGETS = ./assess:FuzzReadPulls:60000 ./yield:FuzzReadLine:8000 ./yield:FuzzParsePolyol:50000 ./yield:FuzzReadPriceSheet:30000 ./data/record:FuzzDecodeEvent:30000 ./data/transfer:FuzzBundleDecode:25000 ./data/transfer:FuzzImportBundle:4000 ./data/transfer:FuzzVerifySign1:2500
FUZZSCALE ?= 1

deps:
	@bash scripts/deps.sh

# The main job on the built-in demo scenario: the field app on the demo
# store when there is a display; without one, the CLI demo: the demo
# bale's audit against the glycolysis-feed spec, then what the wash line
# and the glycol reactor make of it.
run: deps
	$(GO) build -o bin/bale ./cmd/bale
	$(GO) build -o bin/baleassay ./cmd/baleassay
	@if [ -n "$$DISPLAY$$WAYLAND_DISPLAY" ]; then \
		echo "opening the field app on the demo store"; \
		exec bin/baleassay --demo; \
	fi; \
	echo "no display (neither DISPLAY nor WAYLAND_DISPLAY is set): running the CLI demo instead"; echo; \
	$(MAKE) --no-print-directory run-cli

run-cli:
	$(GO) build -o bin/bale ./cmd/bale
	bin/bale assess testdata/demo-bale-0417.csv --bale-kg 548
	@echo; echo "=== what the wash line and the glycolysis reactor make of it ==="; echo
	bin/bale yield testdata/demo-bale-0417.csv --bale-kg 548

# All tests, with the import-direction check first (it also runs in go test).
# scripts/pgtest.sh starts a throwaway PostgreSQL server for the publish
# tests (or uses the one BALEASSAY_PG_DSN names) and stops it afterwards.
test: deps check-tree check-imports
	CGO_ENABLED=0 $(GO) build -o /dev/null ./cmd/bale
	$(GO) vet ./...
	bash scripts/pgtest.sh run -- $(GO) test -count=1 ./...
	$(MAKE) --no-print-directory fuzz-short

fuzz-short:
	@for t in $(FUZZ_TARGETS); do \
		pkg=$${t%%:*}; rest=$${t#*:}; name=$${rest%%:*}; n=$$(( $${rest##*:} * $(FUZZSCALE) )); \
		echo "fuzz $$name ($$pkg) for $$n executions"; \
		$(GO) test -run '^$$' -fuzz "^$$name\$$" -fuzztime $${n}x $$pkg || exit 1; \
	done

# No merge left its conflict markers in a tracked file.
check-tree:
	@if git grep -n -I -E '^(<<<<<<<|>>>>>>>)( |$$)' -- . >/dev/null 2>&1; then \
		echo "conflict markers left in:"; git grep -n -I -E '^(<<<<<<<|>>>>>>>)( |$$)' -- .; exit 1; fi

# Every package imports only what data/imports_test.go allows it
# (domain packages never import Gio).
check-imports:
	$(GO) test -count=1 -run 'ImportAllowList' ./data/

bench:
	$(GO) test -run '^$$' -bench . -benchmem ./...

# Publishing 1,000,000 events into PostgreSQL, against a plain COPY of the
# same bytes (minutes; not part of make test).
bench-publish:
	BALE_PUBLISH_EVENTS=$${BALE_PUBLISH_EVENTS:-1000000} bash scripts/pgtest.sh run -- \
		$(GO) test -run '^$$' -bench 'Publish' -benchtime 1x -timeout 60m -v ./data/publish/
