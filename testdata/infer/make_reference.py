#!/usr/bin/python3
"""Reference values for fitters/infer, made with scipy from Debian.

Run from the repository root:  /usr/bin/python3 testdata/infer/make_reference.py
Writes testdata/infer/edf_statistics.json and testdata/infer/gof_pvalues.json.

edf_statistics.json: Kolmogorov-Smirnov (scipy.stats.kstest), Cramer-von Mises
(scipy.stats.cramervonmises) and Anderson-Darling statistics of samples against
fully specified distributions. scipy.stats.anderson has no option for given
parameters, so A^2 is computed here from its definition (Stephens, 1974),
A^2 = -n - (1/n) sum (2i-1) [ln F(x_(i)) + ln S(x_(n+1-i))], with scipy's
logcdf and logsf, summed by math.fsum.

gof_pvalues.json: parametric-bootstrap p-values from
scipy.stats.goodness_of_fit (Monte Carlo, the family refitted on every sample,
p = (r + 1)/(B + 1)) for fits of the ball-bearing data.
"""
import json
import math
import os

import numpy as np
import scipy
from scipy import stats

HERE = os.path.dirname(os.path.abspath(__file__))

# Lieblein & Zelen (1956) ball-bearing endurance times, millions of revolutions
# (recalled from memory, as in fitters/infer/helpers_test.go).
BALL = [17.88, 28.92, 33.00, 41.52, 42.12, 45.60, 48.48, 51.84, 51.96, 54.12, 55.56, 67.80,
        68.64, 68.64, 68.88, 84.12, 93.12, 98.64, 105.12, 105.84, 127.92, 128.04, 173.40]

# A second sample: 30 values drawn from a fixed generator (test data only).
rng = np.random.default_rng(20261202)
DRAWN = [float(v) for v in np.round(rng.gamma(2.5, 3.0, 30), 6)]
# A sample with one point 40 standard deviations out: A^2's log terms must
# come from logcdf/logsf, not ln(1 - F).
FAR = [-1.2, -0.7, -0.3, 0.0, 0.4, 0.9, 1.3, 40.0]


def frozen(family, p):
    if family == "normal":
        return stats.norm(loc=p[0], scale=p[1])
    if family == "exponential":
        return stats.expon(scale=1 / p[0])
    if family == "gamma":
        return stats.gamma(p[0], scale=1 / p[1])
    if family == "weibull":
        return stats.weibull_min(p[0], scale=p[1])
    if family == "lognormal":
        return stats.lognorm(p[1], scale=math.exp(p[0]))
    if family == "gumbel":
        return stats.gumbel_r(loc=p[0], scale=p[1])
    raise ValueError(family)


def ad(x, d):
    x = sorted(x)
    n = len(x)
    terms = [(2 * i + 1) * (d.logcdf(x[i]) + d.logsf(x[n - 1 - i])) for i in range(n)]
    return -n - math.fsum(terms) / n


cases = [
    ("ball-bearings", BALL, "normal", [72.2243, 36.6676]),
    ("ball-bearings", BALL, "exponential", [0.0138]),
    ("ball-bearings", BALL, "gamma", [4.0, 0.055]),
    ("ball-bearings", BALL, "weibull", [2.1, 81.9]),
    ("ball-bearings", BALL, "lognormal", [4.15, 0.52]),
    ("ball-bearings", BALL, "gumbel", [56.0, 27.0]),
    ("drawn-gamma", DRAWN, "gamma", [2.5, 1 / 3.0]),
    ("drawn-gamma", DRAWN, "weibull", [1.6, 8.5]),
    ("far-point", FAR, "normal", [0.0, 1.0]),
]
out = {"source": "scipy %s (Debian), testdata/infer/make_reference.py" % scipy.__version__, "cases": []}
for name, x, fam, p in cases:
    d = frozen(fam, p)
    out["cases"].append({
        "data": name, "x": x, "family": fam, "params": p,
        "ks": float(stats.kstest(x, d.cdf).statistic),
        "cvm": float(stats.cramervonmises(x, d.cdf).statistic),
        "ad": float(ad(x, d)),
    })

