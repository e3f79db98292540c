#!/usr/bin/python3
"""Table of fitters/fastmath.go (fastLog): 128 entries (1/c, ln c high, ln c low).

Run with Debian's /usr/bin/python3 (mpmath 1.2.1):
    /usr/bin/python3 testdata/fastmath/make_log_table.py > testdata/fastmath/log_table.txt
and paste the printed Go literal into fitters/fastmath.go (the file in testdata
is what TestFastLogTable compares the Go table with, entry by entry).

x = 2^k z with z in [0.6875, 1.375) taken by bit operations; entry i covers
z in [a_i, b_i): width 2^-8 below 1 (i < 80), 2^-7 above (i >= 80).
1/c is a multiple of 2^-7 (z < 1) or 2^-8 (z >= 1) chosen to minimise
max |z/c - 1| over the entry, forced to 1 for the two entries beside z = 1,
so that r = z*(1/c) - 1 is a multiple of 2^-60 with |r| < 2^-7: 53 bits,
exact in one fused multiply-add.  ln c = -ln(1/c) is split into a high part,
a multiple of 2^-42 (so k ln2hi + ln c high is exact for |k| <= 1075), and
the rest rounded to nearest.
"""
import mpmath
from mpmath import mpf

mpmath.mp.prec = 300
OFF = 0x3FE6000000000000
N = 128


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
    for i in range(N):
        a = mpf(asdouble(OFF + (i << 45)))
        b_excl = asdouble(OFF + ((i + 1) << 45))
        b = mpf(b_excl)
        # last representable z in the entry
        z_last = mpf(asdouble(OFF + ((i + 1) << 45) - 1))
        q = 7 if a < 1 else 8
        if i in (79, 80):
            invc = mpf(1)
        else:
            target = 2 / (a + z_last)
            cands = [mpmath.floor(target * 2**q) / mpf(2)**q, mpmath.ceil(target * 2**q) / mpf(2)**q]
            invc = min(cands, key=lambda v: max(abs(a * v - 1), abs(z_last * v - 1)))
        rmax = max(abs(a * invc - 1), abs(z_last * invc - 1))
        assert rmax < mpf(2)**-7, (i, rmax)
        lnc = -mpmath.log(invc)
        hi = round_to(lnc, 42)
        lo = float(lnc - hi)
        assert float(hi) == hi and float(invc) == invc
        # Fast2Sum in fastLog needs |ln c high| >= |r| when k = 0 and c != 1.
        assert hi == 0 or abs(hi) >= rmax, (i, hi, rmax)
        print("{%s, %s, %s}, // %d: z in [%s, %s), |r| <= %s" % (
            float(invc).hex(), float(hi).hex(), lo.hex(), i,
            mpmath.nstr(a, 8), mpmath.nstr(b, 8), mpmath.nstr(rmax, 4)))


main()
