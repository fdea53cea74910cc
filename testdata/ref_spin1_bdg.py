#!/usr/bin/python3
"""Independent reference for the spin-1 Bogoliubov spectra of package phases
(phases.Spin1Excitations).

For Raman-dressed F = 1 cases (h(k) = (k - 2F_z)^2 + delta F_z + eps F_z^2
+ (Omega/sqrt 2) F_x, shifted to the gauge of the pair (0, -1)), the script

  * finds the one-plane-wave mean-field state exp(ikx) phi by minimising the
    energy per particle phi.h(k)phi + G0/2 + G2/2 |<F>|^2 over k and the
    real unit spinor phi (scipy BFGS from a grid of starts), polished by
    scipy fsolve on the stationarity equations;
  * linearises the time-dependent spin-1 GP equation
        i d/dt psi = h psi + G0 n psi + G2 sum_a <F_a>(x) F_a psi - mu psi
    around it numerically: psi = exp(ik0 x)[phi + c_+ exp(iqx) + c_- exp(-iqx)],
    the right-hand side evaluated pointwise on a grid of 16 points of the
    phase qx (the kinetic part on each harmonic), projected back on the
    harmonics +-1 by FFT, and differentiated by central finite differences
    (step 1e-5) in the 12 real parameters of c_+, c_-;
  * diagonalises the 12 x 12 real generator with numpy.linalg.eig: its
    eigenvalues are -i omega for the 6 BdG frequencies at q and their
    conjugates, i.e. the set {+-omega_j(q), +-omega_j(-q)}.

For a stripe (STRIPES) the state is psi = exp(ik0 x) sum_m a_m exp(imKx),
m = -M .. M-1 with real three-component a_m: minimised at a guessed (k0, K)
by BFGS (energy: kinetic part per harmonic, interaction as a grid average of
G0/2 n^2 + G2/2 |<F>|^2), then the GP equations projected on the harmonics,
the norm and the two current conditions (k0, K) solved by fsolve; the
linearisation is done in a box of s periods (q = K r/s) with the
perturbations at q + mK and -q + mK, and the 8 lowest positive frequencies
(the union of the bands at q and -q) are kept.

No matrix of the Go derivation is used. The Go test
(phases/spin1bdg_reference_test.go) compares these 12 sorted values with
+-omega_j(q), +-omega_j(-q) of Spin1Excitations, and the stripe frequencies
with the union of its bands at q and -q (same basis size 2M).

Usage:
  /usr/bin/python3 testdata/ref_spin1_bdg.py --write   # regenerate the file
  /usr/bin/python3 testdata/ref_spin1_bdg.py           # recompute and compare
"""
import json
import os
import sys

import numpy as np
from scipy.optimize import minimize, fsolve

HERE = os.path.dirname(os.path.abspath(__file__))
sys.path.insert(0, HERE)
from refcheck import close  # noqa: E402

OUT = os.path.join(HERE, "ref_spin1_bdg.json")
R = 1 / np.sqrt(2)
FX = np.array([[0, R, 0], [R, 0, R], [0, R, 0]], dtype=complex)
FY = np.array([[0, -1j * R, 0], [1j * R, 0, -1j * R], [0, 1j * R, 0]])
FZ = np.diag([1.0, 0.0, -1.0]).astype(complex)

CASES = [
    dict(name="Raman plane wave, ferromagnetic c2", omega=2.0, delta=0.5, eps=1.0, G0=1.0, G2=-0.1,
         qs=[0.3, -0.6, 0.9, 1.7], qy=[0.5]),
    dict(name="Raman single minimum, antiferromagnetic c2", omega=3.0, delta=0.2, eps=0.5, G0=1.0, G2=0.1,
         qs=[0.25, -0.8, 1.2], qy=[0.7]),
    dict(name="Raman, strong spin coupling", omega=1.5, delta=-0.4, eps=0.3, G0=1.2, G2=-0.3,
         qs=[0.4, -1.1], qy=[0.3]),
]


def model(c):
    m = np.array([1.0, 0.0, -1.0])
    K = 2 * m
    E = c["delta"] * m + c["eps"] * m * m
    # gauge of the pair (0, -1): K_0 = 1, K_-1 = -1, E_0 + E_-1 = 0
    K = K - (K[1] + K[2]) / 2
    E = E - (E[1] + E[2]) / 2
    return K, E


def h(k, K, E, omega):
    H = np.diag((k - K) ** 2 + E).astype(complex)
    H[0, 1] = H[1, 0] = H[1, 2] = H[2, 1] = omega / 2
    return H


def spinor(a, b):
    return np.array([np.sin(a) * np.cos(b), np.cos(a), np.sin(a) * np.sin(b)])


