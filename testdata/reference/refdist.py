"""High-precision reference densities for fitseal's 16 continuous families.

Shared by make_mle.py, make_spot.py and make_bearings.py. Every function
takes the parameters in fitseal's parameterisation (../../../shared/SPEC.md,
family table) as a dict keyed by the SPEC names, and evaluates in mpmath at
the working precision (mp.dps), so that a value stored in the JSON files is
correct to far more digits than float64 holds. scipy (Debian python3-scipy)
is the reference library; SCIPY below maps each family to the scipy.stats
distribution with the same member, and the scripts cross-check the mpmath
values against it.

Requirements (Debian): python3-scipy, python3-numpy, python3-mpmath;
run with /usr/bin/python3.

Formulas (x as float64, converted exactly to mpmath):
  normal(mu, sigma)            z = (x-mu)/sigma; ln f = -z^2/2 - ln sigma - ln sqrt(2 pi)
  lognormal(mu, sigma)         normal of ln x, density of x: ln f = ... - ln x
  exponential(rate)            ln f = ln rate - rate x
  gamma(shape a, rate b)       ln f = a ln b + (a-1) ln x - b x - lnGamma(a)
  weibull(shape k, scale l)    ln f = ln k - ln l + (k-1) ln(x/l) - (x/l)^k
  gumbel(location, scale)      largest-value form, F = exp(-exp(-z))
  gev(location, scale, shape)  F = exp(-(1 + xi z)^(-1/xi)); scipy genextreme has c = -xi
  logistic(location, scale)    F = 1/(1 + exp(-z))
  loglogistic(scale, shape)    F = 1/(1 + (x/scale)^-shape); scipy fisk(c=shape, scale)
  invgauss(mean m, shape lam)  ln f = ln(lam/(2 pi x^3))/2 - lam (x-m)^2/(2 m^2 x);
                               scipy invgauss(mu=m/lam, scale=lam)
  pareto(scale, shape)         F = 1 - (scale/x)^shape, x >= scale
  gpd(scale, shape, threshold) S = (1 + xi (x-u)/sigma)^(-1/xi); scipy genpareto(c=xi, loc=u)
  beta(alpha, beta)            ln f = (a-1) ln x + (b-1) ln(1-x) - ln B(a, b)
  studentt(location, scale, df)
  weibull3(shape, scale, threshold)     weibull of x - threshold
  lognormal3(mu, sigma, threshold)      lognormal of x - threshold
"""

import math

import mpmath as mp
from scipy import stats

NEG_INF = mp.ninf

PARAMS = {
    "normal": ["mu", "sigma"],
    "lognormal": ["mu", "sigma"],
    "exponential": ["rate"],
    "gamma": ["shape", "rate"],
    "weibull": ["shape", "scale"],
    "gumbel": ["location", "scale"],
    "gev": ["location", "scale", "shape"],
    "logistic": ["location", "scale"],
    "loglogistic": ["scale", "shape"],
    "invgauss": ["mean", "shape"],
    "pareto": ["scale", "shape"],
    "gpd": ["scale", "shape", "threshold"],
    "beta": ["alpha", "beta"],
    "studentt": ["location", "scale", "df"],
    "weibull3": ["shape", "scale", "threshold"],
    "lognormal3": ["mu", "sigma", "threshold"],
}

FAMILIES = list(PARAMS)


