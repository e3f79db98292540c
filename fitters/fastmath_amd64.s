//go:build amd64 && !purego

#include "textflag.h"

// Vector kernels of fastLog and fastExp (fastmath.go): the same operations
// in the same order on 8 (AVX-512) or 4 (AVX2) lanes, each product rounded
// on its own (VMULPD, never a fused multiply-add), the same table entries
// (read by scalar-indexed loads and unpacked: gathers cost three times as
// much here), so every lane gives fastLog's or fastExp's bits. Each kernel
// works on whole vectors from the start of x and returns the number of
// values it wrote: len(x) rounded down to the vector width, or the index
// of the first vector holding an input the scalar path treats specially
// (fastmath_amd64.go does that vector and the tail in Go). The log kernels
// also add the logs, in order, to the running sum they are given, if
// addSum is true.

// Constants, each a 64-bit pattern repeated four times (32 bytes): AVX2
// reads them as memory operands, AVX-512 broadcasts the first quadword.
#define CONST4(name, bits) \
	DATA name<>+0(SB)/8, bits; \
	DATA name<>+8(SB)/8, bits; \
	DATA name<>+16(SB)/8, bits; \
	DATA name<>+24(SB)/8, bits; \
	GLOBL name<>(SB), RODATA|NOPTR, $32

// fastLog
CONST4(lgMinNorm, $0x0010000000000000)  // bits of the smallest normal
CONST4(lgSpan, $0x7fe0000000000000)     // normal bits − minNorm < span
CONST4(lgSpanFlip, $0xffdfffffffffffff) // (span − 1) with the sign bit flipped
CONST4(lgSign, $0x8000000000000000)
CONST4(lgOff, $0x3fe6000000000000)      // bits of 0.6875
CONST4(lgExpMask, $0xfff0000000000000)
CONST4(lgLow9, $0xfffffffffffffe00)     // clears the last 9 bits
CONST4(lgKBias, $0x4000000000000000)    // tmp + 2^62: k + 1024 in the top 12 bits
CONST4(lgMagic, $0x4330000000000000)    // 2^52
CONST4(lgMagicK, $0x4330000000000400)   // 2^52 + 1024
CONST4(lgOne, $0x3ff0000000000000)
CONST4(lgLn2Hi, $0x3fe62e42fefa3800)
CONST4(lgLn2Lo, $0x3d2ef35793c76730)
CONST4(lgP0, $0xbfdfffffffffffce)
CONST4(lgP1, $0x3fd5555555542f63)
CONST4(lgP2, $0xbfd00000033955ce)
CONST4(lgP3, $0x3fc999a7618a6968)
CONST4(lgP4, $0xbfc5491653530cc3)

// fastExp
CONST4(exAbs, $0x7fffffffffffffff)
CONST4(exBound, $0x4085f00000000000)   // bits of 702
CONST4(exBoundM1, $0x4085efffffffffff)
CONST4(exInvLn2N, $0x40671547652b82fe)
CONST4(exShift, $0x4338000000000000)   // 1.5·2^52
CONST4(exLn2NHi, $0x3f762e42fefc0000)
CONST4(exLn2NLo, $0xbd3c610ca86c3899)
CONST4(exC2, $0x3fe0000000000000)
CONST4(exC3, $0x3fc5555555555555)
CONST4(exC4, $0x3fa5555555555555)
CONST4(exC5, $0x3f81111111111111)
CONST4(ex127, $0x000000000000007f)
CONST4(exNot127, $0xffffffffffffff80)

// fastLog1p (with the fastLog and fastExp constants above)
CONST4(l1Tiny, $0x3c90000000000000)        // bits of 2^-54
CONST4(l1Span, $0x06b0000000000000)        // bits of 2^53 − bits of 2^-54
CONST4(l1SpanFlip, $0x86afffffffffffff)    // (span − 1) with the sign bit flipped
CONST4(l1NegOne, $0xbff0000000000000)      // bits of −1
CONST4(l1NegOneFlip, $0x3fefffffffffffff)  // (bits of −1) − 1 with the sign bit flipped
CONST4(l1PolyLo, $0xbf60000000000000)      // −2^-9
CONST4(l1PolyHi, $0x3f70000000000000)      // 2^-8
CONST4(l1RowMask, $0x0000000000001fe0)     // 255·32
CONST4(l1Bias1023, $0x00000000000003ff)
CONST4(l1Bias2047, $0x00000000000007ff)

// LOAD8OFFSETS loads the eight byte offsets a kernel stored at (SP) into
// R8-R13, R15 and AX (lanes 0-7); LOAD4OFFSETS the first four.
#define LOAD4OFFSETS \
	MOVQ 0(SP), R8; \
	MOVQ 8(SP), R9; \
	MOVQ 16(SP), R10; \
	MOVQ 24(SP), R11

#define LOAD8OFFSETS \
	LOAD4OFFSETS; \
	MOVQ 32(SP), R12; \
	MOVQ 40(SP), R13; \
	MOVQ 48(SP), R15; \
	MOVQ 56(SP), AX

