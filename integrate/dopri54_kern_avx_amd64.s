//go:build amd64 && !purego

// AVX2 kernels of the Dormand–Prince 5(4) trial step: the SSE2 kernels of
// dopri54_kern_amd64.s four components per instruction (VEX 256-bit) over
// the quads, then for the last one to three components a pair (VEX
// 128-bit) and a single one (VEX scalar) as needed. No FMA instruction
// anywhere (TestDP54KernNoFMA): every product is rounded before it is
// added, as in the Go loops of attemptSq, whose operations and grouping
// these repeat element by element; the error sum is added one term at a
// time in index order. The products h·a_ij are formed here (VMULSD, as
// float64(h*dpAij) in Go) and broadcast to the four lanes. Only VEX
// encodings are used (no legacy SSE after a 256-bit write), and every
// kernel ends with VZEROUPPER. Y15 (X15) and R14 are scratch: in ABI0 code
// they are not special, and the Go caller restores them after the call.
// Operands are in Go's order: VADDPD b, a, d is d = a + b, VDIVPD b, a, d
// is d = a / b, VMAXPD b, a, d is d = (a > b) ? a : b.

#include "textflag.h"
#include "go_asm.h"

// Loop skeleton: CX counts from 0 over the quads below R8 = n &^ 3; then
// (at rest) a pair when two or three components are left, and (at one) a
// single component when one is.
#define QUADS \
	XORQ CX, CX; \
	MOVQ BX, R8; \
	ANDQ $-4, R8

// The quads of a kernel that reads a vector F has just written run in two
// loops: plain 32-byte loads (LDFP) below R14 = max(n - 16, 0) &^ 3, and
// split ones (LDF4, see below) for the last 16 to 19 components. BX = n.
#define SPLITAT \
	MOVQ BX, R14; \
	SUBQ $16, R14; \
	JGE  splitat; \
	XORQ R14, R14; \
splitat: \
	ANDQ $-4, R14

// A vector F has just written with 8-byte stores (the newest k of each
// stage) is read 8 bytes at a time near its end (LDF4, LDF2, as LDF2 in
// the SSE2 kernels): each load is then forwarded from one store, where a
// 32-byte load across four 8-byte stores still on their way to the cache
// waits for all of them. Only F's last stores can still be on their way,
// so the quads before the last 16 components are read with plain 32-byte
// loads (LDFP). Measured on a Zen 3 with BenchmarkDP54Kern (fastest
// round, ns per step; split loads throughout / plain throughout / plain
// then split for the last 16): n = 8: 135 / 151 / 134; n = 13: 173 / 177
// / 171; n = 40: 478 / 451 / 455; n = 100: 1190 / 1137 / 1142; n = 1640:
// 21700 / 20750 / 20500 (the last 32 or 64 split: in between).
#define LDF4(base, y, x) \
	VMOVSD (base)(CX*8), x; \
	VMOVHPD 8(base)(CX*8), x, x; \
	VMOVSD 16(base)(CX*8), X15; \
	VMOVHPD 24(base)(CX*8), X15, X15; \
	VINSERTF128 $1, X15, y, y
#define LDFP(base, y, x) VMOVUPD (base)(CX*8), y
#define LDF2(base, y, x) \
	VMOVSD (base)(CX*8), x; \
	VMOVHPD 8(base)(CX*8), x, x
#define LDF1(base, y, x) VMOVSD (base)(CX*8), x

// The coefficient h·a at off(·dp54KernA) into the four lanes of y (x its
// low half); X15 holds h.
#define COEF(off, y, x) \
	VMULSD ·dp54KernA+off(SB), X15, x; \
	VBROADCASTSD x, y

// ys = y + h21·k1. SI y, DI k1, DX ys; h1 h21.
#define VSTAGE2(MUL, ADD, MOV, h1, a) \
	MUL (DI)(CX*8), h1, a; \
	ADD (SI)(CX*8), a, a; \
	MOV a, (DX)(CX*8)

