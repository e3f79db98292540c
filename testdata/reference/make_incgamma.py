#!/usr/bin/python3
"""Reference values of the regularized incomplete gamma functions for
fitters/incgamma_test.go: ln P(a, x) and ln Q(a, x) by mpmath at 60 digits
(mpmath.gammainc with regularized=True), cross-checked against scipy's
gammainc/gammaincc where those are above 1e-290 (they must agree to 1e-12
relative or the script stops). cond is the condition number of the
smaller tail, |x ∂ln T/∂x| + |a ∂ln T/∂a| (T = min(P, Q)), so the test can
tell well-conditioned points from ill-conditioned ones.

Run: /usr/bin/python3 testdata/reference/make_incgamma.py > testdata/reference/incgamma.json
"""
import json
import mpmath as mp
from scipy.special import gammainc, gammaincc

mp.mp.dps = 60

shapes = [1e-3, 0.01, 0.1, 0.3, 0.5, 0.9, 1, 1.5, 2.5, 4, 7.5, 10, 20, 29.5, 30, 45,
          99, 100, 300, 1000, 1e4]
ratios = [1e-6, 1e-3, 0.01, 0.1, 0.3, 0.5, 0.7, 0.8, 0.9, 0.95, 0.99, 1, 1.01, 1.05,
          1.1, 1.2, 1.3, 1.5, 2, 3, 5, 10, 30, 100]
absolute = [1e-10, 1e-3, 0.1, 0.5, 0.9, 1, 1.1, 1.5, 2, 3, 5, 10, 50, 200, 600, 700, 800]


def tails(a, x):
    p = mp.gammainc(a, 0, x, regularized=True)
    q = mp.gammainc(a, x, mp.inf, regularized=True)
    return p, q


points = []
for a0 in shapes:
    a = mp.mpf(a0)
    xs = set()
    for r in ratios:
        xs.add(float(a0 * r))
    for x in absolute:
        xs.add(float(x))
    for d in (1, 1.5, 2):
        # around the switch between series and continued fraction
        xs.add(float(a0 + d))
        xs.add(float(a0 + 1 + 0.5 * a0 ** 0.5))
    for x0 in sorted(xs):
        if not x0 > 0 or x0 > 1e5:
            continue
        x = mp.mpf(x0)
        p, q = tails(a, x)
        if p == 0 or q == 0:
            continue
        small_is_p = p < q
        # condition numbers of ln T with respect to x and a
        f = mp.exp(a * mp.log(x) - x - mp.loggamma(a))  # x f(x) of the density
        t = p if small_is_p else q
        cx = abs(f / t)
        h = a * mp.mpf(10) ** -20
        try:
            if small_is_p:
                da = (mp.log(mp.gammainc(a + h, 0, x, regularized=True)) - mp.log(p)) / h
            else:
                da = (mp.log(mp.gammainc(a + h, x, mp.inf, regularized=True)) - mp.log(q)) / h
        except (ValueError, mp.libmp.libhyper.NoConvergence):
            continue  # mpmath cannot resolve the derivative here: point left out
        cond = cx + abs(a * da)
        sp, sq = gammainc(a0, x0), gammaincc(a0, x0)
        for mine, theirs in ((p, sp), (q, sq)):
            if mine > 1e-290 and theirs > 0 and cond < 1e6:
                if abs(theirs - mine) > 1e-12 * mine * max(1, float(cond)):
                    raise SystemExit("scipy disagrees at a=%r x=%r: %r vs %s" % (a0, x0, theirs, mp.nstr(mine, 20)))
        points.append({
            "a": a0,
            "x": x0,
            # the larger tail's log as log1p of minus the smaller one, which
            # keeps its digits where 1 − T rounds to 1 even at 60 digits
            "logP": mp.nstr(mp.log(p) if small_is_p else mp.log1p(-q), 20),
            "logQ": mp.nstr(mp.log1p(-p) if small_is_p else mp.log(q), 20),
            "cond": float(cond),
        })

json.dump({"source": "mpmath %s at 60 digits (regularized gammainc), checked against scipy.special.gammainc/gammaincc" % mp.__version__,
           "points": points}, __import__("sys").stdout, indent=0)
print()
