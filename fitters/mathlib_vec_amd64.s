//go:build amd64 && !purego

#include "textflag.h"

// Vector kernels of libLog and libExp (mathlib_amd64.go), which are the
// standard library's math.Log and math.Exp on amd64 (log_amd64.s,
// exp_amd64.s): the same operations in the same order on 8 (AVX-512) or 4
// (AVX2) lanes, each product and sum rounded on its own (VMULPD, VADDPD),
// a fused multiply-add (VFMADD, VFNMADD) exactly where exp's FMA route has
// one and nowhere else, so every lane gives the scalar routine's bits.
// Steps that the scalar code does in integer registers are done here in
// ways that give the same numbers: k = e − 1022 as a float64 by
// (2^52 + e) − (2^52 + 1022), exact for an exponent field e < 2^11, instead
// of CVTSL2SD; the round-to-nearest-even of log2e·x as the sum
// log2e·x + 1.5·2^52 (rounded to an integer, ties to even, as CVTSD2SL
// under the default MXCSR), whose low bits are then k. Each kernel works
// on whole vectors from the start of x and returns the number of values it
// wrote: len(x) rounded down to the vector width, or the index of the first
// vector holding an input the scalar code sends on to math.Log or math.Exp
// (a log of a zero, subnormal, negative, infinite or NaN x; an exp of
// |x| > 700 or NaN); mathlib_vec_amd64.go does that vector and the tail
// with the scalar functions.

// Constants, each a 64-bit pattern repeated four times (32 bytes): AVX2
// reads them as memory operands, AVX-512 broadcasts the first quadword.
#define CONST4(name, bits) \
	DATA name<>+0(SB)/8, bits; \
	DATA name<>+8(SB)/8, bits; \
	DATA name<>+16(SB)/8, bits; \
	DATA name<>+24(SB)/8, bits; \
	GLOBL name<>(SB), RODATA|NOPTR, $32

// log
CONST4(mlMinNorm, $0x0010000000000000)  // bits of the smallest normal
CONST4(mlSpan, $0x7fe0000000000000)     // normal bits − minNorm < span
CONST4(mlSpanFlip, $0xffdfffffffffffff) // (span − 1) with the sign bit flipped
CONST4(mlSign, $0x8000000000000000)
CONST4(mlMant, $0x000fffffffffffff)
CONST4(mlHalf, $0x3fe0000000000000)     // 0.5: also f1's exponent bits
CONST4(mlTwo52, $0x4330000000000000)    // 2^52
CONST4(mlKSub, $0x43300000000003fe)     // 2^52 + 1022
CONST4(mlHSqrt2, $0x3fe6a09e667f3bcd)   // √2/2
CONST4(mlOne, $0x3ff0000000000000)
CONST4(mlTwo, $0x4000000000000000)
CONST4(mlL1, $0x3fe5555555555593)
CONST4(mlL2, $0x3fd999999997fa04)
CONST4(mlL3, $0x3fd2492494229359)
CONST4(mlL4, $0x3fcc71c51d8e78af)
CONST4(mlL5, $0x3fc7466496cb03de)
CONST4(mlL6, $0x3fc39a09d078c69f)
CONST4(mlL7, $0x3fc2f112df3e5244)
CONST4(mlLn2Hi, $0x3fe62e42fee00000)
CONST4(mlLn2Lo, $0x3dea39ef35793c76)

// exp (with mlHalf = C2, mlOne and mlTwo above)
CONST4(meAbs, $0x7fffffffffffffff)
CONST4(meBound, $0x4085e00000000000)    // bits of 700
CONST4(meLog2e, $0x3ff71547652b82fe)
CONST4(meShift, $0x4338000000000000)    // 1.5·2^52
CONST4(meBias, $0x00000000000003ff)     // 1023
CONST4(meLn2U, $0x3fe62e42fefa3000)
CONST4(meLn2L, $0x3d53de6af278ece6)
CONST4(meSixteenth, $0x3fb0000000000000)
CONST4(meC3, $0x3fc5555555555555)
CONST4(meC4, $0x3fa5555555555555)
CONST4(meC5, $0x3f81111111111111)
CONST4(meC6, $0x3f56c16c16c16c17)
CONST4(meC7, $0x3f2a01a01a01a01a)
CONST4(meC8, $0x3efa01a01a01a01a)

