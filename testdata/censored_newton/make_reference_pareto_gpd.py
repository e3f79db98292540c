#!/usr/bin/python3
"""Reference maxima for the censored Pareto, generalised Pareto and beta Newton routes.

Run with Debian's scipy and mpmath:
    /usr/bin/python3 testdata/censored_newton/make_reference_pareto_gpd.py
It writes testdata/censored_newton/reference_pareto_gpd.json beside this script.

The likelihood is the one of SPEC.md: an exact value adds ln f(x), a
non-detect at L adds ln F(L), a suspension at R adds ln S(R), an interval
(l, u] adds ln(F(u) - F(l)).  Pareto: S(x) = (scale/x)^shape for x >= scale
(scipy.stats.pareto(b=shape, scale=scale)); GPD over the fixed threshold u:
S(x) = (1 + shape (x-u)/scale)^(-1/shape) (scipy.stats.genpareto(c=shape,
loc=u, scale=scale)); beta: scipy.stats.beta(a=alpha, b=beta), F = I_x(a, b)
by mpmath.betainc(a, b, x1, x2, regularized=True), each censored term as
one integral.

Censored datasets are simulated here (numpy PCG64, seeds below) and censored
as field data are (detection limits, suspensions, bins).  Each maximum is
found twice:
  - scipy: Nelder-Mead (xatol 1e-10, fatol 1e-12) then BFGS (gtol 1e-9) on
    the log-likelihood built from scipy.stats' logpdf/logcdf/logsf; for the
    Pareto on (ln(-ln(scale/U)), ln shape), U the largest scale with a
    finite likelihood, and also on ln shape with the scale at U (the
    likelihood may be highest on that edge), keeping the better;
  - mpmath at 40 digits from the scipy point: Newton's method on the score
    (mpmath.diff) in (ln scale, ln shape) for the Pareto, (ln scale, shape)
    for the GPD, (ln alpha, ln beta) for the beta, stopped when the step is below 1e-25.  For the Pareto whose
    scipy maximum is on the edge, Newton in ln shape at scale = U, and the
    edge is confirmed by the one-sided derivative in the scale there
    (positive: the likelihood still rises towards the edge).
Both are stored; the tests use the mpmath maximum and record how far
scipy's was from it.
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
GPD_THRESHOLD = 10.0


def sig3(x):
    return float("%.3g" % x)


def dist(family, p):
    if family == "beta":
        return stats.beta(a=p[0], b=p[1])
    if family == "pareto":
        return stats.pareto(b=p[1], scale=p[0])
    return stats.genpareto(c=p[1], loc=GPD_THRESHOLD, scale=p[0])


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
    elif kind == "random suspensions":
        u = rng.random(n)
        frac = rng.random(n)
        for i, v in enumerate(x):
            if u[i] < 0.5:
                base = GPD_THRESHOLD if family == "gpd" else 0.0
                out["right"].append(sig3(base + (v - base) * frac[i]))
            else:
                out["exact"].append(float(v))
    elif kind == "binned+exact":
        edges = [sig3(g.ppf(q)) for q in (0.1, 0.3, 0.5, 0.7, 0.9)]
        bottom = GPD_THRESHOLD if family == "gpd" else 0.0
        for i, v in enumerate(x):
            if i % 3 == 0:
                out["exact"].append(float(v))
                continue
            j = int(np.searchsorted(edges, v, side="left"))
            out["lower"].append(bottom if j == 0 else edges[j - 1])
            out["upper"].append(math.inf if j == len(edges) else edges[j])
    elif kind == "non-detects at the median":
        L = sig3(g.ppf(0.5))
        for i, v in enumerate(x):
            if i % 3 == 0 and v < L:
                out["left"].append(L)
            else:
                out["exact"].append(float(v))
    elif kind == "intervals only":
        edges = [sig3(g.ppf(q)) for q in (0.05, 0.2, 0.4, 0.6, 0.8, 0.95)]
        for v in x:
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
    ("pareto", [2.0, 2.5], 150, 31, "limits+suspensions"),
    ("pareto", [1.0, 0.6], 120, 32, "binned+exact"),
    ("pareto", [10.0, 12.0], 120, 33, "non-detects at the median"),
    ("pareto", [3.0, 1.5], 100, 34, "intervals only"),
    ("gpd", [5.0, 0.2], 150, 41, "limits+suspensions"),
    ("gpd", [2.0, 0.5], 120, 42, "random suspensions"),
    ("gpd", [8.0, -0.3], 120, 43, "binned+exact"),
    ("gpd", [1.0, 0.05], 100, 44, "heavy right"),
    ("gpd", [4.0, -0.7], 150, 45, "limits+suspensions"),
    ("beta", [2.0, 5.0], 150, 51, "limits+suspensions"),
    ("beta", [0.5, 2.0], 120, 52, "binned+exact"),
    ("beta", [0.6, 0.4], 100, 53, "random suspensions"),
    ("beta", [40.0, 60.0], 150, 54, "limits+suspensions"),
]


def loglik_scipy(family, p, d):
    if p[0] <= 0 or (family in ("pareto", "beta") and p[1] <= 0):
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


def mp_sf(family, p, x):
    x = mp.mpf(x)
    if mp.isinf(x):
        return mp.mpf(0)
    if family == "beta":
        if x <= 0:
            return mp.mpf(1)
        if x >= 1:
            return mp.mpf(0)
        return mp.re(mp.betainc(p[1], p[0], 0, 1 - x, regularized=True))
    if family == "pareto":
        scale, shape = p
        return mp.mpf(1) if x <= scale else (scale / x) ** shape
    sigma, xi = p
    if x <= GPD_THRESHOLD:
        return mp.mpf(1)
    z = (x - GPD_THRESHOLD) / sigma
    if xi == 0:
        return mp.exp(-z)
    t = 1 + xi * z
    if t <= 0:
        return mp.mpf(0)
    return t ** (-1 / xi)


def loglik_mp(family, p, d, tallies):
    left, right, iv = tallies
    p = [mp.mpf(v) for v in p]
    s = mp.mpf(0)
    for x in d["exact"]:
        x = mp.mpf(x)
        if family == "beta":
            a, b = p
            s += (a - 1) * mp.log(x) + (b - 1) * mp.log(1 - x) - (mp.loggamma(a) + mp.loggamma(b) - mp.loggamma(a + b))
        elif family == "pareto":
            scale, shape = p
            if x < scale:
                return mp.ninf
            s += mp.log(shape) + shape * mp.log(scale) - (shape + 1) * mp.log(x)
        else:
            sigma, xi = p
            t = 1 + xi * (x - GPD_THRESHOLD) / sigma
            if t <= 0:
                return mp.ninf
            s += -mp.log(sigma) - (1 / xi + 1) * mp.log(t)
    if family == "beta":
        # every censored term as one integral, mpmath.betainc(a, b, x1, x2)
        a, b = p
        prob = lambda x1, x2: mp.re(mp.betainc(a, b, max(x1, 0), min(x2, 1), regularized=True))
        for L, c in left.items():
            s += c * mp.log(prob(0, L))
        for R, c in right.items():
            s += c * mp.log(prob(R, 1))
        for (lo, up), c in iv.items():
            s += c * mp.log(prob(lo, up))
        return s
    for L, c in left.items():
        s += c * mp.log(1 - mp_sf(family, p, L))
    for R, c in right.items():
        s += c * mp.log(mp_sf(family, p, R))
    for (lo, up), c in iv.items():
        s += c * mp.log(mp_sf(family, p, lo) - mp_sf(family, p, up))
    return s


def tally(d):
    return Counter(d["left"]), Counter(d["right"]), Counter(zip(d["lower"], d["upper"]))


def pareto_bound(d):
    return min(d["exact"] + d["left"] + [u for u in d["upper"]])


def newton(f, x, dims):
    """Newton's method on the score of f at 40 digits (1 or 2 coordinates)."""
    for _ in range(40):
        if dims == 1:
            g = mp.diff(f, x)
            h = mp.diff(f, x, 2)
            step = -g / h
            x = x + step
            if abs(step) < mp.mpf("1e-25"):
                break
        else:
            g = mp.matrix([mp.diff(f, (x[0], x[1]), (1, 0)), mp.diff(f, (x[0], x[1]), (0, 1))])
            H = mp.matrix([[mp.diff(f, (x[0], x[1]), (2, 0)), mp.diff(f, (x[0], x[1]), (1, 1))],
                           [mp.diff(f, (x[0], x[1]), (1, 1)), mp.diff(f, (x[0], x[1]), (0, 2))]])
            step = mp.lu_solve(H, -g)
            x = x + step
            if max(abs(step[0]), abs(step[1])) < mp.mpf("1e-25"):
                break
    return x


