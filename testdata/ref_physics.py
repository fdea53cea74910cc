#!/usr/bin/python3
"""Independent reference values for socmap's dispersion package.

Computed with numpy/scipy only (nothing from socmap), written to
testdata/ref_physics.json, which dispersion's Go tests read:

* constants: CODATA 2018 values from scipy.constants;
* breit_rabi: ground-state energies of a J = 1/2 alkali from direct
  diagonalisation of H = A I·J + μ_B (g_J J_z + g_I I_z) B in the |m_J, m_I>
  basis (numpy.linalg.eigvalsh), A = ΔE_hfs/(I + 1/2). The atomic data are
  restated here (same values as dispersion/atoms.go, from memory of
  D. A. Steck's compilations); the check is of the formula, not the data;
* bands: eigenvalues and <σ_z> of the 2×2 effective Hamiltonian
  (k − σ_z)² + (Ω/2)σ_x + (δ/2)σ_z (units k_R, E_R) from scipy.linalg.eigh.

Run: /usr/bin/python3 testdata/ref_physics.py          (recompute, compare; make test does)
     /usr/bin/python3 testdata/ref_physics.py --write  (regenerate the JSON)
"""
import json, os, sys
import numpy as np
import scipy.constants as sc
import scipy.linalg as sl

out = {}
out["constants"] = {
    "h": sc.h, "hbar": sc.hbar, "c": sc.c,
    "mu_B": sc.physical_constants["Bohr magneton"][0],
    "u": sc.physical_constants["atomic mass constant"][0],
    "a_B": sc.physical_constants["Bohr radius"][0],
    "k_B": sc.k,
}

mu_B = out["constants"]["mu_B"]
h = sc.h
atoms = {  # ΔE_hfs/h (Hz), g_J, g_I, I
    "Rb87": (6834682610.90429, 2.00233113, -0.0009951414, 1.5),
    "Na23": (1771626128.8, 2.00229600, -0.00080461080, 1.5),
    "K39": (461719720.2, 2.00229421, -0.00014193489, 1.5),
    "Li7": (803504086.6, 2.0023010, -0.0011822130, 1.5),
}


def ang(j):
    """Angular momentum matrices (Jz, J+) in the basis m = j, j-1, ..., -j."""
    m = np.arange(j, -j - 1, -1)
    jz = np.diag(m)
    jp = np.zeros((len(m), len(m)))
    for i in range(1, len(m)):
        jp[i - 1, i] = np.sqrt(j * (j + 1) - m[i] * (m[i] + 1))
    return jz, jp, m


def levels(name, B):
    dE, gJ, gI, I = atoms[name]
    A = dE * h / (I + 0.5)
    Jz, Jp, mJ = ang(0.5)
    Iz, Ip, mI = ang(I)
    Jm, Im = Jp.T, Ip.T
    eJ, eI = np.eye(2), np.eye(len(mI))
    IJ = np.kron(Jz, Iz) + 0.5 * (np.kron(Jp, Im) + np.kron(Jm, Ip))
    H = A * IJ + mu_B * B * (gJ * np.kron(Jz, eI) + gI * np.kron(eJ, Iz))
    mF = np.add.outer(mJ, mI).ravel()
    res = []
    for m in sorted(set(mF)):
        idx = np.where(mF == m)[0]
        ev = np.linalg.eigvalsh(H[np.ix_(idx, idx)])
        if len(ev) == 1:  # stretched: belongs to F = I + 1/2
            res.append((int(I + 0.5), int(m), ev[0]))
        else:  # lower eigenvalue is F = I - 1/2 (positive A)
            res.append((int(I - 0.5), int(m), ev[0]))
            res.append((int(I + 0.5), int(m), ev[1]))
    return res


br = []
for name in atoms:
    for B in (1e-6, 1e-4, 1.14e-3, 1e-2, 0.1, 0.5):  # tesla
        for F, m, E in levels(name, B):
            br.append({"atom": name, "B_T": B, "F": F, "m": m, "E_J": E})
out["breit_rabi"] = br

bands = []
sz = np.diag([1.0, -1.0])
sx = np.array([[0.0, 1.0], [1.0, 0.0]])
for Om, de in ((0.0, 0.0), (1.0, 0.0), (2.5, 0.0), (3.9, 0.0), (4.0, 0.0), (6.0, 0.0), (1.5, 0.7), (2.0, -1.3)):
    for k in np.linspace(-2.5, 2.5, 41):
        Hk = (k * np.eye(2) - sz) @ (k * np.eye(2) - sz) + Om / 2 * sx + de / 2 * sz
        w, v = sl.eigh(Hk)
        szv = [float(v[:, i] @ sz @ v[:, i]) for i in range(2)]
        bands.append({"omega": Om, "delta": de, "k": float(k), "E": [float(w[0]), float(w[1])], "sz": szv})
out["bands"] = bands

path = os.path.join(os.path.dirname(os.path.abspath(__file__)), "ref_physics.json")


from refcheck import close

if "--write" in sys.argv:
    tmp = path + ".tmp"
    with open(tmp, "w") as f:
        json.dump(out, f, indent=0)
    os.replace(tmp, path)
    print(f"ref_physics.py: wrote {len(br)} Breit–Rabi levels and {len(bands)} band points to {path}")
else:
    with open(path) as f:
        committed = json.load(f)
    bad = close(json.loads(json.dumps(out)), committed, "ref_physics")
    for m in bad[:20]:
        print("FAIL:", m)
    if bad:
        sys.exit(1)
    print(f"ref_physics.py: {len(br)} Breit–Rabi levels and {len(bands)} band points agree with {os.path.basename(path)}")
