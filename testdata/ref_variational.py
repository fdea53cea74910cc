#!/usr/bin/python3
"""Independent reference for the variational theory of package phases.

Minimises, with scipy.optimize, the energy per particle (E_R) of the
two-plane-wave ansatz of a uniform spin-orbit-coupled condensate

    psi = sqrt(n) [C+ chi+ exp(i k+ x) + C- chi- exp(-i k- x)],
    chi = (cos t, sin t),  C+^2 = W,  C-^2 = 1 - W,
    h(k) = (k - sigma_z)^2 + (Omega/2) sigma_x + (delta/2) sigma_z,
    eps_int = x-average of [Guu n_up^2/2 + Gdd n_dn^2/2 + Gud n_up n_dn] / n^2,

for cases with g_upup != g_dndn and delta != 0 (plus two symmetric cases).
It shares no code or closed form with the Go package: the interaction average
is a numerical mean over one period of the density (16 phase samples, exact
for these trigonometric polynomials), the single-particle part is the
expectation of the 2x2 matrix h(k), and all five parameters (k+, k-, t+, t-,
W) are optimised, with many starts (scipy.optimize.minimize, L-BFGS-B).

Three minimisations per case: the single-plane-wave branch (W = 1, over k and
t), the stripe branch (W in [0.1, 0.9], all five parameters) and the whole
ansatz (W in [0, 1], all five parameters). The phase is classified from the
minimum of the whole ansatz with the rule of label.Classify (thresholds 0.1).

Usage:
  /usr/bin/python3 testdata/ref_variational.py --write   # regenerate the file
  /usr/bin/python3 testdata/ref_variational.py           # recompute and compare
The file testdata/ref_variational.json is read by phases/reference_test.go.
Exit status 1 when the recomputed values differ from the file.
"""
import json
import os
import sys

import numpy as np
from scipy.optimize import minimize

FLOOR = 0.1  # minority-weight floor of the stripe branch (label.DefaultThresholds.StripeMinority)
M = 16
PHI = 2 * np.pi * np.arange(M) / M
EXPPHI = np.exp(1j * PHI)

CASES = [
    # Omega, delta, Guu, Gdd, Gud   (E_R)
    (1.0, 0.0, 1.0, 1.0, 0.8),     # symmetric, stripe
    (3.0, 0.0, 1.0, 1.0, 0.8),     # symmetric, plane wave
    (0.8, -0.1, 1.2, 0.9, 0.85),   # asymmetric, near the balancing detuning
    (1.5, 0.05, 1.2, 0.9, 0.85),
    (2.5, -0.3, 1.2, 0.9, 0.85),
    (0.5, 0.4, 0.6, 0.5, 0.45),
    (1.2, -0.2, 0.4, 0.8, 0.5),
    (3.5, 0.3, 1.0, 0.7, 0.6),
    (4.5, 0.2, 0.8, 0.6, 0.9),     # g_ud > g: no stripe
    (2.0, -0.05, 2.0, 1.6, 1.2),   # near the first-order boundary
    (0.3, -0.15, 1.0, 0.7, 0.6),
    (1.8, 0.12, 0.5, 0.9, 0.3),
    (1.12, 0.02, 2.75, 1.48, 1.29),  # ground state: two waves, minority weight < 0.1
    (1.55, -0.35, 1.93, 2.98, 1.14), # the same
    (5.0, -0.1, 1.0, 0.8, 0.7),    # single minimum (delta + (Guu - Gdd)/2 = 0)
    (0.19125, -0.000742, 0.09396, 0.09282, 0.09154),  # weak interactions (G2 ~ 5e-4), stripe:
    (0.6107, 0.00028, 0.02535, 0.02563, 0.02345),     # the descent from the plane wave crosses negative curvature
]


def hmat(k, om, de):
    return np.array([[(k - 1) ** 2 + de / 2, om / 2], [om / 2, (k + 1) ** 2 - de / 2]])


