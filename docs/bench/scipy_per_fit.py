#!/usr/bin/python3
"""Time scipy.stats' own maximum-likelihood fit per family at n = 1000.

The per-fit counterpart of fitseal's Go benchmark BenchmarkFit
(fitters/bench_families_test.go): the same families and parameters, a
sample of n = 1000 drawn with numpy's seeded generator (a workload, not a
reference), and `dist.fit(x)` called as ../shared/bench/peer_fit.py calls
it (floc=0 for the positive families, free loc/scale for normal, gumbel and
logistic). Prints the median over R rounds of the mean time of one fit, in
microseconds, with the route scipy takes (its generic optimiser unless the
distribution overrides fit with closed forms or its own equations).

Run with Debian's Python (it has scipy): /usr/bin/python3 docs/bench/scipy_per_fit.py [R]
"""
import statistics
import sys
import time

import numpy as np
import scipy
from scipy import stats

N = 1000
# family: (scipy distribution, frozen parameters for drawing, fit keywords)
FAMILIES = {
    "normal": (stats.norm, dict(loc=10, scale=2), {}),
    "lognormal": (stats.lognorm, dict(s=0.6, scale=np.exp(1.2)), {"floc": 0}),
    "exponential": (stats.expon, dict(scale=1 / 0.25), {"floc": 0}),
    "gamma": (stats.gamma, dict(a=2.5, scale=1 / 0.8), {"floc": 0}),
    "weibull": (stats.weibull_min, dict(c=1.7, scale=120), {"floc": 0}),
    "gumbel": (stats.gumbel_r, dict(loc=35, scale=6), {}),
    "logistic": (stats.logistic, dict(loc=10, scale=2), {}),
    "loglogistic": (stats.fisk, dict(c=3.5, scale=50), {"floc": 0}),
    "invgauss": (stats.invgauss, dict(mu=4 / 9, scale=9), {"floc": 0}),
}


# weibull_min overrides fit, but with loc fixed it only computes a
# method-of-moments start and hands over to rv_continuous.fit (scipy 1.10
# source, weibull_min_gen.fit): it counts as a generic-optimiser fit.
GENERIC_AFTER_START = {"weibull"}


def route(name, dist):
    """How scipy fits: its generic optimiser, or the class's own fit."""
    if name in GENERIC_AFTER_START or type(dist).fit is stats.rv_continuous.fit:
        return "generic optimiser"
    return "own fit"


def main():
    rounds = int(sys.argv[1]) if len(sys.argv) > 1 else 5
    rng = np.random.default_rng(12345)
    print(f"scipy {scipy.__version__}, numpy {np.__version__}, n = {N}, median of {rounds} rounds")
    print(f"{'family':12s} {'us/fit':>10s}  route")
    for name, (dist, params, kw) in FAMILIES.items():
        x = dist.rvs(size=N, random_state=rng, **params)
        dist.fit(x, **kw)  # warm-up
        per = []
        for _ in range(rounds):
            reps, t0 = 0, time.perf_counter()
            while True:
                dist.fit(x, **kw)
                reps += 1
                el = time.perf_counter() - t0
                if el > 0.2 and reps >= 3:
                    break
            per.append(el / reps)
        print(f"{name:12s} {statistics.median(per) * 1e6:10.1f}  {route(name, dist)}")


if __name__ == "__main__":
    main()
