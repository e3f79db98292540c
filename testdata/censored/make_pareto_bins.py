#!/usr/bin/python3
"""Reference maximum-likelihood Pareto (type I: scale xm, shape a) fits to
interval data with narrow and coarse bins, alone and mixed with exact
values, suspensions and non-detects. Every dataset is drawn here from a
seeded numpy generator (invented for this check).

The log-likelihood is written out from the definitions, S(x) = (xm/x)^a
for x >= xm:

  exact x        ln a + a ln xm - (a + 1) ln x            (x >= xm)
  non-detect L   ln(1 - (xm/L)^a)                          (L > xm)
  suspension t   a ln(xm/t) if t > xm, else 0
  interval (l,u] ln((xm/l)^a - (xm/u)^a) if l > xm,
                 ln(1 - (xm/u)^a) if l <= xm < u

(u/l taken by log1p, so that bins of relative width 1e-6 keep their
digits). It is maximised by profiling: for each xm the shape is found by
Brent's method on ln a (scipy.optimize.minimize_scalar), and the profile is
maximised over xm by
  - evaluating it at every corner: each interval lower end and suspension
    below the bound U = min(exact values, non-detect limits, interval upper
    ends), where the slope in xm changes, and at U itself when U is an
    exact value (xm = U allowed there);
  - bounded Brent on ln xm inside every stretch between neighbouring
    corners (and below the smallest), where the profile is smooth;
  - a grid of 4000 values of xm, logarithmic from U/20 to U, none of which
    may beat the best found.
The maximum's kind is "corner" (at an interval lower end or suspension,
"corner_value" says which), "edge" (at U) or "interior".

Run: /usr/bin/python3 testdata/censored/make_pareto_bins.py > testdata/censored/pareto_bins.json
"""
import json
import math

import numpy as np
import scipy
from scipy import optimize


def loglik(xm, a, d):
    if not (xm > 0 and a > 0):
        return -math.inf
    s = 0.0
    for x in d["exact"]:
        if x < xm:
            return -math.inf
        s += math.log(a) + a * math.log(xm) - (a + 1) * math.log(x)
    for L in d["left"]:
        if L <= xm:
            return -math.inf
        s += math.log(-math.expm1(a * math.log(xm / L)))
    for t in d["right"]:
        if t > xm:
            s += a * math.log(xm / t)
    for l, u in zip(d["lower"], d["upper"]):
        if u <= xm:
            return -math.inf
        if l <= xm:
            s += math.log(-math.expm1(a * math.log(xm / u)))
        else:
            s += a * math.log(xm / l) + math.log(-math.expm1(-a * math.log1p((u - l) / l)))
    return s


def profile(xm, d):
    """max over a of loglik(xm, a), with the maximising a."""
    f = lambda la: -loglik(xm, math.exp(la), d)
    best = None
    for lo, hi in ((-3.0, 0.0), (0.0, 3.0), (3.0, 8.0)):
        r = optimize.minimize_scalar(f, bounds=(lo, hi), method="bounded", options={"xatol": 1e-12})
        if best is None or r.fun < best.fun:
            best = r
    r = optimize.minimize_scalar(f, bracket=(best.x - 0.01, best.x + 0.01), method="brent", tol=1e-14)
    if r.fun < best.fun:
        best = r
    return -best.fun, math.exp(best.x)


def fit(d):
    bound = min(d["exact"] + d["left"] + d["upper"])
    corners = sorted(set([l for l in d["lower"] if 0 < l < bound] + [t for t in d["right"] if 0 < t < bound]))
    cands = []  # (loglik, xm, a, kind)
    for c in corners:
        ll, a = profile(c, d)
        cands.append((ll, c, a, "corner"))
    if bound in d["exact"] and bound not in d["left"] and bound not in d["upper"]:
        ll, a = profile(bound, d)
        cands.append((ll, bound, a, "edge"))
    ends = [bound / 20] + corners + [bound]
    for lo, hi in zip(ends[:-1], ends[1:]):
        f = lambda lx: -profile(math.exp(lx), d)[0]
        r = optimize.minimize_scalar(f, bounds=(math.log(lo), math.log(hi)), method="bounded", options={"xatol": 1e-13})
        xm = math.exp(r.x)
        if lo < xm < hi:
            ll, a = profile(xm, d)
            cands.append((ll, xm, a, "interior"))
    best = max(cands, key=lambda c: c[0])
    for xm in np.exp(np.linspace(math.log(bound / 20), math.log(bound), 4000))[:-1]:
        ll, _ = profile(float(xm), d)
        assert ll <= best[0] + 1e-9, (xm, ll, best)
    return best, corners


