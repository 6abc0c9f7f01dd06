//go:build amd64 && !purego

// SSE2 kernels of the Dormand–Prince 5(4) trial step (dopri54_kern_amd64.go
// says what each computes). Every body exists twice from one macro: packed
// (two components, MOVUPD/ADDPD/...) over the pairs, scalar (MOVSD/ADDSD/...)
// for an odd last component. The operations and their grouping are those
// of the Go loops in dopri54.go's attemptSq, element by element; sums are
// added one term at a time in index order. The products h·a_ij are formed
// here (MULSD, as float64(h*dpAij) in Go) and broadcast to both lanes.
// X15 and R14 are scratch: in ABI0 code they are not special, and the Go
// caller restores them after the call.

#include "textflag.h"
#include "go_asm.h"

// Loop skeleton: CX counts from 0 over the pairs below R8 = n &^ 1, then one
// scalar step when n is odd (BX = n).
#define PAIRS \
	XORQ CX, CX; \
	MOVQ BX, R8; \
	ANDQ $-2, R8

// A vector F has just written (with 8-byte stores) is read 8 bytes at a time
// (MOVSD, MOVHPD), so that each load is forwarded from one store; a 16-byte
// load across two pending 8-byte stores waits for both to reach the cache.
#define LDF2(base, reg) MOVSD (base)(CX*8), reg; MOVHPD 8(base)(CX*8), reg
#define LDF1(base, reg) MOVSD (base)(CX*8), reg

// ys = y + h21·k1. SI y, DI k1, DX ys; X0 h21.
#define STAGE2(MOV, ADD, MUL) \
	MOV (DI)(CX*8), X1; MUL X0, X1; \
	MOV (SI)(CX*8), X2; ADD X1, X2; \
	MOV X2, (DX)(CX*8)

TEXT ·dp54Stage2(SB), NOSPLIT, $0-8
	MOVQ k+0(FP), AX
	MOVSD dp54Kern_h(AX), X15
	MOVQ dp54Kern_y(AX), SI
	MOVQ dp54Kern_k1(AX), DI
	MOVQ dp54Kern_ys(AX), DX
	MOVQ dp54Kern_n(AX), BX
	MOVSD ·dp54KernA+0(SB), X0
	MULSD X15, X0
	UNPCKLPD X0, X0
	PAIRS
	JZ tail
pair:
	STAGE2(MOVUPD, ADDPD, MULPD)
	ADDQ $2, CX
	CMPQ CX, R8
	JLT pair
tail:
	CMPQ CX, BX
	JGE done
	STAGE2(MOVSD, ADDSD, MULSD)
done:
	RET

// ys = (y + h31·k1) + h32·k2. SI y, DI k1, R9 k2, DX ys; X0 h31, X1 h32.
#define STAGE3(MOV, LDF, ADD, MUL) \
	MOV (DI)(CX*8), X2; MUL X0, X2; \
	MOV (SI)(CX*8), X3; ADD X2, X3; \
	LDF(R9, X2); MUL X1, X2; \
	ADD X2, X3; \
	MOV X3, (DX)(CX*8)

TEXT ·dp54Stage3(SB), NOSPLIT, $0-8
	MOVQ k+0(FP), AX
	MOVSD dp54Kern_h(AX), X15
	MOVQ dp54Kern_y(AX), SI
	MOVQ dp54Kern_k1(AX), DI
	MOVQ dp54Kern_k2(AX), R9
	MOVQ dp54Kern_ys(AX), DX
	MOVQ dp54Kern_n(AX), BX
	MOVSD ·dp54KernA+8(SB), X0
	MULSD X15, X0
	UNPCKLPD X0, X0
	MOVSD ·dp54KernA+16(SB), X1
	MULSD X15, X1
	UNPCKLPD X1, X1
	PAIRS
	JZ tail
pair:
	STAGE3(MOVUPD, LDF2, ADDPD, MULPD)
	ADDQ $2, CX
	CMPQ CX, R8
	JLT pair
tail:
	CMPQ CX, BX
	JGE done
	STAGE3(MOVSD, LDF1, ADDSD, MULSD)
done:
	RET