// func libLogsAVX512(dst, x []float64) int
TEXT ·libLogsAVX512(SB), NOSPLIT, $0-56
	MOVQ dst_base+0(FP), DX
	MOVQ x_base+24(FP), SI
	MOVQ x_len+32(FP), CX
	ANDQ $-8, CX
	XORQ BX, BX
	VPBROADCASTQ mlMinNorm<>(SB), Z14
	VPBROADCASTQ mlSpan<>(SB), Z15
	VPBROADCASTQ mlMant<>(SB), Z16
	VPBROADCASTQ mlHalf<>(SB), Z17
	VPBROADCASTQ mlTwo52<>(SB), Z18
	VPBROADCASTQ mlKSub<>(SB), Z19
	VPBROADCASTQ mlHSqrt2<>(SB), Z20
	VPBROADCASTQ mlOne<>(SB), Z21
	VPBROADCASTQ mlTwo<>(SB), Z22
	VPBROADCASTQ mlL1<>(SB), Z23
	VPBROADCASTQ mlL2<>(SB), Z24
	VPBROADCASTQ mlL3<>(SB), Z25
	VPBROADCASTQ mlL4<>(SB), Z26
	VPBROADCASTQ mlL5<>(SB), Z27
	VPBROADCASTQ mlL6<>(SB), Z28
	VPBROADCASTQ mlL7<>(SB), Z29
	VPBROADCASTQ mlLn2Hi<>(SB), Z30
	VPBROADCASTQ mlLn2Lo<>(SB), Z31

liblogs512loop:
	CMPQ BX, CX
	JGE  liblogs512done
	VMOVDQU64 (SI)(BX*8), Z0       // x
	VPSUBQ    Z14, Z0, Z1
	VPCMPUQ   $5, Z15, Z1, K1      // x − minNorm ≥ span (unsigned): special
	KORTESTW  K1, K1
	JNZ       liblogs512done
	VPANDQ    Z16, Z0, Z1
	VPORQ     Z17, Z1, Z1          // f1 in [½, 1)
	VPSRLQ    $52, Z0, Z2
	VPORQ     Z18, Z2, Z2
	VSUBPD    Z19, Z2, Z2          // k = e − 1022
	VCMPPD    $2, Z20, Z1, K2      // f1 ≤ √2/2, i.e. !(√2/2 < f1)
	VSUBPD    Z21, Z2, K2, Z2      // k − 1
	VADDPD    Z1, Z1, K2, Z1       // 2·f1
	VSUBPD    Z21, Z1, Z1          // f = f1 − 1
	VADDPD    Z22, Z1, Z3
	VDIVPD    Z3, Z1, Z3           // s = f/(2 + f)
	VMULPD    Z3, Z3, Z4           // s2
	VMULPD    Z4, Z4, Z5           // s4
	VMULPD    Z29, Z5, Z6
	VADDPD    Z27, Z6, Z6
	VMULPD    Z5, Z6, Z6
	VADDPD    Z25, Z6, Z6
	VMULPD    Z5, Z6, Z6
	VADDPD    Z23, Z6, Z6
	VMULPD    Z6, Z4, Z4           // t1 = s2·(L1 + s4·(L3 + s4·(L5 + s4·L7)))
	VMULPD    Z28, Z5, Z6
	VADDPD    Z26, Z6, Z6
	VMULPD    Z5, Z6, Z6
	VADDPD    Z24, Z6, Z6
	VMULPD    Z6, Z5, Z5           // t2 = s4·(L2 + s4·(L4 + s4·L6))
	VADDPD    Z5, Z4, Z4           // R = t1 + t2
	VMULPD    Z17, Z1, Z0
	VMULPD    Z1, Z0, Z0           // hfsq = ½f·f
	VADDPD    Z0, Z4, Z4
	VMULPD    Z4, Z3, Z3           // s·(hfsq + R)
	VMULPD    Z31, Z2, Z4
	VADDPD    Z4, Z3, Z3           // … + k·ln2Lo
	VSUBPD    Z3, Z0, Z0
	VSUBPD    Z1, Z0, Z0           // (hfsq − (…)) − f
	VMULPD    Z30, Z2, Z2
	VSUBPD    Z0, Z2, Z2           // k·ln2Hi − (…)
	VMOVUPD   Z2, (DX)(BX*8)
	ADDQ      $8, BX
	JMP       liblogs512loop

liblogs512done:
	MOVQ BX, ret+48(FP)
	VZEROUPPER
	RET

