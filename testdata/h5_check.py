#!/usr/bin/python3
"""Outside reader for socmap's HDF5 layer (issue 7).

Opens the fixture written by the Go test TestWriteFixture (output/h5) with
h5py (Debian python3-h5py, a general-purpose reference reader) and checks:
every dataset carries non-empty str attributes `units` and `description`;
values equal the formulas the Go side used (all exactly representable, so
the comparison is exact); complex datasets come back as complex128;
hyperslab-written values and fill values of chunked datasets; root
attribute types. Prints each comparison; exits 1 on any failure.

Usage: /usr/bin/python3 testdata/h5_check.py FILE.h5
"""
import sys

import h5py
import numpy as np

failures = 0


def check(what, ok, detail=""):
    global failures
    print(("ok   " if ok else "FAIL ") + what + (": " + detail if detail else ""))
    if not ok:
        failures += 1


def same(what, got, want):
    got = np.asarray(got)
    want = np.asarray(want)
    ok = got.shape == want.shape and got.dtype == want.dtype and \
        np.array_equal(got, want, equal_nan=want.dtype.kind in "fc")
    check(what, ok, "got %s %s, want %s %s" % (got.dtype, got.shape, want.dtype, want.shape))


def main(path):
    with h5py.File(path, "r") as f:
        # units/description on every dataset
        dsets = []
        f.visititems(lambda name, obj: dsets.append(name) if isinstance(obj, h5py.Dataset) else None)
        check("datasets found", len(dsets) == 10, str(sorted(dsets)))
        for name in sorted(dsets):
            a = f[name].attrs
            for key in ("units", "description"):
                v = a.get(key)
                check("/%s @%s is a non-empty str" % (name, key), isinstance(v, str) and v != "", repr(v))

        # root attributes
        r = f.attrs
        check("@program_version str", r["program_version"] == "socmap h5 fixture")
        check("@plan str with UTF-8", isinstance(r["plan"], str) and "Ω" in r["plan"] and r["plan"].count("\n") == 4)
        check("@answer int64", isinstance(r["answer"], np.int64) and r["answer"] == 42, repr(r["answer"]))
        check("@ratio float64", isinstance(r["ratio"], np.float64) and r["ratio"] == 2.5, repr(r["ratio"]))
        same("@weights", r["weights"], np.array([1, 0.5, -3], dtype=np.float64))
        same("@counts", r["counts"], np.array([-1, 0, 1 << 40], dtype=np.int64))
        check("/axes/delta @units", f["axes/delta"].attrs["units"] == "E_R")
        check("/data/big @units", f["data/big"].attrs["units"] == "Hz")

        # whole datasets
        same("/axes/delta", f["axes/delta"][()], 0.25 * np.arange(11.0) - 1)
        i, j, k = np.meshgrid(np.arange(3), np.arange(4), np.arange(5), indexing="ij")
        same("/data/f64_3d", f["data/f64_3d"][()], (i * 100 + j * 10 + k) + 0.5)
        same("/data/i8", f["data/i8"][()], np.arange(-3, 3, dtype=np.int8).reshape(2, 3))
        same("/data/i32", f["data/i32"][()],
             np.array([-2**31, -1, 0, 1, 2**31 - 1, 123456], dtype=np.int32))
        psi = f["data/psi"]
        check("/data/psi dtype is complex128", psi.dtype == np.complex128, str(psi.dtype))
        ii, jj = np.meshgrid(np.arange(4), np.arange(8), indexing="ij")
        same("/data/psi", psi[()], (0.5 * jj - 0.25j * ii).astype(np.complex128))
        big = f["data/big"]
        check("/data/big chunked + gzip", big.chunks is not None and big.compression == "gzip",
              "chunks %s compression %s" % (big.chunks, big.compression))
        same("/data/big", big[()], (0.125 * (np.arange(256 * 300) % 1000)).reshape(256, 300))

        # hyperslab-written chunked datasets
        ny, nx = 30, 40
        y, x = np.meshgrid(np.arange(ny), np.arange(nx), indexing="ij")
        want = np.full((ny, nx), np.nan)
        pts = (y + x) % 7 == 0
        want[pts] = (100 * y + x)[pts]
        want[6:11, 14:23] = -np.arange(45.0).reshape(5, 9) - 0.5
        e = f["map/energy"]
        check("/map/energy chunked (8,16) + gzip", e.chunks == (8, 16) and e.compression == "gzip")
        same("/map/energy (points, block, NaN fill)", e[()], want)
        same("/map/done", f["map/done"][()], pts.astype(np.int8))
        mp = f["map/psi"]
        check("/map/psi dtype is complex128", mp.dtype == np.complex128, str(mp.dtype))
        wp = np.zeros((ny, nx), dtype=np.complex128)
        a, b = np.meshgrid(np.arange(2), np.arange(3), indexing="ij")
        wp[2:4, 3:6] = a + 1j * b
        same("/map/psi (block)", mp[()], wp)
        same("/map/phase", f["map/phase"][()], (np.arange(ny * nx) % 5).astype(np.int8).reshape(ny, nx))
        check("/map/phase @codes", "3=stripe" in f["map/phase"].attrs["codes"])

    print("%d failure(s)" % failures)
    return 1 if failures else 0


if __name__ == "__main__":
    if len(sys.argv) != 2:
        print("usage: h5_check.py FILE.h5", file=sys.stderr)
        sys.exit(2)
    sys.exit(main(sys.argv[1]))
