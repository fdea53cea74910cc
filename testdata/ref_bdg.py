#!/usr/bin/python3
"""Independent reference for the Bogoliubov spectra of package phases.

For each case the mean-field state is built in a periodic box of length L
with N grid points (pseudo-spectral: the kinetic operator through the DFT),
and the full Bogoliubov-de Gennes matrix of that state in the box,

    L_BdG = [[ H - mu + X,   Y           ],
             [ -Y*,         -(H - mu + X)* ]],
    H = (k - sigma_z)^2 + (Omega/2) sigma_x + (delta/2) sigma_z
        + diag(Guu|psi_up|^2 + Gud|psi_dn|^2, Gdd|psi_dn|^2 + Gud|psi_up|^2),
    X_st(x) = G_st psi_s(x) psi_t(x)*,   Y_st(x) = G_st psi_s(x) psi_t(x),

acting on (u(x), v(x)) with d psi = u e^{-i w t} + v* e^{i w t} (the
textbook linearisation of the two-component GP equation), is diagonalised
densely with numpy.linalg.eig (4N x 4N complex). The modes are the real
eigenvalues whose eigenvectors have positive norm sum |u|^2 - |v|^2; the zero
modes (|w| < 1e-5) are left out, and every mode below 2 E_R is kept.

Units: E_R, k_R, hbar = 1, m = 1/2; mean density 1 (G = n g in E_R).

States (no code shared with the Go package):
  * plane wave / single minimum: the energy per particle of
    exp(ikx)(cos t, sin t), minimised over k and t (scan + brentq on the
    t-derivative with k = <sigma_z>); L = 2 pi j / |k1| so that the box
    admits k1 exactly (any L for the single minimum);
  * stripe: explicit gradient flow in the box, then Newton iterations on
    H psi - mu psi = 0 with the dense real Jacobian (least squares, which
    handles the phase and translation null directions); the box holds
    j = 4 periods and its length is tuned (secant) until the stress
    sum_k k (k - s) |psi_k|^2 vanishes, i.e. until the period is the
    optimal one of the infinite system.

Usage:
  /usr/bin/python3 testdata/ref_bdg.py --write   # regenerate the file
  /usr/bin/python3 testdata/ref_bdg.py           # recompute and compare
The file testdata/ref_bdg.json is read by phases/bdg_reference_test.go.
Exit status 1 when the recomputed values differ from the file.
"""
import json
import os
import sys

import numpy as np
from scipy.optimize import brentq

HERE = os.path.dirname(os.path.abspath(__file__))
OUT = os.path.join(HERE, "ref_bdg.json")
WMAX = 2.0
ZERO = 1e-5


def sym(omega, g1, g2):
    return dict(omega=omega, delta=0.0, guu=2 * (g1 + g2), gdd=2 * (g1 + g2), gud=2 * (g1 - g2))


CASES = [
    dict(name="plane-wave symmetric", kind="plane-wave", N=64, periods=3, **sym(2.6, 1.0, 0.1)),
    dict(name="plane-wave asymmetric", kind="plane-wave", N=64, periods=3,
         omega=2.5, delta=0.3, guu=2.4, gdd=2.0, gud=1.8),
    dict(name="single-minimum", kind="single-minimum", N=64, L=20.0, **sym(5.0, 1.0, 0.1)),
    dict(name="stripe symmetric", kind="stripe", N=64, periods=4, **sym(1.0, 1.0, 0.1)),
]


def pw_energy(k, t, c):
    co, si = np.cos(t), np.sin(t)
    e = k * k + 1 - 2 * k * np.cos(2 * t) + 0.5 * c["omega"] * np.sin(2 * t) + 0.5 * c["delta"] * np.cos(2 * t)
    return e + 0.5 * c["guu"] * co ** 4 + 0.5 * c["gdd"] * si ** 4 + c["gud"] * co ** 2 * si ** 2


def plane_wave(c):
    """Minimum over (k, t) of the plane-wave energy: k = cos 2t at the optimum."""
    def e(t):
        return pw_energy(np.cos(2 * t), t, c)

    def de(t, h=1e-6):
        # derivative of e(t) with k eliminated, analytic in pieces
        k = np.cos(2 * t)
        co, si = np.cos(t), np.sin(t)
        dk = -2 * np.sin(2 * t)
        d = 2 * k * dk - 2 * dk * np.cos(2 * t) + 4 * k * np.sin(2 * t)
        d += c["omega"] * np.cos(2 * t) - c["delta"] * np.sin(2 * t)
        d += 0.5 * c["guu"] * 4 * co ** 3 * (-si) + 0.5 * c["gdd"] * 4 * si ** 3 * co
        d += c["gud"] * (2 * co * (-si) * si ** 2 + co ** 2 * 2 * si * co)
        return d

    ts = np.linspace(-np.pi / 2, np.pi / 2, 4001)
    es = np.array([e(t) for t in ts])
    best = None
    for i in range(1, len(ts) - 1):
        if es[i] <= es[i - 1] and es[i] <= es[i + 1]:
            a, b = ts[i - 1], ts[i + 1]
            if de(a) * de(b) < 0:
                t = brentq(de, a, b, xtol=1e-16, rtol=1e-15, maxiter=200)
            else:
                t = ts[i]
            if best is None or e(t) < e(best) - 1e-13 or (abs(e(t) - e(best)) <= 1e-13 and np.cos(2 * t) > np.cos(2 * best)):
                best = t
    return np.cos(2 * best), best