// func libLogsAVX2(dst, x []float64) int
TEXT ·libLogsAVX2(SB), NOSPLIT, $0-56
	MOVQ dst_base+0(FP), DX
	MOVQ x_base+24(FP), SI
	MOVQ x_len+32(FP), CX
	ANDQ $-4, CX
	XORQ BX, BX
	VMOVDQU mlMinNorm<>(SB), Y8
	VMOVDQU mlSpanFlip<>(SB), Y9
	VMOVDQU mlSign<>(SB), Y10
	VMOVDQU mlHalf<>(SB), Y11
	VMOVDQU mlOne<>(SB), Y12
	VMOVDQU mlHSqrt2<>(SB), Y13
	VMOVDQU mlMant<>(SB), Y14
	VMOVDQU mlTwo52<>(SB), Y15

liblogs2loop:
	CMPQ BX, CX
	JGE  liblogs2done
	VMOVDQU  (SI)(BX*8), Y0         // x
	VPSUBQ   Y8, Y0, Y1
	VPXOR    Y10, Y1, Y1
	VPCMPGTQ Y9, Y1, Y1             // x − minNorm ≥ span (unsigned): special
	VPTEST   Y1, Y1
	JNZ      liblogs2done
	VPAND    Y14, Y0, Y1
	VPOR     Y11, Y1, Y1            // f1 in [½, 1)
	VPSRLQ   $52, Y0, Y2
	VPOR     Y15, Y2, Y2
	VSUBPD   mlKSub<>(SB), Y2, Y2   // k = e − 1022
	VCMPPD   $2, Y13, Y1, Y3        // f1 ≤ √2/2, i.e. !(√2/2 < f1)
	VANDPD   Y12, Y3, Y4
	VSUBPD   Y4, Y2, Y2             // k − (1 or 0), as the assembly
	VANDPD   Y1, Y3, Y4
	VADDPD   Y4, Y1, Y1             // f1 + (f1 or 0) = f1·(2 or 1)
	VSUBPD   Y12, Y1, Y1            // f = f1 − 1
	VADDPD   mlTwo<>(SB), Y1, Y3
	VDIVPD   Y3, Y1, Y3             // s = f/(2 + f)
	VMULPD   Y3, Y3, Y4             // s2
	VMULPD   Y4, Y4, Y5             // s4
	VMULPD   mlL7<>(SB), Y5, Y6
	VADDPD   mlL5<>(SB), Y6, Y6
	VMULPD   Y5, Y6, Y6
	VADDPD   mlL3<>(SB), Y6, Y6
	VMULPD   Y5, Y6, Y6
	VADDPD   mlL1<>(SB), Y6, Y6
	VMULPD   Y6, Y4, Y4             // t1
	VMULPD   mlL6<>(SB), Y5, Y6
	VADDPD   mlL4<>(SB), Y6, Y6
	VMULPD   Y5, Y6, Y6
	VADDPD   mlL2<>(SB), Y6, Y6
	VMULPD   Y6, Y5, Y5             // t2
	VADDPD   Y5, Y4, Y4             // R
	VMULPD   Y11, Y1, Y0
	VMULPD   Y1, Y0, Y0             // hfsq
	VADDPD   Y0, Y4, Y4
	VMULPD   Y4, Y3, Y3             // s·(hfsq + R)
	VMULPD   mlLn2Lo<>(SB), Y2, Y4
	VADDPD   Y4, Y3, Y3
	VSUBPD   Y3, Y0, Y0
	VSUBPD   Y1, Y0, Y0
	VMULPD   mlLn2Hi<>(SB), Y2, Y2
	VSUBPD   Y0, Y2, Y2
	VMOVUPD  Y2, (DX)(BX*8)
	ADDQ     $4, BX
	JMP      liblogs2loop

liblogs2done:
	MOVQ BX, ret+48(FP)
	VZEROUPPER
	RET

