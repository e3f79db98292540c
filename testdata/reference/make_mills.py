#!/usr/bin/python3
"""Reference values of the normal Mills ratio R(t) = Q(t)/phi(t), of
1 - t R(t) = -R'(t), and of ln(R(a) - R(b)), for fitters/special_mills_test.go,
by mpmath at 60 digits (R(t) = sqrt(pi/2) erfc(t/sqrt 2) e^(t^2/2), all in
mpmath; the difference R(a) - R(b) taken at 60 digits, where double precision
would cancel). Cross-checked against scipy: R(t) = scipy.special.erfcx(t/sqrt 2)
sqrt(pi/2) to 1e-13 relative, or the script stops.

Run: /usr/bin/python3 testdata/reference/make_mills.py > testdata/reference/mills.json
"""
import json
import sys
import mpmath as mp
from scipy.special import erfcx

mp.mp.dps = 60


def mills(t):
    t = mp.mpf(t)
    return mp.sqrt(mp.pi / 2) * mp.erfc(t / mp.sqrt(2)) * mp.exp(t * t / 2)


ratio, one_minus = [], []
t = 0.0
ts = [k / 64 for k in range(0, 64 * 6)]           # 0 ... 6 in steps of 1/64
ts += [6 * 1.01 ** k for k in range(1, 700)]      # 6 ... ~6400, 1 % apart
for t in ts:
    r = mills(t)
    if abs(float(r) - erfcx(t / 2 ** 0.5) * (mp.pi / 2) ** 0.5) > 1e-13 * float(r):
        sys.exit("scipy's erfcx disagrees at t=%r" % t)
    ratio.append({"t": t, "r": mp.nstr(r, 20)})
    one_minus.append({"t": t, "v": mp.nstr(1 - mp.mpf(t) * r, 20)})

diff = []
# a from -1 to 300, widths h = b - a from max(1, a) down to 1e-6 of it: the
# domain where logMillsDifference is used.
a = -1.0
while a < 300:
    m = max(1.0, a)
    h = m
    while h > m * 1e-6:
        b = a + h
        diff.append({"a": a, "b": b, "v": mp.nstr(mp.log(mills(a) - mills(b)), 20)})
        h *= 0.3
    a += 0.173 + abs(a) * 0.11
json.dump({"mills": ratio, "one_minus_t_mills": one_minus, "log_mills_difference": diff},
          sys.stdout, indent=0)
print()
