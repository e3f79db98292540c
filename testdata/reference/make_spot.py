#!/usr/bin/python3
"""Spot values of LogPDF, LogCDF, LogSurvival and Quantile for fitseal's 16
continuous families, two parameter sets each. Writes spot.json beside this
script:

    /usr/bin/python3 testdata/reference/make_spot.py

Needs Debian's python3-scipy, python3-numpy and python3-mpmath.

Points: for each member, x is placed (as a float64) where the lower-tail
probability is 1e-30, 1e-8, 0.01, 0.3, 0.5, 0.8 and the upper-tail
probability is 1e-8, 1e-30 (far tails on both sides), plus family-specific
points (the normal at mu ± 40 sigma, whose log-survival is ≈ -804.6) and,
for bounded supports, points outside the support (ln f = ln F = -Inf below,
ln S = -Inf above). Points that round onto a finite bound of the support
are dropped. Every value is then evaluated exactly at that float64 x
with mpmath at 100 digits (refdist.py gives the formulas) and checked to
agree with a 140-digit evaluation to 1e-30 relative (complements such as
ln(1 - 1e-30) lose digits to cancellation); these are the stored values.
Quantiles at p in {1e-12, 1e-6, 0.01, 0.5, 0.99, 1-1e-6} are the exact
roots F(x) = p at the float64 value of p (1-1e-6 is not exact in binary).

Each value carries its condition number with respect to its argument,
kappa = |(x - r) dv/dx| / |v|, where r is the point from which x is
measured exactly (reference_point: the location, threshold, pareto scale,
0, or beta's nearer bound), and |p dQ/dp| / |Q - r| for quantiles (1 - p
for p >= 1/2); a quantile is compared relative to |Q - r| (at least the
IQR for location families, whose median sits at r). The test allows an error of max(1e-10, 8 eps kappa) relative,
i.e. 1e-10 unless even an evaluation exact for x - r a few ulps away must
differ by more (only gev and gpd with xi < 0 next to the upper end of their support,
where forming 1 + xi z cancels).

scipy (the reference library) is evaluated at the same points and stored
beside each value as "scipy"; the script prints where scipy and the exact
value differ by more than 1e-10 relative (scipy's far-tail log-CDFs are not
all computed in log form).
"""

import json
import math
import os
import sys

import mpmath as mp
import numpy as np

sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))
import refdist  # noqa: E402

LN = math.log

MEMBERS = [
    ("normal", {"mu": 1.5, "sigma": 2}),
    ("normal", {"mu": -3, "sigma": 0.25}),
    ("lognormal", {"mu": 0.5, "sigma": 0.8}),
    ("lognormal", {"mu": -13, "sigma": 0.3}),
    ("exponential", {"rate": 0.7}),
    ("exponential", {"rate": 2e-5}),
    ("gamma", {"shape": 2.5, "rate": 0.8}),
    ("gamma", {"shape": 0.3, "rate": 1e5}),
    ("weibull", {"shape": 1.8, "scale": 100}),
    ("weibull", {"shape": 0.6, "scale": 2e-6}),
    ("gumbel", {"location": 50, "scale": 8}),
    ("gumbel", {"location": -1, "scale": 0.3}),
    ("gev", {"location": 10, "scale": 2, "shape": 0.2}),
    ("gev", {"location": 0.5, "scale": 1, "shape": -0.3}),
    ("logistic", {"location": 3, "scale": 1.5}),
    ("logistic", {"location": -10, "scale": 0.2}),
    ("loglogistic", {"scale": 10, "shape": 3}),
    ("loglogistic", {"scale": 2e5, "shape": 0.8}),
    ("invgauss", {"mean": 2, "shape": 5}),
    ("invgauss", {"mean": 10, "shape": 0.5}),
    ("pareto", {"scale": 1, "shape": 2.5}),
    ("pareto", {"scale": 50, "shape": 0.7}),
    ("gpd", {"scale": 2, "shape": 0.2, "threshold": 10}),
    ("gpd", {"scale": 5, "shape": -0.25, "threshold": -3}),
    ("beta", {"alpha": 2, "beta": 5}),
    ("beta", {"alpha": 0.4, "beta": 0.7}),
    ("studentt", {"location": 1, "scale": 2, "df": 4}),
    ("studentt", {"location": -5, "scale": 0.5, "df": 1.5}),
    ("weibull3", {"shape": 2.5, "scale": 10, "threshold": 20}),
    ("weibull3", {"shape": 0.8, "scale": 3, "threshold": -4}),
    ("lognormal3", {"mu": 1, "sigma": 0.5, "threshold": 10}),
    ("lognormal3", {"mu": 2, "sigma": 1.2, "threshold": -5}),
]

