#!/usr/bin/python3
"""Reference maxima and spot values for fitseal's two-parameter families with
closed-form or profile-equation MLEs (lognormal, exponential, gamma, weibull,
gumbel, logistic, loglogistic, invgauss, pareto).

Run: /usr/bin/python3 testdata/families/make_core.py   (from anywhere)
Writes testdata/families/<family>.json (one file per family).

Sources: Debian's scipy (scipy.stats, scipy.special, scipy.optimize) and
mpmath (arbitrary precision, for log-CDF, log-survival and quantiles far in
the tails, where double-precision formulas under- or overflow).

Datasets are drawn from numpy's PCG64 generator with the seed written beside
them, rounded to a few digits (so ties occur), and stored in full. Each
maximum is found two ways, and the better kept: the family's textbook
estimating equation solved with scipy.optimize.brentq at xtol 1e-15 (or the
closed form), and a Nelder-Mead / BFGS polish of the negative log-likelihood
(sum of scipy.stats logpdf) on a log scale from several starts. The JSON
records both log-likelihoods' agreement.
"""
import json
import math
import os

import mpmath as mp
import numpy as np
import scipy
from scipy import optimize, special, stats

HERE = os.path.dirname(os.path.abspath(__file__))
mp.mp.dps = 60

# family -> (scipy frozen distribution from fitseal's parameters)
def sp(family, p):
    a, b = p
    return {
        "lognormal": lambda: stats.lognorm(s=b, scale=math.exp(a)),
        "exponential": lambda: stats.expon(scale=1 / a),
        "gamma": lambda: stats.gamma(a, scale=1 / b),
        "weibull": lambda: stats.weibull_min(a, scale=b),
        "gumbel": lambda: stats.gumbel_r(loc=a, scale=b),
        "logistic": lambda: stats.logistic(loc=a, scale=b),
        "loglogistic": lambda: stats.fisk(b, scale=a),
        "invgauss": lambda: stats.invgauss(a / b, scale=b),
        "pareto": lambda: stats.pareto(b, scale=a),
    }[family]()


def params1(family, p):
    return [p] if family == "exponential" else list(p)


def loglik(family, p, x):
    a, b = p[0], (p[1] if len(p) > 1 else None)
    if family == "lognormal":
        v = stats.lognorm.logpdf(x, b, scale=math.exp(a))
    elif family == "exponential":
        v = stats.expon.logpdf(x, scale=1 / a)
    elif family == "gamma":
        v = stats.gamma.logpdf(x, a, scale=1 / b)
    elif family == "weibull":
        v = stats.weibull_min.logpdf(x, a, scale=b)
    elif family == "gumbel":
        v = stats.gumbel_r.logpdf(x, loc=a, scale=b)
    elif family == "logistic":
        v = stats.logistic.logpdf(x, loc=a, scale=b)
    elif family == "loglogistic":
        v = stats.fisk.logpdf(x, b, scale=a)
    elif family == "invgauss":
        v = stats.invgauss.logpdf(x, a / b, scale=b)
    elif family == "pareto":
        v = stats.pareto.logpdf(x, b, scale=a)
    return float(np.sum(v))


# ---- estimating equations (scipy.special / brentq) -------------------------

