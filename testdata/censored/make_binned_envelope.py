#!/usr/bin/python3
"""Reference values for fitters/infer's BinnedEnvelope
(fitters/infer/censored_envelope_test.go, TestBinnedEnvelopeReference):
the bins in which samples of a fitted model are recorded, each bin's
probability under the model, and the exact binomial law of the sample's
cumulative proportion at every finite bin edge, which a pointwise envelope
from many samples approaches.

Models and bins:
- "weibull", "lognormal": the binned data of binned_gof.json beside this
  script (made by make_binned_gof.py: invented data, scipy's own
  maximum-likelihood fits), read from there;
- "normal-below": the lognormal case's bins and counts under normal(mu 1,
  sigma 0.9), parameters chosen here (not a fit), a model with mass below
  the first bin, so that the bin (-inf, 0] is added;
- "lognormal-gap": the lognormal case with its bin (1, 2] emptied (104
  values), at the same parameters, so that the gap (1, 2] is added.

The recording bins follow the rule of fitters/infer's binned check: the
data's bins, a bin (-inf, first lower edge] where the model has mass below
the first bin, the gaps between bins, and (last upper edge, inf) where the
model has mass above the last. A bin's probability is
P(l < X <= u) = F(u) - F(l), taken as S(l) - S(u) where F(l) >= 0.5
(scipy.stats' cdf and sf). With n values, the count at or below the edge u
is Binomial(n, F(u)); scipy.stats.binom gives its 2.5 % and 97.5 % points
(ppf: the smallest count c with P(N <= c) >= q) and its CDF over the counts
from ppf(1e-4) to ppf(1 - 1e-4).

Run: /usr/bin/python3 testdata/censored/make_binned_envelope.py > testdata/censored/binned_envelope.json
"""
import json
import math
import os

import scipy
from scipy import stats

HERE = os.path.dirname(os.path.abspath(__file__))
with open(os.path.join(HERE, "binned_gof.json")) as f:
    fitted = {c["name"]: c for c in json.load(f)["cases"]}


def model(family, params):
    if family == "weibull":
        return stats.weibull_min(params["shape"], scale=params["scale"])
    if family == "lognormal":
        return stats.lognorm(params["sigma"], scale=math.exp(params["mu"]))
    if family == "normal":
        return stats.norm(params["mu"], params["sigma"])
    raise ValueError(family)


def bins_of(dist, edges, counts):
    """The recording bins (lo, hi]: edges[k] to edges[k+1], the last open
    above, those with a count only, then the added ones."""
    data = []
    for k, c in enumerate(counts):
        if c == 0:
            continue
        hi = edges[k + 1] if k + 1 < len(edges) else math.inf
        data.append((edges[k], hi))
    out = []
    if dist.cdf(data[0][0]) > 0:
        out.append((-math.inf, data[0][0]))
    for k, b in enumerate(data):
        if k > 0 and b[0] > data[k - 1][1]:
            out.append((data[k - 1][1], b[0]))
        out.append(b)
    if math.isfinite(out[-1][1]) and dist.sf(out[-1][1]) > 0:
        out.append((out[-1][1], math.inf))
    return out


def probability(dist, lo, hi):
    if dist.cdf(lo) < 0.5:
        return float(dist.cdf(hi) - dist.cdf(lo))
    return float(dist.sf(lo) - dist.sf(hi))


def bound(x):
    return None if math.isinf(x) else float(x)


cases = []
specs = [
    ("weibull", "weibull", fitted["weibull"]["params"], fitted["weibull"]["edges"], fitted["weibull"]["counts"]),
    ("lognormal", "lognormal", fitted["lognormal"]["params"], fitted["lognormal"]["edges"], fitted["lognormal"]["counts"]),
    ("normal-below", "normal", {"mu": 1.0, "sigma": 0.9}, fitted["lognormal"]["edges"], fitted["lognormal"]["counts"]),
    ("lognormal-gap", "lognormal", fitted["lognormal"]["params"], fitted["lognormal"]["edges"],
     [0 if lo == 1 else c for lo, c in zip(fitted["lognormal"]["edges"], fitted["lognormal"]["counts"])]),
]
for name, family, params, edges, counts in specs:
    dist = model(family, params)
    n = sum(counts)
    bins = bins_of(dist, edges, counts)
    points = []
    for lo, hi in bins:
        if math.isinf(hi):
            continue
        F = float(dist.cdf(hi))
        law = stats.binom(n, F)
        start, end = int(law.ppf(1e-4)), int(law.ppf(1 - 1e-4))
        points.append({"edge": float(hi), "cdf": F,
                       "lower_count": int(law.ppf(0.025)), "upper_count": int(law.ppf(0.975)),
                       "binom_cdf_from": start,
                       "binom_cdf": [float(law.cdf(c)) for c in range(start, end + 1)]})
    cases.append({"name": name, "family": family, "params": {k: float(v) for k, v in params.items()},
                  "edges": edges, "counts": counts, "n": n,
                  "bins": [[bound(lo), bound(hi)] for lo, hi in bins],
                  "bin_probability": [probability(dist, lo, hi) for lo, hi in bins],
                  "points": points})

print(json.dumps({"source": "scipy %s (weibull_min, lognorm, norm cdf and sf; binom ppf and cdf); "
                  "bins and fitted parameters from binned_gof.json (invented data)" % scipy.__version__,
                  "cases": cases}, indent=1))
