#!/usr/bin/python3
"""Reference energies of the linear spin-orbit-coupled problem in a 1D
harmonic trap, for the Go tests of package gpe (gpe/linear_test.go).

    H = (k - sigma_z)^2 + w^2 x^2/4 + (Omega/2) sigma_x + (delta/2) sigma_z
      = -d^2/dx^2 + 2i sigma_z d/dx + 1 + w^2 x^2/4 + ...

(units: k_R, 1/k_R, E_R; m = 1/2, hbar = 1). Discretised with second-order
central finite differences on [-L/2, L/2] with Dirichlet walls, lowest
eigenvalue from scipy.sparse.linalg.eigsh (shift-invert), at M and 2M points,
then Richardson-extrapolated (error O(h^4)).

Self-check: for Omega = 0 the ground energy is w/2 exactly (the SOC term is a
gauge shift; harmonic oscillator, common practice, no source).

Usage:
    /usr/bin/python3 testdata/ref_gpe_linear.py           # recompute, compare with the committed file
    /usr/bin/python3 testdata/ref_gpe_linear.py --write   # regenerate ref_gpe_linear.json
Exits non-zero on failure, printing what it compared.
"""
import json
import os
import sys

import numpy as np
import scipy
import scipy.sparse as sp
import scipy.sparse.linalg as sla

HERE = os.path.dirname(os.path.abspath(__file__))
OUT = os.path.join(HERE, "ref_gpe_linear.json")

CASES = [
    # name, omega_trap, Omega, delta
    ("sanity-omega0", 1.0, 0.0, 0.0),
    ("rabi1.5-det0.2", 1.0, 1.5, 0.2),
    ("rabi3-det0-w0.5", 0.5, 3.0, 0.0),
    ("rabi6-det-0.5", 1.0, 6.0, -0.5),
]
L = 30.0
M = 6000


def ground(w, Om, de, m):
    h = L / (m + 1)
    x = -L / 2 + h * np.arange(1, m + 1)
    ones = np.ones(m)
    d2 = sp.diags([ones[:-1], -2 * ones, ones[:-1]], [-1, 0, 1]) / h**2
    d1 = sp.diags([-ones[:-1], ones[:-1]], [-1, 1]) / (2 * h)
    sz = sp.diags([1.0, -1.0])
    sx = sp.csr_matrix(np.array([[0.0, 1.0], [1.0, 0.0]]))
    eye2 = sp.identity(2)
    diag = sp.diags(1 + w**2 * x**2 / 4)
    H = (sp.kron(eye2, -d2 + diag) + sp.kron(2j * sz, d1)
         + sp.kron(Om / 2 * sx + de / 2 * sz, sp.identity(m)))
    H = H.tocsc()
    # shift below the spectrum: band minimum minus a margin
    vals = sla.eigsh(H, k=1, sigma=-abs(Om) / 2 - abs(de) - 3.0, which="LM",
                     return_eigenvectors=False)
    return float(np.min(vals.real))


def compute():
    out = {"description": "lowest eigenvalue (E_R) of the linear SOC Hamiltonian in a 1D harmonic trap; "
           "finite differences, scipy.sparse.linalg.eigsh, Richardson-extrapolated",
           "generator": "testdata/ref_gpe_linear.py",
           "numpy": np.__version__, "scipy": scipy.__version__,
           "box_length_per_kR": L, "points": [M, 2 * M], "cases": []}
    for name, w, Om, de in CASES:
        e1 = ground(w, Om, de, M)
        e2 = ground(w, Om, de, 2 * M)
        ex = e2 + (e2 - e1) / 3
        out["cases"].append({"name": name, "omega_trap": w, "Omega": Om, "delta": de,
                             "E_fd_M": e1, "E_fd_2M": e2, "E0": ex,
                             "richardson_correction": ex - e2})
        print(f"{name}: E(M)={e1:.12f} E(2M)={e2:.12f} extrapolated {ex:.12f}")
    return out


def main():
    fresh = compute()
    ok = True
    # self-check against the exact harmonic-oscillator value
    c0 = fresh["cases"][0]
    if abs(c0["E0"] - c0["omega_trap"] / 2) > 1e-8:
        print(f"FAIL: Omega=0 case gives {c0['E0']:.12f}, exact {c0['omega_trap']/2}")
        ok = False
    else:
        print(f"ok: Omega=0 case {c0['E0']:.12f} equals w/2 = {c0['omega_trap']/2} to 1e-8")
    if "--write" not in sys.argv:
        with open(OUT) as f:
            ref = json.load(f)
        for a, b in zip(ref["cases"], fresh["cases"]):
            d = abs(a["E0"] - b["E0"])
            status = "ok" if d <= 1e-9 else "FAIL"
            print(f"{status}: {a['name']}: committed {a['E0']:.12f} fresh {b['E0']:.12f} diff {d:.1e}")
            ok = ok and d <= 1e-9 and a["name"] == b["name"]
        if len(ref["cases"]) != len(fresh["cases"]):
            print("FAIL: number of cases differs")
            ok = False
    else:
        with open(OUT, "w") as f:
            json.dump(fresh, f, indent=1)
            f.write("\n")
        print("wrote", OUT)
    sys.exit(0 if ok else 1)


if __name__ == "__main__":
    main()
