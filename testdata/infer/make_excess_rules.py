#!/usr/bin/python3
"""Unconditional values from a model of excesses, made with scipy from Debian.

Run from the repository root:  /usr/bin/python3 testdata/infer/make_excess_rules.py
Writes testdata/infer/excess_rules.json, read by fitters/infer/excess_test.go.

gpd models X given X > u. Whether the rule each derived row's note gives
(for making its value unconditional) is right is checked on a parent whose
excesses are exactly generalised Pareto: the Lomax (Pareto II) law with shape
c and scale s, S(x) = (1 + x/s)^(-c), x >= 0, whose excesses over u are
generalised Pareto with shape xi = 1/c and scale sigma = (s + u)/c
(Pickands, 1975). The script checks that relation with scipy before writing.

With zeta = P(X > u) (scipy's lomax.sf(u)) and n_y observations a year
(daily values: lambda = n_y zeta values above u a year on average):

  exceedance  P(X > t)           = lomax.sf(t)
  quantile    the p-quantile of X = lomax.ppf(p), for p > 1 - zeta
  return      the level exceeded on average once in T years, i.e. by n_y T
    level     observations: lomax.isf(1/(n_y T)) (Coles, 2001, section 4.3.3)

Invented parameters: c = 3, s = 10, u = 30, n_y = 365. The sample (for the
observed information only) is the generalised Pareto's quantiles at the
plotting positions (i + 0.5)/40, i = 0..39.
"""
import json
import os

import numpy as np
import scipy
from scipy import stats

c, s, u, ny = 3.0, 10.0, 30.0, 365
xi, sigma = 1 / c, (s + u) / c
parent = stats.lomax(c, scale=s)
excess = stats.genpareto(xi, loc=u, scale=sigma)

# The excesses of the parent are the generalised Pareto above.
for x in np.linspace(u, 10 * u, 50):
    cond = parent.sf(x) / parent.sf(u)
    assert abs(cond - excess.sf(x)) <= 1e-14 * max(cond, 1e-300), (x, cond, excess.sf(x))

zeta = float(parent.sf(u))
lam = ny * zeta
out = {
    "source": "scipy " + scipy.__version__ + " stats.lomax and stats.genpareto, testdata/infer/make_excess_rules.py",
    "scale": sigma, "shape": xi, "threshold": u,
    "zeta": zeta, "per_year": ny, "lambda": lam,
    "sample": [float(v) for v in excess.ppf((np.arange(40) + 0.5) / 40)],
    "exceedance": [{"argument": t, "unconditional": float(parent.sf(t))} for t in (50.0, 100.0, 400.0)],
    "quantile": [{"argument": p, "unconditional": float(parent.ppf(p))} for p in (0.99, 0.999, 0.9999)],
    "return_level": [{"argument": T, "unconditional": float(parent.isf(1 / (ny * T)))} for T in (10.0, 100.0, 1000.0)],
}
path = os.path.join(os.path.dirname(os.path.abspath(__file__)), "excess_rules.json")
with open(path, "w") as f:
    json.dump(out, f, indent=1)
    f.write("\n")
