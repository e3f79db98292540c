#!/usr/bin/python3
"""Reference values of the gamma distribution at large shapes, for
fitters/incgamma_large_test.go: ln P(a, x) and ln Q(a, x) for a from 150
to 1e20 (both tails, down to about 1e-300), and gamma quantiles (rate 1)
for shapes 1e-3 ... 1e20 at p = 1e-10 ... 1 - 1e-10.

Source: mpmath at 60 digits. For a <= 1e4, mpmath.gammainc(regularized=True);
above, where gammainc does not finish, the defining integral itself,
P = a^a e^-a / Gamma(a) * Int_{-1}^{s} exp(a(log1p(u) - u))/(1+u) du and Q the
same over (s, inf), s = x/a - 1 (t = a(1+u) in the integral of
t^(a-1) e^-t / Gamma(a)), by tanh-sinh quadrature (mpmath.quad) split at
multiples of 1/sqrt(a) from s and from the peak u = 0, each integrand
scaled by its largest value (quad's error goal is absolute); the script stops unless P + Q = 1 to 1e-30, and
unless the integral agrees with gammainc to 1e-25 at a = 150, 1e3, 1e4.
Quantiles are the roots of ln P(a, x) = ln p (p <= 1/2) or
ln Q(a, x) = ln(1 - p) at the float64 value of p (mpmath.findroot); kappa
is the quantile's condition number |d ln x / d ln p| (d ln(1-p) above 1/2).
Quantiles below 1e-300 (shape 1e-3 and 0.01 at small p) are left out.

Run: /usr/bin/python3 testdata/reference/make_gamma_large.py > testdata/reference/gamma_large.json
"""
import json
import sys

import mpmath as mp

mp.mp.dps = 60


def tails_integral(a, x):
    a, x = mp.mpf(a), mp.mpf(x)
    s = (x - a) / a
    c = a * mp.log(a) - a - mp.loggamma(a)
    w = 1 / mp.sqrt(a)
    e = lambda u: a * (mp.log1p(u) - u)  # <= 0, largest at u = 0
    cuts = {mp.mpf(0)}
    for k in steps:
        cuts |= {s + w * k, s - w * k, w * k, -w * k}
    cuts = sorted(u for u in cuts if u > -1)
    lo = [mp.mpf(-1)] + [u for u in cuts if u < s] + [s]
    up = [s] + [u for u in cuts if u > s] + [mp.inf]
    # each integrand is scaled by its largest value, so that quad's
    # absolute error goal is one relative to the integral
    klo, kup = e(min(s, 0)), e(max(s, 0))
    p = mp.exp(c + klo) * mp.quad(lambda u: mp.exp(e(u) - klo) / (1 + u), lo)
    q = mp.exp(c + kup) * mp.quad(lambda u: mp.exp(e(u) - kup) / (1 + u), up)
    if abs(p + q - 1) > mp.mpf(10) ** -30:
        raise SystemExit("quadrature: P + Q - 1 = %s at a=%r x=%r" % (mp.nstr(p + q - 1, 5), a, x))
    return p, q


# cuts of the quadrature, in units of 1/sqrt(a) from s and from the peak:
# fine near s, where a far tail's integrand falls by e every 1/(a|s|)
steps = [mp.mpf(2) ** k for k in range(-10, 8)]


def tails_gammainc(a, x):
    a, x = mp.mpf(a), mp.mpf(x)
    return mp.gammainc(a, 0, x, regularized=True), mp.gammainc(a, x, mp.inf, regularized=True)


def tails(a, x):
    return tails_gammainc(a, x) if a <= 1e4 else tails_integral(a, x)


def logs(p, q):
    # the larger tail as log1p of minus the smaller one
    if p < q:
        return mp.log(p), mp.log1p(-p)
    return mp.log1p(-q), mp.log(q)


for a in (150, 1e3, 1e4):
    for z in (-5, -1, 0, 2, 6):
        x = float(mp.mpf(a) * (1 + z / mp.sqrt(a)))
        (p1, q1), (p2, q2) = tails_gammainc(a, x), tails_integral(a, x)
        if abs(p1 - p2) > 1e-25 * min(p1, q1) or abs(q1 - q2) > 1e-25 * min(p1, q1):
            raise SystemExit("integral and gammainc disagree at a=%r x=%r" % (a, x))

large = [150, 1e3, 1e4, 1e6, 1e8, 1e10, 1e12, 1e14, 1e16, 1e18, 1.8713e20, 1e20]
zs = [-37, -20, -8, -3, -1, -0.25, 0, 0.25, 1, 3, 8, 20, 37]
ratios = [0.5, 0.69, 0.71, 0.9, 1.1, 1.29, 1.31, 2, 5]
points = []
for a in large:
    xs = set()
    for z in zs:
        x = mp.mpf(a) * (1 + z / mp.sqrt(a))
        if x > 0:
            xs.add(float(x))
    for r in ratios:
        xs.add(float(a * r))
    for x in sorted(xs):
        p, q = tails(a, x)
        lp, lq = logs(p, q)
        if lp < -700 or lq < -700:
            if a > 1e4:
                continue  # below 1e-304 the quadrature's tails are not trusted
        points.append({"a": a, "x": x, "logP": mp.nstr(lp, 20), "logQ": mp.nstr(lq, 20)})

shapes = [1e-3, 0.01, 0.1, 0.5, 1, 2.5, 10, 100, 150, 1e3, 1e4, 1e6, 1e8, 1e10, 1e12, 1e14, 1e16, 1e18, 1e20]
probs = [1e-10, 1e-6, 0.01, 0.1, 0.5, 0.9, 0.99, 1 - 1e-6, 1 - 1e-10]
quantiles = []
for a in shapes:
    for p0 in probs:
        p = mp.mpf(p0)
        lower = p0 <= 0.5
        target = mp.log(p) if lower else mp.log1p(-p)

        # the unknown: v = (x - a)/sqrt(a) for large shapes, ln x below
        if a >= 100:
            to_x = lambda v: mp.mpf(a) + v * mp.sqrt(a)
            v0 = mp.sqrt(2) * mp.erfinv(2 * p - 1)
        else:
            to_x = mp.exp
            if lower:
                v0 = min((mp.log(p) + mp.loggamma(a + 1)) / a, mp.log(a))
            else:
                v0 = mp.log(mp.mpf(a) + 1 - mp.log1p(-p))
            if v0 < mp.log(mp.mpf(10) ** -300):
                continue

        def h(v):
            pp, qq = tails(a, to_x(v))
            return mp.log(pp) - target if lower else mp.log(qq) - target

        v = mp.findroot(h, v0, solver="secant", tol=mp.mpf(10) ** -50, verify=False)
        if abs(h(v)) > mp.mpf(10) ** -28:
            raise SystemExit("no root at shape %r p %r: residual %s" % (a, p0, mp.nstr(h(v), 5)))
        x = to_x(v)
        if x < mp.mpf(10) ** -300:
            continue
        pp, qq = tails(a, x)
        f = mp.exp((a - 1) * mp.log(x) - x - mp.loggamma(a))
        kappa = (pp if lower else qq) / (x * f)
        quantiles.append({"shape": a, "p": p0, "x": mp.nstr(x, 22), "kappa": float(kappa)})
    print("shape", a, "done", file=sys.stderr)

json.dump({"source": "mpmath %s at 60 digits: gammainc (a <= 1e4) and the defining integral by tanh-sinh quadrature (above)" % mp.__version__,
           "tails": points, "quantiles": quantiles}, sys.stdout, indent=0)
