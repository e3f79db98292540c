# fitseal — see README.md. Targets: build, test, bench, demo, check-long, fmt, vet.
GO ?= go
BIN := bin/fitseal

.PHONY: build test bench demo check-long vet fmt clean

# A static binary (no cgo: fitseal needs no C library): it runs on any Linux
# of its architecture and starts about 4 ms sooner than one linked against
# the system's C library (no dynamic loader; 29 against 33 ms for
# `fitseal families` here, docs/PERFORMANCE.md).
build:
	CGO_ENABLED=0 $(GO) build -o $(BIN) ./cmd/fitseal

# The whole fast suite (under 10 minutes on 2 cores); CI runs exactly this.
test:
	$(GO) vet ./...
	@test -z "$$(gofmt -l . | grep -v '^testdata/')" || { echo "gofmt needed:"; gofmt -l .; exit 1; }
	$(GO) test -count=1 ./...

# Benchmarks of the hot paths; compare with ../shared/bench/run.sh for scipy.
bench:
	$(GO) test -run '^$$' -bench . -benchmem ./fitters/... ./runner/ ./bundle/...

# Long studies (coverage simulations, fuzzing); results are kept in docs/.
check-long:
	FITSEAL_LONG=1 $(GO) test -count=1 -timeout 3h ./...

demo: build
	@./scripts/demo.sh $(BIN)

vet:
	$(GO) vet ./...

fmt:
	gofmt -w $$(gofmt -l . | grep -v '^testdata/')

clean:
	rm -rf bin