// ys = (y + (h41·k1 + h42·k2)) + h43·k3. SI y, DI k1, R9 k2, R10 k3, DX ys;
// X0..X2 h41..h43.
#define STAGE4(MOV, LDF, ADD, MUL) \
	MOV (DI)(CX*8), X3; MUL X0, X3; \
	MOV (R9)(CX*8), X4; MUL X1, X4; \
	ADD X4, X3; \
	MOV (SI)(CX*8), X4; ADD X3, X4; \
	LDF(R10, X3); MUL X2, X3; \
	ADD X3, X4; \
	MOV X4, (DX)(CX*8)

TEXT ·dp54Stage4(SB), NOSPLIT, $0-8
	MOVQ k+0(FP), AX
	MOVSD dp54Kern_h(AX), X15
	MOVQ dp54Kern_y(AX), SI
	MOVQ dp54Kern_k1(AX), DI
	MOVQ dp54Kern_k2(AX), R9
	MOVQ dp54Kern_k3(AX), R10
	MOVQ dp54Kern_ys(AX), DX
	MOVQ dp54Kern_n(AX), BX
	MOVSD ·dp54KernA+24(SB), X0
	MULSD X15, X0
	UNPCKLPD X0, X0
	MOVSD ·dp54KernA+32(SB), X1
	MULSD X15, X1
	UNPCKLPD X1, X1
	MOVSD ·dp54KernA+40(SB), X2
	MULSD X15, X2
	UNPCKLPD X2, X2
	PAIRS
	JZ tail
pair:
	STAGE4(MOVUPD, LDF2, ADDPD, MULPD)
	ADDQ $2, CX
	CMPQ CX, R8
	JLT pair
tail:
	CMPQ CX, BX
	JGE done
	STAGE4(MOVSD, LDF1, ADDSD, MULSD)
done:
	RET

// ys = (y + ((h51·k1 + h52·k2) + h53·k3)) + h54·k4. SI y, DI k1, R9 k2,
// R10 k3, R11 k4, DX ys; X0..X3 h51..h54.
#define STAGE5(MOV, LDF, ADD, MUL) \
	MOV (DI)(CX*8), X4; MUL X0, X4; \
	MOV (R9)(CX*8), X5; MUL X1, X5; \
	ADD X5, X4; \
	MOV (R10)(CX*8), X5; MUL X2, X5; \
	ADD X5, X4; \
	MOV (SI)(CX*8), X5; ADD X4, X5; \
	LDF(R11, X4); MUL X3, X4; \
	ADD X4, X5; \
	MOV X5, (DX)(CX*8)

TEXT ·dp54Stage5(SB), NOSPLIT, $0-8
	MOVQ k+0(FP), AX
	MOVSD dp54Kern_h(AX), X15
	MOVQ dp54Kern_y(AX), SI
	MOVQ dp54Kern_k1(AX), DI
	MOVQ dp54Kern_k2(AX), R9
	MOVQ dp54Kern_k3(AX), R10
	MOVQ dp54Kern_k4(AX), R11
	MOVQ dp54Kern_ys(AX), DX
	MOVQ dp54Kern_n(AX), BX
	MOVSD ·dp54KernA+48(SB), X0
	MULSD X15, X0
	UNPCKLPD X0, X0
	MOVSD ·dp54KernA+56(SB), X1
	MULSD X15, X1
	UNPCKLPD X1, X1
	MOVSD ·dp54KernA+64(SB), X2
	MULSD X15, X2
	UNPCKLPD X2, X2
	MOVSD ·dp54KernA+72(SB), X3
	MULSD X15, X3
	UNPCKLPD X3, X3
	PAIRS
	JZ tail
pair:
	STAGE5(MOVUPD, LDF2, ADDPD, MULPD)
	ADDQ $2, CX
	CMPQ CX, R8
	JLT pair
tail:
	CMPQ CX, BX
	JGE done
	STAGE5(MOVSD, LDF1, ADDSD, MULSD)
done:
	RET

// ysti = (y + ((h61·k1 + h62·k2) + (h63·k3 + h64·k4))) + h65·k5. SI y,
// DI k1, R9 k2, R10 k3, R11 k4, R12 k5, DX ysti; X0..X4 h61..h65.
#define STAGE6(MOV, LDF, ADD, MUL) \
	MOV (DI)(CX*8), X5; MUL X0, X5; \
	MOV (R9)(CX*8), X6; MUL X1, X6; \
	ADD X6, X5; \
	MOV (R10)(CX*8), X6; MUL X2, X6; \
	MOV (R11)(CX*8), X7; MUL X3, X7; \
	ADD X7, X6; \
	ADD X6, X5; \
	MOV (SI)(CX*8), X6; ADD X5, X6; \
	LDF(R12, X5); MUL X4, X5; \
	ADD X5, X6; \
	MOV X6, (DX)(CX*8)