def scipy_dist(fam, p):
    """The scipy.stats frozen distribution equal to family fam at params p."""
    g = lambda k: float(p[k])
    if fam == "normal":
        return stats.norm(loc=g("mu"), scale=g("sigma"))
    if fam == "lognormal":
        return stats.lognorm(g("sigma"), scale=math.exp(g("mu")))
    if fam == "exponential":
        return stats.expon(scale=1 / g("rate"))
    if fam == "gamma":
        return stats.gamma(g("shape"), scale=1 / g("rate"))
    if fam == "weibull":
        return stats.weibull_min(g("shape"), scale=g("scale"))
    if fam == "gumbel":
        return stats.gumbel_r(loc=g("location"), scale=g("scale"))
    if fam == "gev":
        return stats.genextreme(-g("shape"), loc=g("location"), scale=g("scale"))
    if fam == "logistic":
        return stats.logistic(loc=g("location"), scale=g("scale"))
    if fam == "loglogistic":
        return stats.fisk(g("shape"), scale=g("scale"))
    if fam == "invgauss":
        return stats.invgauss(g("mean") / g("shape"), scale=g("shape"))
    if fam == "pareto":
        return stats.pareto(g("shape"), scale=g("scale"))
    if fam == "gpd":
        return stats.genpareto(g("shape"), loc=g("threshold"), scale=g("scale"))
    if fam == "beta":
        return stats.beta(g("alpha"), g("beta"))
    if fam == "studentt":
        return stats.t(g("df"), loc=g("location"), scale=g("scale"))
    if fam == "weibull3":
        return stats.weibull_min(g("shape"), loc=g("threshold"), scale=g("scale"))
    if fam == "lognormal3":
        return stats.lognorm(g("sigma"), loc=g("threshold"), scale=math.exp(g("mu")))
    raise KeyError(fam)


def _log_neg_expm1(a):
    """ln(1 - exp(-a)) for a >= 0."""
    return mp.log(-mp.expm1(-a))


def _norm_logcdf(z):
    return mp.log(mp.erfc(-z / mp.sqrt(2)) / 2)


LN_SQRT_2PI = None


def _lnsqrt2pi():
    return mp.log(mp.sqrt(2 * mp.pi))


