//go:build amd64 && !purego

package integrate

import "math"

// This file and dopri54_kern_avx_amd64.s are the AVX2 form of the vector
// kernels of dopri54_kern_amd64.go: the same operations on the same
// components, four per instruction, never an FMA, so the same bits as the
// SSE2 kernels and the Go loops of attemptSq. dp54Scheme takes them when
// simd.AVX2 is set (the CPU has AVX2, unless a test or benchmark says
// otherwise); TestDP54KernBits and FuzzDP54KernBits check both widths
// against the Go loops.

// dp54KernMinAVX2 is the smallest dimension that takes the AVX2 kernels.
// Measured with BenchmarkDP54Kern on a Zen 3 (fastest rounds, ns per
// step, Go loops, SSE2, AVX2): 116, 123, 133 at n = 6; 146, 141, 136 at
// n = 8; 235, 207, 175 at n = 13; 724, 586, 478 at n = 40. Below 8 the
// seven calls cost more than the wider arithmetic saves, as for SSE2. A
// variable so that tests can choose either path.
var dp54KernMinAVX2 = 8

// The AVX2 kernels: each computes what the SSE2 kernel of the same name
// without AVX does (dopri54_kern_amd64.go), with the same bits.

//go:noescape
func dp54Stage2AVX(k *dp54Kern)

//go:noescape
func dp54Stage3AVX(k *dp54Kern)

//go:noescape
func dp54Stage4AVX(k *dp54Kern)

//go:noescape
func dp54Stage5AVX(k *dp54Kern)

//go:noescape
func dp54Stage6AVX(k *dp54Kern)

//go:noescape
func dp54Stage7AVX(k *dp54Kern) float64

//go:noescape
func dp54ErrSumAVX(k *dp54Kern, sum float64) float64

// dp54AVX is a dp54Vec whose trial step runs through the AVX2 kernels.
type dp54AVX struct {
	dp54Vec
}

func (v *dp54AVX) attempt(t, h float64, y, k1, y1, k7, rtol, atol []float64) (float64, int) {
	e2, ev := v.attemptSq(t, h, y, k1, y1, k7, rtol, atol)
	return math.Sqrt(e2), ev
}

// attemptSq is dp54Work.attemptSq through the AVX2 kernels: the same trial
// step, the same evaluations of F, the same bits.
func (v *dp54AVX) attemptSq(t, h float64, y, k1, y1, k7, rtol, atol []float64) (float64, int) {
	w, k := v.dp54Work, v.bind(h, y, k1, y1, k7, rtol, atol)
	ys, ysti := w.ys, w.ysti
	dp54Stage2AVX(k)
	w.f(t+float64(dpC2*h), ys, w.k2)
	dp54Stage3AVX(k)
	w.f(t+float64(dpC3*h), ys, w.k3)
	dp54Stage4AVX(k)
	w.f(t+float64(dpC4*h), ys, w.k4)
	dp54Stage5AVX(k)
	w.f(t+float64(dpC5*h), ys, w.k5)
	dp54Stage6AVX(k)
	th := t + h
	w.f(th, ysti, w.k6)
	sum := dp54Stage7AVX(k)
	w.f(th, y1[:k.n], k7[:k.n])
	return dp54ErrSumAVX(k, sum), 6
}

// Constants for the AVX2 kernels, four copies of each so that a kernel
// can read them as 32-byte operands: the error weights e_1, e_3, e_4, e_5,
// e_6, e_7, and the mask that clears the sign bit (math.Abs).
var (
	dp54KernE4 = [24]float64{dpE1, dpE1, dpE1, dpE1, dpE3, dpE3, dpE3, dpE3, dpE4, dpE4, dpE4, dpE4,
		dpE5, dpE5, dpE5, dpE5, dpE6, dpE6, dpE6, dpE6, dpE7, dpE7, dpE7, dpE7}
	dp54KernAbs4 = [4]uint64{1<<63 - 1, 1<<63 - 1, 1<<63 - 1, 1<<63 - 1}
)
