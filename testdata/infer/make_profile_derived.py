#!/usr/bin/python3
"""Profile-likelihood intervals of derived quantities, made with scipy from Debian.

Run from the repository root:  /usr/bin/python3 testdata/infer/make_profile_derived.py
(about 2.5 minutes on one core).
Writes testdata/infer/profile_derived.json, read by fitters/infer/derived_reference_test.go.

For seeded samples (numpy's default_rng, values rounded to 6 significant digits,
so that Go reads the same numbers) of gamma, inverse Gaussian, Weibull, lognormal
and Gumbel data, the 95 % profile-likelihood interval of the 0.1, 0.5 and 0.9
quantiles and the 100-observation return level (the 0.99 quantile):
{q : lp(q) >= l_hat - chi2_1(0.95)/2}, lp(q) = max l(theta) over the theta whose
quantile is q (Cox & Hinkley, 1974, section 9.3).

Here lp(q) is computed independently of fitseal: the one nuisance parameter is
maximised over by Brent's method (scipy.optimize.minimize_scalar) on its log,
the other parameter taken from the constraint: in closed form for Weibull
(scale = q / (-ln(1-p))^(1/shape)), lognormal (mu = ln q - sigma z_p) and Gumbel
(location = q + scale ln(-ln p)); from scipy.special.gammaincinv for the gamma
rate; and for the inverse Gaussian's mean by brentq on scipy.stats.invgauss.ppf
(the 0.99-quantile rises with the mean at a fixed shape). The GEV's two nuisance
parameters: its location from the constraint in closed form, the scale by Brent's
method for each shape, the shape by a grid over (-0.99, 2) refined by Brent's
method (its likelihood has lower local maxima for shape < -1/2). The bounds are the
roots of lp(q) - (l_hat - cut), by brentq to 1e-12 relative, l_hat from
scipy's fit polished by Nelder-Mead.

The inverse Gaussian samples matter most: with its mean held, an upper
quantile is not monotone in the shape (it peaks near shape ~ mean/10 and falls
again), which once made fitseal's profile take the wrong root.
"""
import json
import math
import os
import warnings

import numpy as np
import scipy
from scipy import optimize, special, stats

HERE = os.path.dirname(os.path.abspath(__file__))
# Brent's method meets infinite values where a GEV's support excludes an
# observation; they only steer it away.
warnings.filterwarnings("ignore", category=RuntimeWarning)
CUT = stats.chi2.ppf(0.95, 1) / 2
PROBS = [0.1, 0.5, 0.9, 0.99]


def r6(a):
    return [float("%.6g" % v) for v in a]


rng = np.random.default_rng(20261202)
SAMPLES = [
    ("gamma", "gamma n=100", r6(rng.gamma(2.5, 3.0, 100))),
    ("gamma", "gamma n=1000", r6(rng.gamma(9.0, 4.0, 1000))),
    ("invgauss", "invgauss n=1000", r6(stats.invgauss.rvs(120 / 1500, scale=1500, size=1000, random_state=rng))),
    ("invgauss", "invgauss n=200", r6(stats.invgauss.rvs(3 / 45, scale=45, size=200, random_state=rng))),
    ("weibull", "weibull n=50", r6(stats.weibull_min.rvs(1.8, scale=120, size=50, random_state=rng))),
    ("lognormal", "lognormal n=40", r6(rng.lognormal(1.0, 0.5, 40))),
    ("gumbel", "gumbel n=60", r6(stats.gumbel_r.rvs(10, 2, size=60, random_state=rng))),
    # Lieblein & Zelen (1956) ball-bearing endurance times, millions of
    # revolutions (recalled from memory, as in fitters/infer/helpers_test.go):
    # the GEV return level whose profile's upper side a stray local maximum
    # once cut short (at 432.9 instead of 573).
    ("gev", "gev ball bearings", [17.88, 28.92, 33.00, 41.52, 42.12, 45.60, 48.48, 51.84, 51.96, 54.12, 55.56,
                                   67.80, 68.64, 68.64, 68.88, 84.12, 93.12, 98.64, 105.12, 105.84, 127.92,
                                   128.04, 173.40]),
]


