#!/usr/bin/python3
"""Reference values for the censored gamma and inverse Gaussian Newton routes.

Run with Debian's scipy and mpmath:
    /usr/bin/python3 testdata/censored_newton/make_reference.py
It writes testdata/censored_newton/reference.json beside this script.

The likelihood is the one of SPEC.md: an exact value adds ln f(x), a
non-detect at L adds ln F(L), a suspension at R adds ln S(R), an interval
(l, u] adds ln(F(u) - F(l)).

1. "fits": censored datasets simulated here (numpy PCG64, seeds below) and
   censored in the ways field data are (detection limits, suspensions,
   bins).  Each maximum is found twice:
   - scipy: Nelder-Mead on (ln p1, ln p2) with xatol 1e-10, fatol 1e-12,
     then BFGS (gtol 1e-9) from its end, on the log-likelihood built from
     scipy.stats' logpdf/logcdf/logsf (gamma(a=shape, scale=1/rate),
     invgauss(mu=mean/shape, scale=shape));
   - mpmath: from the scipy point, Newton's method on the score with
     mpmath at 40 digits (the likelihood written out: regularized
     incomplete gamma by mpmath.gammainc, the inverse Gaussian CDF
     Phi(a) + exp(2 lam/mu) Phi(-b) by mpmath.ncdf, derivatives by
     mpmath.diff), stopped when the step is below 1e-25 relative.
   Both are stored; the tests use the mpmath maximum (estimates and
   log-likelihood) and record how far scipy's was from it.
2. "gamma_scores": the score and Hessian of ln P(k, y) and ln Q(k, y) in
   (ln k, ln y) at 40 digits (mpmath.diff), at points from the far lower
   tail to the far upper tail, to check the route's finite differences in
   the shape.
"""
import json
import math
import os

import mpmath as mp
import numpy as np
from scipy import optimize, stats

HERE = os.path.dirname(os.path.abspath(__file__))
mp.mp.dps = 40


def sig3(x):
    return float("%.3g" % x)


def gamma_dist(p):
    return stats.gamma(a=p[0], scale=1 / p[1])


def invgauss_dist(p):
    return stats.invgauss(mu=p[0] / p[1], scale=p[1])


DISTS = {"gamma": gamma_dist, "invgauss": invgauss_dist}


def censor(family, truth, n, seed, kind):
    """Draw n values and censor them; returns dict exact/left/right/lower/upper."""
    g = DISTS[family](truth)
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
    elif kind == "random suspensions":
        u = rng.random(n)
        frac = rng.random(n)
        for i, v in enumerate(x):
            if u[i] < 0.5:
                out["right"].append(sig3(v * frac[i]))
            else:
                out["exact"].append(float(v))
    elif kind == "binned+exact":
        edges = [sig3(g.ppf(q)) for q in (0.1, 0.3, 0.5, 0.7, 0.9)]
        for i, v in enumerate(x):
            if i % 3 == 0:
                out["exact"].append(float(v))
                continue
            j = int(np.searchsorted(edges, v, side="left"))
            out["lower"].append(0.0 if j == 0 else edges[j - 1])
            out["upper"].append(math.inf if j == len(edges) else edges[j])
    elif kind == "heavy right":
        susp = sig3(g.ppf(0.4))
        for v in x:
            if v > susp:
                out["right"].append(susp)
            else:
                out["exact"].append(float(v))
    else:
        raise ValueError(kind)
    return out


CASES = [
    ("gamma", [2.5, 0.8], 150, 11, "limits+suspensions"),
    ("gamma", [0.4, 0.02], 120, 12, "random suspensions"),
    ("gamma", [40.0, 4.0], 120, 13, "binned+exact"),
    ("gamma", [1.3, 2.0], 80, 14, "heavy right"),
    ("invgauss", [5.0, 12.0], 150, 21, "limits+suspensions"),
    ("invgauss", [10.0, 5.0], 120, 22, "random suspensions"),
    ("invgauss", [0.02, 4.0], 120, 23, "binned+exact"),
    ("invgauss", [3.0, 1.5], 80, 24, "heavy right"),
]


