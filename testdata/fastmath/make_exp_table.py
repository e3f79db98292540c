#!/usr/bin/python3
"""Table and constants of fitters/fastmath.go (fastExp).

Run with Debian's /usr/bin/python3 (mpmath 1.2.1):
    /usr/bin/python3 testdata/fastmath/make_exp_table.py > testdata/fastmath/exp_table.txt

exp(x) = 2^(k/128) exp(r), k = round(x 128/ln 2), r = x - k ln2/128 with
ln2/128 = ln2NHi + ln2NLo, ln2NHi having at most 35 significant bits so that
k ln2NHi is exact for |k| < 2^18.  Entry j holds 2^(j/128) rounded to
nearest (hi) and the relative correction (2^(j/128) - hi)/hi rounded to
nearest (tail).
"""
import mpmath
from mpmath import mpf

mpmath.mp.prec = 300


def main():
    ln2n = mpmath.log(2) / 128
    # 35 significant bits: ln2/128 is in [2^-8, 2^-7), so a multiple of 2^-42.
    hi = mpmath.nint(ln2n * 2**42) / mpf(2)**42
    lo = float(ln2n - hi)
    inv = float(128 / mpmath.log(2))
    print("invLn2N = %s // %r" % (inv.hex(), inv))
    print("ln2NHi = %s // %r" % (float(hi).hex(), float(hi)))
    print("ln2NLo = %s // %r" % (lo.hex(), lo))
    for j in range(128):
        t = mpf(2) ** (mpf(j) / 128)
        h = float(t)
        tail = float((t - h) / h)
        print("{%s, %s}, // %d" % (h.hex(), tail.hex(), j))


main()
