#!/usr/bin/python3
"""Independent reference computations for fitseal's nonparametric estimates.

Run:  /usr/bin/python3 testdata/censored/make_nonparametric.py
It writes testdata/censored/nonparametric.json beside this script.

1. Kaplan-Meier with Greenwood's variance, written here from the textbook
   definitions (Kaplan & Meier, 1958; Greenwood, 1926), on the 6-MP arm of
   the remission data of Freireich et al. (1963), as tabulated in standard
   survival texts (weeks in remission; "+" marks a patient still in
   remission): 6 6 6 6+ 7 9+ 10 10+ 11+ 13 16 17+ 19+ 20+ 22 23 25+ 32+ 32+ 34+ 35+
   (the data recalled from memory; the hand-worked survival values in the Go
   test, 0.857, 0.807, 0.753, 0.690, 0.627, 0.538, 0.448, match the tables
   of those texts, also recalled from memory).
2. Reverse Kaplan-Meier for non-detects: the same computation on the
   negated values of a small left-censored dataset (invented for the test,
   several detection limits).
3. Turnbull's nonparametric maximum-likelihood estimate on a small
   interval-censored dataset (invented for the test) by a different route
   than fitseal's EM: no innermost intervals are formed; mass may sit on
   every endpoint and beyond the largest one, the log-likelihood
   sum_i ln sum_j a_ij p_j is maximised over the simplex by scipy's SLSQP,
   then polished by 200000 EM steps; the
   Kuhn-Tucker conditions of the maximum (Gentleman & Geyer, 1994) are
   checked and the masses' cumulative sums are stored.
"""
import json
import math
import os

import numpy as np
from scipy import optimize

HERE = os.path.dirname(os.path.abspath(__file__))


def km(exact, right):
    times = sorted(set(exact))
    s, gw, rows = 1.0, 0.0, []
    for t in times:
        n = sum(1 for x in exact if x >= t) + sum(1 for x in right if x >= t)
        d = sum(1 for x in exact if x == t)
        s *= 1 - d / n
        if n > d:
            gw += d / (n * (n - d))
            var = s * s * gw
        else:
            var = None
        rows.append(dict(time=t, at_risk=n, events=d, survival=s, variance=var))
    return rows


MP6_EXACT = [6, 6, 6, 7, 10, 13, 16, 22, 23]
MP6_RIGHT = [6, 9, 10, 11, 17, 19, 20, 25, 32, 32, 34, 35]

LEFT_EXACT = [0.8, 1.2, 1.2, 2.5, 3.1, 0.6, 4.0, 1.9, 0.55, 2.2, 5.7, 1.0]
LEFT_LIMITS = [0.5, 0.5, 1.0, 1.0, 1.0, 2.0, 0.5]

# (lower, upper]: None is an open end; lower == upper marks an exact value.
TURNBULL = [(0, 2), (1, 3), (2, 4), (None, 1.5), (3, None), (2.5, 2.5), (1, 5), (4, 6),
            (0.5, 1.5), (5, None), (3.5, 3.5), (2, 3), (None, 2.5), (6, 8), (1.5, 2.5)]


def contains(o, c):
    """Does observation o = (l, u] (l == u: the exact value) hold candidate c?"""
    l, u = o
    if c == "above":  # the region beyond every finite value
        return u is None
    if l is not None and l == u:
        return c == l
    return (l is None or c > l) and (u is None or c <= u)


def turnbull_reference(obs):
    # Candidate support: every finite endpoint as a point, and the region
    # beyond the largest one. Mass anywhere in an innermost interval (q, p]
    # gives the same likelihood as mass at its right end p, because every
    # observation that holds p holds the whole of (q, p] (no endpoint lies
    # inside it), so the estimate's CDF at the right ends, which the Go test
    # compares, is the same.
    pts = sorted({v for o in obs for v in o if v is not None})
    cands = pts + ["above"]
    A = np.array([[1.0 if contains(o, c) else 0.0 for c in cands] for o in obs])
    J = A.shape[1]

    def nll(p):
        return -np.sum(np.log(A @ p))

    def grad(p):
        return -(A.T @ (1 / (A @ p)))

    p0 = np.full(J, 1 / J)
    r = optimize.minimize(nll, p0, jac=grad, method="SLSQP", bounds=[(1e-12, 1)] * J,
                          constraints=[dict(type="eq", fun=lambda p: np.sum(p) - 1, jac=lambda p: np.ones(J))],
                          options=dict(ftol=1e-15, maxiter=10000))
    p = np.clip(r.x, 1e-300, None)
    p /= p.sum()
    n = len(obs)
    for _ in range(200000):
        p = p * (A.T @ (1 / (A @ p))) / n
    # Kuhn-Tucker: d_j = sum_i a_ij / (A p)_i <= n, equality where p_j > 0
    dvec = A.T @ (1 / (A @ p))
    assert np.all(dvec <= n * (1 + 1e-6)), dvec
    cum = np.cumsum(p)
    return [dict(point=None if c == "above" else c, mass=float(pj), cdf=float(cj), kt=float(dj / n))
            for c, pj, cj, dj in zip(cands, p, cum, dvec)], float(-nll(p))


def main():
    rkm = km([-x for x in LEFT_EXACT], [-x for x in LEFT_LIMITS])
    rev = [dict(time=-r["time"], at_risk=r["at_risk"], events=r["events"], cdf_below=r["survival"],
                variance_below=r["variance"]) for r in rkm]
    tb, tll = turnbull_reference(TURNBULL)
    out = dict(
        generator="testdata/censored/make_nonparametric.py with numpy %s" % np.__version__,
        km_6mp=dict(exact=MP6_EXACT, right=MP6_RIGHT, rows=km(MP6_EXACT, MP6_RIGHT),
                    source="Freireich et al. (1963) 6-MP arm as tabulated in survival texts (recalled from memory)"),
        reverse_km=dict(exact=LEFT_EXACT, left=LEFT_LIMITS, rows=rev,
                        note="rows from the Kaplan-Meier of the negated values: cdf_below is F just below time"),
        turnbull=dict(intervals=[[l, u] for l, u in TURNBULL], support=tb, loglik=tll),
    )
    path = os.path.join(HERE, "nonparametric.json")
    with open(path + ".tmp", "w") as fh:
        json.dump(out, fh, indent=1)
        fh.write("\n")
    os.replace(path + ".tmp", path)
    for r in out["km_6mp"]["rows"]:
        print(r)
    for r in tb:
        print(r)
    print("loglik", tll)


if __name__ == "__main__":
    main()