def loglik_scipy(family, p, d):
    if p[0] <= 0 or p[1] <= 0:
        return -math.inf
    D = DISTS[family](p)
    with np.errstate(all="ignore"):
        s = 0.0
        if d["exact"]:
            s += np.sum(D.logpdf(np.array(d["exact"])))
        if d["left"]:
            s += np.sum(D.logcdf(np.array(d["left"])))
        if d["right"]:
            s += np.sum(D.logsf(np.array(d["right"])))
        for lo, up in zip(d["lower"], d["upper"]):
            if D.logcdf(lo) > -math.log(2):
                a, b = D.logsf(lo), D.logsf(up)
            else:
                a, b = D.logcdf(up), D.logcdf(lo)
            s += a + (math.log1p(-math.exp(b - a)) if b > -math.inf else 0.0)
    s = float(s)
    return s if math.isfinite(s) else -math.inf


def mp_cdf(family, p, x):
    """F(x) at 40 digits."""
    x = mp.mpf(x)
    if x <= 0:
        return mp.mpf(0)
    if mp.isinf(x):
        return mp.mpf(1)
    if family == "gamma":
        k, b = p
        return mp.gammainc(k, 0, b * x, regularized=True)
    mu, lam = p
    s = mp.sqrt(lam / x)
    a, bb = s * (x / mu - 1), s * (x / mu + 1)
    return mp.ncdf(a) + mp.exp(2 * lam / mu) * mp.ncdf(-bb)


def mp_sf(family, p, x):
    x = mp.mpf(x)
    if x <= 0:
        return mp.mpf(1)
    if mp.isinf(x):
        return mp.mpf(0)
    if family == "gamma":
        k, b = p
        return mp.gammainc(k, b * x, mp.inf, regularized=True)
    return 1 - mp_cdf(family, p, x)


def loglik_mp(family, p, d):
    p = [mp.mpf(v) for v in p]
    s = mp.mpf(0)
    ex = [mp.mpf(v) for v in d["exact"]]
    if family == "gamma":
        k, b = p
        for x in ex:
            s += k * mp.log(b) + (k - 1) * mp.log(x) - b * x - mp.loggamma(k)
    else:
        mu, lam = p
        for x in ex:
            s += mp.log(lam) / 2 - mp.log(2 * mp.pi) / 2 - mp.mpf(1.5) * mp.log(x) - lam * (x - mu) ** 2 / (2 * mu**2 * x)
    for L in d["left"]:
        s += mp.log(mp_cdf(family, p, L))
    for R in d["right"]:
        s += mp.log(mp_sf(family, p, R))
    for lo, up in zip(d["lower"], d["upper"]):
        s += mp.log(mp_sf(family, p, lo) - mp_sf(family, p, up))
    return s


def tally(d):
    """Collapse repeated censored values (same likelihood, fewer mpmath calls)."""
    from collections import Counter
    return Counter(d["left"]), Counter(d["right"]), Counter(zip(d["lower"], d["upper"]))


def loglik_mp_fast(family, p, d, tallies):
    left, right, iv = tallies
    p = [mp.mpf(v) for v in p]
    s = mp.mpf(0)
    dd = dict(d, left=[], right=[], lower=[], upper=[])
    s += loglik_mp(family, p, dd)
    for L, c in left.items():
        s += c * mp.log(mp_cdf(family, p, L))
    for R, c in right.items():
        s += c * mp.log(mp_sf(family, p, R))
    for (lo, up), c in iv.items():
        s += c * mp.log(mp_sf(family, p, lo) - mp_sf(family, p, up))
    return s


