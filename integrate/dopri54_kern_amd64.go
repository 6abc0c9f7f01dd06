//go:build amd64 && !purego

package integrate

import (
	"math"

	"github.com/plumbdyn/plumb/internal/simd"
)

// This file and dopri54_kern_amd64.s are the SSE2 form of the element-wise
// loops of dp54Work.attemptSq: the stage arguments Y_2..Y_6, the new state
// y1 with the error weights, and the error sum, two components per
// instruction. SSE2 is part of the amd64 baseline (GOAMD64=v1): no FMA, no
// AVX. Each component goes through the same IEEE operations, in the same
// order and grouping, as the Go loops of attemptSq, and Σ r_i² is added
// one term at a time in index order (Σ (y1_i - y1_i), whose terms are +0
// or NaN, lane by lane: the same +0 or NaN in any grouping), so the
// results have the same bits as the Go loops (NaN payloads aside,
// which Go itself leaves to the compiler's choice of operands): the Go
// loops define the bits, and TestDP54KernBits and FuzzDP54KernBits hold the
// two together. Every other architecture, and builds with the purego tag,
// run the Go loops (dopri54_kern_other.go).

// dp54KernMin is the smallest dimension that takes the vector kernels.
// Below it the seven calls into assembly cost more than two-wide
// arithmetic saves (measured with BenchmarkDP54Kern). A variable so that
// tests can choose either path.
var dp54KernMin = 8

// dp54Scheme returns the scheme DormandPrince54 runs on w: from dimension
// dp54KernMin on, w with its trial step through the vector kernels. Below,
// w itself, so that small systems run attemptSq exactly as elsewhere.
// With simd.AVX2 set the kernels are the AVX2 ones (dp54AVX, from
// dimension dp54KernMinAVX2 on), otherwise the SSE2 ones.
func dp54Scheme(w *dp54Work, n int) scheme {
	avx, least := simd.AVX2, dp54KernMin
	if avx {
		least = dp54KernMinAVX2
	}
	if n < least || n < 1 {
		return w
	}
	var a *dp54AVX
	v := &dp54Vec{dp54Work: w}
	if avx {
		a = &dp54AVX{dp54Vec{dp54Work: w}}
		v = &a.dp54Vec
	}
	k := &v.kern
	k.k2, k.k3, k.k4, k.k5, k.k6 = &w.k2[0], &w.k3[0], &w.k4[0], &w.k5[0], &w.k6[0]
	k.ys, k.ysti, k.pw, k.ew = &w.ys[0], &w.ysti[0], &w.pw[0], &w.ew[0]
	k.n = n
	if avx {
		return a
	}
	return v
}

// dp54Vec is a dp54Work whose trial step runs through the vector kernels;
// every other method is dp54Work's.
type dp54Vec struct {
	*dp54Work
	kern dp54Kern
}

// dp54Kern is what the kernels read: one pointer to it per call, rather
// than a dozen slices. The pointers are the first elements of slices of
// length n. The kernels form the products h·a_ij of attemptSq themselves
// (from dp54KernA), so that a call sets only the pointers that change and h.
// The assembly finds the fields by the offsets the compiler writes into
// go_asm.h.
type dp54Kern struct {
	y, k1, k2, k3, k4, k5, k6, k7 *float64
	ys, ysti, y1, rtol, atol      *float64
	pw, ew                        *float64
	n                             int
	h                             float64
	hs                            float64 // h/√n
}

// The kernels. Each reads and writes only the first n elements behind the
// pointers of k, keeps no pointer after it returns, and does not allocate.

// ys = y + h21·k1.
//
//go:noescape
func dp54Stage2(k *dp54Kern)

// ys = (y + h31·k1) + h32·k2.
//
//go:noescape
func dp54Stage3(k *dp54Kern)

// ys = (y + (h41·k1 + h42·k2)) + h43·k3.
//
//go:noescape
func dp54Stage4(k *dp54Kern)

// ys = (y + ((h51·k1 + h52·k2) + h53·k3)) + h54·k4.
//
//go:noescape
func dp54Stage5(k *dp54Kern)

