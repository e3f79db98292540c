#!/usr/bin/python3
"""Reference maximum-likelihood fits for data with no exact value whose
non-detect limits and suspensions interleave (current-status data: each
unit inspected once, found failed -- a non-detect at the inspection time --
or still running -- a suspension). With a trend (late inspections mostly
failed) they identify a two-parameter family, and fitseal must fit them;
without one nothing beats a distribution flat across the data, the fits
only run off toward it, and fitseal must say so instead of reporting them.

The data are invented for this check (a fixed list below, no random draw).
scipy 1.10 has no censored-data fit, so the log-likelihood
sum ln F(L) + sum ln S(R) is maximised with scipy.optimize (Nelder-Mead from
a grid of starts, polished by L-BFGS-B) for weibull (shape k, scale lam:
scipy weibull_min(c=k, scale=lam)) and lognormal (mu, sigma: scipy
lognorm(s=sigma, scale=exp(mu))).

Run: /usr/bin/python3 testdata/censored/make_current_status.py > testdata/censored/current_status.json
"""
import json
import numpy as np
from scipy import optimize, stats

# Two invented inspection records (hours). "trend": units inspected late
# were mostly found failed, so the data identify weibull and lognormal
# (interior maxima above the flat supremum). "weak": failures and running
# units spread over the same times, so nothing beats a distribution flat
# across the data: a = 12 non-detects, b = 14 suspensions give the
# supremum a ln(a/n) + b ln(b/n), which the fits only approach.
CASES = {
    "trend": {
        "left": [260.0, 300.0, 380.0, 420.0, 450.0, 520.0, 560.0, 610.0, 640.0, 700.0, 750.0, 820.0],
        "right": [90.0, 120.0, 140.0, 180.0, 200.0, 240.0, 290.0, 330.0, 350.0, 400.0, 480.0, 900.0],
    },
    "weak": {
        "left": [120.0, 180.0, 210.0, 260.0, 300.0, 310.0, 380.0, 420.0, 450.0, 520.0, 610.0, 700.0],
        "right": [90.0, 140.0, 200.0, 240.0, 290.0, 330.0, 350.0, 400.0, 480.0, 560.0, 640.0, 750.0, 820.0, 900.0],
    },
}


def best(nll, starts):
    top = None
    for x0 in starts:
        r = optimize.minimize(nll, x0, method="Nelder-Mead", options={"xatol": 1e-12, "fatol": 1e-14, "maxiter": 20000, "maxfev": 40000})
        r = optimize.minimize(nll, r.x, method="L-BFGS-B", options={"ftol": 1e-15, "gtol": 1e-12})
        if np.isfinite(r.fun) and (top is None or r.fun < top.fun):
            top = r
    return top


out = {"source": "scipy " + __import__("scipy").__version__ + ", testdata/censored/make_current_status.py", "cases": []}
for name, c in CASES.items():
    L, R = np.array(c["left"]), np.array(c["right"])
    a, b = len(L), len(R)
    n = a + b
    case = {"name": name, "left": c["left"], "right": c["right"],
            "flat_supremum": float(a * np.log(a / n) + b * np.log(b / n)), "fits": {}}

    def nll_weibull(p):
        with np.errstate(all="ignore"):
            k, lam = np.exp(p)
            v = -(stats.weibull_min.logcdf(L, k, scale=lam).sum() + stats.weibull_min.logsf(R, k, scale=lam).sum())
        return v if np.isfinite(v) else 1e300

    def nll_lognormal(p):
        mu, ls = p
        with np.errstate(all="ignore"):
            s = np.exp(ls)
            v = -(stats.lognorm.logcdf(L, s, scale=np.exp(mu)).sum() + stats.lognorm.logsf(R, s, scale=np.exp(mu)).sum())
        return v if np.isfinite(v) else 1e300

    w = best(nll_weibull, [np.log([k, lam]) for k in (0.5, 1.0, 2.0, 4.0) for lam in (200.0, 450.0, 1000.0)])
    k, lam = np.exp(w.x)
    case["fits"]["weibull"] = {"parameters": ["shape", "scale"], "estimates": [float(k), float(lam)], "loglik": float(-w.fun)}
    ln = best(nll_lognormal, [[mu, np.log(s)] for mu in (5.0, 6.0, 7.0) for s in (0.3, 1.0, 2.0)])
    case["fits"]["lognormal"] = {"parameters": ["mu", "sigma"], "estimates": [float(ln.x[0]), float(np.exp(ln.x[1]))], "loglik": float(-ln.fun)}
    out["cases"].append(case)
print(json.dumps(out, indent=1))
