#!/usr/bin/python3
"""Table and polynomial of fitters/fastmath.go (fastLog): 256 entries
(1/c, ln c high, ln c low) and the five coefficients of P(r).

Run with Debian's /usr/bin/python3 (mpmath 1.2.1):
    /usr/bin/python3 testdata/fastmath/make_log_table.py > testdata/fastmath/log_table.txt
and paste the printed Go literal into fitters/fastmath.go (the file in testdata
is what TestFastLogTable compares the Go table with, entry by entry).

x = 2^k z with z in [0.6875, 1.375) taken by bit operations; entry i covers
z in [a_i, b_i): width 2^-9 below 1 (i < 160), 2^-8 above (i >= 160).
1/c is a multiple of 2^-8 (z < 1) or 2^-9 (z >= 1), so it has at most 9
significant bits, chosen to minimise max |z/c - 1| over the entry and forced
to 1 for the two entries beside z = 1, so that r = z*(1/c) - 1 is a multiple
of 2^-61 with |r| < 2^-8: 53 bits, exact.  ln c = -ln(1/c) is split into a
high part, a multiple of 2^-42 (so k ln2hi + ln c high is exact for
|k| <= 1075), and the rest rounded to nearest.

P(r), with ln(1 + r) = r + r^2 P(r), is mpmath's Chebyshev fit (chebyfit,
degree 4) of (ln(1 + r) - r)/r^2 over the range of r of the whole table; the
script prints its worst relative error in ln(1 + r) (coefficients rounded to
float64) on a grid of 20,001 points.
"""
import mpmath
from mpmath import mpf

mpmath.mp.prec = 300
OFF = 0x3FE6000000000000
N = 256
BITS = 8


def asdouble(bits):
    import struct
    return struct.unpack('<d', struct.pack('<Q', bits))[0]


def round_to(v, q):
    """v rounded to the nearest multiple of 2^-q (ties away from zero: no ties occur)."""
    return mpmath.nint(v * 2**q) / mpf(2)**q


def main():
    ln2 = mpmath.log(2)
    ln2hi = round_to(ln2, 42)
    ln2lo = float(ln2 - ln2hi)
    print("// ln 2 = ln2hi + ln2lo; ln2hi a multiple of 2^-42")
    print("ln2hi = %s // %r" % (float(ln2hi).hex(), float(ln2hi)))
    print("ln2lo = %s // %r" % (ln2lo.hex(), ln2lo))
    rlo, rhi = mpf(0), mpf(0)
    rows = []
    for i in range(N):
        sh = 52 - BITS
        a = mpf(asdouble(OFF + (i << sh)))
        b = mpf(asdouble(OFF + ((i + 1) << sh)))
        # last representable z in the entry
        z_last = mpf(asdouble(OFF + ((i + 1) << sh) - 1))
        q = 8 if a < 1 else 9
        if a < 1 <= b or a == 1:
            invc = mpf(1)
        else:
            target = 2 / (a + z_last)
            cands = [mpmath.floor(target * 2**q) / mpf(2)**q, mpmath.ceil(target * 2**q) / mpf(2)**q]
            invc = min(cands, key=lambda v: max(abs(a * v - 1), abs(z_last * v - 1)))
        rs = (a * invc - 1, z_last * invc - 1)
        rmax = max(abs(rs[0]), abs(rs[1]))
        assert rmax < mpf(2)**-8, (i, rmax)
        rlo, rhi = min(rlo, rs[0]), max(rhi, rs[1])
        lnc = -mpmath.log(invc)
        hi = round_to(lnc, 42)
        lo = float(lnc - hi)
        assert float(hi) == hi and float(invc) == invc
        # Fast2Sum in fastLog needs |ln c high| >= |r| when k = 0 and c != 1.
        assert hi == 0 or abs(hi) >= rmax, (i, hi, rmax)
        rows.append("{%s, %s, %s}, // %d: z in [%s, %s), |r| <= %s" % (
            float(invc).hex(), float(hi).hex(), lo.hex(), i,
            mpmath.nstr(a, 8), mpmath.nstr(b, 8), mpmath.nstr(rmax, 4)))
    g = lambda r: (mpmath.log1p(r) - r) / r**2 if r != 0 else mpf(-0.5)
    coef, _ = mpmath.chebyfit(g, [rlo, rhi], 5, error=True)
    cs = [float(c) for c in coef[::-1]]
    worst = mpf(0)
    for j in range(20001):
        r = rlo + (rhi - rlo) * j / 20000
        if r == 0:
            continue
        p = mpf(cs[4])
        for c in cs[3::-1]:
            p = mpf(c) + r * p
        worst = max(worst, abs((r + r * r * p) / mpmath.log1p(r) - 1))
    print("// r in [%s, %s]; P(r) worst relative error in ln(1 + r): 2^%s" % (
        mpmath.nstr(rlo, 6), mpmath.nstr(rhi, 6), mpmath.nstr(mpmath.log(worst, 2), 4)))
    for j, c in enumerate(cs):
        print("logP%d = %s // %r" % (j, c.hex(), c))
    for row in rows:
        print(row)


main()