// SCALARIDX(off, r) sets r to 4·(table index) of the value at
// off(SI)(BX*8): the index (tmp>>44)&255 of tmp = ix − logOff is
// ((ix>>44) + 0xa0)&255, logOff having no bits below 2^44 and 0x3fe60 ≡
// −0xa0 mod 256; the row is at (DI)(r*8).
#define SCALARIDX(off, r) \
	MOVQ off(SI)(BX*8), r; \
	SHRQ $42, r; \
	ADDQ $0x280, r; \
	ANDQ $0x3fc, r

// func logsAVX512(dst, x []float64, sum float64, addSum bool) (n int, s float64)
TEXT ·logsAVX512(SB), NOSPLIT, $0-80
	MOVQ dst_base+0(FP), DX
	MOVQ x_base+24(FP), SI
	MOVQ x_len+32(FP), CX
	LEAQ ·logTableRows(SB), DI
	ANDQ $-8, CX
	XORQ BX, BX
	VMOVSD sum+48(FP), X30
	VPBROADCASTQ lgMinNorm<>(SB), Z16
	VPBROADCASTQ lgSpan<>(SB), Z17
	VPBROADCASTQ lgOff<>(SB), Z18
	VPBROADCASTQ lgExpMask<>(SB), Z20
	VPBROADCASTQ lgLow9<>(SB), Z21
	VPBROADCASTQ lgOne<>(SB), Z22
	VPBROADCASTQ lgLn2Hi<>(SB), Z23
	VPBROADCASTQ lgLn2Lo<>(SB), Z24
	VPBROADCASTQ lgP0<>(SB), Z25
	VPBROADCASTQ lgP1<>(SB), Z26
	VPBROADCASTQ lgP2<>(SB), Z27
	VPBROADCASTQ lgP3<>(SB), Z28
	VPBROADCASTQ lgP4<>(SB), Z29

logs512loop:
	CMPQ BX, CX
	JGE  logs512done
	VMOVDQU64 (SI)(BX*8), Z0       // ix
	VPSUBQ    Z16, Z0, Z1
	VPCMPUQ   $5, Z17, Z1, K1      // ix − minNorm ≥ span (unsigned): special
	KORTESTB  K1, K1
	JNZ       logs512done
	VPSUBQ    Z18, Z0, Z1          // tmp = ix − logOff
	SCALARIDX(0, R8)
	SCALARIDX(8, R9)
	SCALARIDX(16, R10)
	SCALARIDX(24, R11)
	SCALARIDX(32, R12)
	SCALARIDX(40, R13)
	SCALARIDX(48, R15)
	SCALARIDX(56, AX)
	VPSRAQ    $52, Z1, Z3          // k
	VCVTQQ2PD Z3, Z3               // kd
	VPANDQ    Z20, Z1, Z1
	VPSUBQ    Z1, Z0, Z0           // zb
	VPANDQ    Z21, Z0, Z1          // zh
	VSUBPD    Z1, Z0, Z0           // zl = zb − zh
	// Rows (1/c, (ln c)hi, (ln c)lo, 0) of lanes 0|2, 1|3, 4|6, 5|7 into
	// Z4, Z5, Z6, Z7; unpacking and 128-bit shuffles put each column in
	// lane order.
	VMOVUPD      (DI)(R8*8), Y4
	VINSERTF64X4 $1, (DI)(R10*8), Z4, Z4
	VMOVUPD      (DI)(R9*8), Y5
	VINSERTF64X4 $1, (DI)(R11*8), Z5, Z5
	VMOVUPD      (DI)(R12*8), Y6
	VINSERTF64X4 $1, (DI)(R15*8), Z6, Z6
	VMOVUPD      (DI)(R13*8), Y7
	VINSERTF64X4 $1, (DI)(AX*8), Z7, Z7
	VUNPCKLPD    Z5, Z4, Z8           // 1/c and (ln c)lo of lanes 0-3
	VUNPCKHPD    Z5, Z4, Z9           // (ln c)hi of lanes 0-3
	VUNPCKLPD    Z7, Z6, Z10
	VUNPCKHPD    Z7, Z6, Z11
	VSHUFF64X2   $0x88, Z10, Z8, Z4   // 1/c
	VSHUFF64X2   $0x88, Z11, Z9, Z5   // (ln c)hi
	VSHUFF64X2   $0xdd, Z10, Z8, Z6   // (ln c)lo
	VMULPD    Z4, Z1, Z1
	VSUBPD    Z22, Z1, Z1          // zh·(1/c) − 1
	VMULPD    Z4, Z0, Z0
	VADDPD    Z0, Z1, Z0           // r
	VMULPD    Z23, Z3, Z1
	VADDPD    Z5, Z1, Z1           // w = kd·ln2Hi + (ln c)hi
	VADDPD    Z0, Z1, Z2           // hi = w + r
	VSUBPD    Z2, Z1, Z1
	VADDPD    Z0, Z1, Z1           // lo = (w − hi) + r
	VMULPD    Z0, Z0, Z4           // r2
	VMULPD    Z26, Z0, Z5
	VADDPD    Z25, Z5, Z5          // p01 = P0 + r·P1
	VMULPD    Z28, Z0, Z7
	VADDPD    Z27, Z7, Z7          // P2 + r·P3
	VMULPD    Z29, Z4, Z8
	VADDPD    Z8, Z7, Z7           // p24 = (P2 + r·P3) + r2·P4
	VMULPD    Z7, Z4, Z7
	VADDPD    Z7, Z5, Z5           // p = p01 + r2·p24
	VMULPD    Z24, Z3, Z3
	VADDPD    Z3, Z6, Z6           // (ln c)lo + kd·ln2Lo
	VADDPD    Z1, Z6, Z6           // tail = … + lo
	VMULPD    Z5, Z4, Z4
	VADDPD    Z4, Z6, Z6           // tail + r2·p
	VADDPD    Z6, Z2, Z2           // hi + (tail + r2·p)
	VMOVUPD       Y2, (DX)(BX*8)
	VEXTRACTF64X4 $1, Z2, 32(DX)(BX*8)
	CMPB          addSum+56(FP), $0
	JEQ           logs512next
	// sum += y[0]; sum += y[1]; … in lane order, from the two 256-bit
	// stores just made (a 512-bit store would not forward to them).
	VADDSD        (DX)(BX*8), X30, X30
	VADDSD        8(DX)(BX*8), X30, X30
	VADDSD        16(DX)(BX*8), X30, X30
	VADDSD        24(DX)(BX*8), X30, X30
	VADDSD        32(DX)(BX*8), X30, X30
	VADDSD        40(DX)(BX*8), X30, X30
	VADDSD        48(DX)(BX*8), X30, X30
	VADDSD        56(DX)(BX*8), X30, X30

