#!/usr/bin/python3
"""Exact 95% intervals that fitseal's bootstrap-t must reproduce up to
Monte-Carlo error, made with scipy from Debian.

Run from the repository root:  /usr/bin/python3 testdata/infer/bootstrap_t_reference.py
Writes testdata/infer/bootstrap_t.json.

It also records sample quantiles by numpy.quantile(method="weibull"), which is
Hyndman & Fan's (1996) type 6, position (m + 1)p: the rule fitseal uses for the
bootstrap-t pivot quantiles (Davison & Hinkley, 1997, section 5.2.1).

For these quantities the studentized pivot's distribution does not depend on
the parameters, so the bootstrap-t interval (Efron & Tibshirani, 1993,
section 12.5) tends, as B grows, to the exact interval from that pivot:

- exponential rate (log scale, se(ln rate) = 1/sqrt(n)): rate * sum(x) is
  Gamma(n, 1), so rate lies in [G^-1(a/2), G^-1(1 - a/2)] / sum(x);
- exponential 0.99 quantile -ln(0.01)/rate: the same interval mapped through;
- normal mean (natural scale, se = sigma_ml/sqrt(n)): Student's interval
  xbar -/+ t_{n-1}(1 - a/2) s/sqrt(n), s the n-1 standard deviation;
- normal sigma (log scale, se(ln sigma) = 1/sqrt(2n)): n sigma_ml^2/sigma^2 is
  chi-square(n-1), so sigma lies in sigma_ml sqrt(n/chi2(1 - a/2)),
  sigma_ml sqrt(n/chi2(a/2));
- normal 0.99 quantile q = mu + z sigma (natural scale, delta-method
  se = sigma_ml sqrt((1 + z^2/2)/n)): sqrt(n)(xbar - q)/s is noncentral t with
  n - 1 degrees of freedom and noncentrality -z sqrt(n), so q lies in
  [xbar - s T(1 - a/2)/sqrt(n), xbar - s T(a/2)/sqrt(n)], T = scipy.stats.nct.ppf.
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

LEVEL = 0.95
a = 1 - LEVEL
n = len(BALL)
total = math.fsum(BALL)
xbar = total / n
ss = math.fsum((x - xbar) ** 2 for x in BALL)
s = math.sqrt(ss / (n - 1))
sigma_ml = math.sqrt(ss / n)
rate = n / total
z99 = stats.norm.ppf(0.99)

g_lo, g_hi = stats.gamma.ppf([a / 2, 1 - a / 2], n)
rate_lo, rate_hi = g_lo / total, g_hi / total
q99 = lambda r: -math.log(0.01) / r
t_hi = stats.t.ppf(1 - a / 2, n - 1)
c_lo, c_hi = stats.chi2.ppf([a / 2, 1 - a / 2], n - 1)
nct_lo, nct_hi = stats.nct.ppf([a / 2, 1 - a / 2], n - 1, -z99 * math.sqrt(n))

out = {
    "source": "scipy " + scipy.__version__ + " (testdata/infer/bootstrap_t_reference.py)",
    "data": "ball bearings (Lieblein & Zelen, 1956)",
    "level": LEVEL,
    "intervals": [
        {"family": "exponential", "quantity": "rate", "lower": rate_lo, "upper": rate_hi},
        {"family": "exponential", "quantity": "quantile 0.99", "lower": q99(rate_hi), "upper": q99(rate_lo)},
        {"family": "normal", "quantity": "mu", "lower": xbar - t_hi * s / math.sqrt(n), "upper": xbar + t_hi * s / math.sqrt(n)},
        {"family": "normal", "quantity": "sigma", "lower": sigma_ml * math.sqrt(n / c_hi), "upper": sigma_ml * math.sqrt(n / c_lo)},
        {"family": "normal", "quantity": "quantile 0.99",
         "lower": xbar - s * nct_hi / math.sqrt(n), "upper": xbar - s * nct_lo / math.sqrt(n)},
    ],
}
# type-6 quantiles of the ball-bearing times and of their first 7
# (where positions below 1 and above m are clamped to the extremes).
probs = [0.001, 0.025, 0.1, 0.5, 0.9, 0.975, 0.999]
out["type6"] = [
    {"values": v, "probs": probs, "quantiles": [float(q) for q in np.quantile(v, probs, method="weibull")]}
    for v in (BALL, BALL[:7])
]
out["source"] += ", numpy " + np.__version__

with open(os.path.join(HERE, "bootstrap_t.json"), "w") as f:
    json.dump(out, f, indent=1)
    f.write("\n")
