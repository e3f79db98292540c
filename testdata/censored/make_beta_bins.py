#!/usr/bin/python3
"""Reference maximum-likelihood beta fit to binned proportions whose outer
bins end at 0 and 1: (0, 0.1], (0.1, 0.2], ..., (0.9, 1]. Bounds of 0 and 1
are valid interval ends (F(0) = 0, F(1) = 1). The counts are invented for
this check. The log-likelihood sum n_i ln(F(u_i) - F(l_i)) is maximised
with scipy.optimize (Nelder-Mead from a grid of starts on (ln a, ln b),
polished by L-BFGS-B); scipy's beta(a, b) is fitseal's beta (alpha, beta).

Run: /usr/bin/python3 testdata/censored/make_beta_bins.py > testdata/censored/beta_bins.json
"""
import json
import numpy as np
from scipy import optimize, stats

edges = [round(0.1 * i, 1) for i in range(11)]
counts = [2, 5, 9, 12, 11, 8, 6, 4, 2, 1]
lo = np.repeat(edges[:-1], counts)
hi = np.repeat(edges[1:], counts)


def nll(p):
    a, b = np.exp(p)
    with np.errstate(all="ignore"):
        v = -np.sum(np.log(stats.beta.cdf(hi, a, b) - stats.beta.cdf(lo, a, b)))
    return v if np.isfinite(v) else 1e300


best = None
for a0 in (0.5, 1, 2, 5):
    for b0 in (0.5, 1, 2, 5):
        r = optimize.minimize(nll, np.log([a0, b0]), method="Nelder-Mead", options={"xatol": 1e-12, "fatol": 1e-14, "maxiter": 20000})
        r = optimize.minimize(nll, r.x, method="L-BFGS-B", options={"ftol": 1e-15, "gtol": 1e-12})
        if best is None or r.fun < best.fun:
            best = r
a, b = np.exp(best.x)
print(json.dumps({"source": "scipy " + __import__("scipy").__version__ + ", testdata/censored/make_beta_bins.py",
                  "lower": lo.tolist(), "upper": hi.tolist(),
                  "estimates": [float(a), float(b)], "loglik": float(-best.fun)}, indent=1))
