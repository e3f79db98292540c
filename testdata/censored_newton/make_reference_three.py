#!/usr/bin/python3
"""Reference maxima for the three-parameter censored Newton routes (Student t, GEV, weibull3, lognormal3).

Run with Debian's scipy and mpmath:
    /usr/bin/python3 testdata/censored_newton/make_reference_three.py
It writes testdata/censored_newton/reference_three.json beside this script.

The likelihood is the one of SPEC.md: an exact value adds ln f(x), a
non-detect at L adds ln F(L), a suspension at R adds ln S(R), an interval
(l, u] adds ln(F(u) - F(l)).  Student t: scipy.stats.t(df, loc, scale);
in mpmath F(z) = I_x(df/2, 1/2)/2 for z <= 0, x = df/(df + z^2)
(mpmath.betainc, regularized), the upper half by symmetry.  GEV with shape
xi: F(x) = exp(-(1 + xi z)^(-1/xi)), scipy.stats.genextreme(c=-xi, loc,
scale) (scipy's c is minus the shape used here).  weibull3 (shape k, scale
lam, threshold g): F = 1 - exp(-((x-g)/lam)^k), scipy.stats.weibull_min(c=k,
loc=g, scale=lam); lognormal3 (mu, sigma, g): F = Phi((ln(x-g) - mu)/sigma),
scipy.stats.lognorm(s=sigma, loc=g, scale=exp(mu)).

Censored datasets are simulated here (numpy PCG64, seeds below) and
censored as field data are (detection limits with suspensions, bins with a
few exact values, random suspension times).  Each maximum is found twice:
  - scipy: Nelder-Mead (xatol 1e-10, fatol 1e-12) then BFGS (gtol 1e-9)
    on (loc, ln scale, ln df) or (loc, ln scale, shape), from the truth;
  - mpmath at 40 digits from the scipy point: Newton's method on the score
    (mpmath.diff, every term at 40 digits) in the same coordinates,
    stopped when the step is below 1e-25.
Both are stored; the tests use the mpmath maximum and record how far
scipy's was from it.  The third Student t dataset (random suspensions) has
no maximum at finite df: both searches run on to huge df (scipy 1.1e7,
mpmath 2.2e24), the normal limit, which the test checks as such.
"""
import json
import math
import os
from collections import Counter

import mpmath as mp
import numpy as np
from scipy import optimize, stats

HERE = os.path.dirname(os.path.abspath(__file__))
mp.mp.dps = 40


def sig3(x):
    return float("%.3g" % x)


def dist(family, p):
    if family == "studentt":
        return stats.t(df=p[2], loc=p[0], scale=p[1])
    if family == "weibull3":
        return stats.weibull_min(c=p[0], loc=p[2], scale=p[1])
    if family == "lognormal3":
        return stats.lognorm(s=p[1], loc=p[2], scale=math.exp(p[0]))
    return stats.genextreme(c=-p[2], loc=p[0], scale=p[1])


def censor(family, truth, n, seed, kind):
    g = dist(family, truth)
    rng = np.random.Generator(np.random.PCG64(seed))
    x = g.rvs(size=n, random_state=rng)
    out = dict(exact=[], left=[], right=[], lower=[], upper=[])
    if kind == "limits+suspensions":
        limits = [sig3(g.ppf(0.1)), sig3(g.ppf(0.2))]
        susp = sig3(g.ppf(0.8))
        for i, v in enumerate(x):
            L = limits[i % 2]
            if v < L:
                out["left"].append(L)
            elif v > susp:
                out["right"].append(susp)
            else:
                out["exact"].append(float(v))
    elif kind == "binned+exact":
        edges = [sig3(g.ppf(q)) for q in (0.1, 0.3, 0.5, 0.7, 0.9)]
        for i, v in enumerate(x):
            if i % 3 == 0:
                out["exact"].append(float(v))
                continue
            j = int(np.searchsorted(edges, v, side="left"))
            out["lower"].append(-math.inf if j == 0 else edges[j - 1])
            out["upper"].append(math.inf if j == len(edges) else edges[j])
    elif kind == "random suspensions":
        u = rng.random(n)
        frac = rng.random(n)
        lo = g.ppf(0.01)
        for i, v in enumerate(x):
            if u[i] < 0.4:
                out["right"].append(sig3(lo + (v - lo) * frac[i]) if v > lo else float(v))
            else:
                out["exact"].append(float(v))
    else:
        raise ValueError(kind)
    return out