logs512next:
	ADDQ      $8, BX
	JMP       logs512loop

logs512done:
	MOVQ   BX, n+64(FP)
	VMOVSD X30, s+72(FP)
	VZEROUPPER
	RET

// func logsAVX2(dst, x []float64, sum float64, addSum bool) (n int, s float64)
TEXT ·logsAVX2(SB), NOSPLIT, $0-80
	MOVQ dst_base+0(FP), DX
	MOVQ x_base+24(FP), SI
	MOVQ x_len+32(FP), CX
	LEAQ ·logTableRows(SB), DI
	ANDQ $-4, CX
	XORQ BX, BX
	VMOVSD  sum+48(FP), X14
	VMOVDQU lgOff<>(SB), Y8
	VMOVDQU lgOne<>(SB), Y9
	VMOVDQU lgLn2Hi<>(SB), Y10
	VMOVDQU lgP0<>(SB), Y11
	VMOVDQU lgP1<>(SB), Y12
	VMOVDQU lgP2<>(SB), Y13

logs2loop:
	CMPQ BX, CX
	JGE  logs2done
	VMOVDQU  (SI)(BX*8), Y0         // ix
	VPSUBQ   lgMinNorm<>(SB), Y0, Y1
	VPXOR    lgSign<>(SB), Y1, Y1
	VPCMPGTQ lgSpanFlip<>(SB), Y1, Y1 // ix − minNorm ≥ span (unsigned): special
	VPTEST   Y1, Y1
	JNZ      logs2done
	VPSUBQ   Y8, Y0, Y1              // tmp = ix − logOff
	SCALARIDX(0, R8)
	SCALARIDX(8, R9)
	SCALARIDX(16, R10)
	SCALARIDX(24, R11)
	VPADDQ   lgKBias<>(SB), Y1, Y3
	VPSRLQ   $52, Y3, Y3             // k + 1024
	VPOR     lgMagic<>(SB), Y3, Y3   // 2^52 + k + 1024
	VSUBPD   lgMagicK<>(SB), Y3, Y3  // kd, exact
	VPAND    lgExpMask<>(SB), Y1, Y1
	VPSUBQ   Y1, Y0, Y0              // zb
	VPAND    lgLow9<>(SB), Y0, Y1    // zh
	VSUBPD   Y1, Y0, Y0              // zl = zb − zh
	// Halves of the rows (1/c, (ln c)hi | (ln c)lo, 0) of lanes 0|2 and
	// 1|3; unpacking puts each column in lane order.
	VMOVUPD     (DI)(R8*8), X4
	VINSERTF128 $1, (DI)(R10*8), Y4, Y4
	VMOVUPD     (DI)(R9*8), X2
	VINSERTF128 $1, (DI)(R11*8), Y2, Y2
	VUNPCKLPD   Y2, Y4, Y5           // 1/c
	VUNPCKHPD   Y2, Y4, Y6           // (ln c)hi
	VMOVUPD     16(DI)(R8*8), X4
	VINSERTF128 $1, 16(DI)(R10*8), Y4, Y4
	VMOVUPD     16(DI)(R9*8), X2
	VINSERTF128 $1, 16(DI)(R11*8), Y2, Y2
	VUNPCKLPD   Y2, Y4, Y7           // (ln c)lo
	VMULPD   Y5, Y1, Y1
	VSUBPD   Y9, Y1, Y1              // zh·(1/c) − 1
	VMULPD   Y5, Y0, Y0
	VADDPD   Y0, Y1, Y0              // r
	VMULPD   Y10, Y3, Y1
	VADDPD   Y6, Y1, Y1              // w = kd·ln2Hi + (ln c)hi
	VADDPD   Y0, Y1, Y2              // hi = w + r
	VSUBPD   Y2, Y1, Y1
	VADDPD   Y0, Y1, Y1              // lo = (w − hi) + r
	VMULPD   Y0, Y0, Y4              // r2
	VMULPD   Y12, Y0, Y5
	VADDPD   Y11, Y5, Y5             // p01 = P0 + r·P1
	VMULPD   lgP3<>(SB), Y0, Y6
	VADDPD   Y13, Y6, Y6             // P2 + r·P3
	VMULPD   lgP4<>(SB), Y4, Y0
	VADDPD   Y0, Y6, Y6              // p24 = (P2 + r·P3) + r2·P4
	VMULPD   Y6, Y4, Y6
	VADDPD   Y6, Y5, Y5              // p = p01 + r2·p24
	VMULPD   lgLn2Lo<>(SB), Y3, Y3
	VADDPD   Y3, Y7, Y7              // (ln c)lo + kd·ln2Lo
	VADDPD   Y1, Y7, Y7              // tail = … + lo
	VMULPD   Y5, Y4, Y4
	VADDPD   Y4, Y7, Y7              // tail + r2·p
	VADDPD   Y7, Y2, Y2              // hi + (tail + r2·p)
	VMOVUPD  Y2, (DX)(BX*8)
	CMPB     addSum+56(FP), $0
	JEQ      logs2next
	// sum += y[0]; sum += y[1]; … in lane order.
	VADDSD       X2, X14, X14
	VPERMILPD    $1, X2, X3
	VADDSD       X3, X14, X14
	VEXTRACTF128 $1, Y2, X4
	VADDSD       X4, X14, X14
	VPERMILPD    $1, X4, X3
	VADDSD       X3, X14, X14