def model(family, x):
    """Log-likelihood in fitseal's parameters, the nuisance parameter's log, the
    other parameter from the constraint (None where no such theta exists), the
    quantile, and a starting point."""
    x = np.asarray(x)
    if family == "gamma":
        a0, _, sc0 = stats.gamma.fit(x, floc=0)
        ll = lambda th: stats.gamma.logpdf(x, th[0], scale=1 / th[1]).sum()
        quant = lambda th, p: special.gammaincinv(th[0], p) / th[1]
        nuis = lambda t, q, p: (math.exp(t), special.gammaincinv(math.exp(t), p) / q)
        return ll, quant, nuis, [a0, 1 / sc0], 0
    if family == "invgauss":
        mu0 = x.mean()
        lam0 = len(x) / np.sum(1 / x - 1 / mu0)
        ll = lambda th: stats.invgauss.logpdf(x, th[0] / th[1], scale=th[1]).sum()
        quant = lambda th, p: stats.invgauss.ppf(p, th[0] / th[1], scale=th[1])

        def nuis(t, q, p):
            lam = math.exp(t)
            f = lambda lm: stats.invgauss.ppf(p, math.exp(lm) / lam, scale=lam) - q
            lo, hi = math.log(mu0) - 8, math.log(mu0) + 8
            if f(lo) * f(hi) > 0:
                return None
            return (math.exp(optimize.brentq(f, lo, hi, xtol=1e-15)), lam)
        return ll, quant, nuis, [mu0, lam0], 1
    if family == "weibull":
        k0, _, c0 = stats.weibull_min.fit(x, floc=0)
        ll = lambda th: stats.weibull_min.logpdf(x, th[0], scale=th[1]).sum()
        quant = lambda th, p: th[1] * (-math.log1p(-p)) ** (1 / th[0])
        nuis = lambda t, q, p: (math.exp(t), q / (-math.log1p(-p)) ** (1 / math.exp(t)))
        return ll, quant, nuis, [k0, c0], 0
    if family == "lognormal":
        lx = np.log(x)
        ll = lambda th: stats.norm.logpdf(lx, th[0], th[1]).sum() - lx.sum()
        quant = lambda th, p: math.exp(th[0] + th[1] * stats.norm.ppf(p))
        nuis = lambda t, q, p: (math.log(q) - math.exp(t) * stats.norm.ppf(p), math.exp(t))
        return ll, quant, nuis, [lx.mean(), lx.std()], 1
    if family == "gumbel":
        m0, s0 = stats.gumbel_r.fit(x)
        ll = lambda th: stats.gumbel_r.logpdf(x, th[0], th[1]).sum()
        quant = lambda th, p: th[0] - th[1] * math.log(-math.log(p))
        nuis = lambda t, q, p: (q + math.exp(t) * math.log(-math.log(p)), math.exp(t))
        return ll, quant, nuis, [m0, s0], 1
    if family == "gev":
        # fitseal's shape xi is scipy's -c. Two nuisance parameters (scale and
        # shape): handled by profile_gev below.
        c0, m0, s0 = stats.genextreme.fit(x)
        ll = lambda th: stats.genextreme.logpdf(x, -th[2], th[0], th[1]).sum()
        quant = lambda th, p: stats.genextreme.ppf(p, -th[2], th[0], th[1])
        return ll, quant, None, [m0, s0, -c0], None
    raise ValueError(family)


def gev_location(q, sigma, xi, p):
    """The location whose p-quantile is q, given scale and shape."""
    y = -math.log(p)
    if abs(xi) < 1e-12:
        return q + sigma * math.log(y)
    return q - sigma / xi * (y ** (-xi) - 1)


def profile_gev(ll, q, p, starts):
    """max over (sigma, xi > -1) of l(location(q), sigma, xi): for each xi the
    scale by Brent's method on its log; xi itself by a grid over (-0.99, 2)
    (the GEV likelihood has lower local maxima for xi < -1/2), then Brent's
    method between the best grid point's neighbours."""
    def over_sigma(xi):
        def neg(ls):
            sigma = math.exp(ls)
            v = ll([gev_location(q, sigma, xi, p), sigma, xi])
            return -v if math.isfinite(v) else math.inf
        r = optimize.minimize_scalar(neg, bracket=(starts - 0.1, starts + 0.1), tol=1e-12)
        return r.fun
    grid = np.linspace(-0.99, 2.0, 151)
    vals = [over_sigma(xi) for xi in grid]
    i = int(np.argmin(vals))
    lo, hi = grid[max(i - 1, 0)], grid[min(i + 1, len(grid) - 1)]
    r = optimize.minimize_scalar(over_sigma, bounds=(lo, hi), method="bounded", options=dict(xatol=1e-12))
    return -min(r.fun, vals[i])


def mle(ll, start, family):
    if family == "gev":  # the shape is not positive: only the scale on its log
        to = lambda th: [th[0], math.log(th[1]), th[2]]
        back = lambda t: [t[0], math.exp(t[1]), t[2]]
    else:
        to, back = (lambda th: np.log(th)), (lambda t: np.exp(t))
    t = to(start)
    for _ in range(3):
        res = optimize.minimize(lambda t: -ll(back(t)), t, method="Nelder-Mead",
                                options=dict(xatol=1e-13, fatol=1e-13, maxiter=40000))
        t = res.x
    return back(t), -res.fun


cases = []
for family, name, x in SAMPLES:
    ll, quant, nuis, start, k = model(family, x)
    theta, llhat = mle(ll, start, family)
    target = llhat - CUT
    t_hat = math.log(theta[k]) if k is not None else None
    gev_starts = math.log(theta[1]) if family == "gev" else None

    def profile(q, p):
        if family == "gev":
            return profile_gev(ll, q, p, gev_starts)
        def neg(t):
            th = nuis(t, q, p)
            if th is None or not all(v > 0 for v in th[:1]) or not all(math.isfinite(v) for v in th):
                return math.inf
            v = ll(th)
            return -v if math.isfinite(v) else math.inf
        r = optimize.minimize_scalar(neg, bracket=(t_hat - 0.02, t_hat + 0.02), tol=1e-12)
        return -r.fun

    for p in PROBS:
        qhat = quant(theta, p)
        g = lambda q: profile(q, p) - target
        bounds = []
        for direction in (-1, 1):
            step = 0.01 * qhat
            inner, outer = qhat, qhat + direction * step
            while g(outer) > 0:
                inner, outer = outer, outer + direction * step
                step *= 2
            bounds.append(optimize.brentq(g, min(inner, outer), max(inner, outer), xtol=1e-12 * qhat, rtol=1e-14))
        quantity, arg = ("return_level", 100) if p == 0.99 else ("quantile", p)
        cases.append({"name": name, "family": family, "quantity": quantity, "argument": arg,
                      "estimate": qhat, "lower": bounds[0], "upper": bounds[1], "loglik": llhat})
        print(name, quantity, arg, qhat, bounds)

samples = {name: x for _, name, x in SAMPLES}
doc = {
    "made_by": "testdata/infer/make_profile_derived.py",
    "scipy": scipy.__version__,
    "numpy": np.__version__,
    "level": 0.95,
    "samples": samples,
    "intervals": cases,
}
with open(os.path.join(HERE, "profile_derived.json"), "w") as f:
    json.dump(doc, f, indent=1)
    f.write("\n")
