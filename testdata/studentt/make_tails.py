#!/usr/bin/python3
"""Reference Student t log tail probabilities for fitters/studentt_tails_test.go.

Source: mpmath (Debian's python3-mpmath), 60 significant digits. Two
independent evaluations of the lower tail F(z) = P(T <= z), z <= 0:
  1. the regularised incomplete beta, F(z) = I_x(nu/2, 1/2)/2, x = nu/(nu+z^2)
     (mpmath.betainc, regularized=True; near z = 0 through
     F(z) = (1 - I_y(1/2, nu/2))/2, y = z^2/(nu+z^2));
  2. direct quadrature of the density
     f(t) = Gamma((nu+1)/2)/(Gamma(nu/2) sqrt(nu pi)) (1+t^2/nu)^(-(nu+1)/2)
     over (-inf, z] (mpmath.quad, split at z, z-1, z-10 ... for the tails).
Where betainc's hypergeometric series does not converge (nu/2 huge), the
first is replaced by the same quadrature with Gauss-Legendre instead of
tanh-sinh nodes. The script stops if they disagree beyond 1e-30 relative. ln S(z) = ln F(-z);
the other tail is log1p(-F). Values are written as decimal strings with 25
significant digits (some are below the float64 range, e.g. ln S = -1e-348).

Run: /usr/bin/python3 testdata/studentt/make_tails.py > testdata/studentt/tails.json
     /usr/bin/python3 testdata/studentt/make_tails.py random > testdata/studentt/tails_random.json
The second adds 160 points off the grid (fixed seed): nu log-uniform on
[1, 1e20] (half of them on [20, 2000], around the switches of the Go code),
|z| log-uniform on [1e-3, 1e4], z = 0 excluded, random sign.
"""
import json
import math
import random
import sys

import mpmath as mp

mp.mp.dps = 60

DFS = ["1", "2.5", "10", "30", "1e2", "1e3", "1e4", "1e5", "1e6", "1e7", "1e9", "1e12", "1e15", "1e20"]
ZS = ["0", "0.1", "1", "2", "5", "10", "40", "1e3"]


def lower_beta(z, nu):
    """F(z) for z <= 0 by the incomplete beta function."""
    if z == 0:
        return mp.mpf(1) / 2
    r2 = z * z / nu
    x = 1 / (1 + r2)
    y = r2 / (1 + r2)
    a, b = nu / 2, mp.mpf(1) / 2
    try:
        if y < mp.mpf("0.3") / max(a, 1):  # central: 1 - I_y(1/2, a) is well conditioned
            return (1 - mp.betainc(b, a, 0, y, regularized=True)) / 2
        return mp.betainc(a, b, 0, x, regularized=True) / 2
    except (mp.libmp.NoConvergence, ValueError):
        return None  # hypergeometric series too slow (huge nu/2), or hypercomb gave up


def lower_quad(z, nu, method="tanh-sinh"):
    """F(z) for z <= 0 by quadrature of the density."""
    c = mp.exp(mp.loggamma((nu + 1) / 2) - mp.loggamma(nu / 2)) / mp.sqrt(nu * mp.pi)
    s = -z
    # the density relative to its value at s, so that quad's absolute
    # tolerance is a relative one
    h0 = (nu + 1) / 2 * mp.log1p(s * s / nu)
    f = lambda t: mp.exp(h0 - (nu + 1) / 2 * mp.log1p(t * t / nu))
    pts = [s]
    step = min(mp.mpf(1) / max(s, 1), mp.mpf(1))
    p = s
    for _ in range(60):
        p = p + step
        pts.append(p)
        step *= 2
    pts.append(mp.inf)
    return c * mp.exp(-h0) * mp.quad(f, pts, maxdegree=12, method=method)


def grid():
    for dfs in DFS:
        for zs in ZS:
            yield dfs, zs, [1] if zs == "0" else [-1, 1]


def random_points():
    rng = random.Random(20261202)
    for i in range(160):
        lo, hi = (20, 2000) if i % 2 else (1, 1e20)
        nu = 10 ** rng.uniform(math.log10(lo), math.log10(hi))
        z = 10 ** rng.uniform(-3, 4)
        yield repr(float(nu)), repr(float(z)), [rng.choice([-1, 1])]


def main():
    rows = []
    for dfs, zs, signs in (random_points() if sys.argv[1:] == ["random"] else grid()):
        nu = mp.mpf(dfs)
        z = mp.mpf(zs)
        Fm = lower_beta(-z, nu)
        if z != 0:
            Fq = lower_quad(-z, nu)
            if Fm is None:  # second, independent quadrature rule instead
                Fm = lower_quad(-z, nu, "gauss-legendre")
            rel = abs(Fq - Fm) / Fm
            if rel > mp.mpf("1e-30"):
                raise SystemExit(f"df={dfs} z={zs}: betainc {Fm} quad {Fq} rel {rel}")
        lnFm = mp.log(Fm)           # ln F(-z) = ln S(z)
        lnFp = mp.log1p(-Fm)        # ln F(z)  = ln S(-z)
        for sign in signs:
            lncdf, lnsf = (lnFm, lnFp) if sign < 0 else (lnFp, lnFm)
            rows.append({
                "df": dfs,
                "z": ("-" if sign < 0 else "") + zs,
                "logcdf": mp.nstr(lncdf, 25, strip_zeros=False, min_fixed=-1, max_fixed=-1),
                "logsf": mp.nstr(lnsf, 25, strip_zeros=False, min_fixed=-1, max_fixed=-1),
            })
    json.dump({"source": "mpmath " + mp.__version__ + ", 60 digits, betainc checked against quadrature of the density",
               "rows": rows}, sys.stdout, indent=1)
    print()


if __name__ == "__main__":
    main()