// ysti = (y + ((h61·k1 + h62·k2) + (h63·k3 + h64·k4))) + h65·k5.
//
//go:noescape
func dp54Stage6(k *dp54Kern)

// y1, pw and ew as in attemptSq's last loop before F(t+h, y1); returns
// Σ (y1_i - y1_i) from 0 (+0, or NaN when a y1_i is infinite or NaN).
//
//go:noescape
func dp54Stage7(k *dp54Kern) float64

// Returns sum + Σ r_i², r_i = pw_i + ew_i·k7_i, added in index order.
//
//go:noescape
func dp54ErrSum(k *dp54Kern, sum float64) float64

func (v *dp54Vec) attempt(t, h float64, y, k1, y1, k7, rtol, atol []float64) (float64, int) {
	e2, ev := v.attemptSq(t, h, y, k1, y1, k7, rtol, atol)
	return math.Sqrt(e2), ev
}

// attemptSq is dp54Work.attemptSq through the vector kernels: the same
// trial step, the same evaluations of F, the same bits.
func (v *dp54Vec) attemptSq(t, h float64, y, k1, y1, k7, rtol, atol []float64) (float64, int) {
	w, k := v.dp54Work, v.bind(h, y, k1, y1, k7, rtol, atol)
	ys, ysti := w.ys, w.ysti
	dp54Stage2(k)
	w.f(t+float64(dpC2*h), ys, w.k2)
	dp54Stage3(k)
	w.f(t+float64(dpC3*h), ys, w.k3)
	dp54Stage4(k)
	w.f(t+float64(dpC4*h), ys, w.k4)
	dp54Stage5(k)
	w.f(t+float64(dpC5*h), ys, w.k5)
	dp54Stage6(k)
	th := t + h
	w.f(th, ysti, w.k6)
	sum := dp54Stage7(k)
	w.f(th, y1[:k.n], k7[:k.n])
	return dp54ErrSum(k, sum), 6
}

// bind points the kernel arguments at the step's vectors (each taken to
// length n, so that a short one panics here rather than in a kernel) and
// sets h and h/√n.
func (v *dp54Vec) bind(h float64, y, k1, y1, k7, rtol, atol []float64) *dp54Kern {
	k := &v.kern
	n := k.n
	y, k1, y1, k7, rtol, atol = y[:n], k1[:n], y1[:n], k7[:n], rtol[:n], atol[:n]
	// The stepper copies its vectors in place rather than swapping them
	// (for short ones), so the pointers rarely change: storing only a
	// changed one skips the write barrier's check.
	if p := &y[0]; k.y != p {
		k.y = p
	}
	if p := &k1[0]; k.k1 != p {
		k.k1 = p
	}
	if p := &y1[0]; k.y1 != p {
		k.y1 = p
	}
	if p := &k7[0]; k.k7 != p {
		k.k7 = p
	}
	if p := &rtol[0]; k.rtol != p {
		k.rtol = p
	}
	if p := &atol[0]; k.atol != p {
		k.atol = p
	}
	k.h, k.hs = h, float64(h*v.sqrtInvN)
	return k
}

// Constants for the assembly: the stage coefficients a_ij (in the order
// of the fields they replace), the error weights e_1, e_3,
// e_4, e_5, e_6 (broadcast by the kernel), e_7 twice, and the mask that
// clears the sign bit (math.Abs) twice.
var (
	dp54KernA = [20]float64{dpA21, dpA31, dpA32, dpA41, dpA42, dpA43, dpA51, dpA52, dpA53, dpA54,
		dpA61, dpA62, dpA63, dpA64, dpA65, dpA71, dpA73, dpA74, dpA75, dpA76}
	dp54KernE   = [5]float64{dpE1, dpE3, dpE4, dpE5, dpE6}
	dp54KernE7  = [2]float64{dpE7, dpE7}
	dp54KernAbs = [2]uint64{1<<63 - 1, 1<<63 - 1}
)