TEXT ·dp54Stage6(SB), NOSPLIT, $0-8
	MOVQ k+0(FP), AX
	MOVSD dp54Kern_h(AX), X15
	MOVQ dp54Kern_y(AX), SI
	MOVQ dp54Kern_k1(AX), DI
	MOVQ dp54Kern_k2(AX), R9
	MOVQ dp54Kern_k3(AX), R10
	MOVQ dp54Kern_k4(AX), R11
	MOVQ dp54Kern_k5(AX), R12
	MOVQ dp54Kern_ysti(AX), DX
	MOVQ dp54Kern_n(AX), BX
	MOVSD ·dp54KernA+80(SB), X0
	MULSD X15, X0
	UNPCKLPD X0, X0
	MOVSD ·dp54KernA+88(SB), X1
	MULSD X15, X1
	UNPCKLPD X1, X1
	MOVSD ·dp54KernA+96(SB), X2
	MULSD X15, X2
	UNPCKLPD X2, X2
	MOVSD ·dp54KernA+104(SB), X3
	MULSD X15, X3
	UNPCKLPD X3, X3
	MOVSD ·dp54KernA+112(SB), X4
	MULSD X15, X4
	UNPCKLPD X4, X4
	PAIRS
	JZ tail
pair:
	STAGE6(MOVUPD, LDF2, ADDPD, MULPD)
	ADDQ $2, CX
	CMPQ CX, R8
	JLT pair
tail:
	CMPQ CX, BX
	JGE done
	STAGE6(MOVSD, LDF1, ADDSD, MULSD)
done:
	RET

// The last loop before F(t+h, y1), in two halves around the sum of
// y1_i - y1_i. That sum is kept lane by lane (X11) and its two lanes added
// after the pairs, not term by term in index order as in Go, with the same
// result: each term is +0 (for finite y1_i, x - x is +0 in
// round-to-nearest) or NaN (for an infinite or NaN y1_i), never -0 or
// anything else. A sum of +0 terms from +0 is +0 in any grouping, and a
// sum with a NaN term is NaN in any grouping, so Go's +0-or-NaN comes out
// either way (NaN payloads aside, which the Go loops do not define either).
// SI y, DI k1, R10 k3, R11 k4, R12 k5, R13 k6, DX y1, R9 rtol, AX atol,
// BX pw, R8 ew; X0..X4 h71, h73, h74, h75, h76; X5 hs; X6..X10 e1, e3, e4,
// e5, e6; X11 the sum. STAGE7A leaves y1 in X13 and y1 - y1 in X12.
#define STAGE7A(MOV, LDF, ADD, SUB, MUL) \
	MOV (DI)(CX*8), X12; MUL X0, X12; \
	MOV (R10)(CX*8), X13; MUL X1, X13; \
	ADD X13, X12; \
	MOV (R11)(CX*8), X13; MUL X2, X13; \
	MOV (R12)(CX*8), X14; MUL X3, X14; \
	ADD X14, X13; \
	ADD X13, X12; \
	MOV (SI)(CX*8), X13; ADD X12, X13; \
	LDF(R13, X12); MUL X4, X12; \
	ADD X12, X13; \
	MOV X13, (DX)(CX*8); \
	MOVAPD X13, X12; SUB X13, X12

// wt = hs/(atol + rtol·max(|y|, |y1|)), pe = ((e1·k1 + e3·k3) + (e4·k4 +
// e5·k5)) + e6·k6, pw = pe·wt, ew = e7·wt. MAX keeps the Go code's
// "if |y1| > |y| { ay = |y1| }": MAXPD returns its destination when that is
// greater and its source otherwise (NaNs included).
#define STAGE7B(MOV, LDF, ADD, MUL, DIV, MAX) \
	MOVUPD ·dp54KernAbs(SB), X14; \
	ANDPD X14, X13; \
	MOV (SI)(CX*8), X12; ANDPD X14, X12; \
	MAX X12, X13; \
	MOV (R9)(CX*8), X12; MUL X13, X12; \
	MOV (AX)(CX*8), X13; ADD X12, X13; \
	MOVAPD X5, X12; DIV X13, X12; \
	MOV (DI)(CX*8), X13; MUL X6, X13; \
	MOV (R10)(CX*8), X14; MUL X7, X14; \
	ADD X14, X13; \
	MOV (R11)(CX*8), X14; MUL X8, X14; \
	MOV (R12)(CX*8), X15; MUL X9, X15; \
	ADD X15, X14; \
	ADD X14, X13; \
	LDF(R13, X14); MUL X10, X14; \
	ADD X14, X13; \
	MUL X12, X13; \
	MOV X13, (BX)(CX*8); \
	MOVUPD ·dp54KernE7(SB), X14; MUL X12, X14; \
	MOV X14, (R8)(CX*8)

