#!/usr/bin/python3
"""Derived quantities of a betabinomial fit at its binomial limit, made with scipy from Debian.

Run from the repository root:  /usr/bin/python3 testdata/infer/make_limit_derived.py
Writes testdata/infer/limit_derived.json, read by fitters/infer/limit_derived_test.go.

Invented counts out of a common 10 trials, less spread than a binomial's
(variance below n p (1 - p)): the betabinomial likelihood is then largest in
the limit alpha, beta -> infinity with alpha/(alpha+beta) = p, the binomial
with the pooled p = sum(k)/sum(n). The script confirms that no finite
(alpha, beta) beats the binomial's log-likelihood (Nelder-Mead from several
starts on log alpha, log beta, the betabinomial log-likelihood by mpmath's
loggamma at 40 digits, as scipy's betabinom loses digits for large alpha, beta)
and that along alpha/(alpha+beta) = p it rises towards the binomial's and writes the
binomial's quantiles (scipy's binom.ppf: the smallest k with P(X <= k) >= p),
return levels (the quantile at 1 - 1/T) and exceedance probabilities
P(X > t) = binom.sf(t).
"""
import json
import os

import mpmath
import numpy as np
import scipy
from scipy import optimize, stats

n = 10
counts = [3, 4, 3, 3, 4, 3, 2, 4, 3, 3, 4, 3, 3, 2, 4, 3]
k = np.array(counts, dtype=float)
p = k.sum() / (n * len(k))
ll_bin = float(stats.binom.logpmf(k, n, p).sum())


def betabinom_loglik(a, b):
    # mpmath at 40 digits: scipy's betabinom.logpmf loses digits for large
    # alpha and beta, just where the limit is approached.
    def lbeta(x, y):
        return mpmath.loggamma(x) + mpmath.loggamma(y) - mpmath.loggamma(x + y)
    s = mpmath.mpf(0)
    for x in counts:
        s += mpmath.log(mpmath.binomial(n, x)) + lbeta(x + a, n - x + b) - lbeta(a, b)
    return float(s)


def nll(t):
    return -betabinom_loglik(mpmath.exp(t[0]), mpmath.exp(t[1]))


mpmath.mp.dps = 40
best = -np.inf
for s in (1.0, 10.0, 100.0, 1e3):
    r = optimize.minimize(nll, [np.log(p * s), np.log((1 - p) * s)], method="Nelder-Mead",
                          options={"xatol": 1e-8, "fatol": 1e-12, "maxiter": 2000})
    best = max(best, -r.fun)
# Along alpha/(alpha+beta) = p the log-likelihood rises towards the binomial's.
along = [betabinom_loglik(mpmath.mpf(p) * s, mpmath.mpf(1 - p) * s) for s in (1e1, 1e2, 1e3, 1e4, 1e6, 1e9)]
assert all(x < y for x, y in zip(along, along[1:])), along
assert abs(along[-1] - ll_bin) < 1e-6, (along[-1], ll_bin)
assert best <= ll_bin + 1e-9, (best, ll_bin)

out = {
    "source": "scipy " + scipy.__version__ + " stats.binom, mpmath " + mpmath.__version__ + ", testdata/infer/make_limit_derived.py",
    "trials": n, "counts": counts, "p": p, "loglik": ll_bin,
    "quantile": [{"argument": q, "value": float(stats.binom.ppf(q, n, p))} for q in (0.05, 0.1, 0.5, 0.9)],
    "return_level": [{"argument": T, "value": float(stats.binom.ppf(1 - 1 / T, n, p))} for T in (10.0, 100.0, 1000.0)],
    "exceedance": [{"argument": t, "value": float(stats.binom.sf(t, n, p))} for t in (2.0, 4.0, 5.5, 7.0)],
}
path = os.path.join(os.path.dirname(os.path.abspath(__file__)), "limit_derived.json")
with open(path, "w") as f:
    json.dump(out, f, indent=1)
    f.write("\n")
