#!/usr/bin/python3
"""Reference maxima and spot values for the multi-parameter families of fitseal
(gev, gpd, beta, studentt, weibull3, lognormal3), computed with Debian's scipy
(and, for the beta and Student t spot values in the far tails, mpmath at 60 digits).

Run: /usr/bin/python3 testdata/families/make_multi.py   (from the repository root)
Writes testdata/families/<family>.json.

Each dataset is drawn from numpy's PCG64 generator with the seed written beside
it and stored in full, so the Go tests need no Python. The maximum of each
likelihood is found carefully rather than with scipy's default fit: the
negative log-likelihood (a sum of scipy.stats logpdf values) is minimised on a
transformed scale from several starts (scipy's own fit among them) with BFGS,
then polished with Nelder-Mead at tight tolerances and BFGS again; the best
point is kept. Threshold families keep the threshold strictly below the
sample minimum (an interior local maximum, Smith 1985).
"""
import json
import os
import sys

import mpmath
import numpy as np
import scipy
from scipy import optimize, stats

HERE = os.path.dirname(os.path.abspath(__file__))


def careful_min(nll, starts):
    """Minimise nll from every start; return the best point."""
    best = None
    for s in starts:
        s = np.asarray(s, dtype=float)
        if not np.isfinite(nll(s)):
            continue
        x = s
        for _ in range(2):
            r = optimize.minimize(nll, x, method="BFGS", options={"gtol": 1e-10, "maxiter": 20000})
            x = r.x if np.isfinite(r.fun) and r.fun <= nll(x) else x
            r = optimize.minimize(nll, x, method="Nelder-Mead",
                                  options={"xatol": 1e-13, "fatol": 1e-14, "maxiter": 20000, "maxfev": 20000})
            x = r.x if np.isfinite(r.fun) and r.fun <= nll(x) else x
        f = nll(x)
        if best is None or f < best[1]:
            best = (x, f)
    return best


def safe(fun):
    def g(t):
        with np.errstate(all="ignore"):
            v = fun(t)
        return v if np.isfinite(v) else np.inf
    return g


def spots(dist, xs, ps):
    out = []
    for x in xs:
        out.append({"x": float(x), "logpdf": float(dist.logpdf(x)), "logcdf": float(dist.logcdf(x)),
                    "logsf": float(dist.logsf(x))})
    qs = [{"p": float(p), "x": float(dist.ppf(p))} for p in ps]
    return out, qs


def mp_beta_points(a, b, xs):
    """Beta log-density, log-CDF and log-survival by mpmath at 60 digits
    (scipy's own logcdf underflows to -inf in the far tails)."""
    mpmath.mp.dps = 60
    out = []
    for x in xs:
        X, A, B = mpmath.mpf(x), mpmath.mpf(a), mpmath.mpf(b)
        lp = (A - 1) * mpmath.log(X) + (B - 1) * mpmath.log(1 - X) - mpmath.log(mpmath.beta(A, B))
        lc = mpmath.log(mpmath.betainc(A, B, 0, X, regularized=True))
        ls = mpmath.log(mpmath.betainc(B, A, 0, 1 - X, regularized=True))
        out.append({"x": float(x), "logpdf": float(lp), "logcdf": float(lc), "logsf": float(ls)})
    return out


def mp_t_points(mu, sig, df, xs):
    """Student t log-density, log-CDF and log-survival by mpmath at 60 digits,
    through F(t) = I_{ν/(ν+t²)}(ν/2, 1/2)/2 for t < 0."""
    mpmath.mp.dps = 60
    out = []
    nu = mpmath.mpf(df)
    for x in xs:
        t = (mpmath.mpf(x) - mpmath.mpf(mu)) / mpmath.mpf(sig)
        lp = (mpmath.loggamma((nu + 1) / 2) - mpmath.loggamma(nu / 2) - mpmath.log(nu * mpmath.pi) / 2
              - mpmath.log(mpmath.mpf(sig)) - (nu + 1) / 2 * mpmath.log(1 + t * t / nu))
        tail = mpmath.betainc(nu / 2, mpmath.mpf(1) / 2, 0, nu / (nu + t * t), regularized=True) / 2
        lo, hi = (tail, 1 - tail) if t < 0 else (1 - tail, tail)
        out.append({"x": float(x), "logpdf": float(lp), "logcdf": float(mpmath.log(lo)), "logsf": float(mpmath.log(hi))})
    return out