logs2next:
	ADDQ     $4, BX
	JMP      logs2loop

logs2done:
	MOVQ   BX, n+64(FP)
	VMOVSD X14, s+72(FP)
	VZEROUPPER
	RET

// func expsAVX512(dst, x []float64) int
TEXT ·expsAVX512(SB), NOSPLIT, $64-56
	MOVQ dst_base+0(FP), DX
	MOVQ x_base+24(FP), SI
	MOVQ x_len+32(FP), CX
	LEAQ ·expTable(SB), DI
	ANDQ $-8, CX
	XORQ BX, BX
	VPBROADCASTQ exAbs<>(SB), Z16
	VPBROADCASTQ exBound<>(SB), Z17
	VPBROADCASTQ exInvLn2N<>(SB), Z18
	VPBROADCASTQ exShift<>(SB), Z19
	VPBROADCASTQ exLn2NHi<>(SB), Z20
	VPBROADCASTQ exLn2NLo<>(SB), Z21
	VPBROADCASTQ exC2<>(SB), Z22
	VPBROADCASTQ exC3<>(SB), Z23
	VPBROADCASTQ exC4<>(SB), Z24
	VPBROADCASTQ exC5<>(SB), Z25
	VPBROADCASTQ ex127<>(SB), Z26
	VPBROADCASTQ exNot127<>(SB), Z27