def fit_case(family, truth, n, seed, kind):
    d = censor(family, truth, n, seed, kind)
    nll = lambda t: -loglik_scipy(family, np.exp(t), d)
    t0 = np.log(truth)
    nm = optimize.minimize(nll, t0, method="Nelder-Mead",
                           options=dict(xatol=1e-10, fatol=1e-12, maxiter=20000, maxfev=40000))
    bf = optimize.minimize(nll, nm.x, method="BFGS", options=dict(gtol=1e-9))
    t = bf.x if bf.fun <= nm.fun else nm.x
    scipy_p = [float(v) for v in np.exp(t)]
    scipy_ll = -float(min(bf.fun, nm.fun))
    # mpmath Newton on the score in (ln p1, ln p2).
    tallies = tally(d)
    f = lambda a, b: loglik_mp_fast(family, [mp.exp(a), mp.exp(b)], d, tallies)
    x = mp.matrix([mp.mpf(float(t[0])), mp.mpf(float(t[1]))])
    for _ in range(30):
        g = mp.matrix([mp.diff(f, (x[0], x[1]), (1, 0)), mp.diff(f, (x[0], x[1]), (0, 1))])
        H = mp.matrix([[mp.diff(f, (x[0], x[1]), (2, 0)), mp.diff(f, (x[0], x[1]), (1, 1))],
                       [mp.diff(f, (x[0], x[1]), (1, 1)), mp.diff(f, (x[0], x[1]), (0, 2))]])
        step = mp.lu_solve(H, -g)
        x = x + step
        if max(abs(step[0]), abs(step[1])) < mp.mpf("1e-25"):
            break
    g = [mp.diff(f, (x[0], x[1]), (1, 0)), mp.diff(f, (x[0], x[1]), (0, 1))]
    est = [float(mp.exp(x[0])), float(mp.exp(x[1]))]
    ll = f(x[0], x[1])
    print(family, kind, "scipy", scipy_p, scipy_ll, "mpmath", est, float(ll), "grad", [float(v) for v in g])
    data = dict(exact=d["exact"], left=d["left"], right=d["right"],
                lower=d["lower"], upper=[None if math.isinf(u) else u for u in d["upper"]])
    return dict(family=family, kind=kind, truth=truth, n=n, seed=seed, data=data,
                scipy=dict(estimates=scipy_p, loglik=scipy_ll),
                estimates=est, loglik=float(ll), score_norm=float(max(abs(g[0]), abs(g[1]))))


def gamma_scores():
    out = []
    for k, y in [(0.3, 0.001), (0.3, 2.0), (0.3, 40.0), (2.5, 0.05), (2.5, 2.5), (2.5, 30.0),
                 (40.0, 15.0), (40.0, 40.0), (40.0, 80.0), (150.0, 120.0), (150.0, 200.0), (5.0, 0.5)]:
        k_, y_ = mp.mpf(k), mp.mpf(y)
        lp = lambda a, b: mp.log(mp.gammainc(mp.exp(a), 0, mp.exp(b), regularized=True))
        lq = lambda a, b: mp.log(mp.gammainc(mp.exp(a), mp.exp(b), mp.inf, regularized=True))
        row = dict(shape=k, y=y)
        for name, fn in (("lnP", lp), ("lnQ", lq)):
            a, b = mp.log(k_), mp.log(y_)
            row[name] = [float(fn(a, b)),
                         float(mp.diff(fn, (a, b), (1, 0))), float(mp.diff(fn, (a, b), (0, 1))),
                         float(mp.diff(fn, (a, b), (2, 0))), float(mp.diff(fn, (a, b), (1, 1))),
                         float(mp.diff(fn, (a, b), (0, 2)))]
        out.append(row)
    return out


def main():
    fits = [fit_case(*c) for c in CASES]
    ref = dict(
        note="written by make_reference.py; values, ln-derivatives in (ln shape, ln y)",
        fits=fits,
        gamma_scores=gamma_scores(),
    )
    with open(os.path.join(HERE, "reference.json"), "w") as fh:
        json.dump(ref, fh, indent=1)


if __name__ == "__main__":
    main()