CASES = [
    ("studentt", [0.0, 1.0, 4.0], 150, 61, "limits+suspensions"),
    ("studentt", [10.0, 2.0, 2.5], 120, 62, "binned+exact"),
    ("studentt", [-3.0, 0.5, 3.0], 120, 64, "random suspensions"),
    ("gev", [50.0, 8.0, 0.1], 150, 71, "limits+suspensions"),
    ("gev", [0.0, 1.0, -0.3], 120, 72, "binned+exact"),
    ("gev", [100.0, 20.0, 0.3], 120, 73, "random suspensions"),
    ("weibull3", [2.5, 20.0, 10.0], 150, 81, "limits+suspensions"),
    ("weibull3", [3.5, 5.0, 2.0], 120, 82, "binned+exact"),
    ("lognormal3", [2.0, 0.4, 5.0], 150, 91, "limits+suspensions"),
    ("lognormal3", [0.0, 0.3, 100.0], 120, 92, "random suspensions"),
]


def natural(family, t):
    if family == "studentt":
        return [t[0], math.exp(t[1]), math.exp(t[2])]
    if family == "weibull3":
        return [math.exp(t[0]), math.exp(t[1]), t[2]]
    return [t[0], math.exp(t[1]), t[2]]


def loglik_scipy(family, p, d):
    if not (p[1] > 0) or (family == "studentt" and not p[2] > 0) or (family == "weibull3" and not p[0] > 0):
        return -math.inf
    D = dist(family, p)
    with np.errstate(all="ignore"):
        s = 0.0
        if d["exact"]:
            s += np.sum(D.logpdf(np.array(d["exact"])))
        if d["left"]:
            s += np.sum(D.logcdf(np.array(d["left"])))
        if d["right"]:
            s += np.sum(D.logsf(np.array(d["right"])))
        if d["lower"]:
            diff = D.cdf(np.array(d["upper"])) - D.cdf(np.array(d["lower"]))
            s += np.sum(np.log(diff)) if np.all(diff > 0) else -math.inf
    s = float(s)
    return s if math.isfinite(s) else -math.inf


def mp_cdf(family, p, x):
    """F(x) at 40 digits; x may be +-inf."""
    if mp.isinf(x):
        return mp.mpf(0) if x < 0 else mp.mpf(1)
    if family in ("weibull3", "lognormal3"):
        y = mp.mpf(x) - p[2]
        if y <= 0:
            return mp.mpf(0)
        if family == "weibull3":
            return -mp.expm1(-(y / p[1]) ** p[0])
        return mp.ncdf((mp.log(y) - p[0]) / p[1])
    mu, sigma, shape = p
    z = (mp.mpf(x) - mu) / sigma
    if family == "studentt":
        nu = shape
        half = mp.betainc(nu / 2, mp.mpf(1) / 2, 0, nu / (nu + z * z), regularized=True) / 2
        return half if z <= 0 else 1 - half
    t = 1 + shape * z
    if t <= 0:
        return mp.mpf(0) if shape > 0 else mp.mpf(1)
    return mp.exp(-t ** (-1 / shape))


def mp_logpdf(family, p, x):
    if family in ("weibull3", "lognormal3"):
        y = mp.mpf(x) - p[2]
        if y <= 0:
            return mp.ninf
        if family == "weibull3":
            k, lam = p[0], p[1]
            return mp.log(k / lam) + (k - 1) * mp.log(y / lam) - (y / lam) ** k
        r = (mp.log(y) - p[0]) / p[1]
        return -mp.log(y) - mp.log(p[1]) - mp.log(2 * mp.pi) / 2 - r * r / 2
    mu, sigma, shape = p
    z = (mp.mpf(x) - mu) / sigma
    if family == "studentt":
        nu = shape
        return (mp.loggamma((nu + 1) / 2) - mp.loggamma(nu / 2) - mp.log(nu * mp.pi) / 2
                - mp.log(sigma) - (nu + 1) / 2 * mp.log(1 + z * z / nu))
    t = 1 + shape * z
    if t <= 0:
        return mp.ninf
    y = mp.log(t) / shape
    return -mp.log(sigma) - (1 + shape) * y - mp.exp(-y)