def energy(k, phi, c, K, E):
    f = [np.real(phi.conj() @ F @ phi) for F in (FX, FY, FZ)]
    return np.real(phi.conj() @ h(k, K, E, c["omega"]) @ phi) + c["G0"] / 2 + c["G2"] / 2 * sum(x * x for x in f)


def state(c):
    K, E = model(c)
    best = None
    for k0 in np.linspace(-3, 3, 13):
        for a0 in (0.3, 1.2, 2.0):
            for b0 in (0.5, 2.5, 4.0):
                r = minimize(lambda x: energy(x[0], spinor(x[1], x[2]), c, K, E), [k0, a0, b0],
                             method="BFGS", options=dict(gtol=1e-11))
                if best is None or r.fun < best.fun - 1e-12:
                    best = r
    k, a, b = best.x
    phi = spinor(a, b).real

    def eqs(x):
        p, mu, kk = x[:3], x[3], x[4]
        f = [np.real(p @ F @ p) for F in (FX, FZ)]
        Hm = h(kk, K, E, c["omega"]).real + c["G0"] * (p @ p) * np.eye(3) + c["G2"] * (f[0] * FX.real + f[1] * FZ.real)
        return list(Hm @ p - mu * p) + [p @ p - 1, float(np.sum(2 * (kk - K) * p * p))]

    mu0 = float(phi @ (h(k, K, E, c["omega"]).real @ phi)) + c["G0"]
    x = fsolve(eqs, list(phi) + [mu0, k], xtol=1e-14)
    return x[:3], x[3], x[4], K, E


def rhs(cp, cm, phi, mu, k0, q, along_x, c, K, E, N=16):
    """Harmonics +-1 of the GP right-hand side for chi = phi + cp e^{i th} + cm e^{-i th}."""
    th = 2 * np.pi * np.arange(N) / N
    chi = phi[:, None] + cp[:, None] * np.exp(1j * th) + cm[:, None] * np.exp(-1j * th)
    n = np.sum(np.abs(chi) ** 2, axis=0)
    f = [np.einsum("ix,ij,jx->x", chi.conj(), F, chi) for F in (FX, FY, FZ)]
    nl = c["G0"] * n * chi + c["G2"] * sum(fa * (F @ chi) for fa, F in zip(f, (FX, FY, FZ))) - mu * chi
    spec = np.fft.fft(nl, axis=1) / N  # coefficient of e^{i n th} at index n
    out = {}
    for s, coef in ((1, cp), (-1, cm)):
        if along_x:
            hk = h(k0 + s * q, K, E, c["omega"])
        else:
            hk = h(k0, K, E, c["omega"]) + q * q * np.eye(3)
        out[s] = hk @ coef + spec[:, s % N]
    return out[1], out[-1]


def modes(phi, mu, k0, q, along_x, c, K, E, step=1e-5):
    def deriv(z):
        cp = z[0:3] + 1j * z[3:6]
        cm = z[6:9] + 1j * z[9:12]
        fp, fm = rhs(cp, cm, phi.astype(complex), mu, k0, q, along_x, c, K, E)
        dp, dm = -1j * fp, -1j * fm  # d/dt c = -i F
        return np.concatenate([dp.real, dp.imag, dm.real, dm.imag])

    J = np.zeros((12, 12))
    for j in range(12):
        e = np.zeros(12)
        e[j] = step
        J[:, j] = (deriv(e) - deriv(-e)) / (2 * step)
    lam = np.linalg.eigvals(J)
    return sorted(float(-x.imag) for x in lam), float(np.max(np.abs(lam.real)))


# ---------------------------------------------------------------------------
# Stripes: psi = exp(ik0 x) sum_m a_m exp(imKx), m = -M .. M-1, real a_m (3).
# The interaction is evaluated pointwise on a grid of the phase Kx (no
# Fourier bookkeeping), the kinetic/coupling part on each harmonic.

STRIPES = [
    dict(name="Raman stripe, ferromagnetic c2", omega=1.0, delta=-0.2 + 0.5, eps=0.5, G0=2.2, G2=-0.4,
         M=8, guess=(-0.99, 1.99), qfrac=[0.25, 0.375]),
]


def stripe_fields(a, M, Ng=64):
    """chi(theta) on Ng points of theta = Kx for amplitudes a (3 x 2M)."""
    m = np.arange(-M, M)
    th = 2 * np.pi * np.arange(Ng) / Ng
    return a @ np.exp(1j * np.outer(m, th))  # 3 x Ng