def energy(p, case):
    om, de, guu, gdd, gud = case
    kp, km, tp, tm, w = p
    cp, cm = np.sqrt(w), np.sqrt(max(1 - w, 0.0))
    xp = np.array([np.cos(tp), np.sin(tp)])
    xm = np.array([np.cos(tm), np.sin(tm)])
    kin = w * xp @ hmat(kp, om, de) @ xp + (1 - w) * xm @ hmat(-km, om, de) @ xm
    up = cp * xp[0] + cm * xm[0] * EXPPHI
    dn = cp * xp[1] + cm * xm[1] * EXPPHI
    nu, nd = np.abs(up) ** 2, np.abs(dn) ** 2
    eint = np.mean(guu * nu ** 2 / 2 + gdd * nd ** 2 / 2 + gud * nu * nd)
    return kin + eint


def single_wave(case):
    best = None
    for k0 in np.linspace(-1.2, 1.2, 5):
        for t0 in np.linspace(0, np.pi, 6, endpoint=False):
            r = minimize(lambda p: energy([p[0], -p[0], p[1], p[1], 1.0], case), [k0, t0],
                         method="BFGS", options=dict(gtol=1e-11))
            if best is None or r.fun < best.fun:
                best = r
    k, t = best.x
    return np.array([k, -k, t, t, 1.0]), best.fun


def branch(case, wlo, whi, rng):
    best = None
    for c0 in (0.95, 0.7, 0.4, 0.1):
        for w0 in np.linspace(wlo + 0.02, whi - 0.02, 5):
            for sgn in (-1, 1):
                t = 0.5 * np.arctan2(sgn * np.sqrt(1 - c0 ** 2), c0)
                tm = 0.5 * np.arctan2(sgn * np.sqrt(1 - c0 ** 2), -c0)
                x0 = np.array([c0, c0, t, tm, w0]) + 0.01 * rng.standard_normal(5) * [1, 1, 1, 1, 0]
                r = minimize(energy, x0, args=(case,), method="L-BFGS-B",
                             bounds=[(-3, 3), (-3, 3), (None, None), (None, None), (wlo, whi)],
                             options=dict(ftol=1e-15, gtol=1e-11, maxiter=5000))
                if best is None or r.fun < best.fun:
                    best = r
    return best


def boundary(g1, g2):
    """Stripe <-> plane-wave boundary in Omega of the symmetric case, located by
    scipy.optimize.brentq on E_stripe(Omega) - E_single_wave(Omega), both from
    scipy minimisations (no closed form)."""
    from scipy.optimize import brentq
    guu = gdd = 2 * (g1 + g2)
    gud = 2 * (g1 - g2)

    def diff(om):
        case = (om, 0.0, guu, gdd, gud)
        _, ep = single_wave(case)
        best = None
        for c0 in (0.95, 0.8, 0.6):
            t = 0.5 * np.arctan2(-np.sqrt(1 - c0 ** 2), c0)
            tm = 0.5 * np.arctan2(-np.sqrt(1 - c0 ** 2), -c0)
            r = minimize(energy, [c0, c0, t, tm, 0.5], args=(case,), method="L-BFGS-B",
                         bounds=[(-3, 3), (-3, 3), (None, None), (None, None), (FLOOR, 1 - FLOOR)],
                         options=dict(ftol=1e-15, gtol=1e-11, maxiter=5000))
            if best is None or r.fun < best.fun:
                best = r
        return best.fun - ep

    return brentq(diff, 0.05, 4 * (1 - g2) - 1e-6, xtol=1e-10)


BOUNDARY_CASES = [(0.45, 0.05), (0.2, 0.15)]  # (G1, G2) in E_R


def describe(p, e):
    kp, km, tp, tm, w = p
    xp = np.array([np.cos(tp), np.sin(tp)])
    xm = np.array([np.cos(tm), np.sin(tm)])
    au = w * xp[0] ** 2 + (1 - w) * xm[0] ** 2
    ad = w * xp[1] ** 2 + (1 - w) * xm[1] ** 2
    # density contrast from the sampled total density
    cp, cm = np.sqrt(w), np.sqrt(max(1 - w, 0.0))
    dens = np.abs(cp * xp[0] + cm * xm[0] * EXPPHI) ** 2 + np.abs(cp * xp[1] + cm * xm[1] * EXPPHI) ** 2
    fine = np.exp(1j * np.linspace(0, 2 * np.pi, 2001))
    dens = np.abs(cp * xp[0] + cm * xm[0] * fine) ** 2 + np.abs(cp * xp[1] + cm * xm[1] * fine) ** 2
    contrast = (dens.max() - dens.min()) / (dens.max() + dens.min())
    if w < 0.5:  # majority wave first
        kp, km, w = -km, -kp, 1 - w
    return dict(energy=float(e), k_plus=float(kp), k_minus=float(km), w_major=float(max(w, 1 - w)),
                sigma_z=float(au - ad), contrast=float(contrast))


