#!/usr/bin/python3
"""Reference values of g(t) = ln((1 - e^(-t))/t) for 0 < t <= ln 2, for
fitters/special_hazard_test.go, by mpmath at 50 digits (ln(-expm1(-t)/t)),
cross-checked against numpy's log(-expm1(-t)/t) to 1e-14 absolute.

Run: /usr/bin/python3 testdata/reference/make_log1mexp_ratio.py > testdata/reference/log1mexp_ratio.json
"""
import json
import math
import sys
import mpmath as mp

mp.mp.dps = 50
points = []
ts = [math.log(2) * k / 400 for k in range(1, 401)] + [10.0 ** -e for e in range(3, 300, 7)]
ts += [math.log(2)]
for t in sorted(set(ts)):
    g = mp.log(-mp.expm1(-mp.mpf(t)) / mp.mpf(t))
    if abs(float(g) - math.log(-math.expm1(-t) / t)) > 1e-14:
        sys.exit("numpy disagrees at t=%r" % t)
    points.append({"t": t, "g": mp.nstr(g, 20)})
json.dump({"log1mexp_ratio": points}, sys.stdout, indent=0)
print()
