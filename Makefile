# socmap — see README.md. `make demo` and `make test` do all set-up.
GO      ?= go
PY      := /usr/bin/python3
BIN     := bin/socmap
export CGO_ENABLED := 1

.PHONY: all deps build test test-cluster refs vet lint race h5check demo bench clean

all: build

deps:
	@scripts/deps.sh

build: deps
	$(GO) build -o $(BIN) ./cmd/socmap

vet: deps
	$(GO) vet ./...

# Habits: gofmt-clean sources, go vet, staticcheck (pinned as a tool in go.mod).
lint: vet
	@bad=$$(gofmt -l $$(git ls-files '*.go' 2>/dev/null || find . -name '*.go')); \
	if [ -n "$$bad" ]; then echo "gofmt: not formatted: $$bad"; exit 1; fi
	$(GO) tool staticcheck ./...

# The race detector on the packages that run goroutines (sweep workers,
# solver threads, FFTW plan cache, the HDF5 lock, verify workers).
race: deps
	$(GO) test -race -short -count=1 -timeout 30m ./phases/... ./gpe/... ./output/...

# Reference values from outside libraries (numpy/scipy), regenerated or
# recomputed and compared on every run.
refs: deps
	$(PY) testdata/ref_physics.py
	$(PY) testdata/ref_variational.py
	$(PY) testdata/ref_gpe_linear.py
	$(PY) testdata/ref_gpe_stripe.py
	$(PY) testdata/ref_calibrate.py
	$(PY) testdata/ref_bdg.py
	$(PY) testdata/ref_spin1.py
	$(PY) testdata/ref_spin1_gpe.py
	$(PY) testdata/ref_gpe_edge.py
	$(PY) testdata/ref_raman.py

# Outside readers of our HDF5 files: h5py and h5dump on a fixture of every
# type the layer writes, and on the result files of a demo run.
h5check: build
	@tmp=$$(mktemp -d) && trap 'rm -rf $$tmp' EXIT && \
	SOCMAP_H5_FIXTURE_DIR=$$tmp $(GO) test -count=1 -run '^TestWriteFixture$$' ./output/h5/ && \
	$(PY) testdata/h5_check.py $$tmp/h5_fixture.h5 && \
	h5dump -H $$tmp/h5_fixture.h5 > /dev/null && \
	./$(BIN) demo --dir $$tmp/demo --quiet > /dev/null && \
	$(PY) testdata/h5_check_results.py $$tmp/demo/*.h5 && \
	for f in $$tmp/demo/*.h5; do h5dump -H $$f > /dev/null || exit 1; done && \
	echo "h5check: h5py and h5dump read every file"

test: deps lint refs
	$(GO) test -count=1 -timeout 30m ./...
	CGO_ENABLED=0 $(GO) build ./gpe/... && CGO_ENABLED=0 $(GO) test -count=1 ./gpe/fft/
	$(GO) test -count=1 -short -timeout 30m -tags purego ./gpe/...
	$(MAKE) --no-print-directory race
	$(MAKE) --no-print-directory h5check
	@echo "make test: all checks passed"

# One-node Slurm on localhost (installs slurm-wlm and munge if missing, as
# root): a 4-task job array + dependent merge must equal a single-process run.
test-cluster: build
	scripts/test-cluster.sh

demo: build
	./$(BIN) demo

# Benchmarks: Go benchmarks of every package, then socmap against a plain
# numpy split-step implementation of the same algorithm, in one run.
bench: build
	$(GO) test -run '^$$' -bench . -benchmem ./...
	sh testdata/bench.sh

clean:
	rm -rf bin socmap-demo