exps512loop:
	CMPQ BX, CX
	JGE  exps512done
	VMOVUPD   (SI)(BX*8), Z0        // x
	VPANDQ    Z16, Z0, Z1
	VPCMPUQ   $5, Z17, Z1, K1       // |x| ≥ 702, Inf or NaN: special
	KORTESTB  K1, K1
	JNZ       exps512done
	VMULPD    Z18, Z0, Z1
	VADDPD    Z19, Z1, Z1           // t = x·N/ln2 + shift
	VSUBPD    Z19, Z1, Z2           // kd = t − shift
	VPSUBQ    Z19, Z1, Z1           // k = bits(t) − bits(shift)
	VMULPD    Z20, Z2, Z3
	VSUBPD    Z3, Z0, Z0            // x − kd·ln2NHi
	VMULPD    Z21, Z2, Z3
	VSUBPD    Z3, Z0, Z0            // r
	VPANDQ    Z26, Z1, Z4
	VPSLLQ    $4, Z4, Z4            // 16·j: the byte offset of entry j
	VMOVDQU     Y4, (SP)            // as two 256-bit stores: a 512-bit one
	VEXTRACTI64X4 $1, Z4, 32(SP)    // does not forward to the loads below
	VPANDQ    Z27, Z1, Z1
	VPSLLQ    $45, Z1, Z1           // (k>>7)<<52
	LOAD8OFFSETS
	// Entries 0, 2, 4, 6 into Z5 and 1, 3, 5, 7 into Z6, 128 bits each
	// (hi, tail): the unpacks leave hi and tail in lane order.
	VMOVUPD     (DI)(R8*1), X5
	VINSERTF128 $1, (DI)(R10*1), Y5, Y5
	VMOVUPD     (DI)(R12*1), X7
	VINSERTF128 $1, (DI)(R15*1), Y7, Y7
	VINSERTF64X4 $1, Y7, Z5, Z5
	VMOVUPD     (DI)(R9*1), X6
	VINSERTF128 $1, (DI)(R11*1), Y6, Y6
	VMOVUPD     (DI)(R13*1), X7
	VINSERTF128 $1, (DI)(AX*1), Y7, Y7
	VINSERTF64X4 $1, Y7, Z6, Z6
	VUNPCKHPD   Z6, Z5, Z7
	VUNPCKLPD   Z6, Z5, Z5          // hi
	VMOVAPD     Z7, Z6              // tail
	VPADDQ    Z1, Z5, Z5            // s
	VMULPD    Z0, Z0, Z7            // r2
	VMULPD    Z23, Z0, Z8
	VADDPD    Z22, Z8, Z8           // C2 + r·C3
	VMULPD    Z25, Z0, Z9
	VADDPD    Z24, Z9, Z9           // C4 + r·C5
	VMULPD    Z9, Z7, Z9
	VADDPD    Z9, Z8, Z8            // p
	VADDPD    Z0, Z6, Z6            // tail + r
	VMULPD    Z8, Z7, Z7
	VADDPD    Z7, Z6, Z6            // tmp = (tail + r) + r2·p
	VMULPD    Z6, Z5, Z6
	VADDPD    Z6, Z5, Z5            // s + s·tmp
	VMOVUPD   Z5, (DX)(BX*8)
	ADDQ      $8, BX
	JMP       exps512loop

exps512done:
	MOVQ BX, ret+48(FP)
	VZEROUPPER
	RET

// func expsAVX2(dst, x []float64) int
TEXT ·expsAVX2(SB), NOSPLIT, $32-56
	MOVQ dst_base+0(FP), DX
	MOVQ x_base+24(FP), SI
	MOVQ x_len+32(FP), CX
	LEAQ ·expTable(SB), DI
	ANDQ $-4, CX
	XORQ BX, BX
	VMOVDQU exAbs<>(SB), Y8
	VMOVDQU exBoundM1<>(SB), Y9
	VMOVDQU exInvLn2N<>(SB), Y10
	VMOVDQU exShift<>(SB), Y11
	VMOVDQU exLn2NHi<>(SB), Y12
	VMOVDQU exLn2NLo<>(SB), Y13
	VMOVDQU exC3<>(SB), Y14

exps2loop:
	CMPQ BX, CX
	JGE  exps2done
	VMOVUPD  (SI)(BX*8), Y0          // x
	VPAND    Y8, Y0, Y1
	VPCMPGTQ Y9, Y1, Y1              // |x| ≥ 702, Inf or NaN: special
	VPTEST   Y1, Y1
	JNZ      exps2done
	VMULPD   Y10, Y0, Y1
	VADDPD   Y11, Y1, Y1             // t = x·N/ln2 + shift
	VSUBPD   Y11, Y1, Y2             // kd = t − shift
	VPSUBQ   Y11, Y1, Y1             // k = bits(t) − bits(shift)
	VMULPD   Y12, Y2, Y3
	VSUBPD   Y3, Y0, Y0              // x − kd·ln2NHi
	VMULPD   Y13, Y2, Y3
	VSUBPD   Y3, Y0, Y0              // r
	VPAND    ex127<>(SB), Y1, Y4
	VPSLLQ   $4, Y4, Y4              // 16·j: the byte offset of entry j
	VMOVDQU  Y4, (SP)
	VPAND    exNot127<>(SB), Y1, Y1
	VPSLLQ   $45, Y1, Y1             // (k>>7)<<52
	LOAD4OFFSETS
	// Entries 0, 2 into Y5 and 1, 3 into Y6, 128 bits each (hi, tail).
	VMOVUPD     (DI)(R8*1), X5
	VINSERTF128 $1, (DI)(R10*1), Y5, Y5
	VMOVUPD     (DI)(R9*1), X6
	VINSERTF128 $1, (DI)(R11*1), Y6, Y6
	VUNPCKHPD   Y6, Y5, Y3
	VUNPCKLPD   Y6, Y5, Y5           // hi
	VMOVAPD     Y3, Y6               // tail
	VPADDQ   Y1, Y5, Y5              // s
	VMULPD   Y0, Y0, Y7              // r2
	VMULPD   Y14, Y0, Y2
	VADDPD   exC2<>(SB), Y2, Y2      // C2 + r·C3
	VMULPD   exC5<>(SB), Y0, Y3
	VADDPD   exC4<>(SB), Y3, Y3      // C4 + r·C5
	VMULPD   Y3, Y7, Y3
	VADDPD   Y3, Y2, Y2              // p
	VADDPD   Y0, Y6, Y6              // tail + r
	VMULPD   Y2, Y7, Y7
	VADDPD   Y7, Y6, Y6              // tmp = (tail + r) + r2·p
	VMULPD   Y6, Y5, Y6
	VADDPD   Y6, Y5, Y5              // s + s·tmp
	VMOVUPD  Y5, (DX)(BX*8)
	ADDQ     $4, BX
	JMP      exps2loop