def write(family, cases, spotcases):
    rec = {"family": family,
           "source": "scipy %s (Debian), numpy %s; script testdata/families/make_multi.py" % (scipy.__version__, np.__version__),
           "cases": cases, "spots": spotcases}
    with open(os.path.join(HERE, family + ".json"), "w") as fh:
        json.dump(rec, fh, indent=1, allow_nan=False)
        fh.write("\n")


def case(name, seed, data, params, loglik, fixed=None):
    c = {"name": name, "seed": seed, "data": [float(v) for v in data], "params": [float(p) for p in params],
         "loglik": float(loglik)}
    if fixed:
        c["fixed"] = fixed
    return c


# ---------------------------------------------------------------- gev
def gev():
    cases = []
    for name, seed, n, mu, sig, xi in [("frechet", 101, 200, 10.0, 2.0, 0.2), ("bounded", 102, 150, 5.0, 1.0, -0.3),
                                       ("gumbel-like", 103, 100, 0.0, 1.0, 0.0), ("far-from-zero", 104, 100, 1e7, 0.1, 0.1),
                                       ("small-n", 105, 10, 50.0, 5.0, 0.1)]:
        rng = np.random.default_rng(seed)
        x = stats.genextreme.rvs(-xi, loc=mu, scale=sig, size=n, random_state=rng)
        # scipy's c is −ξ
        m, s = np.mean(x), np.std(x)
        # location on the scale (μ − mean)/sd, so that tolerances are relative
        nll = safe(lambda t: -np.sum(stats.genextreme.logpdf(x, -t[2], loc=m + s * t[0], scale=s * np.exp(t[1]))))
        sc = s * np.sqrt(6) / np.pi
        starts = [[-0.5772 * sc / s, np.log(sc / s), z] for z in (0.0, 0.2, -0.2, 0.5)]
        c, l, sfit = stats.genextreme.fit(x)
        starts.append([(l - m) / s, np.log(sfit / s), -c])
        t, f = careful_min(nll, starts)
        cases.append(case(name, seed, x, [m + s * t[0], s * np.exp(t[1]), t[2]], -f))
    sp = []
    for mu, sig, xi in [(0.0, 1.0, 0.3), (2.0, 0.5, -0.4), (1.0, 2.0, 0.0), (0.0, 1.0, 1e-9), (1e7, 0.1, 0.1)]:
        d = stats.genextreme(-xi, loc=mu, scale=sig)
        xs = [mu - 1.9 * sig, mu - 0.5 * sig, mu, mu + sig, mu + 5 * sig, mu + 40 * sig]
        if xi < 0:
            xs = [mu - 30 * sig, mu - sig, mu, mu + sig, mu + 2.4 * sig]
        pts, qs = spots(d, xs, [1e-10, 0.01, 0.5, 0.99, 1 - 1e-10])
        sp.append({"params": [mu, sig, xi], "points": pts, "quantiles": qs})
    write("gev", cases, sp)


# ---------------------------------------------------------------- gpd
def gpd():
    cases = []
    for name, seed, n, u, sig, xi in [("heavy", 201, 200, 30.0, 5.0, 0.3), ("bounded", 202, 150, 30.0, 5.0, -0.2),
                                      ("exponential-like", 203, 100, 0.0, 1.0, 0.0), ("small-n", 204, 8, 100.0, 10.0, 0.2)]:
        rng = np.random.default_rng(seed)
        x = u + stats.genpareto.rvs(xi, scale=sig, size=n, random_state=rng)
        nll = safe(lambda t: -np.sum(stats.genpareto.logpdf(x, t[1], loc=u, scale=np.exp(t[0]))))
        y = x - u
        m, v = np.mean(y), np.var(y)
        xi0 = 0.5 * (1 - m * m / v)
        starts = [[np.log(m * (1 - xi0)), xi0], [np.log(m), 0.0], [np.log(m), 0.3], [np.log(np.max(y)), -0.5]]
        c, l, s = stats.genpareto.fit(x, floc=u)
        starts.append([np.log(s), c])
        t, f = careful_min(nll, starts)
        cases.append(case(name, seed, x, [np.exp(t[0]), t[1], u], -f, fixed={"threshold": u}))
    sp = []
    for sig, xi, u in [(1.0, 0.3, 0.0), (2.0, -0.4, 10.0), (1.0, 0.0, 0.0), (1.0, 1e-9, 0.0)]:
        d = stats.genpareto(xi, loc=u, scale=sig)
        xs = [u + 1e-8, u + 0.5 * sig, u + 2 * sig, u + 40 * sig]
        if xi < 0:
            xs = [u + 1e-8, u + 0.5 * sig, u + 2 * sig, u + 2.45 * sig]
        pts, qs = spots(d, xs, [1e-12, 0.01, 0.5, 0.99, 1 - 1e-12])
        sp.append({"params": [sig, xi, u], "points": pts, "quantiles": qs})
    write("gpd", cases, sp)