class Box:
    def __init__(self, L, N, c):
        self.L, self.N, self.c = L, N, c
        self.x = L * np.arange(N) / N
        self.k = 2 * np.pi * np.fft.fftfreq(N, d=L / N)
        self.G = np.array([[c["guu"], c["gud"]], [c["gud"], c["gdd"]]])

    def kin(self, psi):
        out = np.empty_like(psi)
        for s, sg in ((0, 1.0), (1, -1.0)):
            out[s] = np.fft.ifft((self.k - sg) ** 2 * np.fft.fft(psi[s]))
        return out

    def H(self, psi):
        c = self.c
        n = np.abs(psi) ** 2
        out = self.kin(psi)
        out[0] += 0.5 * c["omega"] * psi[1] + 0.5 * c["delta"] * psi[0]
        out[1] += 0.5 * c["omega"] * psi[0] - 0.5 * c["delta"] * psi[1]
        out[0] += (self.G[0, 0] * n[0] + self.G[0, 1] * n[1]) * psi[0]
        out[1] += (self.G[1, 0] * n[0] + self.G[1, 1] * n[1]) * psi[1]
        return out

    def mu(self, psi):
        return np.real(np.sum(np.conj(psi) * self.H(psi))) / np.sum(np.abs(psi) ** 2)

    def normalise(self, psi):
        return psi / np.sqrt(np.mean(np.sum(np.abs(psi) ** 2, axis=0)))

    def energy(self, psi):
        n = np.abs(psi) ** 2
        e = np.real(np.mean(np.sum(np.conj(psi) * self.kin(psi), axis=0)))
        c = self.c
        e += np.mean(np.real(c["omega"] * np.conj(psi[0]) * psi[1]) + 0.5 * c["delta"] * (n[0] - n[1]))
        e += np.mean(0.5 * c["guu"] * n[0] ** 2 + 0.5 * c["gdd"] * n[1] ** 2 + c["gud"] * n[0] * n[1])
        return e

    def kinetic_matrix(self):
        N = self.N
        F = np.fft.fft(np.eye(N), axis=0)
        Fi = np.fft.ifft(np.eye(N), axis=0)
        T = np.zeros((2 * N, 2 * N), complex)
        for s, sg in ((0, 1.0), (1, -1.0)):
            T[s * N:(s + 1) * N, s * N:(s + 1) * N] = Fi @ np.diag((self.k - sg) ** 2) @ F
        c = self.c
        I = np.eye(N)
        T[:N, N:] += 0.5 * c["omega"] * I
        T[N:, :N] += 0.5 * c["omega"] * I
        T[:N, :N] += 0.5 * c["delta"] * I
        T[N:, N:] -= 0.5 * c["delta"] * I
        return T

    def blocks(self, psi):
        """H - mu + X and Y as 2N x 2N matrices (component-major)."""
        N = self.N
        n = np.abs(psi) ** 2
        mu = self.mu(psi)
        A = self.kinetic_matrix() - mu * np.eye(2 * N)
        Y = np.zeros((2 * N, 2 * N), complex)
        for s in range(2):
            dens = self.G[s, 0] * n[0] + self.G[s, 1] * n[1]
            A[s * N:(s + 1) * N, s * N:(s + 1) * N] += np.diag(dens)
            for t in range(2):
                A[s * N:(s + 1) * N, t * N:(t + 1) * N] += np.diag(self.G[s, t] * psi[s] * np.conj(psi[t]))
                Y[s * N:(s + 1) * N, t * N:(t + 1) * N] = np.diag(self.G[s, t] * psi[s] * psi[t])
        return A, Y

    def newton(self, psi, tol=1e-13, it=40):
        N = self.N
        for _ in range(it):
            psi = self.normalise(psi)
            mu = self.mu(psi)
            F = (self.H(psi) - mu * psi).reshape(-1)
            if np.max(np.abs(F)) < tol:
                return psi, np.max(np.abs(F))
            A, Y = self.blocks(psi)
            # d F = A d + Y d*  (real-linear): in (Re d, Im d)
            J = np.block([[np.real(A + Y), np.real(1j * (A - Y))],
                          [np.imag(A + Y), np.imag(1j * (A - Y))]])
            rhs = -np.concatenate([np.real(F), np.imag(F)])
            d, *_ = np.linalg.lstsq(J, rhs, rcond=1e-12)
            psi = psi + (d[:2 * N] + 1j * d[2 * N:]).reshape(2, N)
        psi = self.normalise(psi)
        F = self.H(psi) - self.mu(psi) * psi
        return psi, np.max(np.abs(F))

    def flow(self, psi, steps=4000, dt=None):
        kmax = np.max(np.abs(self.k)) + 1
        dt = dt or 1.0 / (kmax ** 2 + np.max(np.abs(self.G)) * 4 + abs(self.c["omega"]))
        for _ in range(steps):
            psi = self.normalise(psi - dt * (self.H(psi) - self.mu(psi) * psi))
        return psi

    def modes(self, psi):
        A, Y = self.blocks(psi)
        Lb = np.block([[A, Y], [-np.conj(Y), -np.conj(A)]])
        w, V = np.linalg.eig(Lb)
        n = 2 * self.N
        out = []
        for i in range(len(w)):
            # The zero modes (phase, translation) form Jordan blocks, whose
            # eigenvalues rounding splits by about sqrt(machine epsilon)
            # (≈ 1e-7 · scale), real or imaginary depending on the LAPACK
            # build: only a complex frequency away from zero is an instability.
            if abs(w[i].imag) > 1e-7 and abs(w[i]) > 1e-5:
                raise SystemExit("complex frequency %s in a reference case" % w[i])
            u, v = V[:n, i], V[n:, i]
            norm = np.sum(np.abs(u) ** 2) - np.sum(np.abs(v) ** 2)
            if norm > 0 and ZERO < w[i].real < WMAX:
                out.append(w[i].real)
        return sorted(out)

    def stress(self, psi):
        s = 0.0
        for c_, sg in ((0, 1.0), (1, -1.0)):
            ph = np.fft.fft(psi[c_]) / self.N
            s += np.sum(self.k * (self.k - sg) * np.abs(ph) ** 2)
        return s