// func dp54Stage7(k *dp54Kern) float64
TEXT ·dp54Stage7(SB), NOSPLIT, $0-16
	MOVQ k+0(FP), AX
	MOVSD dp54Kern_h(AX), X15
	MOVSD ·dp54KernA+120(SB), X0
	MULSD X15, X0
	UNPCKLPD X0, X0
	MOVSD ·dp54KernA+128(SB), X1
	MULSD X15, X1
	UNPCKLPD X1, X1
	MOVSD ·dp54KernA+136(SB), X2
	MULSD X15, X2
	UNPCKLPD X2, X2
	MOVSD ·dp54KernA+144(SB), X3
	MULSD X15, X3
	UNPCKLPD X3, X3
	MOVSD ·dp54KernA+152(SB), X4
	MULSD X15, X4
	UNPCKLPD X4, X4
	MOVSD dp54Kern_hs(AX), X5
	UNPCKLPD X5, X5
	MOVSD ·dp54KernE+0(SB), X6
	UNPCKLPD X6, X6
	MOVSD ·dp54KernE+8(SB), X7
	UNPCKLPD X7, X7
	MOVSD ·dp54KernE+16(SB), X8
	UNPCKLPD X8, X8
	MOVSD ·dp54KernE+24(SB), X9
	UNPCKLPD X9, X9
	MOVSD ·dp54KernE+32(SB), X10
	UNPCKLPD X10, X10
	XORPS X11, X11
	MOVQ dp54Kern_n(AX), R14
	ANDQ $-2, R14
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
	TESTQ R14, R14
	JZ tail
pair:
	STAGE7A(MOVUPD, LDF2, ADDPD, SUBPD, MULPD)
	ADDPD X12, X11
	STAGE7B(MOVUPD, LDF2, ADDPD, MULPD, DIVPD, MAXPD)
	ADDQ $2, CX
	CMPQ CX, R14
	JLT pair
tail:
	// The sum's two lanes into one (the comment above STAGE7A says why
	// any grouping gives the Go loops' result).
	MOVAPD X11, X12
	UNPCKHPD X12, X12
	ADDSD X12, X11
	MOVQ k+0(FP), R14
	CMPQ CX, dp54Kern_n(R14)
	JGE done
	STAGE7A(MOVSD, LDF1, ADDSD, SUBSD, MULSD)
	ADDSD X12, X11
	STAGE7B(MOVSD, LDF1, ADDSD, MULSD, DIVSD, MAXSD)
done:
	MOVSD X11, ret+8(FP)
	RET

// sum + Σ (pw_i + ew_i·k7_i)², one term at a time. SI pw, DI ew, DX k7;
// X0 the sum.
#define ERRSQ(MOV, LDF, ADD, MUL) \
	MOV (DI)(CX*8), X1; LDF(DX, X2); MUL X2, X1; \
	MOV (SI)(CX*8), X2; ADD X1, X2; \
	MUL X2, X2

// func dp54ErrSum(k *dp54Kern, sum float64) float64
TEXT ·dp54ErrSum(SB), NOSPLIT, $0-24
	MOVQ k+0(FP), AX
	MOVQ dp54Kern_pw(AX), SI
	MOVQ dp54Kern_ew(AX), DI
	MOVQ dp54Kern_k7(AX), DX
	MOVQ dp54Kern_n(AX), BX
	MOVSD sum+8(FP), X0
	PAIRS
	JZ tail
pair:
	ERRSQ(MOVUPD, LDF2, ADDPD, MULPD)
	ADDSD X2, X0
	UNPCKHPD X2, X2
	ADDSD X2, X0
	ADDQ $2, CX
	CMPQ CX, R8
	JLT pair
tail:
	CMPQ CX, BX
	JGE done
	ERRSQ(MOVSD, LDF1, ADDSD, MULSD)
	ADDSD X2, X0
done:
	MOVSD X0, ret+16(FP)
	RET
