#!/usr/bin/python3
"""Reference sums for fitseal's one-pass positive-data kernel (positiveScan,
positiveScanRecip in fitters/sumlog_product.go).

Writes positive_sums.json beside this script:

    /usr/bin/python3 testdata/sumlog/make_positive_sums.py

Needs Debian's python3-numpy and python3-mpmath.

Each dataset is a cycle of float64 values (stored as Python float.hex
strings, so Go reads the same bits) and a length n: the data are
x[i] = cycle[i mod len(cycle)], i = 0..n-1. The data are invented
(numpy's seeded generator, or fixed values); the reference sums
Σ x, Σ ln x and Σ 1/x are exact rational sums or 50-digit mpmath
logarithms of the stored doubles, each cycle value weighted by how often
it occurs, written as decimal strings with 40 significant digits.
"""

import json
import os

import mpmath as mp
import numpy as np

mp.mp.dps = 80


def cyc(name, values, n):
    return {"name": name, "values": [float(v) for v in values], "n": n}


def datasets():
    rng = np.random.default_rng(20261202)
    out = []
    # every binary exponent the kernel takes, log-uniform over [2^-64, 2^64)
    span = np.exp2(rng.uniform(-64, 64, size=2000))
    span = np.clip(span, 2.0**-64, np.nextafter(2.0**64, 0))
    out.append(cyc("span_2000", span, 2000))
    # the same values in other lengths: tails of 1..47 values, whole blocks
    for n in (1, 2, 15, 47, 48, 49, 95, 96, 97, 1000):
        out.append(cyc(f"span_{n}", span[:n], n))
    # values near 1 (products stay near 1: the last digits matter)
    near = 1 + rng.normal(0, 1e-6, size=1000)
    out.append(cyc("near1_1000", near, 1000))
    # a gamma(2.5) sample, the benchmark workload's shape
    out.append(cyc("gamma_1000", rng.gamma(2.5, 1 / 0.8, size=1000), 1000))
    # all equal, short and very long
    out.append(cyc("equal_0.1_1000", [0.1], 1000))
    out.append(cyc("equal_0.1_1e6", [0.1], 1000000))
    # extremes of the range, alternating, n = 10^6 + 3 (a tail after the blocks)
    ext = [2.0**-64, np.nextafter(2.0**64, 0), 3.0, 1e-19, 1.8e19, 0.7, 12345.678]
    out.append(cyc("extremes_1e6+3", ext, 1000003))
    return out


def reference(ds):
    vals, n = ds["values"], ds["n"]
    k = len(vals)
    sx, sl, sr = mp.mpf(0), mp.mpf(0), mp.mpf(0)
    for j, v in enumerate(vals):
        count = n // k + (1 if j < n % k else 0)
        if count == 0:
            continue
        m = mp.mpf(v)  # exact: 80 digits hold any double
        sx += count * m
        sl += count * mp.log(m)
        sr += count / m
    return {"sum": mp.nstr(sx, 40), "sumLog": mp.nstr(sl, 40), "sumRecip": mp.nstr(sr, 40)}


def main():
    docs = []
    for ds in datasets():
        rec = {"name": ds["name"], "n": ds["n"], "cycle": [float(v).hex() for v in ds["values"]]}
        rec.update(reference(ds))
        docs.append(rec)
    path = os.path.join(os.path.dirname(os.path.abspath(__file__)), "positive_sums.json")
    with open(path, "w") as f:
        json.dump({"source": "mpmath %s at 80 digits, numpy %s (make_positive_sums.py)" % (mp.__version__, np.__version__),
                   "datasets": docs}, f, indent=1)
        f.write("\n")


if __name__ == "__main__":
    main()
