#!/bin/sh
# Speed comparison for package gpe (called by `make bench`): the same spinor
# GPE ground-state problems (uniform box, stripe regime Ω = 1, G1 = 0.3,
# G2 = 0.05; see gpe/benchgpe) solved to the same residual tolerance by
# socmap (gpe/benchgpe: split step + conjugate-gradient finisher, FFTW) and
# by the plain numpy split-step implementation testdata/bench_numpy.py.
# Prints both times and their ratio, measured in this run. Fails if either
# side misses the tolerance or the two energies disagree by more than 1e-6 E_R.
#
# Usage: testdata/bench.sh [tol]   (default 1e-4 E_R; the numpy split step
# needs Δτ ≈ 1e-3·tol/1e-4 and grows slow below that)
set -eu
cd "$(dirname "$0")/.."
TOL=${1:-1e-4}
PY=/usr/bin/python3
BIN=$(mktemp -d)/benchgpe
trap 'rm -rf "$(dirname "$BIN")"' EXIT
go build -o "$BIN" ./gpe/benchgpe
echo "problem          socmap_s   numpy_s    ratio   residual(socmap, numpy)   E/N (socmap, numpy)"
fail=0
for spec in "256 0" "1024 0" "256 256"; do
	set -- $spec
	go_out=$("$BIN" -nx "$1" -ny "$2" -tol "$TOL") || { echo "socmap missed the tolerance: $go_out"; fail=1; continue; }
	np_out=$($PY testdata/bench_numpy.py --nx "$1" --ny "$2" --tol "$TOL") || { echo "numpy missed the tolerance: $np_out"; fail=1; continue; }
	$PY - "$1" "$2" "$go_out" "$np_out" <<'PYEOF' || fail=1
import json, sys
nx, ny, g, n = sys.argv[1], sys.argv[2], json.loads(sys.argv[3]), json.loads(sys.argv[4])
name = f"1D {nx}" if ny == "0" else f"2D {nx}x{ny}"
ratio = n["time_s"] / g["time_s"]
print(f"{name:15s} {g['time_s']:9.4f} {n['time_s']:9.3f} {ratio:8.1f}x   {g['residual']:.1e}, {n['residual']:.1e}"
      f"          {g['energy']:.10f}, {n['energy']:.10f}")
if abs(g["energy"] - n["energy"]) > 1e-6:
    print("FAIL: energies disagree")
    sys.exit(1)
PYEOF
done
exit $fail
