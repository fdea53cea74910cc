#!/usr/bin/python3
"""Plain numpy split-step imaginary-time solver of the spinor GPE, written for
the speed comparison of testdata/bench.sh (not used by socmap itself).

Same problem, units and definitions as gpe/benchgpe (see its doc comment):
H = (k_x - sigma_z)^2 + k_y^2 + (Omega/2) sigma_x + interactions, uniform
periodic box, stripe regime Omega = 1, G1 = 0.3, G2 = 0.05, mean density 1.

Method: Strang splitting exp(-tau L/2) exp(-tau K) exp(-tau L/2) with the
local 2x2 part in closed form (numpy exp/cosh/sinh), renormalisation after
each step. The residual ||H psi - mu psi|| is checked every 20 steps; when it
fell by less than 0.1% over them (the splitting floor, about 0.1 tau here),
tau is divided by 4. Stops when the residual <= --tol (E_R).

Prints one JSON line: wall time (numpy FFT plans need no setup), residual,
energy per particle, steps. Exits non-zero if the tolerance is not reached
within --max-steps.
"""
import argparse
import json
import math
import sys
import time

import numpy as np


def main():
    ap = argparse.ArgumentParser()
    ap.add_argument("--nx", type=int, default=256)
    ap.add_argument("--ny", type=int, default=0)
    ap.add_argument("--tol", type=float, default=1e-4)
    ap.add_argument("--max-steps", type=int, default=2_000_000)
    a = ap.parse_args()

    Om, G1, G2 = 1.0, 0.3, 0.05
    guu = gdd = 2 * (G1 + G2)
    gud = 2 * (G1 - G2)
    s2 = Om / (4 + 2 * G1)
    k1 = math.sqrt(1 - s2 * s2)
    Lx = 2 * math.pi * 4 / k1
    nx = a.nx
    x = -Lx / 2 + Lx / nx * np.arange(nx)
    kx = 2 * np.pi * np.fft.fftfreq(nx, Lx / nx)
    if a.ny > 0:
        Ly = 25.0
        y = -Ly / 2 + Ly / a.ny * np.arange(a.ny)
        ky = 2 * np.pi * np.fft.fftfreq(a.ny, Ly / a.ny)
        X, Y = np.meshgrid(x, y, indexing="ij")
        KX, KY = np.meshgrid(kx, ky, indexing="ij")
        env = 1 + 0.1 * np.cos(2 * np.pi * Y / Ly)
        dV = Lx / nx * Ly / a.ny
        vol = Lx * Ly
        fft, ifft = np.fft.fft2, np.fft.ifft2
    else:
        X, KX, KY = x, kx, 0.0 * kx
        env = 1.0
        dV = Lx / nx
        vol = Lx
        fft, ifft = np.fft.fft, np.fft.ifft
    Kup = (KX - 1) ** 2 + KY ** 2
    Kdn = (KX + 1) ** 2 + KY ** 2

    def lower(k):
        hz, hx = -2 * k, Om / 2
        b = math.hypot(hz, hx)
        u, d = hx, -(hz + b)
        if u * u + d * d < (b - hz) ** 2 + hx * hx:
            u, d = b - hz, -hx
        n = math.hypot(u, d)
        u, d = u / n, d / n
        if u < 0:
            u, d = -u, -d
        return u, d

    u1, d1 = lower(k1)
    u2, d2 = lower(-k1)
    ep, em = np.exp(1j * k1 * X), np.exp(-1j * k1 * X)
    up = env * (u1 * ep + u2 * em)
    dn = env * (d1 * ep + d2 * em)

    def normalise(up, dn):
        n = (np.sum(np.abs(up) ** 2) + np.sum(np.abs(dn) ** 2)) * dV
        f = math.sqrt(vol / n)
        return up * f, dn * f

    def local(up, dn, tau):
        nu, nd = np.abs(up) ** 2, np.abs(dn) ** 2
        du = guu * nu + gud * nd
        dd = gdd * nd + gud * nu
        aa = (du + dd) / 2
        bz = (du - dd) / 2
        bx = Om / 2
        b = np.sqrt(bz * bz + bx * bx)
        ea = np.exp(-tau * aa)
        c0 = ea * np.cosh(tau * b)
        c1 = ea * np.sinh(tau * b) / b
        return (c0 - c1 * bz) * up - c1 * bx * dn, -c1 * bx * up + (c0 + c1 * bz) * dn

    def energy_residual(up, dn):
        fu, fd = fft(up), fft(dn)
        ku, kd = ifft(Kup * fu), ifft(Kdn * fd)
        nu, nd = np.abs(up) ** 2, np.abs(dn) ** 2
        hu = ku + (guu * nu + gud * nd) * up + Om / 2 * dn
        hd = kd + (gdd * nd + gud * nu) * dn + Om / 2 * up
        N = (np.sum(nu) + np.sum(nd)) * dV
        ekin = np.sum(np.conj(up) * ku + np.conj(dn) * kd).real * dV
        erabi = Om * np.sum(np.conj(up) * dn).real * dV
        eint = np.sum(guu / 2 * nu ** 2 + gdd / 2 * nd ** 2 + gud * nu * nd) * dV
        mu = np.sum(np.conj(up) * hu + np.conj(dn) * hd).real * dV / N
        res = math.sqrt((np.sum(np.abs(hu - mu * up) ** 2) + np.sum(np.abs(hd - mu * dn) ** 2)) * dV / N)
        return (ekin + erabi + eint) / vol, res

    t0 = time.perf_counter()
    up, dn = normalise(up, dn)
    tau = 0.02
    steps = 0
    e, res = energy_residual(up, dn)
    prev_res = res
    while res > a.tol and steps < a.max_steps:
        eku, ekd = np.exp(-tau * Kup), np.exp(-tau * Kdn)
        for _ in range(20):
            up, dn = local(up, dn, tau / 2)
            fu, fd = fft(up) * eku, fft(dn) * ekd
            up, dn = ifft(fu), ifft(fd)
            up, dn = local(up, dn, tau / 2)
            up, dn = normalise(up, dn)
        steps += 20
        e, res = energy_residual(up, dn)
        if res > 0.999 * prev_res:
            tau /= 4
        prev_res = res
    t = time.perf_counter() - t0
    print(json.dumps({"program": "numpy split-step", "nx": a.nx, "ny": a.ny, "tol": a.tol,
                      "time_s": t, "residual": res, "energy": e, "steps": steps, "final_dtau": tau,
                      "numpy": np.__version__}))
    sys.exit(0 if res <= a.tol else 1)


if __name__ == "__main__":
    main()