exps2done:
	MOVQ BX, ret+48(FP)
	VZEROUPPER
	RET

// func log1psAVX512(dst, u []float64) int
TEXT ·log1psAVX512(SB), NOSPLIT, $64-56
	MOVQ dst_base+0(FP), DX
	MOVQ u_base+24(FP), SI
	MOVQ u_len+32(FP), CX
	LEAQ ·logTableRows(SB), DI
	ANDQ $-8, CX
	XORQ BX, BX
	VPBROADCASTQ l1PolyLo<>(SB), Z12
	VPBROADCASTQ l1PolyHi<>(SB), Z13
	VPBROADCASTQ l1Bias1023<>(SB), Z14
	VPBROADCASTQ exAbs<>(SB), Z16
	VPBROADCASTQ l1Tiny<>(SB), Z17
	VPBROADCASTQ l1Span<>(SB), Z18
	VPBROADCASTQ l1NegOne<>(SB), Z19
	VPBROADCASTQ lgOne<>(SB), Z20
	VPBROADCASTQ lgOff<>(SB), Z21
	VPBROADCASTQ l1RowMask<>(SB), Z22
	VPBROADCASTQ lgExpMask<>(SB), Z23
	VPBROADCASTQ lgLow9<>(SB), Z24
	VPBROADCASTQ lgLn2Hi<>(SB), Z25
	VPBROADCASTQ lgLn2Lo<>(SB), Z26
	VPBROADCASTQ lgP0<>(SB), Z27
	VPBROADCASTQ lgP1<>(SB), Z28
	VPBROADCASTQ lgP2<>(SB), Z29
	VPBROADCASTQ lgP3<>(SB), Z30
	VPBROADCASTQ lgP4<>(SB), Z31