# ---------------------------------------------------------------- beta
def beta():
    cases = []
    for name, seed, n, a, b in [("skewed", 301, 200, 2.0, 5.0), ("u-shaped", 302, 100, 0.5, 0.5),
                                ("near-one", 303, 150, 30.0, 0.8), ("small-n", 304, 5, 3.0, 3.0),
                                ("tiny-values", 305, 100, 0.2, 20.0)]:
        rng = np.random.default_rng(seed)
        x = stats.beta.rvs(a, b, size=n, random_state=rng)
        x = x[(x > 0) & (x < 1)]
        nll = safe(lambda t: -np.sum(stats.beta.logpdf(x, np.exp(t[0]), np.exp(t[1]))))
        m, v = np.mean(x), np.var(x)
        c = m * (1 - m) / v - 1
        starts = [[np.log(m * c), np.log((1 - m) * c)], [0.0, 0.0], [np.log(a), np.log(b)]]
        t, f = careful_min(nll, starts)
        cases.append(case(name, seed, x, np.exp(t), -f))
    sp = []
    for a, b in [(2.0, 5.0), (0.5, 0.5), (30.0, 0.8), (200.0, 300.0)]:
        d = stats.beta(a, b)
        xs = [1e-200, 1e-8, 0.01, 0.3, 0.5, 0.9, 1 - 1e-9]
        _, qs = spots(d, [], [1e-12, 0.01, 0.5, 0.99, 1 - 1e-12])
        pts = mp_beta_points(a, b, xs)
        sp.append({"params": [a, b], "points": pts, "quantiles": qs})
    write("beta", cases, sp)


# ---------------------------------------------------------------- studentt
def studentt():
    cases = []
    for name, seed, n, mu, sig, df in [("heavy", 401, 300, 3.0, 2.0, 4.0), ("cauchy-like", 402, 100, 0.0, 1.0, 1.0),
                                       ("far-from-zero", 403, 120, 1e7, 0.1, 6.0), ("small-n", 404, 12, 10.0, 1.0, 3.0)]:
        rng = np.random.default_rng(seed)
        x = stats.t.rvs(df, loc=mu, scale=sig, size=n, random_state=rng)
        med = np.median(x)
        mad = np.median(np.abs(x - med)) * 1.4826
        nll = safe(lambda t: -np.sum(stats.t.logpdf(x, np.exp(t[2]), loc=med + mad * t[0], scale=mad * np.exp(t[1]))))
        starts = [[0.0, 0.0, np.log(d0)] for d0 in (1.0, 4.0, 30.0)]
        t, f = careful_min(nll, starts)
        cases.append(case(name, seed, x, [med + mad * t[0], mad * np.exp(t[1]), np.exp(t[2])], -f))
    # Light-tailed data (kurtosis below 3): the maximum is the normal limit, df → ∞.
    rng = np.random.default_rng(405)
    x = rng.uniform(-1.0, 1.0, size=200)
    mu, sd = np.mean(x), np.std(x)
    c = case("normal-limit", 405, x, [mu, sd], np.sum(stats.norm.logpdf(x, mu, sd)))
    c["limit"] = "normal: df = +Inf"
    cases.append(c)
    sp = []
    for mu, sig, df in [(0.0, 1.0, 4.0), (1.0, 2.0, 1.0), (0.0, 1.0, 50.0), (1e7, 0.1, 6.0)]:
        d = stats.t(df, loc=mu, scale=sig)
        xs = [mu - 1e6 * sig, mu - 40 * sig, mu - sig, mu, mu + 1e-3 * sig, mu + 3 * sig, mu + 1e8 * sig]
        _, qs = spots(d, [], [1e-12, 0.01, 0.4999, 0.5, 0.99, 1 - 1e-12])
        pts = mp_t_points(mu, sig, df, xs)
        sp.append({"params": [mu, sig, df], "points": pts, "quantiles": qs})
    write("studentt", cases, sp)


