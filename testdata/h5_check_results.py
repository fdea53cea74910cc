#!/usr/bin/python3
"""Outside reader for socmap result files (h5py from Debian, nothing from socmap).

For every file given: the root carries program, version, command_line,
created_utc, kind and plan_toml; every dataset carries non-empty `units` and
`description` string attributes; complex datasets read as complex numbers.
Per kind, values are cross-checked with scipy.constants:
  scheme-*  : E_R/h = ħ²k_R²/(2m h) from /model/k_R and /model/mass
  scheme-shake: Doppler coefficient = k_t/2π
  map       : every phase code present is named in the `codes` attribute, shapes match the axes
Exit status 1 with a list of failures.
"""
import sys
import numpy as np
import h5py
import scipy.constants as sc

fails = []


def fail(f, msg):
    fails.append(f"{f}: {msg}")


def check(path):
    with h5py.File(path, "r") as f:
        for a in ("program", "version", "command_line", "created_utc", "kind", "plan_toml"):
            if a not in f.attrs:
                fail(path, f"root attribute {a} missing")
        kind = f.attrs.get("kind", "")
        ndata = 0

        def visit(name, obj):
            nonlocal ndata
            if isinstance(obj, h5py.Dataset):
                ndata += 1
                for a in ("units", "description"):
                    v = obj.attrs.get(a)
                    if not isinstance(v, str) or not v.strip():
                        fail(path, f"/{name}: attribute {a} missing or empty ({v!r})")
                if obj.dtype.names == ("r", "i"):
                    fail(path, f"/{name}: compound r,i not read as complex")
                if obj.dtype.kind == "c" and obj.size and not np.iscomplexobj(obj[()]):
                    fail(path, f"/{name}: not complex")
        f.visititems(visit)
        if ndata == 0:
            fail(path, "no datasets")
        if kind.startswith("scheme-") or kind == "bands":
            kR, m, ER = f["model/k_R"][()], f["model/mass"][()], f["model/E_R"][()]
            want = sc.hbar ** 2 * kR ** 2 / (2 * m) / sc.h
            if m > 0 and abs(ER - want) > 1e-9 * abs(want):
                fail(path, f"E_R {ER} Hz, recomputed {want} Hz")
        if kind == "scheme-shake":
            kt, dop = f["results/k_t"][()], f["results/doppler"][()]
            if abs(dop - kt / (2 * np.pi)) > 1e-9 * abs(dop):
                fail(path, f"doppler {dop} Hz/(m/s), k_t/2π = {kt / (2 * np.pi)}")
        if kind == "map":
            ph = f["map/phase"][()]
            x = f["map/x"][()]
            shape = (len(f["map/y"][()]), len(x)) if "y" in f["map"] else (len(x),)
            if ph.shape != shape:
                fail(path, f"phase shape {ph.shape}, axes give {shape}")
            attr = f["map/phase"].attrs.get("codes", "")
            if isinstance(attr, bytes):
                attr = attr.decode()
            listed = {int(c.split("=")[0]) for c in attr.split(", ") if "=" in c}
            if "3=stripe" not in attr:
                fail(path, "phase codes attribute missing")
            if not set(int(c) for c in np.unique(ph)) <= listed:
                fail(path, f"phase codes {np.unique(ph)} not all in the codes attribute {attr!r}")
            done = f["map/done"][()]
            if done.shape != shape or not set(np.unique(done)) <= {0, 1}:
                fail(path, "done mask malformed")
    print(f"h5_check_results: {path}: kind {kind}, {ndata} datasets checked")


for p in sys.argv[1:]:
    try:
        check(p)
    except Exception as e:  # noqa: BLE001 — any failure to read is a failure
        fail(p, f"cannot read: {e}")
if not sys.argv[1:]:
    fails.append("no files given")
for x in fails:
    print("FAIL", x)
sys.exit(1 if fails else 0)