log1ps512loop:
	CMPQ BX, CX
	JGE  log1ps512done
	VMOVUPD   (SI)(BX*8), Z0       // u
	VPANDQ    Z16, Z0, Z1
	VPSUBQ    Z17, Z1, Z1
	VPCMPUQ   $5, Z18, Z1, K1      // |u| < 2^-54, |u| ≥ 2^53 or NaN
	VPCMPUQ   $5, Z19, Z0, K2      // u ≤ −1
	KORB      K1, K2, K1
	KORTESTB  K1, K1
	JNZ       log1ps512done
	VCMPPD    $13, Z12, Z0, K2     // u ≥ −2^-9
	VCMPPD    $1, Z13, Z0, K2, K2  // and u < 2^-8: the polynomial alone

	// u + u²P(u) (the lanes of K2)
	VMULPD    Z0, Z0, Z2           // u2
	VMULPD    Z28, Z0, Z3
	VADDPD    Z27, Z3, Z3          // p01 = P0 + u·P1
	VMULPD    Z30, Z0, Z4
	VADDPD    Z29, Z4, Z4          // P2 + u·P3
	VMULPD    Z31, Z2, Z5
	VADDPD    Z5, Z4, Z4           // p24
	VMULPD    Z4, Z2, Z4
	VADDPD    Z4, Z3, Z3           // p01 + u2·p24
	VMULPD    Z3, Z2, Z3
	VADDPD    Z3, Z0, Z11          // u + u2·(…)

	// ln y + e/y, y = 1 + u (the other lanes)
	VADDPD    Z20, Z0, Z1          // y = 1 + u
	VSUBPD    Z20, Z1, Z2          // b = y − 1
	VSUBPD    Z2, Z1, Z3
	VSUBPD    Z3, Z20, Z3          // 1 − (y − b)
	VSUBPD    Z2, Z0, Z4           // u − b
	VADDPD    Z4, Z3, Z10          // e = (1 − (y − b)) + (u − b)
	VPSUBQ    Z21, Z1, Z2          // tmp = bits(y) − logOff
	VPSRLQ    $39, Z2, Z3
	VPANDQ    Z22, Z3, Z3          // 32·index: the byte offset of its row
	VMOVDQU   Y3, (SP)             // as two 256-bit stores: a 512-bit one
	VEXTRACTI64X4 $1, Z3, 32(SP)   // does not forward to the loads below
	VPSRAQ    $52, Z2, Z3          // k
	VPSUBQ    Z3, Z14, Z9
	VPSLLQ    $52, Z9, Z9          // 2^-k
	VCVTQQ2PD Z3, Z3               // kd
	VPANDQ    Z23, Z2, Z2
	VPSUBQ    Z2, Z1, Z1           // zb
	VPANDQ    Z24, Z1, Z2          // zh
	VSUBPD    Z2, Z1, Z1           // zl = zb − zh
	LOAD8OFFSETS
	VMOVUPD      (DI)(R8*1), Y4
	VINSERTF64X4 $1, (DI)(R10*1), Z4, Z4
	VMOVUPD      (DI)(R9*1), Y5
	VINSERTF64X4 $1, (DI)(R11*1), Z5, Z5
	VMOVUPD      (DI)(R12*1), Y6
	VINSERTF64X4 $1, (DI)(R15*1), Z6, Z6
	VMOVUPD      (DI)(R13*1), Y7
	VINSERTF64X4 $1, (DI)(AX*1), Z7, Z7
	VUNPCKLPD    Z5, Z4, Z0
	VUNPCKHPD    Z5, Z4, Z8
	VUNPCKLPD    Z7, Z6, Z4
	VUNPCKHPD    Z7, Z6, Z5
	VSHUFF64X2   $0x88, Z4, Z0, Z6    // 1/c
	VSHUFF64X2   $0xdd, Z4, Z0, Z7    // (ln c)lo
	VSHUFF64X2   $0x88, Z5, Z8, Z4    // (ln c)hi
	VMULPD    Z6, Z2, Z2
	VSUBPD    Z20, Z2, Z2          // zh·(1/c) − 1
	VMULPD    Z6, Z1, Z1
	VADDPD    Z1, Z2, Z2           // r
	VMULPD    Z9, Z6, Z9           // (1/c)·2^-k
	VSUBPD    Z2, Z20, Z6
	VMULPD    Z6, Z9, Z9           // inv = (1/c)·2^-k·(1 − r)
	VMULPD    Z25, Z3, Z1
	VADDPD    Z4, Z1, Z1           // w = kd·ln2Hi + (ln c)hi
	VADDPD    Z2, Z1, Z0           // hi = w + r
	VSUBPD    Z0, Z1, Z1
	VADDPD    Z2, Z1, Z1           // lo = (w − hi) + r
	VMULPD    Z2, Z2, Z4           // r2
	VMULPD    Z28, Z2, Z5
	VADDPD    Z27, Z5, Z5          // p01
	VMULPD    Z30, Z2, Z8
	VADDPD    Z29, Z8, Z8          // P2 + r·P3
	VMULPD    Z31, Z4, Z6
	VADDPD    Z6, Z8, Z8           // p24
	VMULPD    Z8, Z4, Z8
	VADDPD    Z8, Z5, Z5           // p = p01 + r2·p24
	VMULPD    Z26, Z3, Z3
	VADDPD    Z3, Z7, Z7           // (ln c)lo + kd·ln2Lo
	VADDPD    Z1, Z7, Z7           // … + lo
	VMULPD    Z9, Z10, Z10         // e·inv
	VADDPD    Z10, Z7, Z7          // tail
	VMULPD    Z5, Z4, Z4
	VADDPD    Z4, Z7, Z7           // tail + r2·p
	VADDPD    Z7, Z0, Z0           // hi + (tail + r2·p)
	VBLENDMPD Z11, Z0, K2, Z0      // the polynomial's lanes from Z11
	VMOVUPD   Z0, (DX)(BX*8)
	ADDQ      $8, BX
	JMP       log1ps512loop

log1ps512done:
	MOVQ BX, ret+48(FP)
	VZEROUPPER
	RET

// func log1psAVX2(dst, u []float64) int
TEXT ·log1psAVX2(SB), NOSPLIT, $32-56
	MOVQ dst_base+0(FP), DX
	MOVQ u_base+24(FP), SI
	MOVQ u_len+32(FP), CX
	LEAQ ·logTableRows(SB), DI
	ANDQ $-4, CX
	XORQ BX, BX
	VMOVDQU lgOne<>(SB), Y9

