#!/usr/bin/python3
"""Reference maxima of censored log-likelihoods for every continuous family.

Run with Debian's scipy:  /usr/bin/python3 testdata/censored/make_reference.py
It writes testdata/censored/reference.json beside this script (several
minutes: every maximum is searched carefully). With family names as
arguments it recomputes only those families' cases in the existing file.

The likelihood is the one of SPEC.md: an exact value adds ln f(x), a
non-detect (left-censored at L) ln F(L), a suspension (right-censored at R)
ln S(R), an interval (l, u] ln(F(u) - F(l)), with open ends as -inf/+inf.
Each term comes from scipy.stats' logpdf, logcdf, logsf (Debian's scipy
1.10.1 predates scipy.stats.CensoredData, which builds the same sum from the
same methods); an interval's difference is taken on the side where it does
not cancel (survival functions above the median).

Families in SPEC.md's parameterisation, mapped to scipy:
  normal(mu, sigma)            norm(loc=mu, scale=sigma)
  lognormal(mu, sigma)         lognorm(s=sigma, scale=exp(mu))
  exponential(rate)            expon(scale=1/rate)
  gamma(shape, rate)           gamma(a=shape, scale=1/rate)
  weibull(shape, scale)        weibull_min(c=shape, scale=scale)
  gumbel(location, scale)      gumbel_r(loc, scale)
  gev(location, scale, shape)  genextreme(c=-shape, loc, scale)  (scipy's c has the other sign)
  logistic(location, scale)    logistic(loc, scale)
  loglogistic(scale, shape)    fisk(c=shape, scale=scale)
  invgauss(mean, shape)        invgauss(mu=mean/shape, scale=shape)
  pareto(scale, shape)         pareto(b=shape, scale=scale)
  gpd(scale, shape; threshold fixed)  genpareto(c=shape, loc=threshold, scale=scale)
  beta(alpha, beta)            beta(a=alpha, b=beta)
  studentt(location, scale, df)  t(df, loc, scale)
  weibull3(shape, scale, threshold)   weibull_min(c=shape, loc=threshold, scale=scale)
  lognormal3(mu, sigma, threshold)    lognorm(s=sigma, loc=threshold, scale=exp(mu))

Datasets are simulated here (numpy PCG64, seeds below) from the generating
parameters, then censored four ways:
  left      three detection limits (rounded generating quantiles 0.15, 0.25,
            0.35) assigned in turn; a value below its limit is a non-detect
            at the limit;
  right     three suspension times (quantiles 0.6, 0.75, 0.9) in turn; a
            value above its time is a suspension at that time;
  interval  half the values exact, the other half reported only as the bin
            they fell in, bins at quantiles 0.1 0.3 0.5 0.7 0.9 with open
            first and last bins;
  binned    every value reported only as its bin (quantiles 0.05, 0.15, ...,
            0.95, open ends).

Maximisation: from the generating parameters and four perturbed starts,
Nelder-Mead (tolerances 1e-8 on the scale, 1e-10 on the log-likelihood) on an unconstrained scale (logs of
positive parameters; threshold = bound - exp(t)), then Newton polishing with
central-difference gradient and Hessian and a backtracking line search; the
best point is kept and its gradient norm and the Hessian's smallest
eigenvalue are recorded (a positive one means a strict local maximum).
pareto's scale is bounded by the smallest exact value or non-detect limit,
so its profile is also maximised on that boundary and the better point kept.
(The bound also lies below every finite interval upper end.)
"""
import json
import math
import os
import sys

import numpy as np
from scipy import optimize, stats

HERE = os.path.dirname(os.path.abspath(__file__))
GPD_THRESHOLD = 30.0