LOWER = [1e-30, 1e-8, 0.01, 0.3, 0.5, 0.8]
UPPER = [1e-8, 1e-30]
QUANT = [1e-12, 1e-6, 0.01, 0.5, 0.99, 1 - 1e-6]


def val(x):
    """A JSON value: float64 repr, or a string for ±Inf."""
    if x is None:
        return None
    return refdist.fmt(x)


def exact(fam, p, x):
    with mp.workdps(100):
        a = refdist.mp_eval(fam, p, x)
    with mp.workdps(140):
        b = refdist.mp_eval(fam, p, x)
    for u, v in zip(a, b):
        if mp.isinf(u) or mp.isinf(v):
            if u != v:
                raise RuntimeError("%s %s x=%r: precision check failed (%s vs %s)" % (fam, p, x, u, v))
            continue
        if abs(u - v) > mp.mpf("1e-30") * max(abs(v), mp.mpf("1e-300")):
            raise RuntimeError("%s %s x=%r: precision check failed (%s vs %s)" % (fam, p, x, u, v))
    return b


LOCATION = ("normal", "gumbel", "logistic", "studentt", "gev")


def reference_point(fam, p, x):
    """The point r from which a careful evaluation measures x exactly:
    x - r is exact in float64 near r (Sterbenz), so only the relative error
    of x - r matters. The location for location-scale families (gev
    included: its 1 + xi z still cancels near an end of the support), the
    threshold, pareto's scale, 0 for the positive families, and for beta the
    nearer of 0 and 1 (1 - x is exact for x >= 1/2)."""
    if fam in LOCATION:
        return p["location"] if "location" in p else p["mu"]
    if fam in ("weibull3", "lognormal3", "gpd"):
        return p["threshold"]
    if fam == "pareto":
        return p["scale"]
    if fam == "beta":
        return 0 if x < 0.5 else 1
    return 0


def condition(fam, p, x, vals):
    """Condition numbers kappa = |(x - r) v'(x)| / |v| of the three log
    values at x, r = reference_point (for ln f with |v| floored at 1,
    matching its tolerance). An evaluation that is exact for x - r
    perturbed by a few ulps errs by about kappa * eps; 0 where v is
    infinite or zero."""
    out = []
    r = mp.mpf(reference_point(fam, p, x))
    for i, v in enumerate(vals):
        if mp.isinf(v) or v == 0 or x == r:
            out.append(0.0)
            continue
        with mp.workdps(60):
            xm = mp.mpf(x)
            h = abs(xm) * mp.mpf("1e-20")
            lo, hi = refdist.support(fam, p)
            if xm - h <= lo or xm + h >= hi:
                h = min(xm - lo, hi - xm) / 4 if (lo > mp.ninf or hi < mp.inf) else h
            d = (refdist.mp_eval(fam, p, xm + h)[i] - refdist.mp_eval(fam, p, xm - h)[i]) / (2 * h)
            den = max(abs(v), mp.mpf(1)) if i == 0 else abs(v)
            out.append(float(abs((xm - r) * d) / den))
    return out