// func libExpsAVX512(dst, x []float64) int
//
// exp's FMA route only (the caller checks libUseFMA).
TEXT ·libExpsAVX512(SB), NOSPLIT, $0-56
	MOVQ dst_base+0(FP), DX
	MOVQ x_base+24(FP), SI
	MOVQ x_len+32(FP), CX
	ANDQ $-8, CX
	XORQ BX, BX
	VPBROADCASTQ meBias<>(SB), Z15
	VPBROADCASTQ meAbs<>(SB), Z16
	VPBROADCASTQ meBound<>(SB), Z17
	VPBROADCASTQ meLog2e<>(SB), Z18
	VPBROADCASTQ meShift<>(SB), Z19
	VPBROADCASTQ meLn2U<>(SB), Z20
	VPBROADCASTQ meLn2L<>(SB), Z21
	VPBROADCASTQ meSixteenth<>(SB), Z22
	VPBROADCASTQ meC8<>(SB), Z23
	VPBROADCASTQ meC7<>(SB), Z24
	VPBROADCASTQ meC6<>(SB), Z25
	VPBROADCASTQ meC5<>(SB), Z26
	VPBROADCASTQ meC4<>(SB), Z27
	VPBROADCASTQ meC3<>(SB), Z28
	VPBROADCASTQ mlHalf<>(SB), Z29
	VPBROADCASTQ mlOne<>(SB), Z30
	VPBROADCASTQ mlTwo<>(SB), Z31

libexps512loop:
	CMPQ BX, CX
	JGE  libexps512done
	VMOVUPD     (SI)(BX*8), Z0     // x
	VPANDQ      Z16, Z0, Z1
	VPCMPUQ     $6, Z17, Z1, K1    // |x| > 700 or NaN: special
	KORTESTW    K1, K1
	JNZ         libexps512done
	VMULPD      Z18, Z0, Z1
	VADDPD      Z19, Z1, Z1        // t = log2e·x + 1.5·2^52
	VSUBPD      Z19, Z1, Z2        // k = t − 1.5·2^52
	VPSUBQ      Z19, Z1, Z1
	VPADDQ      Z15, Z1, Z1
	VPSLLQ      $52, Z1, Z1        // 2^k
	VFNMADD231PD Z20, Z2, Z0       // FMA(−k, ln2U, x)
	VFNMADD231PD Z21, Z2, Z0       // FMA(−k, ln2L, ·)
	VMULPD      Z22, Z0, Z0        // y = ·/16
	VMOVAPD     Z23, Z3
	VFMADD213PD Z24, Z0, Z3        // p = FMA(c8, y, c7)
	VFMADD213PD Z25, Z0, Z3
	VFMADD213PD Z26, Z0, Z3
	VFMADD213PD Z27, Z0, Z3
	VFMADD213PD Z28, Z0, Z3
	VFMADD213PD Z29, Z0, Z3
	VFMADD213PD Z30, Z0, Z3        // p = FMA(p, y, 1)
	VMULPD      Z3, Z0, Z0         // y·p
	VADDPD      Z31, Z0, Z3
	VMULPD      Z3, Z0, Z0         // y·(y + 2)
	VADDPD      Z31, Z0, Z3
	VMULPD      Z3, Z0, Z0
	VADDPD      Z31, Z0, Z3
	VMULPD      Z3, Z0, Z0
	VADDPD      Z31, Z0, Z3
	VFMADD213PD Z30, Z3, Z0        // FMA(y, y + 2, 1)
	VMULPD      Z1, Z0, Z0         // ·2^k
	VMOVUPD     Z0, (DX)(BX*8)
	ADDQ        $8, BX
	JMP         libexps512loop

libexps512done:
	MOVQ BX, ret+48(FP)
	VZEROUPPER
	RET

// func libExpsAVX2(dst, x []float64, fma bool) int
//
// exp's FMA route if fma, else its route of separate products and sums.
TEXT ·libExpsAVX2(SB), NOSPLIT, $0-64
	MOVQ dst_base+0(FP), DX
	MOVQ x_base+24(FP), SI
	MOVQ x_len+32(FP), CX
	ANDQ $-4, CX
	XORQ BX, BX
	VMOVDQU meAbs<>(SB), Y8
	VMOVDQU meBound<>(SB), Y9
	VMOVDQU meLog2e<>(SB), Y10
	VMOVDQU meShift<>(SB), Y11
	VMOVDQU meSixteenth<>(SB), Y12
	VMOVDQU mlTwo<>(SB), Y13
	VMOVDQU mlOne<>(SB), Y14
	VMOVDQU meBias<>(SB), Y15
	CMPB    fma+48(FP), $0
	JEQ     libexps2plainloop