def stripe_energy(a, k0, K, c, Kof, Eof, M):
    m = np.arange(-M, M)
    e = sum(a[:, i] @ h(k0 + mi * K, Kof, Eof, c["omega"]).real @ a[:, i] for i, mi in enumerate(m))
    chi = stripe_fields(a, M)
    n = np.sum(np.abs(chi) ** 2, axis=0)
    f2 = sum(np.real(np.einsum("ix,ij,jx->x", chi.conj(), F, chi)) ** 2 for F in (FX, FY, FZ))
    return float(e + np.mean(c["G0"] / 2 * n * n + c["G2"] / 2 * f2))


def stripe_eqs(x, c, Kof, Eof, M):
    nh = 2 * M
    a = x[:3 * nh].reshape(nh, 3).T
    mu, k0, K = x[3 * nh:3 * nh + 3]
    m = np.arange(-M, M)
    Ng = 64
    chi = stripe_fields(a, M, Ng)
    n = np.sum(np.abs(chi) ** 2, axis=0)
    nl = c["G0"] * n * chi + c["G2"] * sum(np.einsum("ix,ij,jx->x", chi.conj(), F, chi) * (F @ chi) for F in (FX, FY, FZ))
    spec = np.fft.fft(nl, axis=1) / Ng
    r = []
    cur0 = cur1 = 0.0
    for i, mi in enumerate(m):
        hk = h(k0 + mi * K, Kof, Eof, c["omega"]).real
        ri = hk @ a[:, i] + spec[:, mi % Ng].real - mu * a[:, i]
        r += list(ri)
        d = np.sum(2 * (k0 + mi * K - Kof) * a[:, i] ** 2)
        cur0 += d
        cur1 += mi * d
    return r + [float(np.sum(a * a) - 1), cur0, cur1]


def stripe_state(c):
    Kof, Eof = model(c)
    M = c["M"]
    nh = 2 * M
    k0, K = c["guess"]
    # start: the lowest-band spinors at k0 + mK for m = 0, 1, 2, equal weights
    a = np.zeros((3, nh))
    for mi in (0, 1, 2):
        w, v = np.linalg.eigh(h(k0 + mi * K, Kof, Eof, c["omega"]).real)
        a[:, mi + M] = v[:, 0] / np.sqrt(3)

    def e_of(z):
        b = z.reshape(3, nh)
        return stripe_energy(b / np.sqrt(np.sum(b * b)), k0, K, c, Kof, Eof, M)

    r = minimize(e_of, a.ravel(), method="BFGS", options=dict(gtol=1e-9))
    a = r.x.reshape(3, nh)
    a /= np.sqrt(np.sum(a * a))
    mu = stripe_eqs(np.concatenate([a.T.ravel(), [0.0, k0, K]]), c, Kof, Eof, M)
    mu = float(np.dot(a.T.ravel(), mu[:3 * nh]))
    x = fsolve(stripe_eqs, np.concatenate([a.T.ravel(), [mu, k0, K]]), args=(c, Kof, Eof, M), xtol=1e-14)
    res = float(np.max(np.abs(stripe_eqs(x, c, Kof, Eof, M))))
    a = x[:3 * nh].reshape(nh, 3).T
    mu, k0, K = x[3 * nh:]
    if K < 0:
        k0, K, a = k0 - K, -K, a[:, ::-1]
    return a, float(mu), float(k0), float(K), res, Kof, Eof


def stripe_modes(a, mu, k0, K, q, c, Kof, Eof, M, s, step=1e-5):
    """12 nh eigenvalues -Im of the generator of the GP equation linearised
    around the stripe in a box of s periods (q = K r/s)."""
    nh = 2 * M
    m = np.arange(-M, M)
    Ng = 64 * s
    th = 2 * np.pi * np.arange(Ng) / Ng  # phase (K/s) x over the box
    jq = int(round(q / K * s))  # q in units of K/s
    E0 = np.exp(1j * np.outer(s * m, th))
    Ep = np.exp(1j * np.outer(s * m + jq, th))
    Em = np.exp(1j * np.outer(s * m - jq, th))
    phi = a.astype(complex) @ E0

    def F(cp, cm):
        chi = phi + cp @ Ep + cm @ Em
        n = np.sum(np.abs(chi) ** 2, axis=0)
        nl = c["G0"] * n * chi + c["G2"] * sum(np.einsum("ix,ij,jx->x", chi.conj(), Fa, chi) * (Fa @ chi) for Fa in (FX, FY, FZ)) - mu * chi
        spec = np.fft.fft(nl, axis=1) / Ng
        op = np.zeros((3, nh), complex)
        om = np.zeros((3, nh), complex)
        for i, mi in enumerate(m):
            op[:, i] = h(k0 + mi * K + q, Kof, Eof, c["omega"]) @ cp[:, i] + spec[:, (s * mi + jq) % Ng]
            om[:, i] = h(k0 + mi * K - q, Kof, Eof, c["omega"]) @ cm[:, i] + spec[:, (s * mi - jq) % Ng]
        return op, om

    nv = 3 * nh

    def deriv(z):
        cp = (z[0:nv] + 1j * z[nv:2 * nv]).reshape(3, nh)
        cm = (z[2 * nv:3 * nv] + 1j * z[3 * nv:4 * nv]).reshape(3, nh)
        fp, fm = F(cp, cm)
        dp, dm = (-1j * fp).ravel(), (-1j * fm).ravel()
        return np.concatenate([dp.real, dp.imag, dm.real, dm.imag])

    J = np.zeros((4 * nv, 4 * nv))
    for j in range(4 * nv):
        e = np.zeros(4 * nv)
        e[j] = step
        J[:, j] = (deriv(e) - deriv(-e)) / (2 * step)
    lam = np.linalg.eigvals(J)
    w = sorted(float(-x.imag) for x in lam if -x.imag > 1e-6)
    return w