TEXT ·dp54Stage2AVX(SB), NOSPLIT, $0-8
	MOVQ k+0(FP), AX
	VMOVSD dp54Kern_h(AX), X15
	MOVQ dp54Kern_y(AX), SI
	MOVQ dp54Kern_k1(AX), DI
	MOVQ dp54Kern_ys(AX), DX
	MOVQ dp54Kern_n(AX), BX
	COEF(0, Y0, X0)
	QUADS
	JZ rest
quad:
	VSTAGE2(VMULPD, VADDPD, VMOVUPD, Y0, Y1)
	ADDQ $4, CX
	CMPQ CX, R8
	JLT quad
rest:
	LEAQ 2(CX), R8
	CMPQ R8, BX
	JGT one
	VSTAGE2(VMULPD, VADDPD, VMOVUPD, X0, X1)
	MOVQ R8, CX
one:
	CMPQ CX, BX
	JGE done
	VSTAGE2(VMULSD, VADDSD, VMOVSD, X0, X1)
done:
	VZEROUPPER
	RET

// ys = (y + h31·k1) + h32·k2. SI y, DI k1, R9 k2, DX ys; h1, h2 h31, h32.
#define VSTAGE3(MUL, ADD, MOV, LDF, h1, h2, a, b, bl) \
	MUL (DI)(CX*8), h1, a; \
	ADD (SI)(CX*8), a, a; \
	LDF(R9, b, bl); \
	MUL b, h2, b; \
	ADD b, a, a; \
	MOV a, (DX)(CX*8)

TEXT ·dp54Stage3AVX(SB), NOSPLIT, $0-8
	MOVQ k+0(FP), AX
	VMOVSD dp54Kern_h(AX), X15
	MOVQ dp54Kern_y(AX), SI
	MOVQ dp54Kern_k1(AX), DI
	MOVQ dp54Kern_k2(AX), R9
	MOVQ dp54Kern_ys(AX), DX
	MOVQ dp54Kern_n(AX), BX
	COEF(8, Y0, X0)
	COEF(16, Y1, X1)
	QUADS
	JZ rest
	SPLITAT
plain:
	CMPQ CX, R14
	JGE quad
	VSTAGE3(VMULPD, VADDPD, VMOVUPD, LDFP, Y0, Y1, Y2, Y3, X3)
	ADDQ $4, CX
	JMP plain
quad:
	VSTAGE3(VMULPD, VADDPD, VMOVUPD, LDF4, Y0, Y1, Y2, Y3, X3)
	ADDQ $4, CX
	CMPQ CX, R8
	JLT quad
rest:
	LEAQ 2(CX), R8
	CMPQ R8, BX
	JGT one
	VSTAGE3(VMULPD, VADDPD, VMOVUPD, LDF2, X0, X1, X2, X3, X3)
	MOVQ R8, CX
one:
	CMPQ CX, BX
	JGE done
	VSTAGE3(VMULSD, VADDSD, VMOVSD, LDF1, X0, X1, X2, X3, X3)
done:
	VZEROUPPER
	RET

// ys = (y + (h41·k1 + h42·k2)) + h43·k3. SI y, DI k1, R9 k2, R10 k3, DX ys;
// h1..h3 h41..h43.
#define VSTAGE4(MUL, ADD, MOV, LDF, h1, h2, h3, a, b, bl) \
	MUL (DI)(CX*8), h1, a; \
	MUL (R9)(CX*8), h2, b; \
	ADD b, a, a; \
	ADD (SI)(CX*8), a, a; \
	LDF(R10, b, bl); \
	MUL b, h3, b; \
	ADD b, a, a; \
	MOV a, (DX)(CX*8)

TEXT ·dp54Stage4AVX(SB), NOSPLIT, $0-8
	MOVQ k+0(FP), AX
	VMOVSD dp54Kern_h(AX), X15
	MOVQ dp54Kern_y(AX), SI
	MOVQ dp54Kern_k1(AX), DI
	MOVQ dp54Kern_k2(AX), R9
	MOVQ dp54Kern_k3(AX), R10
	MOVQ dp54Kern_ys(AX), DX
	MOVQ dp54Kern_n(AX), BX
	COEF(24, Y0, X0)
	COEF(32, Y1, X1)
	COEF(40, Y2, X2)
	QUADS
	JZ rest
	SPLITAT
