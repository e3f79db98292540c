#!/usr/bin/python3
"""Reference values for fitters/infer/binned_gof_test.go: binned data (every
value recorded only as the bin it fell in), the maximum-likelihood fit by
scipy, and Pearson's X² over the bins at scipy's estimates, the bins pooled
from the left until each expected count is at least 5 (a short last group
joined to its neighbour).

Invented data, drawn here with a fixed seed:
- "weibull": 200 lifetimes from weibull(shape 1.6, scale 40) in bins
  (0, 10], (10, 20], …, (90, 100] and the suspension (100, ∞);
- "lognormal": 150 concentrations from lognormal(mu 0, sigma 0.8) in bins
  (0, 0.25], (0.25, 0.5], (0.5, 1], (1, 2], (2, 4] and (4, ∞).
The log-likelihood Σ nₖ ln(F(hₖ) − F(lₖ)) is maximised by scipy.optimize
(Nelder–Mead from several starts, then polished by BFGS on log parameters).

Run: /usr/bin/python3 testdata/censored/make_binned_gof.py > testdata/censored/binned_gof.json
"""
import json
import numpy as np
import scipy
from scipy import optimize, stats

MIN_EXPECTED = 5


def binned(x, edges):
    counts = []
    for k in range(len(edges) - 1):
        lo, hi = edges[k], edges[k + 1]
        counts.append(int(np.sum((x > lo) & (x <= hi))))
    return counts


def loglik(dist, edges, counts):
    ll = 0.0
    for k, n in enumerate(counts):
        if n == 0:
            continue
        p = dist.cdf(edges[k + 1]) - dist.cdf(edges[k])
        if not p > 0:
            return -np.inf
        ll += n * np.log(p)
    return ll


def chisq(dist, edges, counts):
    n = sum(counts)
    obs, exp = [], []
    o = e = 0.0
    for k, c in enumerate(counts):
        o += c
        e += n * (dist.cdf(edges[k + 1]) - dist.cdf(edges[k]))
        if e >= MIN_EXPECTED:
            obs.append(o)
            exp.append(e)
            o = e = 0.0
    if e > 0 or o > 0:
        if obs:
            obs[-1] += o
            exp[-1] += e
        else:
            obs.append(o)
            exp.append(e)
    return sum((a - b) ** 2 / b for a, b in zip(obs, exp)), len(obs)


def fit(make, starts, edges, counts):
    nll = lambda t: -loglik(make(np.exp(t)), edges, counts)
    best = None
    for s in starts:
        r = optimize.minimize(nll, np.log(s), method="Nelder-Mead", options={"xatol": 1e-12, "fatol": 1e-13, "maxiter": 20000})
        r = optimize.minimize(nll, r.x, method="BFGS", options={"gtol": 1e-10})
        if best is None or r.fun < best.fun:
            best = r
    return np.exp(best.x), -best.fun


rng = np.random.default_rng(20261203)
cases = []
x = 40 * rng.weibull(1.6, 200)
edges = [0, 10, 20, 30, 40, 50, 60, 70, 80, 90, 100, np.inf]
counts = binned(x, edges)
(k, s), ll = fit(lambda t: stats.weibull_min(t[0], scale=t[1]), [(1, 30), (2, 50), (1.5, 40)], edges, counts)
x2, cells = chisq(stats.weibull_min(k, scale=s), edges, counts)
cases.append({"name": "weibull", "family": "weibull", "edges": edges[:-1], "counts": counts,
              "params": {"shape": k, "scale": s}, "loglik": ll, "chisq": x2, "cells": cells})

y = np.exp(rng.normal(0, 0.8, 150))
edges = [0, 0.25, 0.5, 1, 2, 4, np.inf]
counts = binned(y, edges)
(mu_, sig), ll = fit(lambda t: stats.lognorm(t[1], scale=t[0]), [(1, 1), (0.8, 0.6), (1.5, 1.2)], edges, counts)
x2, cells = chisq(stats.lognorm(sig, scale=mu_), edges, counts)
cases.append({"name": "lognormal", "family": "lognormal", "edges": edges[:-1], "counts": counts,
              "params": {"mu": float(np.log(mu_)), "sigma": sig}, "loglik": ll, "chisq": x2, "cells": cells})

print(json.dumps({"source": "scipy %s (weibull_min, lognorm; optimize Nelder-Mead then BFGS); invented data, seed 20261203" % scipy.__version__,
                  "cases": [{**c, "params": {k: float(v) for k, v in c["params"].items()}, "loglik": float(c["loglik"]), "chisq": float(c["chisq"])} for c in cases]}, indent=1))