def points(fam, p):
    d = refdist.scipy_dist(fam, p)
    xs = []
    mp.mp.dps = 60
    def invert(idx, q, x0):
        # scipy's start can be far off (or inf) in a far tail: then start at the median.
        try:
            return float(refdist.mp_invert(fam, p, idx, mp.log(q), x0, mp.mpf("1e-25")))
        except (TypeError, ValueError):
            return float(refdist.mp_invert(fam, p, idx, mp.log(q), float(d.median()), mp.mpf("1e-25")))
    for q in LOWER:
        xs.append(invert(1, q, float(d.ppf(q))))
    for q in UPPER:
        xs.append(invert(2, q, float(d.isf(q))))
    if fam == "normal":
        xs += [p["mu"] - 40 * p["sigma"], p["mu"] + 40 * p["sigma"], p["mu"] + 10 * p["sigma"]]
    lo, hi = refdist.support(fam, p)
    if lo > mp.ninf:
        w = float(d.ppf(0.5) - float(lo))
        xs.append(float(lo) - 0.5 * abs(w))
    if hi < mp.inf:
        w = float(float(hi) - d.ppf(0.5))
        xs.append(float(hi) + 0.5 * abs(w))
    # Drop duplicates, and points that rounded onto a finite bound of the
    # support (a far-tail point of beta(0.4, 0.7) rounds to 1.0): there the
    # density can be infinite and the bound's membership is a convention.
    out = []
    for x in xs:
        if x not in out and mp.mpf(x) != lo and mp.mpf(x) != hi:
            out.append(x)
    return out


def rel_diff(a, b):
    if math.isinf(a) or math.isinf(b) or math.isnan(a) or math.isnan(b):
        return 0.0 if a == b else math.inf
    return abs(a - b) / max(abs(b), 1e-300)


def main():
    out = []
    disagree = []
    for fam, p in MEMBERS:
        d = refdist.scipy_dist(fam, p)
        rec = {"family": fam, "params": p, "location_family": fam in LOCATION,
               "xscale": float(d.ppf(0.75) - d.ppf(0.25)), "points": [], "quantiles": []}
        for x in points(fam, p):
            lpdf, lcdf, lsf = exact(fam, p, x)
            with np.errstate(all="ignore"):
                sc = [float(d.logpdf(x)), float(d.logcdf(x)), float(d.logsf(x))]
            cond = condition(fam, p, x, (lpdf, lcdf, lsf))
            pt = {"x": x, "logpdf": val(lpdf), "logcdf": val(lcdf), "logsf": val(lsf),
                  "cond": {"logpdf": cond[0], "logcdf": cond[1], "logsf": cond[2]},
                  "scipy": {"logpdf": val(sc[0]), "logcdf": val(sc[1]), "logsf": val(sc[2])}}
            for name, e, s in zip(("logpdf", "logcdf", "logsf"), (lpdf, lcdf, lsf), sc):
                r = rel_diff(s, float(e))
                if r > 1e-10:
                    disagree.append("%s %s %s(%r): exact %s scipy %r (rel %.2g)" % (fam, p, name, x, mp.nstr(e, 17), s, r))
            rec["points"].append(pt)
        for q in QUANT:
            mp.mp.dps = 60
            x = refdist.mp_quantile(fam, p, q)
            s = float(d.ppf(q))
            r = rel_diff(s, float(x))
            if r > 1e-10:
                disagree.append("%s %s Quantile(%r): exact %s scipy %r (rel %.2g)" % (fam, p, q, mp.nstr(x, 17), s, r))
            # kappa = |p Q'(p) / (Q - r)| = p / (f(Q) |Q - r|) (1 - p for p >= 1/2)
            r = reference_point(fam, p, float(x))
            with mp.workdps(60):
                fq = mp.exp(refdist.mp_eval(fam, p, x, cdf=False)[0])
                kq = (min(mp.mpf(q), 1 - mp.mpf(q)) / (fq * max(abs(x - r), mp.mpf("1e-300"))))
            rec["quantiles"].append({"p": q, "x": val(x), "r": r, "cond": float(kq), "scipy": val(s)})
        out.append(rec)
        print("%-12s %s: %d points" % (fam, p, len(rec["points"])), file=sys.stderr)
    print("\nscipy differs from the exact value by more than 1e-10 relative at %d places:" % len(disagree), file=sys.stderr)
    for line in disagree:
        print("  " + line, file=sys.stderr)
    doc = {
        "source": "testdata/reference/make_spot.py: exact values by mpmath at 100 digits (checked at 140) "
                  "from the formulas in refdist.py; scipy's values stored beside them",
        "scipy": __import__("scipy").__version__,
        "mpmath": mp.__version__,
        "scipy_disagreements": disagree,
        "members": out,
    }
    with open(os.path.join(os.path.dirname(os.path.abspath(__file__)), "spot.json"), "w") as fh:
        json.dump(doc, fh, indent=1)
        fh.write("\n")


if __name__ == "__main__":
    main()