def stripe_box(c, N, j):
    g1 = (c["guu"] + c["gdd"] + 2 * c["gud"]) / 8
    s = abs(c["omega"]) / (2 * (2 + g1))
    k1 = np.sqrt(1 - s * s)
    t = 0.5 * np.arccos(k1)

    def solve(K, psi_hat=None):
        box = Box(j * 2 * np.pi / K, N, c)
        if psi_hat is None:
            x = box.x
            kk = K / 2
            psi = np.array([np.cos(t) * np.exp(1j * kk * x) + np.sin(t) * np.exp(-1j * kk * x),
                            -np.sin(t) * np.exp(1j * kk * x) - np.cos(t) * np.exp(-1j * kk * x)]) / np.sqrt(2)
            psi = box.flow(psi)
        else:
            psi = np.fft.ifft(psi_hat, axis=1)
        psi, res = box.newton(psi)
        return box, psi, res

    K0 = 2 * k1
    box, psi, res = solve(K0)
    S0 = box.stress(psi)
    K1 = K0 * (1 + 1e-3)
    box1, psi1, res = solve(K1, np.fft.fft(psi, axis=1))
    S1 = box1.stress(psi1)
    for _ in range(30):
        if abs(S1) < 1e-13:
            break
        K2 = K1 - S1 * (K1 - K0) / (S1 - S0)
        K0, S0 = K1, S1
        K1 = K2
        box1, psi1, res = solve(K1, np.fft.fft(psi1, axis=1))
        S1 = box1.stress(psi1)
    return box1, psi1, res, K1, S1


def run():
    out = []
    for c in CASES:
        rec = {k: c[k] for k in ("name", "kind", "N", "omega", "delta", "guu", "gdd", "gud")}
        if c["kind"] == "stripe":
            box, psi, res, K, S = stripe_box(c, c["N"], c["periods"])
            rec.update(K=K, periods=c["periods"], stress=S)
        else:
            k1, t = plane_wave(c)
            L = c.get("L") or 2 * np.pi * c["periods"] / abs(k1)
            box = Box(L, c["N"], c)
            psi = np.array([np.cos(t) * np.exp(1j * k1 * box.x), np.sin(t) * np.exp(1j * k1 * box.x)])
            res = np.max(np.abs(box.H(psi) - box.mu(psi) * psi))
            rec.update(k1=k1)
        rec.update(L=box.L, energy=box.energy(psi), mu=box.mu(psi), residual=float(res), modes=box.modes(psi))
        out.append(rec)
    return {"description": "Bogoliubov modes below 2 E_R of mean-field states in a periodic box, "
                           "dense numpy diagonalisation (testdata/ref_bdg.py)", "cases": out}


def main():
    doc = run()
    if "--write" in sys.argv:
        with open(OUT, "w") as f:
            json.dump(doc, f, indent=1)
        print("wrote", OUT)
        return 0
    with open(OUT) as f:
        old = json.load(f)
    bad = 0
    for a, b in zip(doc["cases"], old["cases"]):
        if len(a["modes"]) != len(b["modes"]) or np.max(np.abs(np.array(a["modes"]) - np.array(b["modes"]))) > 1e-9:
            print("ref_bdg: case %s differs from the file" % a["name"])
            bad = 1
    if len(doc["cases"]) != len(old["cases"]):
        bad = 1
    if not bad:
        print("ref_bdg: %d cases agree with %s" % (len(doc["cases"]), os.path.basename(OUT)))
    return bad


if __name__ == "__main__":
    sys.exit(main())
