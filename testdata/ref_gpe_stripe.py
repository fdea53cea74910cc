#!/usr/bin/python3
"""Reference ground-state energy of a 1D uniform stripe for the Go tests of
package gpe (gpe/uniform_test.go), from an independent numpy implementation.

Problem (units k_R, 1/k_R, E_R): H = (k - sigma_z)^2 + (Omega/2) sigma_x +
interactions, uniform periodic box, Omega = 1, G1 = 0.3, G2 = 0.05
(n g = 2(G1+G2), n g_ud = 2(G1-G2), mean density 1), L = 2 pi 4/k1 with
k1 = sqrt(1 - (Omega/(4+2 G1))^2), 256 points, starting from the variational
stripe (same as gpe/benchgpe in 1D).

Method: numpy Strang split-step imaginary time at fixed steps tau and tau/2,
each run until the energy changes by less than 1e-14 per 20 steps; the
splitting error of the energy is O(tau^2) (Strang splitting, common practice,
no source), with a tau^4 term next: three-point Richardson extrapolation
E0 = (64 E(tau/4) - 20 E(tau/2) + E(tau))/45; its difference from the
two-point value (4 E(tau/4) - E(tau/2))/3 is reported as the error estimate.
The chemical potential is not variational, its error starts at O(tau):
mu0 = (8 mu(tau/4) - 6 mu(tau/2) + mu(tau))/3 (eliminating tau and tau^2).

Usage:
    /usr/bin/python3 testdata/ref_gpe_stripe.py           # recompute, compare with the committed file
    /usr/bin/python3 testdata/ref_gpe_stripe.py --write   # regenerate ref_gpe_stripe.json
"""
import json
import math
import os
import sys

import numpy as np

HERE = os.path.dirname(os.path.abspath(__file__))
OUT = os.path.join(HERE, "ref_gpe_stripe.json")

Om, G1, G2 = 1.0, 0.3, 0.05
guu = gdd = 2 * (G1 + G2)
gud = 2 * (G1 - G2)
s2 = Om / (4 + 2 * G1)
k1 = math.sqrt(1 - s2 * s2)
L = 2 * math.pi * 4 / k1
N = 256
x = -L / 2 + L / N * np.arange(N)
k = 2 * np.pi * np.fft.fftfreq(N, L / N)
Kup, Kdn = (k - 1) ** 2, (k + 1) ** 2
dV = L / N


def lower(q):
    hz, hx = -2 * q, Om / 2
    b = math.hypot(hz, hx)
    u, d = hx, -(hz + b)
    if u * u + d * d < (b - hz) ** 2 + hx * hx:
        u, d = b - hz, -hx
    n = math.hypot(u, d)
    u, d = u / n, d / n
    return (-u, -d) if u < 0 else (u, d)


def normalise(up, dn):
    n = (np.sum(np.abs(up) ** 2) + np.sum(np.abs(dn) ** 2)) * dV
    f = math.sqrt(L / n)
    return up * f, dn * f


def local(up, dn, tau):
    nu, nd = np.abs(up) ** 2, np.abs(dn) ** 2
    du, dd = guu * nu + gud * nd, gdd * nd + gud * nu
    a, bz, bx = (du + dd) / 2, (du - dd) / 2, Om / 2
    b = np.sqrt(bz * bz + bx * bx)
    ea = np.exp(-tau * a)
    c0, c1 = ea * np.cosh(tau * b), ea * np.sinh(tau * b) / b
    return (c0 - c1 * bz) * up - c1 * bx * dn, -c1 * bx * up + (c0 + c1 * bz) * dn


def energy(up, dn):
    fu, fd = np.fft.fft(up), np.fft.fft(dn)
    ekin = (np.sum(Kup * np.abs(fu) ** 2) + np.sum(Kdn * np.abs(fd) ** 2)) * dV / N
    nu, nd = np.abs(up) ** 2, np.abs(dn) ** 2
    erabi = Om * np.sum(np.conj(up) * dn).real * dV
    eint = np.sum(guu / 2 * nu ** 2 + gdd / 2 * nd ** 2 + gud * nu * nd) * dV
    return (ekin + erabi + eint) / L, (ekin + erabi + 2 * eint) / L


def fixed_tau(tau):
    u1, d1 = lower(k1)
    u2, d2 = lower(-k1)
    ep, em = np.exp(1j * k1 * x), np.exp(-1j * k1 * x)
    up, dn = normalise(u1 * ep + u2 * em, d1 * ep + d2 * em)
    eku, ekd = np.exp(-tau * Kup), np.exp(-tau * Kdn)
    prev = math.inf
    for it in range(200000):
        for _ in range(20):
            up, dn = local(up, dn, tau / 2)
            up, dn = np.fft.ifft(np.fft.fft(up) * eku), np.fft.ifft(np.fft.fft(dn) * ekd)
            up, dn = local(up, dn, tau / 2)
            up, dn = normalise(up, dn)
        e, mu = energy(up, dn)
        if abs(e - prev) < 1e-14:
            return e, mu
        prev = e
    raise SystemExit(f"FAIL: tau={tau} did not settle")


def compute():
    taus = [0.01, 0.005, 0.0025]
    es = [fixed_tau(t) for t in taus]
    for t, (e, mu) in zip(taus, es):
        print(f"tau={t}: E/N={e:.14f} mu={mu:.14f}")
    r1 = (4 * es[1][0] - es[0][0]) / 3
    r2 = (4 * es[2][0] - es[1][0]) / 3
    # three points: eliminate the tau^2 and tau^4 terms
    r3 = (64 * es[2][0] - 20 * es[1][0] + es[0][0]) / 45
    # mu is not variational: its splitting error starts at O(tau)
    m2 = 2 * es[2][1] - es[1][1]
    m3 = (8 * es[2][1] - 6 * es[1][1] + es[0][1]) / 3
    print(f"mu0 two-point (first order) {m2:.14f}, three-point {m3:.14f}")
    print(f"Richardson: E0={r1:.14f} (tau, tau/2), {r2:.14f} (tau/2, tau/4), {r3:.14f} (three points); mu0={m3:.14f}")
    return {"description": "ground-state energy per particle (E_R) of a 1D uniform stripe, numpy split step "
            "at fixed tau, Richardson-extrapolated in tau^2",
            "generator": "testdata/ref_gpe_stripe.py", "numpy": np.__version__,
            "Omega": Om, "G1": G1, "G2": G2, "points": N, "box_length_per_kR": L,
            "taus": taus, "energies": [e for e, _ in es], "mus": [m for _, m in es],
            "E0": r3, "mu0": m3, "error_estimate": abs(r3 - r2),
            "mu_error_estimate_first_order": abs(m3 - m2)}


def main():
    fresh = compute()
    ok = fresh["error_estimate"] < 1e-9
    print(("ok" if ok else "FAIL") + f": extrapolation error estimate {fresh['error_estimate']:.1e} (need < 1e-9)")
    if "--write" not in sys.argv:
        with open(OUT) as f:
            ref = json.load(f)
        d = abs(ref["E0"] - fresh["E0"])
        print(("ok" if d <= 1e-11 else "FAIL") + f": committed E0 {ref['E0']:.14f} fresh {fresh['E0']:.14f} diff {d:.1e}")
        ok = ok and d <= 1e-11
    else:
        with open(OUT, "w") as f:
            json.dump(fresh, f, indent=1)
            f.write("\n")
        print("wrote", OUT)
    sys.exit(0 if ok else 1)


if __name__ == "__main__":
    main()