# ---------------------------------------------------------------- weibull3
def weibull3():
    cases = []
    for name, seed, n, k, lam, g in [("shape-2.5", 501, 200, 2.5, 10.0, 5.0), ("shape-1.6", 502, 120, 1.6, 3.0, 100.0),
                                     ("far-from-zero", 503, 150, 3.0, 2.0, 1e4)]:
        rng = np.random.default_rng(seed)
        x = g + stats.weibull_min.rvs(k, scale=lam, size=n, random_state=rng)
        m = np.min(x)
        r = np.max(x) - m
        nll = safe(lambda t: -np.sum(stats.weibull_min.logpdf(x, np.exp(t[0]), loc=m - np.exp(t[2]), scale=np.exp(t[1]))))
        starts = []
        for c in (0.05, 0.3, 1.0, 3.0):
            y = x - (m - c * r)
            ly = np.log(y)
            k0 = np.pi / (np.std(ly) * np.sqrt(6))
            starts.append([np.log(k0), np.mean(ly) + 0.5772 / k0, np.log(c * r)])
        t, f = careful_min(nll, starts)
        cases.append(case(name, seed, x, [np.exp(t[0]), np.exp(t[1]), m - np.exp(t[2])], -f))
    # Threshold fixed: an excess model, two free parameters.
    rng = np.random.default_rng(504)
    u = 30.0
    x = u + stats.weibull_min.rvs(1.3, scale=4.0, size=100, random_state=rng)
    nll = safe(lambda t: -np.sum(stats.weibull_min.logpdf(x, np.exp(t[0]), loc=u, scale=np.exp(t[1]))))
    t, f = careful_min(nll, [[0.0, np.log(np.mean(x - u))], [1.0, 1.0]])
    cases.append(case("fixed-threshold", 504, x, [np.exp(t[0]), np.exp(t[1]), u], -f, fixed={"threshold": u}))
    sp = []
    for k, lam, g in [(2.5, 10.0, 5.0), (0.7, 1.0, 0.0), (3.0, 2.0, 1e4)]:
        d = stats.weibull_min(k, loc=g, scale=lam)
        xs = [g + 1e-10 * lam, g + 0.1 * lam, g + lam, g + 3 * lam, g + 20 * lam]
        pts, qs = spots(d, xs, [1e-12, 0.01, 0.5, 0.99, 1 - 1e-12])
        sp.append({"params": [k, lam, g], "points": pts, "quantiles": qs})
    write("weibull3", cases, sp)


# ---------------------------------------------------------------- lognormal3
def lognormal3():
    cases = []
    for name, seed, n, mu, sig, g in [("skewed", 601, 200, 1.0, 0.5, 10.0), ("negative-threshold", 602, 150, 2.0, 0.3, -5.0),
                                      ("far-from-zero", 603, 150, 0.0, 0.4, 1e5)]:
        rng = np.random.default_rng(seed)
        x = g + stats.lognorm.rvs(sig, scale=np.exp(mu), size=n, random_state=rng)
        m = np.min(x)
        r = np.max(x) - m
        nll = safe(lambda t: -np.sum(stats.lognorm.logpdf(x, np.exp(t[1]), loc=m - np.exp(t[2]), scale=np.exp(t[0]))))
        starts = []
        for c in (0.05, 0.3, 1.0, 3.0):
            ly = np.log(x - (m - c * r))
            starts.append([np.mean(ly), np.log(np.std(ly)), np.log(c * r)])
        t, f = careful_min(nll, starts)
        cases.append(case(name, seed, x, [t[0], np.exp(t[1]), m - np.exp(t[2])], -f))
    rng = np.random.default_rng(604)
    u = 30.0
    x = u + stats.lognorm.rvs(0.8, scale=3.0, size=100, random_state=rng)
    ly = np.log(x - u)
    mu, sd = np.mean(ly), np.std(ly)
    cases.append(case("fixed-threshold", 604, x, [mu, sd, u], np.sum(stats.lognorm.logpdf(x, sd, loc=u, scale=np.exp(mu))),
                      fixed={"threshold": u}))
    sp = []
    for mu, sig, g in [(1.0, 0.5, 10.0), (0.0, 2.0, 0.0), (0.0, 0.4, 1e5)]:
        d = stats.lognorm(sig, loc=g, scale=np.exp(mu))
        s = np.exp(mu)
        xs = [g + 1e-10 * s, g + 0.1 * s, g + s, g + 10 * s, g + 1e6 * s]
        pts, qs = spots(d, xs, [1e-12, 0.01, 0.5, 0.99, 1 - 1e-12])
        sp.append({"params": [mu, sig, g], "points": pts, "quantiles": qs})
    write("lognormal3", cases, sp)


if __name__ == "__main__":
    which = sys.argv[1:] or ["gev", "gpd", "beta", "studentt", "weibull3", "lognormal3"]
    for w in which:
        globals()[w]()
        print("wrote", w)
