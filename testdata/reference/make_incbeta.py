#!/usr/bin/python3
"""Reference values of the regularized incomplete beta function and the beta
log-density for fitters/incbeta_large_test.go: ln I_x(a, b) (logCDF),
ln I_(1−x)(b, a) (logSF), ln B(a, b) and ln f(x) by mpmath at 50 digits
(the smaller tail, on the side x(a+b+2) < a+1, by the positive series
x^a (1−x)^b/(a B(a, b)) · 2F1(a+b, 1; a+1; x) (DLMF 8.17.8) summed term
by term in mpmath, with its loggamma; where its terms would shrink by less than 0.95 at a step (near the
mean, or z near 1), by mpmath.quad of the density, split at the mean, at
±1, ±4, ±12 standard deviations and at x − 2^k/|d ln f/dx| in a far tail,
with t = w^(1/a) on the first piece for a < 1; the larger tail as 1 minus the smaller). Both are
checked against mpmath.betainc with regularized=True at the points of
agree_check, where it runs: the series to 1e-30, the quadrature to 1e-16
(half an ulp; the tests allow 1e-13). cond is the condition
number of the smaller tail T in x: |x ∂ln T/∂x| = x f(x)/T, by which the
test widens its tolerance.

Run: /usr/bin/python3 testdata/reference/make_incbeta.py > testdata/reference/incbeta.json
"""
import json
import sys
import mpmath as mp

mp.mp.dps = 50

shapes = [0.01, 0.3, 1, 2.5, 7, 30, 250, 3e3, 1e5, 1.4e6, 1.3e7, 6.4e8, 1e9]
absolute = [1e-12, 1e-9, 1e-6, 1e-3, 0.1, 0.5, 0.9, 1 - 1e-3, 1 - 1e-6, 1 - 1e-9, 1 - 1e-12]
sds = [-4, -1, 0, 0.5, 2, 8]


def logdens(a, b, x):
    return (a - 1) * mp.log(x) + (b - 1) * mp.log1p(-x) - mp.log(mp.beta(a, b))


def lower_by_quad(a, b, x):
    # I_x(a, b) by quadrature of the density, split at the mean, at ±1, ±4,
    # ±12 standard deviations and, for a far tail, at x − 2^k L (L the local
    # scale 1/|d ln f/dx| at x), where the density falls by e^(2^k)
    m = a / (a + b)
    sd = mp.sqrt(a * b / ((a + b) ** 2 * (a + b + 1)))
    pts = set([mp.mpf(0), x] + [m + k * sd for k in (-12, -4, -1, 0, 1, 4, 12)])
    slope = (a - 1) / x - (b - 1) / (1 - x)
    if slope > 0:
        L = 1 / slope
        for k in range(0, 12):
            pts.add(x - 2 ** k * L)
    pts = sorted(p for p in pts if 0 <= p <= x)
    f = lambda t: mp.exp(logdens(a, b, t)) if 0 < t < 1 else mp.mpf(0)
    if a >= 1:
        return mp.quad(f, pts, maxdegree=10)
    # t^(a−1) is singular at 0: on the first piece [0, p] substitute t = w^(1/a),
    # ∫ f dt = (1/a) ∫_0^(p^a) (1−t)^(b−1)/B(a, b) dw, smooth
    g = lambda w: mp.exp((b - 1) * mp.log1p(-w ** (1 / a)) - mp.log(mp.beta(a, b))) / a
    return mp.quad(g, [0, pts[1] ** a], maxdegree=10) + mp.quad(f, pts[1:], maxdegree=10)


def lower_by_series(a, b, x):
    # I_x(a, b) = x^a (1−x)^b / (a B(a, b)) · 2F1(a+b, 1; a+1; x) (DLMF 8.17.8),
    # a series of positive terms, used on the side x (a+b+2) < a+1
    lpre = a * mp.log(x) + b * mp.log1p(-x) - mp.log(a) - mp.log(mp.beta(a, b))
    # summed term by term (mpmath's hyp2f1 transforms z > 0.75 and is slow
    # there for huge a + b): t_n = t_(n−1)·(a+b+n−1)/(a+n)·x, all positive
    total, term, n = mp.mpf(1), mp.mpf(1), 0
    while term > mp.mpf(10) ** -55 * total:
        n += 1
        term *= (a + b + n - 1) / (a + n) * x
        total += term
    return mp.exp(lpre) * total