def est_equation(family, x):
    x = np.asarray(x, dtype=float)
    n = len(x)
    if family == "lognormal":
        lx = np.log(x)
        return (lx.mean(), math.sqrt(np.mean((lx - lx.mean()) ** 2)))
    if family == "exponential":
        return (1 / x.mean(), None)
    if family == "invgauss":
        m = x.mean()
        return (m, 1 / np.mean(1 / x - 1 / m))
    if family == "pareto":
        xm = x.min()
        return (xm, n / np.sum(np.log(x / xm)))
    if family == "gamma":
        s = math.log(x.mean()) - np.mean(np.log(x))
        k = optimize.brentq(lambda k: math.log(k) - special.digamma(k) - s, 1e-8, 1e8, xtol=1e-15, rtol=1e-15)
        return (k, k / x.mean())
    if family == "weibull":
        lx = np.log(x / x.max())
        def g(k):
            w = np.exp(k * lx)
            return np.sum(w * lx) / np.sum(w) - 1 / k - lx.mean()
        k = optimize.brentq(g, 1e-3, 1e4, xtol=1e-15, rtol=1e-15)
        lam = x.max() * np.mean(np.exp(k * lx)) ** (1 / k)
        return (k, lam)
    if family == "gumbel":
        e = x - x.min()
        def g(b):
            w = np.exp(-e / b)
            return e.mean() - np.sum(e * w) / np.sum(w) - b
        b = optimize.brentq(g, 1e-6 * e.std(), 100 * e.std(), xtol=1e-15, rtol=1e-15)
        mu = x.min() - b * math.log(np.mean(np.exp(-e / b)))
        return (mu, b)
    if family in ("logistic", "loglogistic"):
        y = np.log(x) if family == "loglogistic" else x
        def score(t):
            mu, s = t
            z = (y - mu) / s
            th = np.tanh(z / 2)
            return [np.sum(th), np.sum(z * th) - len(y)]
        m0, s0 = y.mean(), y.std() * math.sqrt(3) / math.pi
        sol = optimize.fsolve(score, [m0, s0], xtol=1e-15)
        mu, s = sol
        if family == "logistic":
            return (mu, s)
        return (math.exp(mu), 1 / s)
    raise KeyError(family)


def polish(family, x, p0):
    """Nelder-Mead then BFGS on the log scale of the positive parameters."""
    pos = {"lognormal": [False, True], "gumbel": [False, True], "logistic": [False, True]}.get(family, [True, True])
    if family == "exponential":
        f = lambda t: -loglik(family, (math.exp(t[0]),), x)
        best = None
        for s in (math.log(p0[0]), math.log(p0[0]) + 0.3):
            r = optimize.minimize(f, [s], method="Nelder-Mead", options={"xatol": 1e-14, "fatol": 1e-15, "maxiter": 3000})
            if best is None or r.fun < best.fun:
                best = r
        return (math.exp(best.x[0]),), -best.fun
    if family == "pareto":
        # The scale sits at the sample minimum (boundary); polish the shape only.
        xm = min(x)
        f = lambda t: -loglik(family, (xm, math.exp(t[0])), x)
        r = optimize.minimize(f, [math.log(p0[1])], method="Nelder-Mead", options={"xatol": 1e-14, "fatol": 1e-15, "maxiter": 3000})
        return (xm, math.exp(r.x[0])), -r.fun
    to = lambda t: tuple(math.exp(v) if q else v for v, q in zip(t, pos))
    fr = lambda p: [math.log(v) if q else v for v, q in zip(p, pos)]
    f = lambda t: -loglik(family, to(t), x)
    best = None
    for scale in (1.0, 1.1):
        t0 = fr(p0)
        t0 = [v * scale if q else v for v, q in zip(t0, pos)] if scale != 1.0 else t0
        r = optimize.minimize(f, t0, method="Nelder-Mead", options={"xatol": 1e-13, "fatol": 1e-14, "maxiter": 3000})
        r2 = optimize.minimize(f, r.x, method="BFGS", options={"gtol": 1e-10})
        for rr in (r, r2):
            if np.isfinite(rr.fun) and (best is None or rr.fun < best.fun):
                best = rr
    return to(best.x), -best.fun


def reference_fit(family, x, name, seed, note):
    p_eq = est_equation(family, x)
    if family == "exponential":
        p_eq = (p_eq[0],)
    ll_eq = loglik(family, p_eq, x)
    p_po, ll_po = polish(family, x, p_eq)
    better = ll_po > ll_eq + 1e-12 * abs(ll_eq)
    p, ll, how = (p_po, ll_po, "polished") if better else (p_eq, ll_eq, "estimating equation")
    return {"name": name, "seed": seed, "note": note, "n": len(x), "data": [float(v) for v in x],
            "params": [float(v) for v in p], "loglik": ll, "method": how,
            "loglik_equation": ll_eq, "loglik_polished": ll_po}


# ---- censored data -----------------------------------------------------------

