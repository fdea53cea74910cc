# socmap — see README.md. `make demo` and `make test` do all set-up.
GO      ?= go
PY      := /usr/bin/python3
BIN     := bin/socmap
export CGO_ENABLED := 1

.PHONY: all deps build test test-cluster refs vet lint race fuzz h5check demo bench clean

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

# Fuzz tests, each for a bounded number of executions: the quantity parser,
# axis specs, the plan reader, the calibration CSV reader, and
# inspect/read/merge of damaged map files. Seeds are in the packages'
# testdata/fuzz/ folders (go test runs them on every run as well).
# Budgets are execution counts (-fuzztime Nx), not durations: with a duration,
# Go 1.26's fuzz coordinator can report a spurious "context deadline exceeded"
# failure at the deadline when the machine is loaded (a known toolchain race,
# fixed in Go 1.27); a count has no deadline to race. Each budget is about
# 5 s of fuzzing on a two-core machine. FUZZSCALE multiplies every count
# (e.g. make fuzz FUZZSCALE=20 for a longer run).
FUZZSCALE ?= 1
FUZZ := ./dispersion:FuzzParseQuantity:100000 ./dispersion:FuzzCalibrationCSV:50000 \
	./phases:FuzzParseAxis:100000 ./cmd/socmap:FuzzReadPlan:20000 ./output:FuzzDamagedMapFile:4000
fuzz: deps
	@for t in $(FUZZ); do \
		pkg=$${t%%:*}; rest=$${t#*:}; name=$${rest%%:*}; n=$$(( $${rest##*:} * $(FUZZSCALE) )); \
		echo "fuzz $$name ($$pkg, $${n} executions)"; \
		$(GO) test -run '^$$' -fuzz "^$$name\$$" -fuzztime $${n}x $$pkg > /tmp/socmap-fuzz-$$$$.log 2>&1 || \
			{ tail -30 /tmp/socmap-fuzz-$$$$.log; rm -f /tmp/socmap-fuzz-$$$$.log; exit 1; }; \
	done; rm -f /tmp/socmap-fuzz-$$$$.log

# Reference values from outside libraries (numpy/scipy), regenerated or
# recomputed and compared on every run.
refs: deps
	$(PY) testdata/ref_physics.py
	$(PY) testdata/ref_variational.py
	$(PY) testdata/ref_gpe_linear.py
	$(PY) testdata/ref_gpe_stripe.py
	$(PY) testdata/ref_calibrate.py
	$(PY) testdata/ref_bdg.py
	$(PY) testdata/ref_spin1_bdg.py
	$(PY) testdata/ref_spin1.py
	$(PY) testdata/ref_spin1_gpe.py
	$(PY) testdata/ref_spin1_gpemap.py
	$(PY) testdata/ref_spin1_magnetization.py
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
	$(MAKE) --no-print-directory fuzz
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