libexps2fmaloop:
	CMPQ BX, CX
	JGE  libexps2done
	VMOVUPD      (SI)(BX*8), Y0     // x
	VPAND        Y8, Y0, Y1
	VPCMPGTQ     Y9, Y1, Y1         // |x| > 700 or NaN: special
	VPTEST       Y1, Y1
	JNZ          libexps2done
	VMULPD       Y10, Y0, Y1
	VADDPD       Y11, Y1, Y1        // t = log2e·x + 1.5·2^52
	VSUBPD       Y11, Y1, Y2        // k
	VPSUBQ       Y11, Y1, Y1
	VPADDQ       Y15, Y1, Y1
	VPSLLQ       $52, Y1, Y1        // 2^k
	VFNMADD231PD meLn2U<>(SB), Y2, Y0
	VFNMADD231PD meLn2L<>(SB), Y2, Y0
	VMULPD       Y12, Y0, Y0        // y
	VMOVUPD      meC8<>(SB), Y3
	VFMADD213PD  meC7<>(SB), Y0, Y3
	VFMADD213PD  meC6<>(SB), Y0, Y3
	VFMADD213PD  meC5<>(SB), Y0, Y3
	VFMADD213PD  meC4<>(SB), Y0, Y3
	VFMADD213PD  meC3<>(SB), Y0, Y3
	VFMADD213PD  mlHalf<>(SB), Y0, Y3
	VFMADD213PD  Y14, Y0, Y3
	VMULPD       Y3, Y0, Y0
	VADDPD       Y13, Y0, Y3
	VMULPD       Y3, Y0, Y0
	VADDPD       Y13, Y0, Y3
	VMULPD       Y3, Y0, Y0
	VADDPD       Y13, Y0, Y3
	VMULPD       Y3, Y0, Y0
	VADDPD       Y13, Y0, Y3
	VFMADD213PD  Y14, Y3, Y0
	VMULPD       Y1, Y0, Y0
	VMOVUPD      Y0, (DX)(BX*8)
	ADDQ         $4, BX
	JMP          libexps2fmaloop

libexps2plainloop:
	CMPQ BX, CX
	JGE  libexps2done
	VMOVUPD  (SI)(BX*8), Y0         // x
	VPAND    Y8, Y0, Y1
	VPCMPGTQ Y9, Y1, Y1
	VPTEST   Y1, Y1
	JNZ      libexps2done
	VMULPD   Y10, Y0, Y1
	VADDPD   Y11, Y1, Y1
	VSUBPD   Y11, Y1, Y2            // k
	VPSUBQ   Y11, Y1, Y1
	VPADDQ   Y15, Y1, Y1
	VPSLLQ   $52, Y1, Y1            // 2^k
	VMULPD   meLn2U<>(SB), Y2, Y3
	VSUBPD   Y3, Y0, Y0             // x − ln2U·k
	VMULPD   meLn2L<>(SB), Y2, Y3
	VSUBPD   Y3, Y0, Y0             // · − ln2L·k
	VMULPD   Y12, Y0, Y0            // y
	VMULPD   meC8<>(SB), Y0, Y3     // p = c8·y
	VADDPD   meC7<>(SB), Y3, Y3
	VMULPD   Y0, Y3, Y3             // p = (p + c7)·y
	VADDPD   meC6<>(SB), Y3, Y3
	VMULPD   Y0, Y3, Y3
	VADDPD   meC5<>(SB), Y3, Y3
	VMULPD   Y0, Y3, Y3
	VADDPD   meC4<>(SB), Y3, Y3
	VMULPD   Y0, Y3, Y3
	VADDPD   meC3<>(SB), Y3, Y3
	VMULPD   Y0, Y3, Y3
	VADDPD   mlHalf<>(SB), Y3, Y3
	VMULPD   Y0, Y3, Y3
	VADDPD   Y14, Y3, Y3            // p + 1
	VMULPD   Y3, Y0, Y0             // y·p
	VADDPD   Y13, Y0, Y3
	VMULPD   Y3, Y0, Y0             // y·(y + 2), four times
	VADDPD   Y13, Y0, Y3
	VMULPD   Y3, Y0, Y0
	VADDPD   Y13, Y0, Y3
	VMULPD   Y3, Y0, Y0
	VADDPD   Y13, Y0, Y3
	VMULPD   Y3, Y0, Y0
	VADDPD   Y14, Y0, Y0            // y + 1
	VMULPD   Y1, Y0, Y0             // ·2^k
	VMOVUPD  Y0, (DX)(BX*8)
	ADDQ     $4, BX
	JMP      libexps2plainloop

libexps2done:
	MOVQ BX, ret+56(FP)
	VZEROUPPER
	RET
