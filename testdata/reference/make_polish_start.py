#!/usr/bin/python3
"""Exact quantiles at points where Newton steps on fitseal's own tails moved
an already good start (gonum's inverse) further from the true quantile, for
fitters/quantilepolish_test.go (TestPolishKeepsAGoodStart).

The first points were found by comparing, at 900 random shapes and
probabilities (beta shapes log-uniform on [0.05, 200] and [1e-3, 1e9];
studentt df log-uniform on [0.3, 200] and [0.3, 1e15]; p log-uniform in
either tail or uniform), the start and the polished value against mpmath:
the polish made these worse by 2 to 40 ulps. Further random points (fixed
seed, moderate shapes) are added so that the test also covers starts that
the polish must not disturb.

Each quantile is exact to about 35 digits, by bisection on the logarithm of
the variable (the tail is monotone in it) at 40 digits:
  beta(a, b):  I_x(a, b) = p below p = 1/2, I_z(b, a) = 1 - p above
               (z = 1 - x),
               with make_incbeta.py's `tails` (the positive hypergeometric
               series or quadrature of the density, checked against
               mpmath.betainc there).
  studentt(df) (location 0, scale 1): F(z) = p below 1/2, S(z) = 1 - p
               above (S(z) = F(-z)), F(z) for z <= 0 by
               make_tails.py's `lower_beta` (the incomplete beta function,
               I_(df/(df + z^2))(df/2, 1/2)/2).
1 - p is taken in exact arithmetic from the double p, as fitseal's log1p(-p).

Run: /usr/bin/python3 testdata/reference/make_polish_start.py > testdata/reference/polish_start.json
"""
import json
import math
import os
import random
import sys

import mpmath as mp

here = os.path.dirname(os.path.abspath(__file__))
sys.path.insert(0, here)
sys.path.insert(0, os.path.join(here, "..", "studentt"))
from make_incbeta import tails  # noqa: E402
import make_tails  # noqa: E402

mp.mp.dps = 40

FOUND = [
    ("beta", 65.07669652634283, 124.70884804734014, 0.0013414459558567652),
    ("beta", 0.15102874735350685, 11.812943625942589, 3.3085478232281507e-10),
    ("beta", 0.8309688306014034, 28.930075301394965, 0.9510233746584866),
    ("beta", 0.05986251356329853, 19.914962552185717, 0.7724399248145634),
    ("t", 4.770327248169259, 0, 0.9999999998495885),
    ("t", 7.748254457433236, 0, 2.2531181518629555e-12),
    ("t", 5.097245086265554, 0, 0.9999999997190219),
    ("t", 2.068940481195298, 0, 0.9999999601107175),
    ("t", 4.905687365275737, 0, 0.9999999950413814),
    ("t", 3.9881417840752778, 0, 0.9999999895445619),
    ("t", 10.585760904783001, 0, 2.9526765741013505e-09),
    ("t", 13.137434357798515, 0, 0.999999999496347),
    ("t", 2.3363075677191105, 0, 0.9999999998580099),
    ("t", 1.4061590196018, 0, 0.9999999999968495),
]


def bisect(f, lo, hi):
    """the root of the monotone f in [lo, hi], to 1e-36 relative"""
    flo, fhi = f(lo), f(hi)
    assert flo * fhi < 0, (flo, fhi)
    while hi - lo > mp.mpf(10) ** -36 * max(1, abs(lo)):
        mid = (lo + hi) / 2
        fm = f(mid)
        if (fm < 0) == (flo < 0):
            lo, flo = mid, fm
        else:
            hi = mid
    return (lo + hi) / 2


def beta_quantile(a, b, p):
    a, b = mp.mpf(a), mp.mpf(b)
    pe = mp.mpf(p)
    hi = mp.log(mp.mpf(1) - mp.mpf(10) ** -30)
    if p <= 0.5:
        f = lambda u: mp.log(tails(a, b, mp.exp(u))[0]) - mp.log(pe)
        return mp.exp(bisect(f, mp.mpf(-700), hi))
    # the upper tail is the lower tail of beta(b, a) in z = 1 - x
    f = lambda w: mp.log(tails(b, a, mp.exp(w))[0]) - mp.log(1 - pe)
    return 1 - mp.exp(bisect(f, mp.mpf(-700), hi))


def t_quantile(nu, p):
    nu = mp.mpf(nu)
    pe = mp.mpf(p)
    t, sign = (pe, -1) if p <= 0.5 else (1 - pe, 1)
    # F(-s) = t for s >= 0, in v = ln s
    f = lambda v: mp.log(make_tails.lower_beta(-mp.exp(v), nu)) - mp.log(t)
    v = bisect(f, mp.mpf(-30), mp.mpf(80))
    return sign * mp.exp(v)


def main():
    rng = random.Random(20261203)
    points = list(FOUND)
    for i in range(40):
        p = 10 ** rng.uniform(-10, math.log10(0.5))
        if rng.random() < 0.5:
            p = 1 - p
        if i % 2:
            points.append(("beta", 10 ** rng.uniform(-1, 2.5), 10 ** rng.uniform(-1, 2.5), p))
        else:
            points.append(("t", 10 ** rng.uniform(0, 2.5), 0, p))
    out = []
    for fam, a, b, p in points:
        x = beta_quantile(a, b, p) if fam == "beta" else t_quantile(a, p)
        out.append({"family": fam, "a": a, "b": b, "p": p, "quantile": mp.nstr(x, 30)})
    json.dump({"points": out}, sys.stdout, indent=1)
    print()


if __name__ == "__main__":
    main()