def loglik_mp(family, p, d, tallies):
    left, right, iv = tallies
    s = mp.mpf(0)
    for x in d["exact"]:
        s += mp_logpdf(family, p, x)
    for L, c in left.items():
        s += c * mp.log(mp_cdf(family, p, L))
    for R, c in right.items():
        s += c * mp.log(1 - mp_cdf(family, p, R))
    for (lo, up), c in iv.items():
        s += c * mp.log(mp_cdf(family, p, up) - mp_cdf(family, p, lo))
    return s


def mp_natural(family, t):
    if family == "studentt":
        return [t[0], mp.exp(t[1]), mp.exp(t[2])]
    if family == "weibull3":
        return [mp.exp(t[0]), mp.exp(t[1]), t[2]]
    return [t[0], mp.exp(t[1]), t[2]]


def newton3(f, x):
    """Newton's method on the score of f(a, b, c) at 40 digits."""
    for _ in range(40):
        pt = (x[0], x[1], x[2])
        g = mp.matrix([mp.diff(f, pt, tuple(int(i == k) for i in range(3))) for k in range(3)])
        H = mp.matrix(3, 3)
        for i in range(3):
            for j in range(i, 3):
                order = [0, 0, 0]
                order[i] += 1
                order[j] += 1
                H[i, j] = H[j, i] = mp.diff(f, pt, tuple(order))
        step = mp.lu_solve(H, -g)
        x = x + step
        if max(abs(step[k]) for k in range(3)) < mp.mpf("1e-25"):
            break
    return x, g


def fit_case(family, truth, n, seed, kind):
    d = censor(family, truth, n, seed, kind)
    tallies = (Counter(d["left"]), Counter(d["right"]), Counter(zip(d["lower"], d["upper"])))
    opts = dict(xatol=1e-10, fatol=1e-12, maxiter=40000, maxfev=80000)
    if family == "studentt":
        t0 = [truth[0], math.log(truth[1]), math.log(truth[2])]
    elif family == "weibull3":
        t0 = [math.log(truth[0]), math.log(truth[1]), truth[2]]
    else:
        t0 = [truth[0], math.log(truth[1]), truth[2]]
    nll = lambda t: -loglik_scipy(family, natural(family, t), d)
    nm = optimize.minimize(nll, t0, method="Nelder-Mead", options=opts)
    bf = optimize.minimize(nll, nm.x, method="BFGS", options=dict(gtol=1e-9))
    t, fun = (bf.x, bf.fun) if bf.fun <= nm.fun else (nm.x, nm.fun)
    scipy_p, scipy_ll = natural(family, t), -float(fun)
    f3 = lambda a, b, c: loglik_mp(family, mp_natural(family, [a, b, c]), d, tallies)
    x, _ = newton3(f3, mp.matrix([mp.mpf(v) for v in t]))
    est_mp = mp_natural(family, [x[0], x[1], x[2]])
    ll = f3(x[0], x[1], x[2])
    g = [mp.diff(f3, (x[0], x[1], x[2]), tuple(int(i == k) for i in range(3))) for k in range(3)]
    est = [float(v) for v in est_mp]
    print(family, kind, "scipy", scipy_p, scipy_ll, "mpmath", est, float(ll), "grad", [float(v) for v in g])
    data = dict(exact=d["exact"], left=d["left"], right=d["right"],
                lower=[None if math.isinf(v) else v for v in d["lower"]],
                upper=[None if math.isinf(v) else v for v in d["upper"]])
    return dict(family=family, kind=kind, truth=truth, n=n, seed=seed, data=data,
                scipy=dict(estimates=[float(v) for v in scipy_p], loglik=scipy_ll),
                estimates=est, loglik=float(ll), score_norm=float(max(abs(v) for v in g)))


def main():
    fits = [fit_case(*c) for c in CASES]
    ref = dict(note="written by make_reference_three.py; estimates in the family's parameter order", fits=fits)
    with open(os.path.join(HERE, "reference_three.json"), "w") as fh:
        json.dump(ref, fh, indent=1)


if __name__ == "__main__":
    main()
