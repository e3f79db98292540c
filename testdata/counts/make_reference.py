#!/usr/bin/python3
"""Reference values for fitseal's count families (poisson, negbinomial,
geometric, binomial, betabinomial).

Run with Debian's scipy:  /usr/bin/python3 testdata/counts/make_reference.py
It writes testdata/counts/reference.json beside this script.

Sources of the numbers:
  * log-pmf, log-CDF and log-survival in the body of each distribution:
    scipy.stats (poisson; nbinom with n = size, p = size/(size+mean);
    geom with loc = -1 so that it counts failures before the first success;
    binom; betabinom);
  * far tails, where scipy's logcdf/logsf underflow: exact sums of the pmf
    in mpmath at 50 digits;
  * maximum-likelihood fits: closed forms where they exist (poisson, geometric,
    pooled binomial), a bracketed root of the profile score (negbinomial) and
    multi-start Nelder-Mead + BFGS + Newton polishing (betabinomial); the
    maximum log-likelihood is scipy's sum of logpmf at the optimum.

Datasets: "horsekick" is the classic count of deaths by horse kick in
Prussian army corps over 20 years, 200 corps-years (Bortkiewicz, 1898),
frequencies 0:109, 1:65, 2:22, 3:3, 4:1 (recalled from memory; the
well-known mean is 0.61, which these frequencies reproduce). The other
datasets are simulated here with numpy's PCG64 generator and the seeds
below, and are stored in the JSON.
"""
import json
import os

import mpmath
import numpy as np
from scipy import optimize, special, stats

mpmath.mp.dps = 50
HERE = os.path.dirname(os.path.abspath(__file__))


def f(x):
    return float(x)


# ---------------------------------------------------------------- datasets
def datasets():
    out = []
    horse = [0] * 109 + [1] * 65 + [2] * 22 + [3] * 3 + [4] * 1
    out.append(dict(name="horsekick", x=horse, source="Bortkiewicz (1898), 200 corps-years (recalled from memory)"))
    rng = np.random.default_rng(20261202)
    size, mean = 2.5, 4.0
    x = rng.negative_binomial(size, size / (size + mean), 150)
    out.append(dict(name="nb-overdispersed", x=[int(v) for v in x],
                    source="simulated: numpy default_rng(20261202).negative_binomial(2.5, 2.5/6.5, 150)"))
    rng = np.random.default_rng(7)
    x = rng.geometric(0.2, 120) - 1
    out.append(dict(name="geometric-sim", x=[int(v) for v in x],
                    source="simulated: numpy default_rng(7).geometric(0.2, 120) - 1"))
    rng = np.random.default_rng(11)
    n = rng.integers(5, 31, 60)
    x = rng.binomial(n, 0.3)
    out.append(dict(name="binomial-sim", x=[int(v) for v in x], trials=[int(v) for v in n],
                    source="simulated: numpy default_rng(11): trials integers(5, 31, 60), binomial(trials, 0.3)"))
    rng = np.random.default_rng(13)
    n = rng.integers(10, 41, 80)
    p = rng.beta(2.0, 5.0, 80)
    x = rng.binomial(n, p)
    out.append(dict(name="betabinomial-sim", x=[int(v) for v in x], trials=[int(v) for v in n],
                    source="simulated: numpy default_rng(13): trials integers(10, 41, 80), p beta(2, 5), binomial(trials, p)"))
    return out


# ---------------------------------------------------------------- fits
def ll_poisson(x, rate):
    return f(np.sum(stats.poisson.logpmf(x, rate)))


def ll_nbinom(x, size, mean):
    return f(np.sum(stats.nbinom.logpmf(x, size, size / (size + mean))))


def ll_geom(x, p):
    return f(np.sum(stats.geom.logpmf(x, p, loc=-1)))


def ll_binom(x, n, p):
    return f(np.sum(stats.binom.logpmf(x, n, p)))


def ll_betabinom(x, n, a, b):
    return f(np.sum(stats.betabinom.logpmf(x, n, a, b)))


def fit_negbinomial(x):
    x = np.asarray(x, float)
    n, xb = len(x), x.mean()
    s2 = x.var()  # divide by n, the ML variance
    if s2 <= xb:
        return dict(params=dict(size=None, mean=f(xb)), limit="poisson", loglik=ll_poisson(x, xb))

    def score(r):
        return f(np.sum(special.digamma(x + r)) - n * special.digamma(r) - n * np.log1p(xb / r))

    r0 = xb * xb / (s2 - xb)
    lo, hi = r0 / 2, r0 * 2
    while score(lo) < 0:
        lo /= 2
    while score(hi) > 0:
        hi *= 2
    r = optimize.brentq(score, lo, hi, xtol=1e-300, rtol=1e-15, maxiter=500)
    ll = ll_nbinom(x, r, xb)
    # the profile optimum must also be the 2-D optimum: check from several starts
    best = max((optimize.minimize(lambda t: -ll_nbinom(x, np.exp(t[0]), np.exp(t[1])), [np.log(r0 * m), np.log(xb)],
                                  method="Nelder-Mead", options=dict(xatol=1e-12, fatol=1e-13, maxiter=20000))
                for m in (0.3, 1, 3)), key=lambda res: -res.fun)
    assert -best.fun <= ll + 1e-9 * abs(ll), (best, ll)
    return dict(params=dict(size=f(r), mean=f(xb)), loglik=ll)