def fit_case(family, truth, n, seed, kind):
    d = censor(family, truth, n, seed, kind)
    tallies = tally(d)
    opts = dict(xatol=1e-10, fatol=1e-12, maxiter=20000, maxfev=40000)

    def polish(nll, t0):
        nm = optimize.minimize(nll, t0, method="Nelder-Mead", options=opts)
        bf = optimize.minimize(nll, nm.x, method="BFGS", options=dict(gtol=1e-9))
        return (bf.x, bf.fun) if bf.fun <= nm.fun else (nm.x, nm.fun)

    edge = False
    if family == "pareto":
        U = pareto_bound(d)
        nat = lambda t: [U * math.exp(-math.exp(t[0])), math.exp(t[1])]
        t, fun = polish(lambda t: -loglik_scipy(family, nat(t), d), [-3.0, math.log(truth[1])])
        scipy_p = nat(t)
        if U in d["exact"]:
            te, fe = polish(lambda t: -loglik_scipy(family, [U, math.exp(t[0])], d), [math.log(truth[1])])
            if fe <= fun:
                edge, scipy_p, fun = True, [U, math.exp(te[0])], fe
    elif family == "beta":
        nat = lambda t: [math.exp(t[0]), math.exp(t[1])]
        t, fun = polish(lambda t: -loglik_scipy(family, nat(t), d), [math.log(truth[0]), math.log(truth[1])])
        scipy_p = nat(t)
    else:
        nat = lambda t: [math.exp(t[0]), t[1]]
        t, fun = polish(lambda t: -loglik_scipy(family, nat(t), d), [math.log(truth[0]), truth[1]])
        scipy_p = nat(t)
    scipy_ll = -float(fun)
    score = None
    if family == "pareto" and edge:
        U = mp.mpf(pareto_bound(d))
        f1 = lambda a: loglik_mp(family, [U, mp.exp(a)], d, tallies)
        a = newton(f1, mp.mpf(math.log(scipy_p[1])), 1)
        est_mp = [U, mp.exp(a)]
        ll = f1(a)
        g = [mp.diff(f1, a)]
        score = float(mp.diff(lambda s: loglik_mp(family, [s, mp.exp(a)], d, tallies), U, direction=-1))
        assert score > 0, "edge not confirmed"
    else:
        if family in ("pareto", "beta"):
            f2 = lambda a, b: loglik_mp(family, [mp.exp(a), mp.exp(b)], d, tallies)
            x = newton(f2, mp.matrix([mp.log(scipy_p[0]), mp.log(scipy_p[1])]), 2)
            est_mp = [mp.exp(x[0]), mp.exp(x[1])]
        else:
            f2 = lambda a, b: loglik_mp(family, [mp.exp(a), b], d, tallies)
            x = newton(f2, mp.matrix([mp.log(scipy_p[0]), mp.mpf(scipy_p[1])]), 2)
            est_mp = [mp.exp(x[0]), x[1]]
        ll = f2(x[0], x[1])
        g = [mp.diff(f2, (x[0], x[1]), (1, 0)), mp.diff(f2, (x[0], x[1]), (0, 1))]
    est = [float(v) for v in est_mp]
    print(family, kind, "edge" if edge else "", "scipy", scipy_p, scipy_ll, "mpmath", est, float(ll),
          "grad", [float(v) for v in g], "edge score", score)
    data = dict(exact=d["exact"], left=d["left"], right=d["right"],
                lower=d["lower"], upper=[None if math.isinf(u) else u for u in d["upper"]])
    return dict(family=family, kind=kind, truth=truth, n=n, seed=seed, data=data, edge=edge,
                threshold=GPD_THRESHOLD if family == "gpd" else None,
                scipy=dict(estimates=[float(v) for v in scipy_p], loglik=scipy_ll),
                estimates=est, loglik=float(ll), score_norm=float(max(abs(v) for v in g)))


def main():
    fits = [fit_case(*c) for c in CASES]
    ref = dict(note="written by make_reference_pareto_gpd.py; estimates (scale, shape), beta (alpha, beta)", fits=fits)
    with open(os.path.join(HERE, "reference_pareto_gpd.json"), "w") as fh:
        json.dump(ref, fh, indent=1)


if __name__ == "__main__":
    main()