def pareto(rng, xm, a, n):
    return [float(v) for v in xm * (1 + rng.pareto(a, n))]


def empty():
    return {"exact": [], "left": [], "right": [], "lower": [], "upper": []}


rng = np.random.default_rng(20260417)
cases = []

# Every value recorded as (v, v(1 + 1e-6)].
d = empty()
for v in pareto(rng, 2.0, 2.5, 60):
    d["lower"].append(v)
    d["upper"].append(v * (1 + 1e-6))
cases.append(("relative width 1e-6", d))

# An instrument reading to 0.001: (k/1000, (k+1)/1000].
d = empty()
for v in pareto(rng, 5.0, 3.0, 60):
    k = math.floor(v * 1000)
    d["lower"].append(k / 1000)
    d["upper"].append((k + 1) / 1000)
cases.append(("resolution 1e-3", d))

# Bins of relative width 0.1: (v, 1.1 v].
d = empty()
for v in pareto(rng, 2.0, 2.5, 50):
    d["lower"].append(v)
    d["upper"].append(v * 1.1)
cases.append(("relative width 0.1", d))

# Bins of relative width 0.5: (v, 1.5 v].
d = empty()
for v in pareto(rng, 2.0, 2.5, 50):
    d["lower"].append(v)
    d["upper"].append(v * 1.5)
cases.append(("relative width 0.5", d))

# Coarse bins of width 0.5 from 1.8, the last one open: (1.8, 2.3], (2.3, 2.8], ...
d = empty()
for v in pareto(rng, 2.0, 2.5, 80):
    k = math.floor((v - 1.8) / 0.5)
    lo = round(1.8 + 0.5 * k, 10)
    if lo >= 6.8:
        d["right"].append(6.8)
    else:
        d["lower"].append(lo)
        d["upper"].append(round(lo + 0.5, 10))
cases.append(("coarse bins 0.5", d))

# Mixed: each third value a narrow bin (v, v + 1e-4]; each third exact
# unless a random inspection time C ~ U(1, 6) came first (a suspension at
# C); each third exact unless below the detection limit 1.3 (a non-detect).
d = empty()
for i, v in enumerate(pareto(rng, 1.0, 2.0, 90)):
    if i % 3 == 0:
        d["lower"].append(v)
        d["upper"].append(v + 1e-4)
    elif i % 3 == 1:
        c = float(rng.uniform(1, 6))
        if c < v:
            d["right"].append(c)
        else:
            d["exact"].append(v)
    elif v < 1.3:
        d["left"].append(1.3)
    else:
        d["exact"].append(v)
cases.append(("mixed narrow bins, exact, suspensions, non-detects", d))

# Mixed, the low range read by a finer instrument: values below 1.2 as
# (v, v + 1e-4], the others exact unless a random inspection time
# C ~ U(1, 6) came first (a suspension at C), every fourth of them a
# non-detect at 1.5 when below it.
d = empty()
for i, v in enumerate(pareto(rng, 1.0, 2.0, 90)):
    c = float(rng.uniform(1, 6))
    if v < 1.2:
        d["lower"].append(v)
        d["upper"].append(v + 1e-4)
    elif c < v:
        d["right"].append(c)
    elif i % 4 == 0 and v < 1.5:
        d["left"].append(1.5)
    else:
        d["exact"].append(v)
cases.append(("mixed, fine bins below 1.2", d))

out = {"source": "scipy " + scipy.__version__ + ", numpy " + np.__version__ + ", testdata/censored/make_pareto_bins.py", "fits": []}
for name, d in cases:
    (ll, xm, a, kind), corners = fit(d)
    out["fits"].append({
        "name": name, **d,
        "estimates": [xm, a], "loglik": ll, "kind": kind,
        "corner_value": xm if kind == "corner" else None,
        "smallest_lower_end": min(d["lower"]),
        "bound": min(d["exact"] + d["left"] + d["upper"]),
    })
print(json.dumps(out, indent=1))