# name: (parameter names, kinds ('real', 'pos', 'thr'), generating values, n)
FAMILIES = {
    "normal": (["mu", "sigma"], ["real", "pos"], [10.0, 2.0], 120),
    "lognormal": (["mu", "sigma"], ["real", "pos"], [1.0, 0.6], 120),
    "exponential": (["rate"], ["pos"], [0.5], 120),
    "gamma": (["shape", "rate"], ["pos", "pos"], [2.5, 0.8], 120),
    "weibull": (["shape", "scale"], ["pos", "pos"], [1.7, 100.0], 120),
    "gumbel": (["location", "scale"], ["real", "pos"], [50.0, 8.0], 120),
    "gev": (["location", "scale", "shape"], ["real", "pos", "real"], [50.0, 8.0, 0.1], 200),
    "logistic": (["location", "scale"], ["real", "pos"], [5.0, 1.5], 120),
    "loglogistic": (["scale", "shape"], ["pos", "pos"], [20.0, 3.0], 120),
    "invgauss": (["mean", "shape"], ["pos", "pos"], [5.0, 12.0], 120),
    "pareto": (["scale", "shape"], ["pos", "pos"], [2.0, 2.5], 120),
    "gpd": (["scale", "shape"], ["pos", "real"], [5.0, 0.2], 120),
    "beta": (["alpha", "beta"], ["pos", "pos"], [2.0, 5.0], 120),
    "studentt": (["location", "scale", "df"], ["real", "pos", "pos"], [0.0, 1.0, 4.0], 200),
    "weibull3": (["shape", "scale", "threshold"], ["pos", "pos", "thr"], [2.5, 20.0, 10.0], 200),
    "lognormal3": (["mu", "sigma", "threshold"], ["real", "pos", "thr"], [2.0, 0.4, 5.0], 200),
}


def dist(family, p):
    if family == "normal":
        return stats.norm(loc=p[0], scale=p[1])
    if family == "lognormal":
        return stats.lognorm(s=p[1], scale=math.exp(p[0]))
    if family == "exponential":
        return stats.expon(scale=1 / p[0])
    if family == "gamma":
        return stats.gamma(a=p[0], scale=1 / p[1])
    if family == "weibull":
        return stats.weibull_min(c=p[0], scale=p[1])
    if family == "gumbel":
        return stats.gumbel_r(loc=p[0], scale=p[1])
    if family == "gev":
        return stats.genextreme(c=-p[2], loc=p[0], scale=p[1])
    if family == "logistic":
        return stats.logistic(loc=p[0], scale=p[1])
    if family == "loglogistic":
        return stats.fisk(c=p[1], scale=p[0])
    if family == "invgauss":
        return stats.invgauss(mu=p[0] / p[1], scale=p[1])
    if family == "pareto":
        return stats.pareto(b=p[1], scale=p[0])
    if family == "gpd":
        return stats.genpareto(c=p[1], loc=GPD_THRESHOLD, scale=p[0])
    if family == "beta":
        return stats.beta(a=p[0], b=p[1])
    if family == "studentt":
        return stats.t(df=p[2], loc=p[0], scale=p[1])
    if family == "weibull3":
        return stats.weibull_min(c=p[0], loc=p[2], scale=p[1])
    if family == "lognormal3":
        return stats.lognorm(s=p[1], loc=p[2], scale=math.exp(p[0]))
    raise ValueError(family)


def sig3(x):
    """Round to 3 significant digits, as a laboratory reports a limit."""
    if x == 0:
        return 0.0
    return float("%.3g" % x)


def censor(family, x, kind):
    g = dist(family, FAMILIES[family][2])
    out = dict(exact=[], left=[], right=[], lower=[], upper=[])
    if kind == "left":
        limits = [sig3(g.ppf(q)) for q in (0.15, 0.25, 0.35)]
        for i, v in enumerate(x):
            L = limits[i % 3]
            (out["left"] if v <= L else out["exact"]).append(L if v <= L else v)
    elif kind == "right":
        times = [sig3(g.ppf(q)) for q in (0.6, 0.75, 0.9)]
        for i, v in enumerate(x):
            R = times[i % 3]
            (out["right"] if v > R else out["exact"]).append(R if v > R else v)
    else:
        qs = (0.1, 0.3, 0.5, 0.7, 0.9) if kind == "interval" else tuple(0.05 + 0.1 * i for i in range(10))
        edges = [sig3(g.ppf(q)) for q in qs]
        for i, v in enumerate(x):
            if kind == "interval" and i % 2 == 0:
                out["exact"].append(v)
                continue
            j = int(np.searchsorted(edges, v, side="left"))  # v in (edges[j-1], edges[j]]
            out["lower"].append(-math.inf if j == 0 else edges[j - 1])
            out["upper"].append(math.inf if j == len(edges) else edges[j])
    return out


