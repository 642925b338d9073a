# The two set-up commands of the README: `make run` and `make test`.
GO ?= go

.PHONY: run test deps check-imports bench

deps:
	@bash scripts/deps.sh

# The main job on the built-in demo scenario.
run:
	$(GO) run ./cmd/bale assess testdata/demo-bale-0417.csv --bale-kg 548

# All tests, with the import-direction check first.
test: deps check-imports
	CGO_ENABLED=0 $(GO) build -o /dev/null ./cmd/bale
	$(GO) vet ./...
	$(GO) test -count=1 ./...

# Domain packages never import Gio.
check-imports:
	@if $(GO) list -deps ./assess/... ./yield/... ./data/... 2>/dev/null | grep -q '^gioui.org'; then \
		echo "domain packages import gioui.org:"; $(GO) list -deps ./assess/... ./yield/... ./data/... | grep '^gioui.org'; exit 1; fi
	@echo "import direction ok: assess/, yield/, data/ import no gioui.org"

bench:
	$(GO) test -run '^$$' -bench . -benchmem ./...
