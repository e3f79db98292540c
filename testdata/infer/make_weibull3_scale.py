#!/usr/bin/python3
"""Reference for TestIrregularScaleBoundMatchesScipy (fitters/infer).

The profile log-likelihood of the three-parameter Weibull's scale on a
seeded, right-censored test sample (weibull3_sample6_right.json), by scipy:
at each scale, the shape and the threshold are maximised by Nelder-Mead from
63 starts (shape 0.8-3, threshold 1-40 below the smallest exact value), the
likelihood of an exact value being the density and of a suspension the
survival function. A maximum whose threshold lies within 1e-4 data ranges
of the smallest exact value is the unbounded corner of the likelihood
(Smith, 1985), not a maximum, and is left out (fitseal's rule). The 95 %
upper bound is where the profile crosses the maximum less chi2(1, 0.95)/2.
At 57.805, the bound an earlier fitseal reported from a lower branch of the
other parameters' maximum, the profile is still above the cut-off.

Run: /usr/bin/python3 testdata/infer/make_weibull3_scale.py > testdata/infer/weibull3_scale_profile.json
"""
import json
import os

import numpy as np
import scipy
from scipy import optimize, stats

here = os.path.dirname(os.path.abspath(__file__))
d = json.load(open(os.path.join(here, 'weibull3_sample6_right.json')))
x, r = np.array(d['exact']), np.array(d['right'])
floor = x.min()
span = max(x.max(), r.max()) - floor
NM = {'xatol': 1e-12, 'fatol': 1e-13, 'maxiter': 20000, 'maxfev': 40000}


def loglik(shape, scale, thr):
    return stats.weibull_min.logpdf(x, shape, thr, scale).sum() + stats.weibull_min.logsf(r, shape, thr, scale).sum()


def profile(scale):
    best, arg = -np.inf, None
    for sh0 in [0.8, 1.0, 1.3, 1.6, 2.0, 2.5, 3.0]:
        for below in [1, 5, 10, 15, 20, 25, 30, 35, 40]:
            f = lambda p: -loglik(np.exp(p[0]), scale, floor - np.exp(p[1]))
            res = optimize.minimize(f, [np.log(sh0), np.log(below)], method='Nelder-Mead', options=NM)
            thr = floor - np.exp(res.x[1])
            if floor - thr <= 1e-4 * span:
                continue
            if -res.fun > best:
                best, arg = -res.fun, (float(np.exp(res.x[0])), float(thr))
    return best, arg


# the maximum: over scale too, from the profile's best point near the estimate
fit = optimize.minimize_scalar(lambda s: -profile(s)[0], bounds=(30, 55), method='bounded',
                               options={'xatol': 1e-10})
llhat = -fit.fun
cut = llhat - stats.chi2.ppf(0.95, 1) / 2
upper = optimize.brentq(lambda s: profile(s)[0] - cut, 58.5, 61, xtol=1e-12)
old = 57.805190642643005
print(json.dumps({'generator': 'testdata/infer/make_weibull3_scale.py', 'scipy': scipy.__version__,
                  'loglik_hat': llhat, 'scale_hat': fit.x, 'scale_upper': upper,
                  'old_bound': old, 'above_cut_at_old_bound': profile(old)[0] - cut,
                  'shape_threshold_at_upper': profile(upper)[1]}, indent=1))