# Pooled chi-square for counts: Bortkiewicz's (1898) deaths by horse kick in
# 200 corps-years, counts 0..4 seen 109, 65, 22, 3, 1 times (recalled from
# memory), against a Poisson with rate 0.61. Cells 0, 1, ..., m-1 and ">= m"
# (m the largest count) are pooled from the left until each expected count is
# at least 5, a short last group joining its neighbour (fitseal's rule); the
# statistic is scipy.stats.chisquare's.
KICKS = [0] * 109 + [1] * 65 + [2] * 22 + [3] * 3 + [4] * 1


def pooled(x, d):
    n, m = len(x), max(x)
    obs, exp, o, e = [], [], 0.0, 0.0
    for v in range(m + 1):
        o += sum(1 for y in x if y == v)
        e += n * (d.pmf(v) if v < m else d.sf(m - 1))
        if e >= 5:
            obs.append(o); exp.append(e); o, e = 0.0, 0.0
    if o > 0 or e > 0:
        obs[-1] += o; exp[-1] += e
    return obs, exp


def pooled_trials(x, trials, p):
    m = max(x)
    obs, exp, o, e = [], [], 0.0, 0.0
    for v in range(m + 1):
        o += sum(1 for y in x if y == v)
        e += math.fsum(stats.binom(t, p).pmf(v) if v < m else stats.binom(t, p).sf(m - 1) for t in trials)
        if e >= 5:
            obs.append(o); exp.append(e); o, e = 0.0, 0.0
    if o > 0 or e > 0:
        obs[-1] += o; exp[-1] += e
    return obs, exp


# Binomial counts with their own numbers of trials (40 rows drawn from a fixed
# generator; test data only): expected counts sum the binomial of every row.
TRIALS = [int(v) for v in rng.integers(5, 13, 40)]
SUCC = [int(v) for v in rng.binomial(TRIALS, 0.3)]
tobs, texp = pooled_trials(SUCC, TRIALS, 0.3)

obs, exp = pooled(KICKS, stats.poisson(0.61))
out["chisq"] = [{"data": "horse-kicks", "x": KICKS, "family": "poisson", "params": [0.61],
                 "cells": len(obs), "observed": obs, "expected": exp,
                 "chisq": float(stats.chisquare(obs, exp).statistic)},
                {"data": "drawn-binomial", "x": SUCC, "trials": TRIALS, "family": "binomial", "params": [0.3],
                 "cells": len(tobs), "observed": tobs, "expected": texp,
                 "chisq": float(stats.chisquare(tobs, texp).statistic)}]
with open(os.path.join(HERE, "edf_statistics.json"), "w") as f:
    json.dump(out, f, indent=1)
    f.write("\n")

# Parametric-bootstrap p-values by scipy.stats.goodness_of_fit. For the normal,
# scipy 1.10 fits the standard deviation with ddof=1; fitseal reports maximum
# likelihood estimates (ddof=0), so scipy's normal fitting function is
# replaced by the maximum-likelihood one before the call (same mechanism,
# same statistic, MLE refits on every sample).
import scipy.stats._fit as _fit


def _fit_norm_mle(data, floc=None, fscale=None):
    loc = np.mean(data, axis=-1) if floc is None else floc
    scale = np.sqrt(((data - np.expand_dims(loc, -1)) ** 2).mean(axis=-1)) if fscale is None else fscale
    return loc, scale


_fit._fit_funs[stats.norm] = _fit_norm_mle
gof = {"source": "scipy %s (Debian) scipy.stats.goodness_of_fit, testdata/infer/make_reference.py" % scipy.__version__,
       "cases": []}
for fam, dist, known, B in [("normal", stats.norm, {}, 9999), ("gamma", stats.gamma, {"loc": 0}, 1999)]:
    for stat in ["ks", "cvm", "ad"]:
        res = stats.goodness_of_fit(dist, BALL, known_params=known, statistic=stat,
                                    n_mc_samples=B, random_state=np.random.default_rng(4))
        gof["cases"].append({"data": "ball-bearings", "x": BALL, "family": fam, "statistic": stat,
                             "value": float(res.statistic), "pvalue": float(res.pvalue),
                             "replicates": B,
                             "fitted": [float(v) for v in res.fit_result.params]})
with open(os.path.join(HERE, "gof_pvalues.json"), "w") as f:
    json.dump(gof, f, indent=1)
    f.write("\n")
