#!/usr/bin/python3
"""Independent reference for the three-level (F = 1) bands of package dispersion.

Builds the 3x3 single-particle Hamiltonian of an F = 1 manifold (order
m = +1, 0, -1, units k_R and E_R)

    h(k) = sum_m [(k - K_m)^2 + E_m] |m><m| + (Omega/sqrt(2)) F_x,
    F_x = [[0, 1, 0], [1, 0, 1], [0, 1, 0]] / sqrt(2),

with the spin-1 matrix written out here (nothing from socmap), and computes
its eigenvalues with scipy.linalg.eigvalsh and <F_z>, <F_z^2> of every
branch from scipy.linalg.eigh on a k grid, for Raman-dressed cases
(K_m = 2m, E_m = delta m + eps m^2) and for generic K_m, E_m (unequal
recoils, as the shaking scheme gives). Written to testdata/ref_spin1.json,
read by dispersion/spin1_test.go.

Usage:
  /usr/bin/python3 testdata/ref_spin1.py           # recompute and compare (make refs)
  /usr/bin/python3 testdata/ref_spin1.py --write   # regenerate the file
Exit status 1 when the recomputed values differ from the file.
"""
import json
import os
import sys

import numpy as np
import scipy.linalg as sl

FX = np.array([[0, 1, 0], [1, 0, 1], [0, 1, 0]]) / np.sqrt(2)
FZ = np.diag([1.0, 0.0, -1.0])


def ham(k, K, E, omega):
    return np.diag([(k - K[i]) ** 2 + E[i] for i in range(3)]) + omega / np.sqrt(2) * FX


cases = []
raman = [(1.0, 0.0, 0.0), (3.0, 0.5, -1.0), (5.0, -0.3, 2.0), (0.5, 1.0, 0.25), (8.0, 0.0, -4.0)]
for (om, de, ep) in raman:
    K = [2.0, 0.0, -2.0]
    E = [de + ep, 0.0, -de + ep]
    cases.append({"kind": "raman", "omega": om, "delta": de, "epsilon": ep, "K": K, "E": E})
generic = [([1.0, -1.0, -3.1], [0.2, -0.2, 4.0], 2.5), ([2.9, 1.0, -1.0], [7.0, 0.3, -0.3], 1.2)]
for (K, E, om) in generic:
    cases.append({"kind": "generic", "omega": om, "K": K, "E": E})

for c in cases:
    ks = np.linspace(-4, 4, 33)
    pts = []
    for k in ks:
        w = sl.eigvalsh(ham(k, c["K"], c["E"], c["omega"]))
        w2, v = sl.eigh(ham(k, c["K"], c["E"], c["omega"]))
        fz = [float(v[:, i] @ FZ @ v[:, i]) for i in range(3)]
        fz2 = [float(v[:, i] @ FZ @ FZ @ v[:, i]) for i in range(3)]
        pts.append({"k": float(k), "E": [float(x) for x in w], "fz": fz, "fz2": fz2})
    c["points"] = pts

out = {"cases": cases}
path = os.path.join(os.path.dirname(os.path.abspath(__file__)), "ref_spin1.json")


from refcheck import close

if "--write" in sys.argv:
    tmp = path + ".tmp"
    with open(tmp, "w") as f:
        json.dump(out, f, indent=0)
    os.replace(tmp, path)
    print(f"ref_spin1.py: wrote {len(cases)} cases to {path}")
else:
    with open(path) as f:
        committed = json.load(f)
    bad = close(json.loads(json.dumps(out)), committed, "ref_spin1")
    for m in bad[:20]:
        print("FAIL:", m)
    if bad:
        sys.exit(1)
    print(f"ref_spin1.py: {len(cases)} three-level band cases agree with {os.path.basename(path)}")