plain:
	CMPQ CX, R14
	JGE quad
	VSTAGE4(VMULPD, VADDPD, VMOVUPD, LDFP, Y0, Y1, Y2, Y3, Y4, X4)
	ADDQ $4, CX
	JMP plain
quad:
	VSTAGE4(VMULPD, VADDPD, VMOVUPD, LDF4, Y0, Y1, Y2, Y3, Y4, X4)
	ADDQ $4, CX
	CMPQ CX, R8
	JLT quad
rest:
	LEAQ 2(CX), R8
	CMPQ R8, BX
	JGT one
	VSTAGE4(VMULPD, VADDPD, VMOVUPD, LDF2, X0, X1, X2, X3, X4, X4)
	MOVQ R8, CX
one:
	CMPQ CX, BX
	JGE done
	VSTAGE4(VMULSD, VADDSD, VMOVSD, LDF1, X0, X1, X2, X3, X4, X4)
done:
	VZEROUPPER
	RET

// ys = (y + ((h51·k1 + h52·k2) + h53·k3)) + h54·k4. SI y, DI k1, R9 k2,
// R10 k3, R11 k4, DX ys; h1..h4 h51..h54.
#define VSTAGE5(MUL, ADD, MOV, LDF, h1, h2, h3, h4, a, b, bl) \
	MUL (DI)(CX*8), h1, a; \
	MUL (R9)(CX*8), h2, b; \
	ADD b, a, a; \
	MUL (R10)(CX*8), h3, b; \
	ADD b, a, a; \
	ADD (SI)(CX*8), a, a; \
	LDF(R11, b, bl); \
	MUL b, h4, b; \
	ADD b, a, a; \
	MOV a, (DX)(CX*8)

TEXT ·dp54Stage5AVX(SB), NOSPLIT, $0-8
	MOVQ k+0(FP), AX
	VMOVSD dp54Kern_h(AX), X15
	MOVQ dp54Kern_y(AX), SI
	MOVQ dp54Kern_k1(AX), DI
	MOVQ dp54Kern_k2(AX), R9
	MOVQ dp54Kern_k3(AX), R10
	MOVQ dp54Kern_k4(AX), R11
	MOVQ dp54Kern_ys(AX), DX
	MOVQ dp54Kern_n(AX), BX
	COEF(48, Y0, X0)
	COEF(56, Y1, X1)
	COEF(64, Y2, X2)
	COEF(72, Y3, X3)
	QUADS
	JZ rest
	SPLITAT
plain:
	CMPQ CX, R14
	JGE quad
	VSTAGE5(VMULPD, VADDPD, VMOVUPD, LDFP, Y0, Y1, Y2, Y3, Y4, Y5, X5)
	ADDQ $4, CX
	JMP plain
quad:
	VSTAGE5(VMULPD, VADDPD, VMOVUPD, LDF4, Y0, Y1, Y2, Y3, Y4, Y5, X5)
	ADDQ $4, CX
	CMPQ CX, R8
	JLT quad
rest:
	LEAQ 2(CX), R8
	CMPQ R8, BX
	JGT one
	VSTAGE5(VMULPD, VADDPD, VMOVUPD, LDF2, X0, X1, X2, X3, X4, X5, X5)
	MOVQ R8, CX
one:
	CMPQ CX, BX
	JGE done
	VSTAGE5(VMULSD, VADDSD, VMOVSD, LDF1, X0, X1, X2, X3, X4, X5, X5)
done:
	VZEROUPPER
	RET