def classify(d):
    # rule of label.Classify with thresholds SingleMinimumK = 0.1, StripeMinority = 0.1;
    # the wave at k+ carries w_major, the wave at -k- carries 1 - w_major
    w = d["w_major"]
    mean_abs_k = w * abs(d["k_plus"]) + (1 - w) * abs(d["k_minus"])
    if mean_abs_k < 0.1:
        return "single-minimum"
    plus = (w if d["k_plus"] > 0 else 0) + ((1 - w) if d["k_minus"] < 0 else 0)
    minus = 1 - plus
    if min(plus, minus) >= FLOOR - 1e-7:
        return "stripe"
    return "plane-wave"


def compute():
    rng = np.random.default_rng(7)
    out = []
    for case in CASES:
        xp, ep = single_wave(case)
        st = branch(case, FLOOR, 1 - FLOOR, rng)
        gl = branch(case, 0.0, 1.0, rng)
        # the whole ansatz contains both branches: keep the lowest
        cands = [(gl.fun, gl.x), (st.fun, st.x), (ep, xp)]
        eg, xg = min(cands, key=lambda c: c[0])
        dgl = describe(xg, eg)
        om, de, guu, gdd, gud = case
        out.append(dict(omega=om, delta=de, guu=guu, gdd=gdd, gud=gud,
                        plane_wave=describe(xp, ep), stripe=describe(st.x, st.fun), ground=dgl,
                        phase=classify(dgl)))
    return out


def main():
    path = os.path.join(os.path.dirname(os.path.abspath(__file__)), "ref_variational.json")
    got = compute()
    bnd = [dict(g1=g1, g2=g2, omega=boundary(g1, g2)) for g1, g2 in BOUNDARY_CASES]
    if "--write" in sys.argv:
        doc = dict(description="Reference minima of the two-plane-wave ansatz (energies in E_R, momenta in k_R), "
                               "computed independently with scipy.optimize (L-BFGS-B) by testdata/ref_variational.py; "
                               "boundaries: stripe/plane-wave Omega (E_R) of the symmetric case at (G1, G2) by brentq",
                   floor=FLOOR, cases=got, boundaries=bnd)
        with open(path, "w") as f:
            json.dump(doc, f, indent=1)
        print("wrote", path)
        return 0
    with open(path) as f:
        ref = json.load(f)["cases"]
    bad = 0
    if len(ref) != len(got):
        print("case count differs: file", len(ref), "recomputed", len(got))
        return 1
    for r, g in zip(ref, got):
        tag = "Omega=%g delta=%g Guu=%g Gdd=%g Gud=%g" % (g["omega"], g["delta"], g["guu"], g["gdd"], g["gud"])
        for br in ("plane_wave", "stripe", "ground"):
            de = abs(r[br]["energy"] - g[br]["energy"])
            ok = de < 1e-8
            print("%s %-10s energy file %.12f recomputed %.12f %s" % (tag, br, r[br]["energy"], g[br]["energy"], "ok" if ok else "MISMATCH"))
            bad += not ok
        ok = r["phase"] == g["phase"]
        print("%s phase file %s recomputed %s %s" % (tag, r["phase"], g["phase"], "ok" if ok else "MISMATCH"))
        bad += not ok
    for r, g in zip(json.load(open(path))["boundaries"], bnd):
        ok = abs(r["omega"] - g["omega"]) < 1e-6
        print("stripe/plane-wave boundary G1=%g G2=%g: file %.9f recomputed %.9f %s" % (g["g1"], g["g2"], r["omega"], g["omega"], "ok" if ok else "MISMATCH"))
        bad += not ok
    if bad:
        print(bad, "mismatches")
        return 1
    print("all", len(got), "cases agree with", path)
    return 0


if __name__ == "__main__":
    sys.exit(main())