def loglik(family, p, d):
    try:
        D = dist(family, p)
    except Exception:
        return -math.inf
    with np.errstate(all="ignore"):
        s = 0.0
        if d["exact"]:
            s += np.sum(D.logpdf(np.array(d["exact"])))
        if d["left"]:
            s += np.sum(D.logcdf(np.array(d["left"])))
        if d["right"]:
            s += np.sum(D.logsf(np.array(d["right"])))
        if d["lower"]:
            lo, up = np.array(d["lower"]), np.array(d["upper"])
            a_c, b_c = D.logcdf(up), D.logcdf(lo)      # ln F(u), ln F(l)
            a_s, b_s = D.logsf(lo), D.logsf(up)        # ln S(l), ln S(u)
            upper_side = b_c > -math.log(2)            # F(l) > 1/2: use S(l) - S(u)
            a = np.where(upper_side, a_s, a_c)
            b = np.where(upper_side, b_s, b_c)
            with np.errstate(divide="ignore"):
                t = a + np.log1p(-np.exp(b - a))
            t = np.where(np.isneginf(b), a, t)
            s += np.sum(t)
    s = float(s)
    return s if math.isfinite(s) else -math.inf


def bound_of(d):
    """Threshold bound: every exact value, non-detect limit and interval upper lies above it."""
    v = list(d["exact"]) + list(d["left"]) + [u for u in d["upper"] if math.isfinite(u)]
    return min(v)


def transforms(family, d):
    kinds = FAMILIES[family][1]
    m = bound_of(d)

    def to_nat(t):
        out = []
        for k, v in zip(kinds, t):
            if k == "real":
                out.append(float(v))
            elif k == "pos":
                out.append(math.exp(v))
            else:
                out.append(m - math.exp(v))
        return out

    def to_t(p):
        out = []
        for k, v in zip(kinds, p):
            if k == "real":
                out.append(v)
            elif k == "pos":
                out.append(math.log(v))
            else:
                out.append(math.log(m - v))
        return np.array(out)

    return to_nat, to_t


def newton_polish(nll, t, iters=60):
    dim = len(t)

    def grad(t, h=1e-5):
        g = np.zeros(dim)
        for i in range(dim):
            e = np.zeros(dim)
            e[i] = h * max(1, abs(t[i]))
            g[i] = (nll(t + e) - nll(t - e)) / (2 * e[i])
        return g

    def hess(t, h=1e-4):
        H = np.zeros((dim, dim))
        for i in range(dim):
            e = np.zeros(dim)
            e[i] = h * max(1, abs(t[i]))
            H[:, i] = (grad(t + e) - grad(t - e)) / (2 * e[i])
        return 0.5 * (H + H.T)

    f = nll(t)
    for _ in range(iters):
        g, H = grad(t), hess(t)
        try:
            step = np.linalg.solve(H, g)
        except np.linalg.LinAlgError:
            break
        if not np.all(np.isfinite(step)):
            break
        lam = 1.0
        while lam > 1e-10:
            tn = t - lam * step
            fn = nll(tn)
            if fn <= f:
                break
            lam /= 2
        else:
            break
        done = np.max(np.abs(t - tn)) < 1e-13 * max(1, np.max(np.abs(t)))
        t, f = tn, fn
        if done:
            break
    g, H = grad(t), hess(t)
    return t, f, float(np.max(np.abs(g))), float(np.min(np.linalg.eigvalsh(H)))


