#!/usr/bin/python3
"""Independent reference for spin-1 ground states at fixed magnetisation.

Without coupling (Omega = 0) a uniform spin-1 gas is a single-mode spinor
zeta = (zeta_+, zeta_0, zeta_-), |zeta| = 1, with energy per particle

  e(zeta) = q (rho_+ + rho_-) + (c/2) (F_z^2 + |F_+|^2),
  F_z = rho_+ - rho_-,  F_+ = sqrt(2) (zeta_+^* zeta_0 + zeta_0^* zeta_-),

(q: quadratic Zeeman shift, c = n c2, both in E_R; n c0/2 and the linear
Zeeman term are constants at fixed magnetisation M = F_z). This script
minimises e over the full complex spinor with scipy.optimize (SLSQP, the
two constraints |zeta| = 1 and F_z = M, many starts), and cross-checks the
result with the reduced form derived in gpe/spin1_test.go:

  rho_0 = 1 - s, rho_+- = (s +- M)/2, relative phase chosen by sign(c):
  e(s) = q s + (c/2) M^2 + c (1 - s)(s - sign(c) sqrt(s^2 - M^2)) ... (c < 0: +)

whose stationary points are the roots of de/ds (scipy.optimize.brentq) or the
ends of s in [|M|, 1].
The cases are our own. gpe/spin1_test.go reads testdata/ref_spin1_magnetization.json.

Usage:
  /usr/bin/python3 testdata/ref_spin1_magnetization.py           # recompute and compare
  /usr/bin/python3 testdata/ref_spin1_magnetization.py --write   # regenerate the file
"""
import json
import os
import sys

import numpy as np
from scipy.optimize import brentq, minimize

S2 = np.sqrt(2.0)
CASES = [  # (q, c = n c2, M), E_R
    (0.4, -1.0, 0.0),
    (0.4, -1.0, 0.3),
    (0.0, -1.0, 0.5),
    (0.5, 1.0, 0.2),
]


def spinor(x):
    return np.array([x[0] + 1j * x[1], x[2] + 1j * x[3], x[4] + 1j * x[5]])


def energy(z, q, c):
    r = np.abs(z) ** 2
    fz = r[0] - r[2]
    fp = S2 * (np.conj(z[0]) * z[1] + np.conj(z[1]) * z[2])
    return q * (r[0] + r[2]) + c / 2 * (fz * fz + abs(fp) ** 2)


def full(q, c, M):
    rng = np.random.default_rng(7)
    best = None
    cons = [
        {"type": "eq", "fun": lambda x: np.sum(x * x) - 1},
        {"type": "eq", "fun": lambda x: x[0] ** 2 + x[1] ** 2 - x[4] ** 2 - x[5] ** 2 - M},
    ]
    for _ in range(40):
        x0 = rng.normal(size=6)
        x0 /= np.linalg.norm(x0)
        with np.errstate(all="ignore"):
            r = minimize(lambda x: energy(spinor(x), q, c), x0, method="SLSQP", constraints=cons,
                         options={"ftol": 1e-15, "maxiter": 1000})
        if not r.success:
            continue
        if best is None or r.fun < best.fun - 1e-13:
            best = r
    z = spinor(best.x)
    return float(np.abs(z[1]) ** 2), float(energy(z, q, c))


def reduced(q, c, M):
    """Stationary point of e(s): the root of de/ds (scipy brentq) or an end."""
    sg = 1.0 if c < 0 else -1.0

    def e(s):
        return q * s + c / 2 * M * M + c * (1 - s) * (s + sg * np.sqrt(max(s * s - M * M, 0.0)))

    def de(s):
        w = np.sqrt(s * s - M * M)
        return q + c * (-(s + sg * w) + (1 - s) * (1 + sg * s / w))

    cands = [abs(M), 1.0]
    lo, hi = abs(M) + 1e-12, 1.0 - 1e-12
    grid = np.linspace(lo, hi, 2001)
    d = [de(x) for x in grid]
    for i in range(len(grid) - 1):
        if d[i] == 0 or d[i] * d[i + 1] < 0:
            cands.append(brentq(de, grid[i], grid[i + 1], xtol=1e-15, rtol=1e-15))
    s = min(cands, key=e)
    return 1 - s, e(s)


def compute():
    out = []
    for q, c, M in CASES:
        rho0, en = full(q, c, M)
        rr, er = reduced(q, c, M)
        if abs(rr - rho0) > 1e-6 or abs(er - en) > 1e-10:
            sys.exit(f"full and reduced minimisation disagree at q={q} c={c} M={M}: {rho0} {rr}, {en} {er}")
        out.append({"q": q, "c2n": c, "M": M, "rho0": rr, "e_spin": er})
    return {"source": "testdata/ref_spin1_magnetization.py (scipy SLSQP over the spinor, cross-checked by the reduced form)",
            "cases": out}


def main():
    path = os.path.join(os.path.dirname(os.path.abspath(__file__)), "ref_spin1_magnetization.json")
    doc = compute()
    if "--write" in sys.argv[1:]:
        with open(path, "w") as f:
            json.dump(doc, f, indent=1)
            f.write("\n")
        return
    with open(path) as f:
        old = json.load(f)
    for a, b in zip(old["cases"], doc["cases"]):
        for k in a:
            if abs(a[k] - b[k]) > 1e-9:
                sys.exit(f"ref_spin1_magnetization: {k} changed: {a[k]} -> {b[k]}")
    if len(old["cases"]) != len(doc["cases"]):
        sys.exit("ref_spin1_magnetization: case list changed; rerun with --write")
    print("ref_spin1_magnetization: ok")


if __name__ == "__main__":
    main()