// ysti = (y + ((h61·k1 + h62·k2) + (h63·k3 + h64·k4))) + h65·k5. SI y,
// DI k1, R9 k2, R10 k3, R11 k4, R12 k5, DX ysti; h1..h5 h61..h65.
#define VSTAGE6(MUL, ADD, MOV, LDF, h1, h2, h3, h4, h5, a, b, bl, c) \
	MUL (DI)(CX*8), h1, a; \
	MUL (R9)(CX*8), h2, b; \
	ADD b, a, a; \
	MUL (R10)(CX*8), h3, b; \
	MUL (R11)(CX*8), h4, c; \
	ADD c, b, b; \
	ADD b, a, a; \
	ADD (SI)(CX*8), a, a; \
	LDF(R12, b, bl); \
	MUL b, h5, b; \
	ADD b, a, a; \
	MOV a, (DX)(CX*8)

TEXT ·dp54Stage6AVX(SB), NOSPLIT, $0-8
	MOVQ k+0(FP), AX
	VMOVSD dp54Kern_h(AX), X15
	MOVQ dp54Kern_y(AX), SI
	MOVQ dp54Kern_k1(AX), DI
	MOVQ dp54Kern_k2(AX), R9
	MOVQ dp54Kern_k3(AX), R10
	MOVQ dp54Kern_k4(AX), R11
	MOVQ dp54Kern_k5(AX), R12
	MOVQ dp54Kern_ysti(AX), DX
	MOVQ dp54Kern_n(AX), BX
	COEF(80, Y0, X0)
	COEF(88, Y1, X1)
	COEF(96, Y2, X2)
	COEF(104, Y3, X3)
	COEF(112, Y4, X4)
	QUADS
	JZ rest
	SPLITAT
plain:
	CMPQ CX, R14
	JGE quad
	VSTAGE6(VMULPD, VADDPD, VMOVUPD, LDFP, Y0, Y1, Y2, Y3, Y4, Y5, Y6, X6, Y7)
	ADDQ $4, CX
	JMP plain
quad:
	VSTAGE6(VMULPD, VADDPD, VMOVUPD, LDF4, Y0, Y1, Y2, Y3, Y4, Y5, Y6, X6, Y7)
	ADDQ $4, CX
	CMPQ CX, R8
	JLT quad
rest:
	LEAQ 2(CX), R8
	CMPQ R8, BX
	JGT one
	VSTAGE6(VMULPD, VADDPD, VMOVUPD, LDF2, X0, X1, X2, X3, X4, X5, X6, X6, X7)
	MOVQ R8, CX
one:
	CMPQ CX, BX
	JGE done
	VSTAGE6(VMULSD, VADDSD, VMOVSD, LDF1, X0, X1, X2, X3, X4, X5, X6, X6, X7)
done:
	VZEROUPPER
	RET