def censored_case(family, x):
    """Left-censor below the 15th percentile, right-censor above the 80th, and
    turn three exact values into intervals; maximise the censored likelihood
    (ln f exact, ln F left, ln S right, ln(F(u) − F(l)) intervals)."""
    x = np.sort(np.asarray(x, dtype=float))
    lo, hi = float(np.quantile(x, 0.15)), float(np.quantile(x, 0.8))
    left = [lo] * int(np.sum(x < lo))
    right = [hi] * int(np.sum(x > hi))
    exact = [float(v) for v in x if lo <= v <= hi]
    lower, upper = [], []
    for v in exact[1::6][:3]:
        exact.remove(v)
        if family in ("gumbel", "logistic"):
            lower.append(v - 1.0); upper.append(v + 1.0)
        else:
            lower.append(v * 0.9); upper.append(v * 1.1)

    def ll(p):
        d = stats.expon(scale=1 / p[0]) if family == "exponential" else sp(family, p)
        with np.errstate(all="ignore"):
            s = np.sum(d.logpdf(exact)) + np.sum(d.logcdf(left)) + np.sum(d.logsf(right))
            for l, u in zip(lower, upper):
                s += math.log(d.cdf(u) - d.cdf(l)) if d.cdf(u) > d.cdf(l) else -math.inf
        return float(s) if np.isfinite(s) else -math.inf

    p0 = est_equation(family, x)
    if family == "exponential":
        pos, p0 = [True], [p0[0]]
    elif family in ("lognormal", "gumbel", "logistic"):
        pos = [False, True]
    else:
        pos = [True, True]
    if family == "pareto":
        p0 = (0.9 * lo, p0[1])
    to = lambda t: tuple(math.exp(v) if q else v for v, q in zip(t, pos))
    f = lambda t: -ll(to(t))
    t0 = [math.log(v) if q else v for v, q in zip(p0, pos)]
    best = None
    for shift in (0.0, 0.2):
        r = optimize.minimize(f, [v + shift for v in t0], method="Nelder-Mead",
                              options={"xatol": 1e-13, "fatol": 1e-14, "maxiter": 3000})
        r2 = optimize.minimize(f, r.x, method="Nelder-Mead",
                               options={"xatol": 1e-14, "fatol": 1e-15, "maxiter": 3000})
        for rr in (r, r2):
            if np.isfinite(rr.fun) and (best is None or rr.fun < best.fun):
                best = rr
    return {"name": "censored", "exact": exact, "left": left, "right": right,
            "lower": lower, "upper": upper, "params": [float(v) for v in to(best.x)],
            "loglik": -float(best.fun)}


# ---- samples ---------------------------------------------------------------

TRUE = {
    "lognormal": (1.2, 0.6), "exponential": (0.25, None), "gamma": (2.5, 0.8),
    "weibull": (1.7, 120.0), "gumbel": (35.0, 6.0), "logistic": (10.0, 2.0),
    "loglogistic": (50.0, 3.5), "invgauss": (4.0, 9.0), "pareto": (2.0, 3.0),
}


def draw(family, n, seed, digits):
    rng = np.random.Generator(np.random.PCG64(seed))
    p = TRUE[family]
    d = stats.expon(scale=1 / p[0]) if family == "exponential" else sp(family, p)
    x = d.rvs(size=n, random_state=rng)
    x = np.round(x, digits)
    if family == "pareto":
        x = np.maximum(x, p[0])
    return x


# ---- spot values with mpmath -------------------------------------------------

def mp_cdf_sf(family, p, x):
    a, b = [mp.mpf(v) if v is not None else None for v in p]
    x = mp.mpf(x)
    if family == "lognormal":
        z = (mp.log(x) - a) / b
        return mp.ncdf(z), mp.ncdf(-z)
    if family == "exponential":
        return -mp.expm1(-a * x), mp.exp(-a * x)
    if family == "gamma":
        return mp.gammainc(a, 0, b * x, regularized=True), mp.gammainc(a, b * x, mp.inf, regularized=True)
    if family == "weibull":
        t = (x / b) ** a
        return -mp.expm1(-t), mp.exp(-t)
    if family == "gumbel":
        z = (x - a) / b
        return mp.exp(-mp.exp(-z)), -mp.expm1(-mp.exp(-z))
    if family == "logistic":
        z = (x - a) / b
        return 1 / (1 + mp.exp(-z)), 1 / (1 + mp.exp(z))
    if family == "loglogistic":
        t = (x / a) ** b
        return t / (1 + t), 1 / (1 + t)
    if family == "invgauss":
        with mp.workdps(150):
            s = mp.sqrt(b / x)
            A, B = s * (x / a - 1), s * (x / a + 1)
            F = mp.ncdf(A) + mp.exp(2 * b / a) * mp.ncdf(-B)
            S = mp.ncdf(-A) - mp.exp(2 * b / a) * mp.ncdf(-B)
            return +F, +S
    if family == "pareto":
        s = (a / x) ** b
        return 1 - s, s
    raise KeyError(family)


