# socmap — see README.md. `make demo` and `make test` do all set-up.
GO      ?= go
PY      := /usr/bin/python3
BIN     := bin/socmap
export CGO_ENABLED := 1

.PHONY: all deps build test refs vet demo bench clean

all: build

deps:
	@scripts/deps.sh

build: deps
	$(GO) build -o $(BIN) ./cmd/socmap

vet: deps
	$(GO) vet ./...

# Reference values from outside libraries (numpy/scipy), regenerated on every run.
refs: deps
	$(PY) testdata/ref_physics.py
	$(PY) testdata/ref_variational.py

test: deps vet refs
	$(GO) test -count=1 ./...
	@echo "make test: all checks passed"

demo: build
	./$(BIN) demo

bench: build
	$(GO) test -run '^$$' -bench . -benchmem ./...

clean:
	rm -rf bin socmap-demo