def tails(a, b, x):
    """the smaller tail by the positive series (by quadrature where that
    does not converge: a and b both huge, near the mean), the other as 1 − it"""
    lower = x * (a + b + 2) < a + 1
    aa, bb, z = (a, b, x) if lower else (b, a, 1 - x)
    if z <= 0.95 and (aa + bb) * z / (aa + 1) <= 0.95:
        # the terms shrink by at most 0.95 from the start: a few thousand at most
        t, how = lower_by_series(aa, bb, z), "series"
    else:
        t, how = lower_by_quad(aa, bb, z), "quad"
    return (t, 1 - t, how) if lower else (1 - t, t, how)


def agree_check():
    # the series (where tails takes it) and the quadrature agree with
    # mpmath.betainc where that runs
    for a, b, x in ((2.5e3, 3e3, 0.45), (7, 1e5, 6e-5), (1.3e7, 30, 1 - 2e-6), (5, 2.85e8, 2.2e-8),
                    (0.3, 1e5, 1e-9), (0.01, 0.3, 1e-12), (1, 1e3, 0.01), (1e3, 1, 0.999)):
        a, b, x = mp.mpf(a), mp.mpf(b), mp.mpf(x)
        p1 = mp.betainc(a, b, 0, x, regularized=True)
        p2, _, how = tails(a, b, x)
        if abs(p1 - p2) > (1e-30 if how == "series" else 1e-16) * p1:
            raise SystemExit("betainc and %s disagree at a=%s b=%s x=%s: %s %s" % (how, a, b, x, p1, p2))
        lower = x * (a + b + 2) < a + 1
        p2 = lower_by_quad(a, b, x) if lower else 1 - lower_by_quad(b, a, 1 - x)
        if abs(p1 - p2) > 1e-16 * p1:
            raise SystemExit("betainc and quad disagree at a=%s b=%s x=%s: %s %s" % (a, b, x, p1, p2))


def main():
    agree_check()
    points = []
    for a0 in shapes:
        for b0 in shapes:
            a, b = mp.mpf(a0), mp.mpf(b0)
            m = a / (a + b)
            sd = mp.sqrt(a * b / ((a + b) ** 2 * (a + b + 1)))
            xs = set(absolute)
            for k in sds:
                v = float(m + k * sd)
                if 1e-12 <= v <= 1 - 1e-12:
                    xs.add(v)
            for x0 in sorted(xs):
                x = mp.mpf(x0)
                p, q, how = tails(a, b, x)
                if not (p > 0 and q > 0):
                    continue
                lp = mp.log(p) if p < q else mp.log1p(-q)
                lq = mp.log1p(-p) if p < q else mp.log(q)
                lt = min(lp, lq)
                lf = logdens(a, b, x)
                if lt < -700 * 2.302585:  # below 1e-700: nothing to check there
                    continue
                cond = mp.exp(lf + mp.log(x) - lt)
                points.append({
                    "a": a0, "b": b0, "x": x0,
                    "logCDF": mp.nstr(lp, 20), "logSF": mp.nstr(lq, 20),
                    "logPDF": mp.nstr(lf, 20), "lnBeta": mp.nstr(mp.log(mp.beta(a, b)), 20),
                    "cond": float(cond), "how": how,
                })
            print("a=%g b=%g done" % (a0, b0), file=sys.stderr)

    json.dump({"source": "mpmath %s at 50 digits (hyp2f1 series of the smaller tail, quad of the density where it does not converge; checked against betainc with regularized=True)" % mp.__version__,
               "points": points}, sys.stdout, indent=0)
    print()


if __name__ == "__main__":
    main()