// The last loop before F(t+h, y1): y1, pw, ew and Σ (y1_i - y1_i).
// SI y, DI k1, R10 k3, R11 k4, R12 k5, R13 k6, DX y1, R9 rtol, AX atol,
// BX pw, R8 ew; h1, h3..h6 h71, h73..h76; hs h/√n; sum the sum of
// y1_i - y1_i; the error weights e1, e3..e7 are read from ·dp54KernE4
// (four copies each), the mask that clears the sign bit from
// ·dp54KernAbs4.
//
// yn = (y + ((h71·k1 + h73·k3) + (h74·k4 + h75·k5))) + h76·k6,
// wt = hs/(atol + rtol·max(|y|, |yn|)), pe = ((e1·k1 + e3·k3) + (e4·k4 +
// e5·k5)) + e6·k6, pw = pe·wt, ew = e7·wt. MAX keeps the Go code's
// "if |y1| > |y| { ay = |y1| }" (and the SSE2 kernel's operand order):
// VMAXPD returns its first Intel source (|yn|) when that is greater and
// its second (|y|) otherwise, NaNs included.
//
// The sum of y1_i - y1_i is kept lane by lane and its lanes added at the
// end, not term by term in index order as in Go, with the same result:
// each term is +0 (for finite y1_i, x - x is +0 in round-to-nearest) or
// NaN (for an infinite or NaN y1_i), never -0 or anything else. A sum of
// +0 terms from +0 is +0 in any grouping, and a sum with a NaN term is NaN
// in any grouping, so Go's +0-or-NaN comes out either way (NaN payloads
// aside, which the Go loops do not define either).
#define VSTAGE7(MOV, ADD, SUB, MUL, DIV, MAX, LDF, h1, h3, h4, h5, h6, hs, sum, k1, k3, k4, k5, k6, k6l, a, b, c) \
	MOV (DI)(CX*8), k1; \
	MOV (R10)(CX*8), k3; \
	MUL k1, h1, a; \
	MUL k3, h3, b; \
	ADD b, a, a; \
	MOV (R11)(CX*8), k4; \
	MOV (R12)(CX*8), k5; \
	MUL k4, h4, b; \
	MUL k5, h5, c; \
	ADD c, b, b; \
	ADD b, a, a; \
	ADD (SI)(CX*8), a, a; \
	LDF(R13, k6, k6l); \
	MUL k6, h6, b; \
	ADD b, a, a; \
	MOV a, (DX)(CX*8); \
	SUB a, a, b; \
	ADD b, sum, sum; \
	VANDPD ·dp54KernAbs4(SB), a, a; \
	MOV (SI)(CX*8), b; \
	VANDPD ·dp54KernAbs4(SB), b, b; \
	MAX b, a, a; \
	MUL (R9)(CX*8), a, a; \
	ADD (AX)(CX*8), a, a; \
	DIV a, hs, a; \
	MUL ·dp54KernE4+0(SB), k1, k1; \
	MUL ·dp54KernE4+32(SB), k3, k3; \
	ADD k3, k1, k1; \
	MUL ·dp54KernE4+64(SB), k4, k4; \
	MUL ·dp54KernE4+96(SB), k5, k5; \
	ADD k5, k4, k4; \
	ADD k4, k1, k1; \
	MUL ·dp54KernE4+128(SB), k6, k6; \
	ADD k6, k1, k1; \
	MUL a, k1, k1; \
	MOV k1, (BX)(CX*8); \
	MUL ·dp54KernE4+160(SB), a, a; \
	MOV a, (R8)(CX*8)

// func dp54Stage7AVX(k *dp54Kern) float64
TEXT ·dp54Stage7AVX(SB), NOSPLIT, $0-16
	MOVQ k+0(FP), AX
	VMOVSD dp54Kern_h(AX), X15
	COEF(120, Y0, X0)
	COEF(128, Y1, X1)
	COEF(136, Y2, X2)
	COEF(144, Y3, X3)
	COEF(152, Y4, X4)
	VBROADCASTSD dp54Kern_hs(AX), Y5
	VXORPD Y6, Y6, Y6
	MOVQ dp54Kern_n(AX), BX
	SPLITAT
	MOVQ dp54Kern_y(AX), SI
	MOVQ dp54Kern_k1(AX), DI
	MOVQ dp54Kern_k3(AX), R10
	MOVQ dp54Kern_k4(AX), R11
	MOVQ dp54Kern_k5(AX), R12
	MOVQ dp54Kern_k6(AX), R13
	MOVQ dp54Kern_y1(AX), DX
	MOVQ dp54Kern_rtol(AX), R9
	MOVQ dp54Kern_pw(AX), BX
	MOVQ dp54Kern_ew(AX), R8
	MOVQ dp54Kern_atol(AX), AX
	XORQ CX, CX
plain:
	CMPQ CX, R14
	JGE split
	VSTAGE7(VMOVUPD, VADDPD, VSUBPD, VMULPD, VDIVPD, VMAXPD, LDFP, Y0, Y1, Y2, Y3, Y4, Y5, Y6, Y7, Y8, Y9, Y10, Y11, X11, Y12, Y13, Y14)
	ADDQ $4, CX
	JMP plain
split:
	// No register is free for both bounds: R14 becomes n &^ 3 now.
	MOVQ k+0(FP), R14
	MOVQ dp54Kern_n(R14), R14
	ANDQ $-4, R14
	CMPQ CX, R14
	JGE fold