def run():
    out = []
    for c in CASES:
        phi, mu, k0, K, E = state(c)
        rec = dict(name=c["name"], omega=c["omega"], delta=c["delta"], eps=c["eps"], G0=c["G0"], G2=c["G2"],
                   k0=float(k0), mu=float(mu), phi=[float(x) for x in phi], energy=float(energy(k0, phi.astype(complex), c, K, E)))
        pts = []
        for axis, qs in (("x", c["qs"]), ("y", c["qy"])):
            for q in qs:
                w, re = modes(phi, mu, k0, q, axis == "x", c, K, E)
                pts.append(dict(axis=axis, q=q, omegas=w, max_real=re))
        rec["points"] = pts
        out.append(rec)
    stripes = []
    for c in STRIPES:
        a, mu, k0, K, res, Kof, Eof = stripe_state(c)
        rec = dict(name=c["name"], omega=c["omega"], delta=c["delta"], eps=c["eps"], G0=c["G0"], G2=c["G2"], M=c["M"],
                   k0=k0, K=K, mu=mu, residual=res, energy=stripe_energy(a, k0, K, c, Kof, Eof, c["M"]))
        pts = []
        for f in c["qfrac"]:
            s = {0.25: 4, 0.375: 8}[f]
            w = stripe_modes(a, mu, k0, K, f * K, c, Kof, Eof, c["M"], s)
            pts.append(dict(qfrac=f, q=f * K, omegas=w[:8]))
        rec["points"] = pts
        stripes.append(rec)
    return {"description": "spin-1 BdG frequencies (+-omega at q and -q) by numerical linearisation of the spin-1 GP "
                           "equation around the one-plane-wave state and a stripe (testdata/ref_spin1_bdg.py)", "cases": out,
            "stripes": stripes}


def main():
    doc = json.loads(json.dumps(run()))
    if "--write" in sys.argv:
        with open(OUT, "w") as f:
            json.dump(doc, f, indent=1)
        print("wrote", OUT)
        return 0
    with open(OUT) as f:
        old = json.load(f)
    # the finite-difference linearisation is reproducible to rounding, not to
    # 1e-12: compare the frequencies to 1e-9 E_R, the rest with refcheck
    bad = []
    if len(doc.get("stripes", [])) != len(old.get("stripes", [])):
        bad.append("stripe cases differ in number")
    for a, b in zip(doc.get("stripes", []), old.get("stripes", [])):
        for pa, pb in zip(a["points"], b["points"]):
            if np.max(np.abs(np.array(pa["omegas"]) - np.array(pb["omegas"]))) > 1e-9:
                bad.append("%s q=%g: frequencies differ" % (a["name"], pa["q"]))
            pa["omegas"], pb["omegas"] = 0, 0
        for k in ("residual",):
            a[k], b[k] = 0, 0
    for a, b in zip(doc["cases"], old["cases"]):
        for pa, pb in zip(a["points"], b["points"]):
            if np.max(np.abs(np.array(pa["omegas"]) - np.array(pb["omegas"]))) > 1e-9:
                bad.append("%s q=%g: frequencies differ" % (a["name"], pa["q"]))
            pa["omegas"], pb["omegas"], pa["max_real"], pb["max_real"] = 0, 0, 0, 0
    bad += close(doc, old, "ref_spin1_bdg")
    for m in bad[:20]:
        print("FAIL:", m)
    if bad:
        return 1
    print("ref_spin1_bdg.py: %d cases agree with %s" % (len(doc["cases"]), os.path.basename(OUT)))
    return 0


if __name__ == "__main__":
    sys.exit(main())