def mp_eval(fam, p, x, cdf=True):
    """(ln f(x), ln F(x), ln S(x)) at the float64 x, in mpmath. With
    cdf=False only ln f is computed (the other two are None)."""
    P = {k: mp.mpf(v) for k, v in p.items()}
    x = mp.mpf(x)
    ninf = NEG_INF
    below = (ninf, ninf, mp.mpf(0))  # x below the support
    above = (ninf, mp.mpf(0), ninf)  # x above the support
    if fam == "normal":
        z = (x - P["mu"]) / P["sigma"]
        return (-z * z / 2 - mp.log(P["sigma"]) - _lnsqrt2pi(), _norm_logcdf(z), _norm_logcdf(-z))
    if fam in ("lognormal", "lognormal3"):
        y = x - P.get("threshold", 0)
        if y <= 0:
            return below
        z = (mp.log(y) - P["mu"]) / P["sigma"]
        return (-z * z / 2 - mp.log(P["sigma"]) - mp.log(y) - _lnsqrt2pi(), _norm_logcdf(z), _norm_logcdf(-z))
    if fam == "exponential":
        if x < 0:
            return below
        r = P["rate"]
        return (mp.log(r) - r * x, _log_neg_expm1(r * x), -r * x)
    if fam == "gamma":
        if x <= 0:
            return below
        a, b = P["shape"], P["rate"]
        lpdf = a * mp.log(b) + (a - 1) * mp.log(x) - b * x - mp.loggamma(a)
        if not cdf:
            return (lpdf, None, None)
        return (lpdf, mp.log(mp.gammainc(a, 0, b * x, regularized=True)),
                mp.log(mp.gammainc(a, b * x, mp.inf, regularized=True)))
    if fam in ("weibull", "weibull3"):
        y = x - P.get("threshold", 0)
        if y < 0 or (fam == "weibull3" and y == 0):
            return below
        k, l = P["shape"], P["scale"]
        t = (y / l) ** k
        if y == 0:
            lpdf = mp.log(k / l) if k == 1 else (mp.inf if k < 1 else ninf)
            return (lpdf, ninf, mp.mpf(0))
        return (mp.log(k / l) + (k - 1) * mp.log(y / l) - t, _log_neg_expm1(t), -t)
    if fam == "gumbel":
        s = P["scale"]
        z = (x - P["location"]) / s
        return (-mp.log(s) - z - mp.exp(-z), -mp.exp(-z), _log_neg_expm1(mp.exp(-z)))
    if fam == "gev":
        s, xi = P["scale"], P["shape"]
        z = (x - P["location"]) / s
        if xi == 0:
            return mp_eval("gumbel", {"location": p["location"], "scale": p["scale"]}, x)
        t = 1 + xi * z
        if t <= 0:
            return below if xi > 0 else above
        u = t ** (-1 / xi)  # -ln F
        return (-mp.log(s) - (1 + 1 / xi) * mp.log(t) - u, -u, _log_neg_expm1(u))
    if fam == "logistic":
        s = P["scale"]
        z = (x - P["location"]) / s
        return (-z - mp.log(s) - 2 * mp.log1p(mp.exp(-z)), -mp.log1p(mp.exp(-z)), -mp.log1p(mp.exp(z)))
    if fam == "loglogistic":
        if x <= 0:
            return below
        a, b = P["scale"], P["shape"]
        r = x / a
        return (mp.log(b / a) + (b - 1) * mp.log(r) - 2 * mp.log1p(r ** b),
                -mp.log1p(r ** (-b)), -mp.log1p(r ** b))
    if fam == "invgauss":
        if x <= 0:
            return below
        m, lam = P["mean"], P["shape"]
        lpdf = (mp.log(lam / (2 * mp.pi * x ** 3))) / 2 - lam * (x - m) ** 2 / (2 * m * m * x)
        if not cdf:
            return (lpdf, None, None)
        # S = Phi(-a) - e^(2 lam/m) Phi(-b): the two terms agree to about
        # 1/a^2 relative far out, so work with that many more digits.
        extra = 20 + int(mp.log10(1 + (lam / x) * (x / m - 1) ** 2))
        with mp.extradps(extra):
            r = mp.sqrt(lam / x)
            a = r * (x / m - 1)
            b = r * (x / m + 1)
            ncdf = lambda z: mp.erfc(-z / mp.sqrt(2)) / 2
            e = mp.exp(2 * lam / m)
            cdf = ncdf(a) + e * ncdf(-b)
            sf = ncdf(-a) - e * ncdf(-b)
            lcdf, lsf = mp.log(cdf), mp.log(sf)
        return (lpdf, +lcdf, +lsf)
    if fam == "pareto":
        xm, b = P["scale"], P["shape"]
        if x < xm:
            return below
        lsf = b * mp.log(xm / x)
        return (mp.log(b) + b * mp.log(xm) - (b + 1) * mp.log(x),
                mp.log(-mp.expm1(lsf)) if x > xm else ninf, lsf)
    if fam == "gpd":
        s, xi = P["scale"], P["shape"]
        y = x - P["threshold"]
        if y < 0:
            return below
        if xi == 0:
            lsf = -y / s
            lpdf = -mp.log(s) - y / s
        else:
            t = 1 + xi * y / s
            if t <= 0:
                return above
            lsf = -mp.log(t) / xi
            lpdf = -mp.log(s) - (1 + 1 / xi) * mp.log(t)
        lcdf = mp.log(-mp.expm1(lsf)) if y > 0 else ninf
        return (lpdf, lcdf, lsf)
    if fam == "beta":
        a, b = P["alpha"], P["beta"]
        if x <= 0:
            return below
        if x >= 1:
            return above
        lpdf = (a - 1) * mp.log(x) + (b - 1) * mp.log1p(-x) - (mp.loggamma(a) + mp.loggamma(b) - mp.loggamma(a + b))
        if not cdf:
            return (lpdf, None, None)
        return (lpdf, mp.log(mp.betainc(a, b, 0, x, regularized=True)),
                mp.log(mp.betainc(a, b, x, 1, regularized=True)))
    if fam == "studentt":
        s, nu = P["scale"], P["df"]
        z = (x - P["location"]) / s
        lpdf = (mp.loggamma((nu + 1) / 2) - mp.loggamma(nu / 2) - mp.log(nu * mp.pi) / 2 - mp.log(s)
                - (nu + 1) / 2 * mp.log1p(z * z / nu))
        if not cdf:
            return (lpdf, None, None)
        # P(T < -|z|) = I_{nu/(nu+z^2)}(nu/2, 1/2)/2
        tail = mp.betainc(nu / 2, mp.mpf(1) / 2, 0, nu / (nu + z * z), regularized=True) / 2
        if z < 0:
            return (lpdf, mp.log(tail), mp.log1p(-tail))
        return (lpdf, mp.log1p(-tail), mp.log(tail))
    raise KeyError(fam)


def mp_loglik(fam, p, data):
    """Full log-likelihood of the float64 data, constants included."""
    s = mp.mpf(0)
    for x in data:
        s += mp_eval(fam, p, x, cdf=False)[0]
    return s