quad:
	VSTAGE7(VMOVUPD, VADDPD, VSUBPD, VMULPD, VDIVPD, VMAXPD, LDF4, Y0, Y1, Y2, Y3, Y4, Y5, Y6, Y7, Y8, Y9, Y10, Y11, X11, Y12, Y13, Y14)
	ADDQ $4, CX
	CMPQ CX, R14
	JLT quad
fold:
	// The sum's four lanes into two (X6), then, after a pair, into one
	// (the comment above VSTAGE7 says why any grouping gives the Go
	// loops' result). R14: the components left, 0 to 3.
	VEXTRACTF128 $1, Y6, X7
	VADDPD X7, X6, X6
	MOVQ k+0(FP), R14
	MOVQ dp54Kern_n(R14), R14
	SUBQ CX, R14
	CMPQ R14, $2
	JLT one
	VSTAGE7(VMOVUPD, VADDPD, VSUBPD, VMULPD, VDIVPD, VMAXPD, LDF2, X0, X1, X2, X3, X4, X5, X6, X7, X8, X9, X10, X11, X11, X12, X13, X14)
	ADDQ $2, CX
	SUBQ $2, R14
one:
	VPERMILPD $1, X6, X7
	VADDSD X7, X6, X6
	TESTQ R14, R14
	JZ done
	VSTAGE7(VMOVSD, VADDSD, VSUBSD, VMULSD, VDIVSD, VMAXSD, LDF1, X0, X1, X2, X3, X4, X5, X6, X7, X8, X9, X10, X11, X11, X12, X13, X14)
done:
	VMOVSD X6, ret+8(FP)
	VZEROUPPER
	RET

// r² = (pw + ew·k7)², into a (al its low half). SI pw, DI ew, DX k7.
#define VERRSQ(MUL, ADD, LDF, a, al) \
	LDF(DX, a, al); \
	MUL (DI)(CX*8), a, a; \
	ADD (SI)(CX*8), a, a; \
	MUL a, a, a

// X0 += the four lanes of Y1 (r² of four components), one at a time in
// index order.
#define ADDLANES \
	VADDSD X1, X0, X0; \
	VPERMILPD $1, X1, X2; \
	VADDSD X2, X0, X0; \
	VEXTRACTF128 $1, Y1, X2; \
	VADDSD X2, X0, X0; \
	VPERMILPD $1, X2, X2; \
	VADDSD X2, X0, X0

// func dp54ErrSumAVX(k *dp54Kern, sum float64) float64
// sum + Σ r_i², one term at a time in index order: the four lanes of a quad
// are taken out in order and added to X0 one by one.
TEXT ·dp54ErrSumAVX(SB), NOSPLIT, $0-24
	MOVQ k+0(FP), AX
	MOVQ dp54Kern_pw(AX), SI
	MOVQ dp54Kern_ew(AX), DI
	MOVQ dp54Kern_k7(AX), DX
	MOVQ dp54Kern_n(AX), BX
	VMOVSD sum+8(FP), X0
	QUADS
	JZ rest
	SPLITAT
plain:
	CMPQ CX, R14
	JGE quad
	VERRSQ(VMULPD, VADDPD, LDFP, Y1, X1)
	ADDLANES
	ADDQ $4, CX
	JMP plain
quad:
	VERRSQ(VMULPD, VADDPD, LDF4, Y1, X1)
	ADDLANES
	ADDQ $4, CX
	CMPQ CX, R8
	JLT quad
rest:
	LEAQ 2(CX), R8
	CMPQ R8, BX
	JGT one
	VERRSQ(VMULPD, VADDPD, LDF2, X1, X1)
	VADDSD X1, X0, X0
	VPERMILPD $1, X1, X2
	VADDSD X2, X0, X0
	MOVQ R8, CX
one:
	CMPQ CX, BX
	JGE done
	VERRSQ(VMULSD, VADDSD, LDF1, X1, X1)
	VADDSD X1, X0, X0
done:
	VMOVSD X0, ret+16(FP)
	VZEROUPPER
	RET
