"""Shared by the reference scripts in testdata/: comparison of freshly
computed reference values with the committed JSON.

close(fresh, committed, where) returns the list of differences: numbers to
1e-12 relative (libm/LAPACK differences in the last digits are not a change
of the reference), everything else exactly.
"""


def close(a, b, where):
    if isinstance(a, dict):
        if set(a) != set(b):
            return [f"{where}: keys differ"]
        return [m for k in a for m in close(a[k], b[k], f"{where}.{k}")]
    if isinstance(a, list):
        if len(a) != len(b):
            return [f"{where}: length {len(a)} vs {len(b)}"]
        return [m for i, (x, y) in enumerate(zip(a, b)) for m in close(x, y, f"{where}[{i}]")]
    if isinstance(a, float) or isinstance(b, float):
        if abs(a - b) <= 1e-12 * max(1.0, abs(a), abs(b)):
            return []
        return [f"{where}: committed {b!r} fresh {a!r}"]
    return [] if a == b else [f"{where}: committed {b!r} fresh {a!r}"]