def fit_betabinomial(x, n):
    x, n = np.asarray(x, float), np.asarray(n, float)
    p = x.sum() / n.sum()
    llbin = ll_binom(x, n, p)

    def nll(t):
        return -ll_betabinom(x, n, np.exp(t[0]), np.exp(t[1]))

    def grad(t):
        a, b = np.exp(t)
        dn = special.digamma(a + b + n) - special.digamma(a + b)
        ga = np.sum(special.digamma(a + x) - special.digamma(a) - dn)
        gb = np.sum(special.digamma(b + n - x) - special.digamma(b) - dn)
        return -np.array([a * ga, b * gb])

    best = None
    for s in (0.5, 2, 7, 30, 200):
        t0 = np.log([p * s, (1 - p) * s])
        r = optimize.minimize(nll, t0, method="Nelder-Mead",
                              options=dict(xatol=1e-12, fatol=1e-14, maxiter=50000, maxfev=50000))
        r = optimize.minimize(nll, r.x, jac=grad, method="BFGS", options=dict(gtol=1e-11, maxiter=10000))
        t = r.x
        for _ in range(20):  # Newton polish with a central-difference Hessian of the analytic gradient
            h = 1e-6
            H = np.column_stack([(grad(t + h * e) - grad(t - h * e)) / (2 * h) for e in np.eye(2)])
            step = np.linalg.solve(H, grad(t))
            if not np.all(np.isfinite(step)) or nll(t - step) > nll(t) + 1e-12:
                break
            t = t - step
            if np.max(np.abs(step)) < 1e-14:
                break
        if best is None or nll(t) < nll(best):
            best = t
    ll = -nll(best)
    if ll <= llbin + 1e-10 * max(1, abs(llbin)):
        return dict(params=dict(alpha=None, beta=None), limit="binomial", limit_p=f(p), loglik=llbin)
    a, b = np.exp(best)
    return dict(params=dict(alpha=f(a), beta=f(b)), loglik=ll, gradient_norm=f(np.max(np.abs(grad(best)))))


def fits(ds):
    out = []
    for d in ds:
        x = np.asarray(d["x"], float)
        if "trials" not in d:
            xb = x.mean()
            out.append(dict(dataset=d["name"], family="poisson", params=dict(rate=f(xb)), loglik=ll_poisson(x, xb)))
            r = fit_negbinomial(x)
            r.update(dataset=d["name"], family="negbinomial")
            out.append(r)
            p = 1 / (1 + xb)
            out.append(dict(dataset=d["name"], family="geometric", params=dict(p=f(p)), loglik=ll_geom(x, p)))
        else:
            n = np.asarray(d["trials"], float)
            p = x.sum() / n.sum()
            out.append(dict(dataset=d["name"], family="binomial", params=dict(p=f(p)), loglik=ll_binom(x, n, p)))
            r = fit_betabinomial(x, n)
            r.update(dataset=d["name"], family="betabinomial")
            out.append(r)
    return out


# ---------------------------------------------------------------- point values
def mp_pmf(family, par, trials, k):
    k = mpmath.mpf(k)
    if family == "poisson":
        lam = mpmath.mpf(par["rate"])
        return mpmath.exp(k * mpmath.log(lam) - lam - mpmath.loggamma(k + 1))
    if family == "negbinomial":
        r, mu = mpmath.mpf(par["size"]), mpmath.mpf(par["mean"])
        return mpmath.exp(mpmath.loggamma(k + r) - mpmath.loggamma(r) - mpmath.loggamma(k + 1)
                          + r * mpmath.log(r / (r + mu)) + k * mpmath.log(mu / (r + mu)))
    if family == "geometric":
        p = mpmath.mpf(par["p"])
        return p * (1 - p) ** k
    if family == "binomial":
        p, n = mpmath.mpf(par["p"]), trials
        return mpmath.binomial(n, k) * p ** k * (1 - p) ** (n - k)
    if family == "betabinomial":
        a, b, n = mpmath.mpf(par["alpha"]), mpmath.mpf(par["beta"]), trials
        return mpmath.binomial(n, k) * mpmath.beta(k + a, n - k + b) / mpmath.beta(a, b)
    raise ValueError(family)


