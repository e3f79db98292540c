#!/usr/bin/python3
"""Reference goodness-of-fit statistics of censored data against the
Kaplan-Meier estimate, for fitters/infer's censored check.

Run with Debian's scipy:  /usr/bin/python3 testdata/censored/make_censored_gof.py
It writes testdata/censored/censored_gof.json beside this script (seconds).

Every number is invented: datasets are simulated here with numpy's PCG64
and the seeds below.

  weibull-suspensions  60 lifetimes from weibull(shape 1.8, scale 1000 h),
                       each with its own censoring time uniform on (0, 2500) h;
                       the smaller of the two is recorded, rounded to 10 h (so
                       that some failures and suspensions tie), a suspension
                       when the censoring time came first.
  lognormal-nondetects 50 concentrations from lognormal(mu 0, sigma 1),
                       measured in turn against detection limits 0.4 and 0.8;
                       a value below its limit is a non-detect at the limit.

The censored maximum-likelihood estimates are found here by
scipy.optimize.minimize (Nelder-Mead on log scale parameters, tolerances
1e-12, then polished by BFGS) from the likelihood of SPEC.md: an exact value
adds ln f(x), a suspension at R ln S(R), a non-detect at L ln F(L), each from
scipy.stats' logpdf, logsf, logcdf.

The statistics are computed at scipy's estimates by an implementation
written here from the formulas, independent of fitseal's code:

  Kaplan-Meier (product-limit) estimate, Kaplan & Meier (1958): at each
  distinct failure time t with d failures and r units at risk,
  S <- S (1 - d/r); a unit suspended at t counts as at risk at t.
  Non-detects use the left-censored form directly, without reflecting:
  F_KM(x) = prod over detected values x_j > x of (1 - d_j/r_j), r_j the
  units with a value (detected or limit) <= x_j, defined for x at or above
  the smallest value.

  ks:  sup |F_KM - F| over the range where F_KM is defined, both one-sided
       limits at every jump and the end of the range.
  cvm: n * integral of (F_KM - F)^2 dF over that range (Koziol & Green 1976,
       Biometrika 63, 465-474), taken to the far end of the support where
       F_KM reaches its limit (1 on the right, 0 on the left) at the last
       value; each step is integrated with scipy.integrate.quad on the
       u = F scale and checked against the closed form
       ((b - c)^3 - (a - c)^3)/3.
"""

import json
import os

import numpy as np
from scipy import integrate, optimize, stats


def censored_loglik(dist, exact, right, left):
    ll = np.sum(dist.logpdf(exact))
    if len(right):
        ll += np.sum(dist.logsf(right))
    if len(left):
        ll += np.sum(dist.logcdf(left))
    return ll


def fit(make, start, exact, right, left):
    def nll(p):
        try:
            v = -censored_loglik(make(p), exact, right, left)
        except (ValueError, FloatingPointError):
            return np.inf
        return v if np.isfinite(v) else np.inf

    r = optimize.minimize(nll, start, method="Nelder-Mead",
                          options={"xatol": 1e-12, "fatol": 1e-13, "maxiter": 40000, "maxfev": 80000})
    r2 = optimize.minimize(nll, r.x, method="BFGS", options={"gtol": 1e-10})
    best = r2 if r2.fun <= r.fun else r
    return best.x, -best.fun


def km_right(exact, right):
    """Steps (t, F after t) of the product-limit estimate, the largest time,
    and whether F reaches 1."""
    times = sorted(set(exact))
    steps, S = [], 1.0
    reaches = False
    for t in times:
        r = sum(1 for v in exact if v >= t) + sum(1 for v in right if v >= t)
        d = sum(1 for v in exact if v == t)
        if d == r:
            S, reaches = 0.0, True
        else:
            S *= 1 - d / r
        steps.append((t, 1 - S))
    tmax = max(max(exact), max(right) if len(right) else -np.inf)
    return steps, tmax, reaches


def km_left(exact, left):
    """Steps (x, F_KM(x−), F_KM(x)) of the left-censored product-limit
    estimate of the CDF, ascending, the smallest value, and whether
    F_KM reaches 0 below the smallest detected value."""
    times = sorted(set(exact), reverse=True)
    F = 1.0
    out = []
    reaches = False
    for x in times:
        r = sum(1 for v in exact if v <= x) + sum(1 for v in left if v <= x)
        d = sum(1 for v in exact if v == x)
        after = F
        if d == r:
            F, reaches = 0.0, True
        else:
            F *= 1 - d / r
        out.append((x, F, after))
    out.reverse()
    xmin = min(min(exact), min(left) if len(left) else np.inf)
    return out, xmin, reaches


def step_integral(c, a, b):
    q, _ = integrate.quad(lambda u: (c - u) ** 2, a, b, epsabs=1e-15, epsrel=1e-13)
    closed = ((b - c) ** 3 - (a - c) ** 3) / 3
    assert abs(q - closed) <= 1e-12 + 1e-9 * abs(closed), (q, closed)
    return q


