#!/usr/bin/python3
"""Reference quantiles of the beta distribution for fitters/beta_quantile_test.go:
the p-quantile of beta(a, b) for shapes 1e-2 … 1e9 and p = 1e-10 … 1 − 1e-4,
by mpmath at 50 digits.

Each is stored in the variable that is below 1/2 there, so that no digit is
lost to 1 − x: where the quantile is below 1/2, z solves I_z(a, b) = p and
x = z; above ("upper"), z solves I_z(b, a) = 1 − p and x = 1 − z (the upper
tail of beta(a, b) is the lower tail of beta(b, a) in 1 − x). The tail I_z is make_incbeta.py's `tails`
(the positive hypergeometric series, or quadrature of the density where the
series does not converge; checked there against mpmath.betainc). z is found
by Newton's method on ln I_z − ln p in u = ln z (derivative z f(z) / I_z),
safeguarded by bisection in u, started from scipy.special.betaincinv or, where
that underflows, from the small-z limit I_z ≈ z^a / (a B(a, b)); it stops when
|ln I_z − ln p| < 1e-30. kappa is the quantile's condition number in its tail
variable, |d ln z / d ln p| = I_z / (z f(z)), by which the test may widen its
tolerance.

Run: /usr/bin/python3 testdata/reference/make_beta_quantile.py > testdata/reference/beta_quantile.json
"""
import json
import os
import sys

import mpmath as mp
import scipy
from scipy import special

sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))
from make_incbeta import logdens, tails  # noqa: E402

mp.mp.dps = 50

shapes = [0.01, 0.3, 1, 2.5, 7, 30, 250, 3e3, 1e5, 1.4e6, 1.3e7, 6.4e8, 1e9]
probabilities = [1e-10, 1e-4, 0.025, 0.5, 0.975, 1 - 1e-4]


def lower_quantile(a, b, p):
    """z ≤ 1/2 with I_z(a, b) = p, and its condition number"""
    lp = mp.log(p)
    z0 = float(special.betaincinv(float(a), float(b), float(p)))
    if not (0 < z0 < 1):
        z0 = None
    u_small = (lp + mp.log(a) + mp.log(mp.beta(a, b))) / a  # ln z of the small-z limit
    u = mp.log(z0) if z0 else u_small
    lo, hi = mp.mpf(-1e6), mp.log(mp.mpf(0.5))  # ln z brackets: I_z rises with z
    for _ in range(400):
        z = mp.exp(u)
        t = tails(a, b, z)[0]
        g = mp.log(t) - lp
        if abs(g) < mp.mpf(10) ** -30:
            return z, t / (z * mp.exp(logdens(a, b, z)))
        if g > 0:
            hi = min(hi, u)
        else:
            lo = max(lo, u)
        slope = z * mp.exp(logdens(a, b, z)) / t
        step = u - g / slope
        u = step if lo < step < hi else (lo + hi) / 2 if lo > -1e6 else u - 1
    raise SystemExit("no convergence at a=%s b=%s p=%s" % (a, b, p))


def main():
    points = []
    for a0 in shapes:
        for b0 in shapes:
            for p0 in probabilities:
                # the tail variable is the one below 1/2: 1 − x when the
                # quantile is above 1/2 (I_(1/2)(a, b) < p)
                upper = tails(mp.mpf(a0), mp.mpf(b0), mp.mpf(0.5))[0] < p0
                a, b = (mp.mpf(b0), mp.mpf(a0)) if upper else (mp.mpf(a0), mp.mpf(b0))
                tail = 1 - mp.mpf(p0) if upper else mp.mpf(p0)
                z, kappa = lower_quantile(a, b, tail)
                points.append({"a": a0, "b": b0, "p": p0, "upper": upper,
                               "z": mp.nstr(z, 20), "kappa": float(kappa)})
            print("a=%g b=%g done" % (a0, b0), file=sys.stderr)
    json.dump({"source": "mpmath %s at 50 digits (Newton on the tails of make_incbeta.py; starts from scipy %s betaincinv)" % (mp.__version__, scipy.__version__),
               "points": points}, sys.stdout, indent=0)
    print()


if __name__ == "__main__":
    main()