log1ps2loop:
	CMPQ BX, CX
	JGE  log1ps2done
	VMOVUPD  (SI)(BX*8), Y0           // u
	VPAND    exAbs<>(SB), Y0, Y1
	VPSUBQ   l1Tiny<>(SB), Y1, Y1
	VPXOR    lgSign<>(SB), Y1, Y1
	VPCMPGTQ l1SpanFlip<>(SB), Y1, Y1  // |u| < 2^-54, |u| ≥ 2^53 or NaN
	VPXOR    lgSign<>(SB), Y0, Y2
	VPCMPGTQ l1NegOneFlip<>(SB), Y2, Y2 // u ≤ −1
	VPOR     Y2, Y1, Y1
	VPTEST   Y1, Y1
	JNZ      log1ps2done

	// u + u²P(u)
	VMULPD   Y0, Y0, Y1               // u2
	VMULPD   lgP1<>(SB), Y0, Y2
	VADDPD   lgP0<>(SB), Y2, Y2       // p01
	VMULPD   lgP3<>(SB), Y0, Y3
	VADDPD   lgP2<>(SB), Y3, Y3       // P2 + u·P3
	VMULPD   lgP4<>(SB), Y1, Y4
	VADDPD   Y4, Y3, Y3               // p24
	VMULPD   Y3, Y1, Y3
	VADDPD   Y3, Y2, Y2               // p01 + u2·p24
	VMULPD   Y2, Y1, Y2
	VADDPD   Y2, Y0, Y13              // u + u2·(…)

	// ln y + e/y, y = 1 + u
	VADDPD   Y9, Y0, Y1               // y = 1 + u
	VSUBPD   Y9, Y1, Y2               // b = y − 1
	VSUBPD   Y2, Y1, Y3
	VSUBPD   Y3, Y9, Y3               // 1 − (y − b)
	VSUBPD   Y2, Y0, Y4               // u − b
	VADDPD   Y4, Y3, Y12              // e
	VPSUBQ   lgOff<>(SB), Y1, Y2      // tmp = bits(y) − logOff
	VPSRLQ   $39, Y2, Y3
	VPAND    l1RowMask<>(SB), Y3, Y3  // 32·index: the byte offset of its row
	VMOVDQU  Y3, (SP)
	VPADDQ   lgKBias<>(SB), Y2, Y3
	VPSRLQ   $52, Y3, Y3              // k + 1024
	VMOVDQU  l1Bias2047<>(SB), Y4
	VPSUBQ   Y3, Y4, Y4               // 1023 − k
	VPSLLQ   $52, Y4, Y11             // 2^-k
	VPOR     lgMagic<>(SB), Y3, Y3
	VSUBPD   lgMagicK<>(SB), Y3, Y3   // kd, exact
	VPAND    lgExpMask<>(SB), Y2, Y2
	VPSUBQ   Y2, Y1, Y1               // zb
	VPAND    lgLow9<>(SB), Y1, Y2     // zh
	VSUBPD   Y2, Y1, Y1               // zl
	LOAD4OFFSETS
	VMOVUPD     (DI)(R8*1), X4
	VINSERTF128 $1, (DI)(R10*1), Y4, Y4
	VMOVUPD     (DI)(R9*1), X5
	VINSERTF128 $1, (DI)(R11*1), Y5, Y5
	VUNPCKLPD   Y5, Y4, Y6            // 1/c
	VUNPCKHPD   Y5, Y4, Y7            // (ln c)hi
	VMOVUPD     16(DI)(R8*1), X4
	VINSERTF128 $1, 16(DI)(R10*1), Y4, Y4
	VMOVUPD     16(DI)(R9*1), X5
	VINSERTF128 $1, 16(DI)(R11*1), Y5, Y5
	VUNPCKLPD   Y5, Y4, Y8            // (ln c)lo
	VMULPD   Y6, Y11, Y11             // (1/c)·2^-k
	VMULPD   Y6, Y2, Y2
	VSUBPD   Y9, Y2, Y2               // zh·(1/c) − 1
	VMULPD   Y6, Y1, Y1
	VADDPD   Y1, Y2, Y2               // r
	VSUBPD   Y2, Y9, Y6
	VMULPD   Y6, Y11, Y11             // inv
	VMULPD   lgLn2Hi<>(SB), Y3, Y1
	VADDPD   Y7, Y1, Y1               // w
	VADDPD   Y2, Y1, Y4               // hi
	VSUBPD   Y4, Y1, Y1
	VADDPD   Y2, Y1, Y1               // lo
	VMULPD   Y2, Y2, Y5               // r2
	VMULPD   lgP1<>(SB), Y2, Y6
	VADDPD   lgP0<>(SB), Y6, Y6       // p01
	VMULPD   lgP3<>(SB), Y2, Y7
	VADDPD   lgP2<>(SB), Y7, Y7       // P2 + r·P3
	VMULPD   lgP4<>(SB), Y5, Y10
	VADDPD   Y10, Y7, Y7              // p24
	VMULPD   Y7, Y5, Y7
	VADDPD   Y7, Y6, Y6               // p
	VMULPD   lgLn2Lo<>(SB), Y3, Y3
	VADDPD   Y3, Y8, Y8               // (ln c)lo + kd·ln2Lo
	VADDPD   Y1, Y8, Y8               // … + lo
	VMULPD   Y11, Y12, Y12            // e·inv
	VADDPD   Y12, Y8, Y8              // tail
	VMULPD   Y6, Y5, Y5
	VADDPD   Y5, Y8, Y8               // tail + r2·p
	VADDPD   Y8, Y4, Y4               // hi + (tail + r2·p)
	VCMPPD   $13, l1PolyLo<>(SB), Y0, Y1 // u ≥ −2^-9
	VCMPPD   $1, l1PolyHi<>(SB), Y0, Y2  // u < 2^-8
	VPAND    Y2, Y1, Y1
	VBLENDVPD Y1, Y13, Y4, Y4         // the polynomial's lanes from Y13
	VMOVUPD  Y4, (DX)(BX*8)
	ADDQ     $4, BX
	JMP      log1ps2loop

log1ps2done:
	MOVQ BX, ret+48(FP)
	VZEROUPPER
	RET