def maximise(family, d):
    names, kinds, truth, _ = FAMILIES[family]
    to_nat, to_t = transforms(family, d)

    def nll(t):
        try:
            p = to_nat(t)
        except (OverflowError, ValueError):
            return math.inf
        return -loglik(family, p, d)

    t_true = to_t(truth) if all(k != "thr" for k in kinds) or bound_of(d) > truth[-1] else None
    starts = []
    if t_true is not None:
        starts.append(t_true)
        rng = np.random.default_rng(99)
        for _ in range(4):
            starts.append(t_true + rng.normal(0, 0.25, len(t_true)))
    best = None
    for s in starts:
        if not math.isfinite(nll(s)):
            continue
        r = optimize.minimize(nll, s, method="Nelder-Mead",
                              options=dict(xatol=1e-8, fatol=1e-10, maxiter=8000, maxfev=8000, adaptive=True))
        if best is None or r.fun < best[1]:
            best = (r.x, r.fun)
    t, f, gnorm, mineig = newton_polish(nll, best[0])
    p = to_nat(t)
    info = dict(gradient_norm=gnorm, min_hessian_eigenvalue=mineig)
    if family == "pareto":
        # the scale may sit on its bound (the smallest exact value or non-detect limit)
        m = bound_of(d)
        def nll_b(a):
            return -loglik(family, [m, math.exp(a[0])], d)
        rb = optimize.minimize_scalar(lambda a: nll_b([a]), bracket=(-1, 2), tol=1e-12)
        tb, fb, gb, hb = newton_polish(nll_b, np.array([rb.x]))
        if fb <= f + 1e-12 * abs(f) or p[0] > m * (1 - 1e-7):
            p, f = [m, math.exp(tb[0])], fb
            info = dict(boundary="scale at the smallest exact value or non-detect limit",
                        gradient_norm=gb, min_hessian_eigenvalue=hb)
    return p, -f, info


def main():
    out = dict(generator="testdata/censored/make_reference.py with scipy %s, numpy %s" % (
        __import__("scipy").__version__, np.__version__), gpd_threshold=GPD_THRESHOLD, cases=[])
    only = sys.argv[1:]  # family names: recompute these and keep the other cases
    path = os.path.join(HERE, "reference.json")
    if only:
        with open(path) as fh:
            out["cases"] = [c for c in json.load(fh)["cases"] if c["family"] not in only]
    for idx, (family, (names, kinds, truth, n)) in enumerate(FAMILIES.items()):
        if only and family not in only:
            continue
        rng = np.random.default_rng(1000 + idx)
        x = dist(family, truth).rvs(size=n, random_state=rng)
        for kind in ("left", "right", "interval", "binned"):
            d = censor(family, [float(v) for v in x], kind)
            p, ll, info = maximise(family, d)
            case = dict(family=family, kind=kind, seed=1000 + idx, generating=dict(zip(names, truth)),
                        params=dict(zip(names, p)), loglik=ll, **info,
                        data=dict(exact=d["exact"], left=d["left"], right=d["right"],
                                  lower=[None if math.isinf(v) else v for v in d["lower"]],
                                  upper=[None if math.isinf(v) else v for v in d["upper"]]))
            ok = info.get("boundary") or (info["gradient_norm"] < 1e-5 and info["min_hessian_eigenvalue"] > 0)
            case["strict_local_maximum"] = bool(ok)
            if "threshold" in case["params"]:
                case["threshold_gap"] = bound_of(d) - case["params"]["threshold"]
            out["cases"].append(case)
            write(out, path)  # after every case, so that an interrupted run keeps its work
            print("%-12s %-8s ll=%.10f %s %s" % (family, kind, ll, {k: round(v, 6) for k, v in case["params"].items()},
                                                 "" if ok else "NOT A STRICT LOCAL MAXIMUM"), flush=True)
    write(out, path)


def write(out, path):
    order = {f: i for i, f in enumerate(FAMILIES)}
    kinds_order = {k: i for i, k in enumerate(("left", "right", "interval", "binned"))}
    out["cases"].sort(key=lambda c: (order[c["family"]], kinds_order[c["kind"]]))
    with open(path + ".tmp", "w") as fh:
        json.dump(out, fh, indent=1)
        fh.write("\n")
    os.replace(path + ".tmp", path)

if __name__ == "__main__":
    main()