def mp_tails(family, par, trials, k):
    """ln P(X <= k) and ln P(X > k) by exact summation in mpmath."""
    lower = mpmath.fsum(mp_pmf(family, par, trials, j) for j in range(0, k + 1))
    if trials is not None:
        upper = mpmath.fsum(mp_pmf(family, par, trials, j) for j in range(k + 1, trials + 1))
    else:
        upper = mpmath.mpf(0)
        j = k + 1
        while True:
            t = mp_pmf(family, par, trials, j)
            upper += t
            if t < upper * mpmath.mpf(10) ** -40 and j > k + 10:
                break
            j += 1
    # the larger side is 1 minus the smaller one (the pmf sums to 1), so that
    # a log-CDF of -1e-90 keeps its digits at 50-digit working precision
    if lower > upper:
        lower = 1 - upper
        return f(mpmath.log1p(-upper)), f(mpmath.log(upper)) if upper > 0 else float("-inf")
    return f(mpmath.log(lower)), f(mpmath.log1p(-lower))


def scipy_dist(family, par, trials):
    if family == "poisson":
        return stats.poisson(par["rate"])
    if family == "negbinomial":
        return stats.nbinom(par["size"], par["size"] / (par["size"] + par["mean"]))
    if family == "geometric":
        return stats.geom(par["p"], loc=-1)
    if family == "binomial":
        return stats.binom(trials, par["p"])
    if family == "betabinomial":
        return stats.betabinom(trials, par["alpha"], par["beta"])
    raise ValueError(family)


POINTS = [
    ("poisson", dict(rate=3.5), None, [0, 1, 3, 7, 15, 40, 90]),
    ("poisson", dict(rate=250.0), None, [100, 200, 250, 300, 450]),
    ("poisson", dict(rate=0.02), None, [0, 1, 5, 20]),
    ("negbinomial", dict(size=2.5, mean=4.0), None, [0, 2, 4, 10, 30, 120]),
    ("negbinomial", dict(size=0.3, mean=12.0), None, [0, 1, 5, 50, 400]),
    ("negbinomial", dict(size=1e6, mean=5.0), None, [0, 5, 12, 40]),
    ("geometric", dict(p=0.2), None, [0, 1, 4, 20, 200]),
    ("geometric", dict(p=0.999), None, [0, 1, 3, 10]),
    ("binomial", dict(p=0.3), 20, [0, 3, 6, 12, 19, 20]),
    ("binomial", dict(p=1e-3), 500, [0, 1, 4, 30]),
    ("binomial", dict(p=0.5), 1000, [300, 480, 500, 700]),
    ("betabinomial", dict(alpha=2.0, beta=5.0), 30, [0, 4, 9, 20, 30]),
    ("betabinomial", dict(alpha=0.4, beta=0.7), 12, [0, 1, 6, 11, 12]),
    ("betabinomial", dict(alpha=300.0, beta=700.0), 200, [20, 60, 100, 140]),
]

QUANTILE_PS = [1e-6, 0.01, 0.1, 0.25, 0.5, 0.75, 0.9, 0.99, 0.999999]


def points():
    out, quant = [], []
    for family, par, trials, ks in POINTS:
        dist = scipy_dist(family, par, trials)
        for k in ks:
            # mpmath's exact 50-digit sums are stored; scipy's logcdf/logsf
            # must agree in the body (1e-9 absolute), and where they do not
            # (underflow to 0 or -inf, or lost digits) the source says so.
            lc, ls = mp_tails(family, par, trials, k)
            slc, sls = f(dist.logcdf(k)), f(dist.logsf(k))
            src = "mpmath sum; scipy logcdf/logsf agree to 1e-9"
            if not (abs(slc - lc) <= 1e-9 * max(1, abs(lc)) and abs(sls - ls) <= 1e-9 * max(1, abs(ls))):
                src = "mpmath sum; scipy differs: logcdf %r logsf %r" % (slc, sls)
            lp, mlp = f(dist.logpmf(k)), f(mpmath.log(mp_pmf(family, par, trials, k)))
            if abs(lp - mlp) > 1e-12 * max(1, abs(mlp)):
                src += "; logpmf from mpmath (scipy %r)" % lp
                lp = mlp
            out.append(dict(family=family, params=par, trials=trials, x=k, logpmf=lp, logcdf=lc,
                            logsf=None if ls == float("-inf") else ls, source=src))
        for p in QUANTILE_PS:
            quant.append(dict(family=family, params=par, trials=trials, p=p, q=f(dist.ppf(p))))
    return out, quant


def main():
    ds = datasets()
    pts, qs = points()
    ref = dict(
        generator="testdata/counts/make_reference.py with scipy %s, numpy %s, mpmath %s" % (
            __import__("scipy").__version__, np.__version__, mpmath.__version__),
        datasets=ds, fits=fits(ds), points=pts, quantiles=qs)
    path = os.path.join(HERE, "reference.json")
    with open(path + ".tmp", "w") as fh:
        json.dump(ref, fh, indent=1)
        fh.write("\n")
    os.replace(path + ".tmp", path)
    for r in ref["fits"]:
        print(r["dataset"], r["family"], r["params"], r["loglik"], r.get("limit", ""))


if __name__ == "__main__":
    main()
