#!/usr/bin/python3
"""Reference for the GPE stripe edge of a uniform spin-orbit-coupled gas.

Our own numpy/scipy solver, independent of socmap's (different box,
different method). Units: k_R, E_R; H = (k_x - sigma_z)^2 + (Omega/2) sigma_x
+ interactions with n g_uu = n g_dd = 2(G1 + G2), n g_ud = 2(G1 - G2) at mean
density 1, delta = 0.

 * Plane wave: a single plane wave is an exact stationary state of the
   uniform GPE; its energy is minimised over (k, mixing angle) with
   scipy.optimize.minimize.
 * Stripe: the state is periodic with the wavelength 2 pi/k of its
   components; the box is one wavelength, L = 2 pi/k, with 64 points, and
   the energy is minimised over psi by L-BFGS (scipy) with the norm
   constraint built in (psi = sqrt(N) phi/|phi|). The stripe energy is then
   minimised over the period (k) by bounded scalar minimisation: the box is
   optimised over the stripe period.
 * The edge: the Omega where the optimised stripe energy meets the plane
   wave's (brentq on the difference), at G1 = 1, G2 = 0.05 and at G1 = 1.74,
   G2 = 0.013851 (variational edge 0.68 E_R).

Check by default (compares with testdata/ref_gpe_edge.json, exit 1 on a
mismatch); --write regenerates the JSON.
"""
import json, os, sys
import numpy as np
from scipy.optimize import minimize, minimize_scalar, brentq

HERE = os.path.dirname(os.path.abspath(__file__))
OUT = os.path.join(HERE, "ref_gpe_edge.json")
NPTS = 64


def couplings(G1, G2):
    return 2 * (G1 + G2), 2 * (G1 + G2), 2 * (G1 - G2)


def plane_wave_energy(om, G1, G2):
    guu, gdd, gud = couplings(G1, G2)

    def e(p):
        k, th = p
        c, s = np.cos(th), np.sin(th)
        return (c * c * (k - 1) ** 2 + s * s * (k + 1) ** 2 - om * c * s
                + 0.5 * guu * c ** 4 + 0.5 * gdd * s ** 4 + gud * c * c * s * s)
    best = None
    for k0 in (1.0, 0.5, 0.0):
        for th0 in (0.1, 0.4, np.pi / 4):
            r = minimize(e, [k0, th0], method="BFGS", options={"gtol": 1e-12})
            if best is None or r.fun < best.fun:
                best = r
    return best.fun


def stripe_energy(om, G1, G2, k):
    guu, gdd, gud = couplings(G1, G2)
    L = 2 * np.pi / k
    n = NPTS
    dx = L / n
    x = np.arange(n) * dx
    q = 2 * np.pi * np.fft.fftfreq(n, d=dx)
    K = np.array([(q - 1) ** 2, (q + 1) ** 2])
    N = L  # mean density 1

    def unpack(v):
        phi = (v[:2 * n] + 1j * v[2 * n:]).reshape(2, n)
        s = np.sqrt(N / (np.sum(np.abs(phi) ** 2) * dx))
        return s * phi, s

    def fg(v):
        psi, s = unpack(v)
        kp = np.fft.ifft(K * np.fft.fft(psi, axis=1), axis=1)
        nu, nd = np.abs(psi[0]) ** 2, np.abs(psi[1]) ** 2
        hp = kp.copy()
        hp[0] += (guu * nu + gud * nd) * psi[0] + om / 2 * psi[1]
        hp[1] += (gdd * nd + gud * nu) * psi[1] + om / 2 * psi[0]
        E = (np.sum(np.conj(psi) * kp).real + om * np.sum((np.conj(psi[0]) * psi[1]).real)
             + np.sum(0.5 * guu * nu * nu + 0.5 * gdd * nd * nd + gud * nu * nd)) * dx / N
        mu = np.sum(np.conj(psi) * hp).real * dx / N
        gr = s * dx * (hp - mu * psi) * 2 / N
        return E, np.concatenate([gr.real.ravel(), gr.imag.ravel()])

    # start: the two lower-band spinors at +-k, with equal weights
    def spinor(kk):
        # lower eigenvector of [[(kk-1)^2, om/2], [om/2, (kk+1)^2]]
        h = np.array([[(kk - 1) ** 2, om / 2], [om / 2, (kk + 1) ** 2]])
        w, v = np.linalg.eigh(h)
        return v[:, 0]
    a, b = spinor(k), spinor(-k)
    psi0 = np.array([a[0] * np.exp(1j * k * x) + b[0] * np.exp(-1j * k * x),
                     a[1] * np.exp(1j * k * x) + b[1] * np.exp(-1j * k * x)])
    v0 = np.concatenate([psi0.real.ravel(), psi0.imag.ravel()])
    r = minimize(fg, v0, jac=True, method="L-BFGS-B", options={"maxiter": 20000, "gtol": 1e-13, "ftol": 1e-16, "maxcor": 30})
    psi, _ = unpack(r.x)
    nu, nd = np.abs(psi[0]) ** 2, np.abs(psi[1]) ** 2
    # minority weight of the momentum distribution: the smaller of the weights at +k and -k
    ph = np.abs(np.fft.fft(psi, axis=1)) ** 2
    w = ph.sum(axis=0)
    wp, wm = w[1], w[-1]
    minority = min(wp, wm) / w.sum()
    return r.fun, minority


def best_stripe(om, G1, G2, k0):
    r = minimize_scalar(lambda k: stripe_energy(om, G1, G2, k)[0], bounds=(k0 - 0.25, min(k0 + 0.1, 1.2)),
                        method="bounded", options={"xatol": 1e-6})
    e, minority = stripe_energy(om, G1, G2, r.x)
    return e, r.x, minority


def edge(G1, G2, lo, hi):
    def f(om):
        e, k, m = best_stripe(om, G1, G2, np.sqrt(max(1 - (om / (4 + 2 * G1)) ** 2, 0.3)))
        if m < 0.02:  # the stripe has become a plane wave
            return 1.0
        return e - plane_wave_energy(om, G1, G2)
    return brentq(f, lo, hi, xtol=1e-5)


def compute():
    cases = []
    # G2 = 0.013851 at G1 = 1.74 puts the variational edge at 0.68 E_R (the
    # second case of the issue, which names G1 and the two edges only)
    for G1, G2, lo, hi in ((1.0, 0.05, 1.5, 1.8), (1.74, 0.013851, 0.7, 0.95)):
        cases.append({"G1": G1, "G2": G2, "gpe_stripe_edge_omega_over_ER": edge(G1, G2, lo, hi)})
    return {"about": "GPE stripe edge of the uniform 1D gas at delta = 0, box optimised over the stripe period; "
                     "numpy/scipy, testdata/ref_gpe_edge.py", "cases": cases}


def main():
    res = compute()
    if "--write" in sys.argv[1:]:
        with open(OUT, "w") as f:
            json.dump(res, f, indent=1)
            f.write("\n")
        print(json.dumps(res, indent=1))
        return 0
    with open(OUT) as f:
        ref = json.load(f)
    bad = 0
    for a, b in zip(res["cases"], ref["cases"]):
        d = abs(a["gpe_stripe_edge_omega_over_ER"] - b["gpe_stripe_edge_omega_over_ER"])
        print(f"G1 {a['G1']} G2 {a['G2']}: edge {a['gpe_stripe_edge_omega_over_ER']:.5f} (stored {b['gpe_stripe_edge_omega_over_ER']:.5f})")
        if d > 1e-4:
            bad += 1
    return 1 if bad else 0


if __name__ == "__main__":
    sys.exit(main())
