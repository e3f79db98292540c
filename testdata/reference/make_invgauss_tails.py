#!/usr/bin/python3
"""Reference values of the inverse Gaussian ln F and ln S for
fitters/invgausstails_test.go, by mpmath at 80 digits:
F = Φ(a) + e^(2λ/μ) Φ(−b), S = Φ(−a) − e^(2λ/μ) Φ(−b), a = √(λ/x)(x/μ − 1),
b = √(λ/x)(x/μ + 1), cross-checked against scipy.stats.invgauss
(mu = μ/λ, scale = λ) where its values are above 1e-290 (agreement to 1e-9
relative on the smaller tail, or the script stops). cond is the condition
number of the smaller tail T with respect to x, μ and λ
(|x ∂ln T/∂x| + |μ ∂ln T/∂μ| + |λ ∂ln T/∂λ|).

Run: /usr/bin/python3 testdata/reference/make_invgauss_tails.py > testdata/reference/invgauss_tails.json
"""
import json
import sys
import mpmath as mp
from scipy.stats import invgauss

mp.mp.dps = 80

members = [(3, 8), (10, 150), (1, 0.1), (1, 1), (1, 30), (2, 500)]


def tails(x, mu, lam):
    s = mp.sqrt(lam / x)
    a, b = s * (x / mu - 1), s * (x / mu + 1)
    second = mp.exp(2 * lam / mu) * mp.ncdf(-b)
    return mp.ncdf(a) + second, mp.ncdf(-a) - second, a


points = []
for mu0, lam0 in members:
    mu, lam = mp.mpf(mu0), mp.mpf(lam0)
    for k in range(-60, 61):
        x0 = float(mu0 * mp.power(10, mp.mpf(k) / 20))
        x = mp.mpf(x0)
        f, s, a = tails(x, mu, lam)
        if not (f > mp.mpf(10) ** -300 and s > mp.mpf(10) ** -300):
            continue
        small_is_f = f < s
        t = f if small_is_f else s
        h = mp.mpf(10) ** -30

        def lt(xx, mm, ll):
            ff, ss, _ = tails(xx, mm, ll)
            return mp.log(ff if small_is_f else ss)
        base = mp.log(t)
        cond = (abs(x * (lt(x * (1 + h), mu, lam) - base) / (x * h))
                + abs((lt(x, mu * (1 + h), lam) - base) / h)
                + abs((lt(x, mu, lam * (1 + h)) - base) / h))
        sp = invgauss.cdf(x0, mu0 / lam0, scale=lam0) if small_is_f else invgauss.sf(x0, mu0 / lam0, scale=lam0)
        if t > 1e-290 and abs(sp - t) > 1e-9 * t * max(1, float(cond)):
            sys.exit("scipy disagrees at mu=%r lam=%r x=%r: %r vs %s" % (mu0, lam0, x0, sp, mp.nstr(t, 20)))
        points.append({
            "mu": mu0, "lambda": lam0, "x": x0, "a": float(a),
            # the larger tail's log as log1p of minus the smaller one
            "logF": mp.nstr(mp.log(f) if small_is_f else mp.log1p(-s), 20),
            "logS": mp.nstr(mp.log1p(-f) if small_is_f else mp.log(s), 20),
            "cond": float(cond),
        })

json.dump({"source": "mpmath %s at 80 digits, checked against scipy.stats.invgauss" % mp.__version__,
           "points": points}, sys.stdout, indent=0)
print()