def mp_logpdf(family, p, x):
    a, b = [mp.mpf(v) if v is not None else None for v in p]
    x = mp.mpf(x)
    if family == "lognormal":
        z = (mp.log(x) - a) / b
        return -z * z / 2 - mp.log(x * b * mp.sqrt(2 * mp.pi))
    if family == "exponential":
        return mp.log(a) - a * x
    if family == "gamma":
        return a * mp.log(b) + (a - 1) * mp.log(x) - b * x - mp.loggamma(a)
    if family == "weibull":
        return mp.log(a / b) + (a - 1) * mp.log(x / b) - (x / b) ** a
    if family == "gumbel":
        z = (x - a) / b
        return -z - mp.exp(-z) - mp.log(b)
    if family == "logistic":
        z = (x - a) / b
        return -z - 2 * mp.log1p(mp.exp(-z)) - mp.log(b)
    if family == "loglogistic":
        t = (x / a) ** b
        return mp.log(b / a) + (b - 1) * mp.log(x / a) - 2 * mp.log1p(t)
    if family == "invgauss":
        return mp.log(b / (2 * mp.pi * x ** 3)) / 2 - b * (x - a) ** 2 / (2 * a * a * x)
    if family == "pareto":
        return mp.log(b) + b * mp.log(a) - (b + 1) * mp.log(x)
    raise KeyError(family)


def mp_quantile(family, p, q):
    """The quantile at q (a float, taken exactly) in mpmath: closed forms
    where they exist, else bisection in ln x on ln F (q ≤ 1/2) or ln S."""
    with mp.workdps(400):
        q = mp.mpf(q)
        a = mp.mpf(p[0])
        b = mp.mpf(p[1]) if p[1] is not None else None
        if family == "lognormal":
            return float(mp.exp(a + b * mp.sqrt(2) * mp.erfinv(2 * q - 1)))
        if family == "exponential":
            return float(-mp.log1p(-q) / a)
        if family == "weibull":
            return float(b * (-mp.log1p(-q)) ** (1 / a))
        if family == "gumbel":
            return float(a - b * mp.log(-mp.log(q)))
        if family == "logistic":
            return float(a + b * mp.log(q / (1 - q)))
        if family == "loglogistic":
            return float(a * (q / (1 - q)) ** (1 / b))
        if family == "pareto":
            return float(a * (1 - q) ** (-1 / b))
    if q <= 0.5:
        g = lambda y: mp.log(mp_cdf_sf(family, p, mp.exp(y))[0]) - mp.log(q)
    else:
        g = lambda y: mp.log1p(-q) - mp.log(mp_cdf_sf(family, p, mp.exp(y))[1])  # increasing
    lo = hi = mp.log(mp.mpf(p[0]))
    step = mp.mpf(1)
    while g(lo) >= 0:
        lo -= step
        step *= 2
    step = mp.mpf(1)
    while g(hi) <= 0:
        hi += step
        step *= 2
    for _ in range(120):
        mid = (lo + hi) / 2
        if g(mid) < 0:
            lo = mid
        else:
            hi = mid
    return float(mp.exp((lo + hi) / 2))