def mp_quantile(fam, p, prob, rel=mp.mpf("1e-40")):
    """The exact quantile at the float64 probability prob: F(x) = prob,
    solved on ln F (prob < 1/2) or ln S (prob >= 1/2)."""
    q = mp.mpf(prob)
    if q < 0.5:
        return mp_invert(fam, p, 1, mp.log(q), float(scipy_dist(fam, p).ppf(prob)), rel)
    return mp_invert(fam, p, 2, mp.log1p(-q), float(scipy_dist(fam, p).ppf(prob)), rel)


def mp_invert(fam, p, idx, target, x0, rel=mp.mpf("1e-40")):
    """x with ln F(x) = target (idx 1) or ln S(x) = target (idx 2), by
    bracketing around the start x0 (widening geometrically, towards a finite
    bound of the support by halving the gap) and bisection to relative
    width rel."""

    def g(x):
        v = mp_eval(fam, p, x)[idx]
        return v - target if idx == 1 else target - v  # increasing in x

    lo_sup, hi_sup = support(fam, p)
    if math.isnan(x0):
        raise ValueError("start not a number for %s %s" % (fam, p))
    x0 = mp.mpf(x0)  # may be ±inf where scipy could not invert so far out
    if not (lo_sup < x0 < hi_sup):  # start inside the support and widen
        if lo_sup > mp.ninf and hi_sup < mp.inf:
            x0 = (lo_sup + hi_sup) / 2
        elif lo_sup > mp.ninf:
            x0 = lo_sup + 1
        elif hi_sup < mp.inf:
            x0 = hi_sup - 1
        else:
            x0 = mp.mpf(0)
    d = abs(x0) * mp.mpf("1e-3") + mp.mpf("1e-300")
    lo = x0
    while g(lo) >= 0:
        if lo_sup > mp.ninf:
            lo = lo_sup + (lo - lo_sup) / 16
            if lo - lo_sup < mp.mpf("1e-320") * (1 + abs(lo_sup)):
                raise ValueError("no lower bracket for %s %s" % (fam, p))
        else:
            lo = lo - d
            d *= 4
    d = abs(x0) * mp.mpf("1e-3") + mp.mpf("1e-300")
    hi = x0
    while g(hi) <= 0:
        if hi_sup < mp.inf:
            hi = hi_sup - (hi_sup - hi) / 16
            if hi_sup - hi < mp.mpf("1e-320") * (1 + abs(hi_sup)):
                raise ValueError("no upper bracket for %s %s" % (fam, p))
        else:
            hi = hi + d
            d *= 4
    for _ in range(5000):
        mid = (lo + hi) / 2
        if g(mid) < 0:
            lo = mid
        else:
            hi = mid
        if hi - lo <= rel * max(abs(mid), mp.mpf("1e-300")):
            break
    return (lo + hi) / 2


def support(fam, p):
    """(lower, upper) bounds of the support as mpmath numbers (±inf when open)."""
    P = {k: mp.mpf(v) for k, v in p.items()}
    if fam in ("normal", "gumbel", "logistic", "studentt"):
        return (mp.ninf, mp.inf)
    if fam in ("lognormal", "exponential", "gamma", "weibull", "loglogistic", "invgauss"):
        return (mp.mpf(0), mp.inf)
    if fam in ("weibull3", "lognormal3"):
        return (P["threshold"], mp.inf)
    if fam == "pareto":
        return (P["scale"], mp.inf)
    if fam == "beta":
        return (mp.mpf(0), mp.mpf(1))
    if fam == "gpd":
        if P["shape"] < 0:
            return (P["threshold"], P["threshold"] - P["scale"] / P["shape"])
        return (P["threshold"], mp.inf)
    if fam == "gev":
        b = P["location"] - P["scale"] / P["shape"]
        return (b, mp.inf) if P["shape"] > 0 else (mp.ninf, b)
    raise KeyError(fam)


def fmt(x):
    """Shortest round-trip decimal of a float64 (Python's repr), as a JSON number."""
    x = float(x)
    if math.isinf(x):
        return "-Inf" if x < 0 else "+Inf"
    return float(repr(x))
