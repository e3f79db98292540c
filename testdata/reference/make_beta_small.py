#!/usr/bin/python3
"""Reference maximum-likelihood fits of the beta distribution to very small
proportions (values around 1e-8 and 1e-6), for fitters/beta_test.go
(TestBetaFitSmallProportions). The samples are invented: numpy's
RandomState(seed).beta(alpha, beta, n), printed with repr so that Go reads
the same doubles. The maximum is found by scipy.optimize.minimize
(Nelder–Mead on (ln mean, ln(α+β))) with the log-likelihood evaluated by
mpmath at 40 digits (loggamma, free of the cancellation of ln B(α, β) in
doubles at β ≈ 1e8), then polished by mpmath.findroot on the score
equations ψ(α) − ψ(α+β) = mean ln x, ψ(β) − ψ(α+β) = mean ln(1−x).

Run: /usr/bin/python3 testdata/reference/make_beta_small.py > testdata/reference/beta_small.json
"""
import json
import sys
import mpmath as mp
import numpy as np
from scipy import optimize

mp.mp.dps = 40
cases = [("beta-5-3e8", 8, 5.0, 3e8, 12), ("beta-2-1e6", 9, 2.0, 1e6, 30), ("beta-40-2e9", 10, 40.0, 2e9, 20)]
out = []
for name, seed, a0, b0, n in cases:
    x = [float(v) for v in np.random.RandomState(seed).beta(a0, b0, n)]
    s1 = sum(mp.log(mp.mpf(v)) for v in x)
    s2 = sum(mp.log1p(-mp.mpf(v)) for v in x)

    def ll(a, b):
        return (a - 1) * s1 + (b - 1) * s2 - n * (mp.loggamma(a) + mp.loggamma(b) - mp.loggamma(a + b))

    def obj(t):
        s = mp.exp(t[1])
        return -float(ll(mp.exp(t[0]) * s, -mp.expm1(t[0]) * s))

    m = float(np.mean(x))
    r = optimize.minimize(obj, [np.log(m), np.log(a0 / m)], method="Nelder-Mead",
                          options=dict(xatol=1e-12, fatol=1e-13, maxiter=20000))
    a1 = mp.exp(r.x[0] + r.x[1])
    b1 = -mp.expm1(r.x[0]) * mp.exp(r.x[1])
    a, b = mp.findroot(lambda a, b: [s1 - n * (mp.digamma(a) - mp.digamma(a + b)),
                                     s2 - n * (mp.digamma(b) - mp.digamma(a + b))], (a1, b1))
    if abs(ll(a, b) + r.fun) > 1e-9:
        raise SystemExit("%s: scipy's optimum %r and the score's root %s disagree" % (name, -r.fun, ll(a, b)))
    out.append({"name": name, "x": [repr(v) for v in x], "alpha": mp.nstr(a, 17), "beta": mp.nstr(b, 17),
                "logLik": mp.nstr(ll(a, b), 17)})
json.dump({"source": "scipy.optimize.minimize (Nelder-Mead) %s on an mpmath %s log-likelihood, polished by mpmath.findroot on the score"
           % (__import__("scipy").__version__, mp.__version__), "fits": out}, sys.stdout, indent=1)
print()