def statistics_right(dist, exact, right):
    steps, tmax, reaches = km_right(exact, right)
    n = len(exact) + len(right)
    ks, total = 0.0, 0.0
    c, a = 0.0, 0.0
    for t, f in steps:
        Ft = float(dist.cdf(t))
        ks = max(ks, abs(c - Ft), abs(f - Ft))
        total += step_integral(c, a, Ft)
        c, a = f, Ft
    Fmax = float(dist.cdf(tmax))
    ks = max(ks, abs(c - Fmax))
    total += step_integral(c, a, 1.0 if reaches else Fmax)
    return ks, n * total


def statistics_left(dist, exact, left):
    steps, xmin, reaches = km_left(exact, left)
    n = len(exact) + len(left)
    ks, total = 0.0, 0.0
    # Walk downwards from +inf, where F_KM = 1 and F = 1.
    c, b = 1.0, 1.0
    for x, below, at in reversed(steps):
        Fx = float(dist.cdf(x))
        ks = max(ks, abs(at - Fx), abs(below - Fx))
        total += step_integral(c, Fx, b)   # F_KM = c on [x, next jump)
        c, b = below, Fx
    Fmin = float(dist.cdf(xmin))
    ks = max(ks, abs(c - Fmin))
    total += step_integral(c, 0.0 if reaches else Fmin, b)
    return ks, n * total


def weibull_case():
    rng = np.random.Generator(np.random.PCG64(20261203))
    n = 60
    life = 1000 * rng.weibull(1.8, n)
    cens = rng.uniform(0, 2500, n)
    exact = [round(float(t), -1) for t, c in zip(life, cens) if t <= c]
    right = [round(float(c), -1) for t, c in zip(life, cens) if t > c]
    make = lambda p: stats.weibull_min(c=np.exp(p[0]), scale=np.exp(p[1]))
    x, ll = fit(make, [np.log(1.5), np.log(np.mean(exact + right))], np.array(exact), np.array(right), np.array([]))
    shape, scale = float(np.exp(x[0])), float(np.exp(x[1]))
    ks, cvm = statistics_right(stats.weibull_min(c=shape, scale=scale), exact, right)
    return {"name": "weibull-suspensions", "family": "weibull", "exact": exact, "right": right, "left": [],
            "parameters": ["shape", "scale"], "estimates": [shape, scale], "loglik": float(ll),
            "ks": ks, "cvm": cvm}


def lognormal_case():
    rng = np.random.Generator(np.random.PCG64(20261204))
    n = 50
    conc = rng.lognormal(0.0, 1.0, n)
    limits = [0.4, 0.8]
    exact, left = [], []
    for i, v in enumerate(conc):
        L = limits[i % 2]
        if v < L:
            left.append(L)
        else:
            exact.append(round(float(v), 4))
    make = lambda p: stats.lognorm(s=np.exp(p[1]), scale=np.exp(p[0]))
    x, ll = fit(make, [0.0, 0.0], np.array(exact), np.array([]), np.array(left))
    mu, sigma = float(x[0]), float(np.exp(x[1]))
    ks, cvm = statistics_left(stats.lognorm(s=sigma, scale=np.exp(mu)), exact, left)
    return {"name": "lognormal-nondetects", "family": "lognormal", "exact": exact, "right": [], "left": left,
            "parameters": ["mu", "sigma"], "estimates": [mu, sigma], "loglik": float(ll),
            "ks": ks, "cvm": cvm}


def complete_check():
    """Without censoring the formulas must give the usual D and W²."""
    rng = np.random.Generator(np.random.PCG64(7))
    x = np.sort(rng.normal(size=25))
    d = stats.norm(0.1, 1.1)
    ks, cvm = statistics_right(d, list(x), [])
    F = d.cdf(x)
    i = np.arange(1, 26)
    W2 = 1 / (12 * 25) + np.sum((F - (2 * i - 1) / 50) ** 2)
    D = stats.kstest(x, d.cdf).statistic
    assert abs(cvm - W2) < 1e-12 and abs(ks - D) < 1e-12, (cvm, W2, ks, D)
    ks2, cvm2 = statistics_left(d, list(x), [])
    assert abs(cvm2 - W2) < 1e-12 and abs(ks2 - D) < 1e-12, (cvm2, W2, ks2, D)


if __name__ == "__main__":
    complete_check()
    cases = [weibull_case(), lognormal_case()]
    out = os.path.join(os.path.dirname(os.path.abspath(__file__)), "censored_gof.json")
    with open(out, "w") as f:
        json.dump({"source": "testdata/censored/make_censored_gof.py (numpy PCG64, scipy " +
                   __import__("scipy").__version__ + ")", "cases": cases}, f, indent=1)
        f.write("\n")
    for c in cases:
        print(c["name"], len(c["exact"]), "exact,", len(c["right"]) + len(c["left"]), "censored;",
              "estimates", c["estimates"], "ks", c["ks"], "cvm", c["cvm"])
