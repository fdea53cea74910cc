#!/usr/bin/python3
"""Independent reference for points of spin-1 GPE maps (phases.MethodSpin1GPE).

Each case is a map point of the direct three-level model (phases.Spin1FromScheme:
K_m = 2m, E_m = delta m + eps m^2 in the gauge of the pair (0, -1)) with
n c0, n c2 (E_R) in a periodic box of mean density 1. The box (length, points)
is the one the map chose at the point (its box_length and grid_points, which the
Go test checks against this file); everything else is recomputed here: the
model from (omega, delta, eps) and the ground-state energy by the independent
numpy/scipy minimiser of testdata/ref_spin1_gpe.py (L-BFGS-B on the discrete
energy, analytic gradient from the energy density, many starts).
phases/spin1gpemap_test.go reads testdata/ref_spin1_gpemap.json and compares the
map's energies to 1e-7 E_R.

Usage:
  /usr/bin/python3 testdata/ref_spin1_gpemap.py           # recompute and compare (make refs)
  /usr/bin/python3 testdata/ref_spin1_gpemap.py --write   # regenerate the file
"""
import json
import os
import sys

import numpy as np

sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))
from ref_spin1_gpe import raman_pair_gauge, solve  # noqa: E402
from refcheck import close  # noqa: E402

# map points: (name, omega, delta, eps, n c0, n c2, box length, grid points)
points = [
    ("plane wave, ferromagnetic c2", 1.0, 0.0, 0.5, 1.0, -0.1, 25.1327412287183, 64),
    ("broken-axisymmetry at Omega = 0", 0.0, 0.0, 0.05, 1.0, -0.1, 25.1327412287183, 64),
    ("antiferromagnetic, c2 > 0, eps < 0", 0.3, 0.0, -0.5, 1.0, 0.5, 25.1452185799751, 64),
]

cases = []
for name, om, de, eps, c0, c2, L, n in points:
    K, E = raman_pair_gauge(om, de, eps)
    c = {"name": name, "omega": om, "delta": de, "epsilon": eps, "nc0": c0, "nc2": c2,
         "points": n, "length": L, "K": K, "E": E, "c0": c0, "c2": c2, "norm": L, "trap_omega": 0.0}
    e, mu, res, pops = solve(c, starts=16)
    cases.append({"name": name, "omega": om, "delta": de, "epsilon": eps, "nc0": c0, "nc2": c2,
                  "points": n, "length": L, "energy": e, "residual": res, "populations": pops})

out = {"cases": cases}
path = os.path.join(os.path.dirname(os.path.abspath(__file__)), "ref_spin1_gpemap.json")
if "--write" in sys.argv:
    tmp = path + ".tmp"
    with open(tmp, "w") as f:
        json.dump(out, f, indent=1)
    os.replace(tmp, path)
    for c in cases:
        print(f"ref_spin1_gpemap.py: {c['name']}: E = {c['energy']:.12f} E_R, residual {c['residual']:.1e}, populations {c['populations']}")
else:
    with open(path) as f:
        committed = json.load(f)
    # inputs exactly (to rounding), energies to 1e-9 E_R (L-BFGS-B from
    # random starts: the last digits may change with the BLAS)
    strip = lambda d: [{k: v for k, v in c.items() if k not in ("energy", "residual", "populations")} for c in d["cases"]]
    bad = close(json.loads(json.dumps(strip(out))), strip(committed), "ref_spin1_gpemap")
    for a, b in zip(cases, committed["cases"]):
        if abs(a["energy"] - b["energy"]) > 1e-9:
            bad.append(f"{a['name']}: committed {b['energy']!r}, fresh {a['energy']!r}")
    for m in bad:
        print("FAIL:", m)
    if bad:
        sys.exit(1)
    print(f"ref_spin1_gpemap.py: {len(cases)} spin-1 GPE map points agree with {os.path.basename(path)}")