SPOTS = {
    # family: (params, x values, p values); x values reach far into both tails.
    "lognormal": ((1.2, 0.6), [1e-3, 0.05, 1.0, 3.32, 20.0, 1e3, 1e6], [1e-300, 1e-10, 0.01, 0.5, 0.99, 1 - 1e-12]),
    "exponential": ((0.25, None), [1e-12, 1e-3, 1.0, 4.0, 40.0, 2000.0], [1e-300, 1e-10, 0.01, 0.5, 0.99, 1 - 1e-12]),
    "gamma": ((2.5, 0.8), [1e-8, 1e-3, 0.5, 3.0, 20.0, 200.0, 1000.0], [1e-200, 1e-10, 0.01, 0.5, 0.99, 1 - 1e-12]),
    "weibull": ((1.7, 120.0), [1e-6, 1.0, 50.0, 120.0, 500.0, 3000.0], [1e-200, 1e-10, 0.01, 0.5, 0.99, 1 - 1e-12]),
    "gumbel": ((35.0, 6.0), [-40.0, 10.0, 35.0, 60.0, 200.0, 5000.0], [1e-300, 1e-10, 0.01, 0.5, 0.99, 1 - 1e-12]),
    "logistic": ((10.0, 2.0), [-1500.0, -30.0, 5.0, 10.0, 40.0, 1500.0], [1e-300, 1e-10, 0.01, 0.5, 0.99, 1 - 1e-12]),
    "loglogistic": ((50.0, 3.5), [1e-30, 1.0, 30.0, 50.0, 400.0, 1e40], [1e-300, 1e-10, 0.01, 0.5, 0.99, 1 - 1e-12]),
    "invgauss": ((4.0, 9.0), [0.05, 0.5, 3.0, 4.0, 15.0, 100.0, 1000.0], [1e-300, 1e-10, 0.01, 0.5, 0.99, 1 - 1e-12]),
    "pareto": ((2.0, 3.0), [2.0000001, 2.5, 5.0, 100.0, 1e50], [1e-300, 1e-10, 0.01, 0.5, 0.99, 1 - 1e-12]),
}


def fnum(v):
    v = float(v)
    if math.isinf(v):
        return "+Inf" if v > 0 else "-Inf"
    return v


def spots(family):
    p, xs, qs = SPOTS[family]
    out = []
    for x in xs:
        F, S = mp_cdf_sf(family, p, x)
        rec = {"params": params1(family, p if family != "exponential" else p[0]), "x": x,
               "logpdf": fnum(mp_logpdf(family, p, x)),
               "logcdf": fnum(mp.log(F)) if F > 0 else "-Inf",
               "logsf": fnum(mp.log(S)) if S > 0 else "-Inf"}
        # scipy's double-precision value beside it, where finite, as a cross-check
        f = sp(family, p) if family != "exponential" else stats.expon(scale=1 / p[0])
        rec["scipy_logsf"] = fnum(f.logsf(x)) if np.isfinite(f.logsf(x)) else None
        out.append(rec)
    qout = []
    for q in qs:
        qout.append({"params": params1(family, p if family != "exponential" else p[0]), "p": q,
                     "x": mp_quantile(family, p, q)})
    return out, qout


def main():
    for family in TRUE:
        fits = []
        base = 1000 + sorted(TRUE).index(family)
        x = draw(family, 60, base, 4)
        fits.append(reference_fit(family, x, "n60", base, "sample of 60 from the family, rounded to 4 decimals"))
        x = draw(family, 7, base + 1, 6)
        fits.append(reference_fit(family, x, "n7", base + 1, "small sample of 7"))
        x = draw(family, 40, base + 2, 0 if family not in ("lognormal", "pareto", "invgauss", "gamma") else 1)
        if len(set(x)) >= 3 and min(x) > (0 if family not in ("gumbel", "logistic") else -1e300):
            fits.append(reference_fit(family, x, "rounded", base + 2, "sample of 40 rounded coarsely: many ties"))
        spot, quant = spots(family)
        rec = {"family": family, "source": "scipy %s and mpmath %s (Debian), by make_core.py" % (scipy.__version__, mp.__version__),
               "fits": fits, "censored": [censored_case(family, fits[0]["data"])],
               "spots": spot, "quantiles": quant}
        with open(os.path.join(HERE, family + ".json"), "w") as fh:
            json.dump(rec, fh, indent=1)
        print(family, [(f["name"], f["method"], f["loglik_equation"] - f["loglik_polished"]) for f in fits])


if __name__ == "__main__":
    main()
