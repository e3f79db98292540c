#!/usr/bin/python3
"""Reference values for TestIrregularFalseMaxima (fitters/infer).

Two seeded test samples of n = 25 (drawn by fitseal's own tests from a
Student t and a three-parameter lognormal; test data only) on which a profile
used to report a log-likelihood above the fit's, i.e. "the fit is not the
maximum". scipy says otherwise:

- studentt: the maximum-likelihood fit is the same from starts df = 0.5 to
  1000; below df = 1/(n - 1) the likelihood is unbounded (a spike on one
  observation as the scale shrinks), which is what the profile had found.
  The profile lower bound of df at 95 % is the crossing of the profile
  (location and log-scale maximised by Nelder-Mead from 12 starts) with
  loglik_hat - chi2(1, 0.95)/2.
- lognormal3: every start converges to the same interior maximum
  (threshold about -1059); the normal limit (threshold -> -inf) is lower.
  The profile had evaluated a threshold of -1.5e13, where log(x - threshold)
  has lost the data's digits.

Run: /usr/bin/python3 testdata/infer/make_false_maxima.py > testdata/infer/false_maxima.json
"""
import json
import numpy as np
from scipy import optimize, stats
import scipy

T = [47.887881798805985, 13.215528809083082, 68.44544015876463, 126.54718525462076, 57.41391602793883,
     36.89451885625319, -14.321497780607785, 66.95227881930565, 128.83479661530438, 72.37110141043905,
     66.74590264131197, 64.17337139489484, 89.19953886696828, 53.570301236830026, -1.0742961581234596,
     32.084844310399205, 60.659807873360826, 76.95313829676243, 33.09747699369463, 44.9725986563402,
     65.94640740525308, 131.28634682077637, 104.81648936534177, 58.255183796959805, 74.34437288885351]
L = [102.10228043967284, 86.66454973035181, 64.00550387119813, 103.37949694518547, 42.92891975473377,
     120.78121602397195, 106.1678622248343, 90.51460194833895, 50.84326415898847, 66.075964548601,
     82.93921811065225, 61.70872116820898, 53.73338063008079, 30.34620289682772, 95.89803694818931,
     78.66763599646869, 91.92254933531653, 36.68211744693376, 85.65015711261508, 127.34228826332546,
     83.34942411103863, 62.093789487737894, 40.835542578262746, 35.97003718558246, 79.97652184610533]
NM = {'xatol': 1e-11, 'fatol': 1e-13, 'maxiter': 40000, 'maxfev': 80000}


def studentt():
    x = np.array(T)
    nll = lambda p: -stats.t.logpdf(x, p[0], p[1], np.exp(p[2])).sum() if p[0] > 0 else np.inf
    fits = [optimize.minimize(nll, [df0, np.median(x), np.log(np.std(x))], method='Nelder-Mead', options=NM)
            for df0 in [0.5, 1, 2, 5, 12, 30, 100, 1000]]
    best = min(fits, key=lambda r: r.fun)
    llhat = -best.fun
    cut = llhat - stats.chi2.ppf(0.95, 1) / 2

    def prof(df):
        return max(-optimize.minimize(lambda p: -stats.t.logpdf(x, df, p[0], np.exp(p[1])).sum(),
                                      [m0, np.log(s0)], method='Nelder-Mead', options=NM).fun
                   for m0 in [np.median(x), x.mean(), 60, 65] for s0 in [10, 20, 30])
    lower = optimize.brentq(lambda df: prof(df) - cut, 0.5, 5, xtol=1e-13)
    return {'x': T, 'loglik_hat': llhat, 'df_hat': best.x[0], 'starts_agree': max(abs(r.fun - best.fun) for r in fits),
            'df_lower': lower, 'unbounded_below_df': 1 / (len(x) - 1)}


def lognormal3():
    x = np.array(L)

    def nll(p):
        mu, ls, thr = p
        if thr >= x.min():
            return np.inf
        return -stats.lognorm.logpdf(x, np.exp(ls), loc=thr, scale=np.exp(mu)).sum()
    fits = []
    for t0 in [0, 20, 29, -100, -1000]:
        y = np.log(x - t0)
        fits.append(optimize.minimize(nll, [y.mean(), np.log(y.std()), t0], method='Nelder-Mead', options=NM))
    best = min(fits, key=lambda r: r.fun)
    return {'x': L, 'loglik_hat': -best.fun, 'threshold_hat': best.x[2],
            'starts_agree': max(abs(r.fun - best.fun) for r in fits),
            'normal_limit_loglik': stats.norm.logpdf(x, x.mean(), x.std()).sum()}


print(json.dumps({'generator': 'testdata/infer/make_false_maxima.py', 'scipy': scipy.__version__,
                  'studentt': studentt(), 'lognormal3': lognormal3()}, indent=1))
