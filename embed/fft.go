package embed

import (
	"math"

	"github.com/plumbdyn/plumb/internal/detmath"
)

// realFFT is the discrete Fourier transform of real sequences of one
// length n whose only prime factors are 2, 3 and 5 (FFTLength), with the
// conventions of gonum's dsp/fourier.FFT, which the surrogates used
// before: Coefficients gives X_k = Σ_j x_j e^{-2πi jk/n} for k = 0..n/2,
// Sequence the inverse without the factor 1/n.
//
// It exists for its bits: every product is rounded before it is added
// (float64(a*b), never a fused multiply-add) and the twiddle factors come
// from internal/detmath, so the transform gives the same bits on every
// architecture, and so do the surrogates built on it. The transform is a
// recursive mixed-radix Cooley–Tukey decimation in time on complex
// values, the real input taken with zero imaginary parts (about twice
// the work of a transform specialised to real input; the surrogate test
// spends most of its time elsewhere).
//
// A realFFT is not safe for concurrent use: it keeps its workspace.
type realFFT struct {
	n       int
	factors []int        // n's prime factors, 5s, then 3s, then 2s
	tw      []complex128 // tw[i] = e^{-2πi i/n}
	a, b    []complex128 // workspaces of length n
}

// newRealFFT returns the transform of length n, or nil when n has a prime
// factor other than 2, 3 and 5 or is not positive.
func newRealFFT(n int) *realFFT {
	if n < 1 {
		return nil
	}
	var factors []int
	m := n
	for _, p := range []int{5, 3, 2} {
		for m%p == 0 {
			factors = append(factors, p)
			m /= p
		}
	}
	if m != 1 {
		return nil
	}
	f := &realFFT{n: n, factors: factors, tw: make([]complex128, n), a: make([]complex128, n), b: make([]complex128, n)}
	for i := range f.tw {
		// The quarter turns exactly, so that a real input's mean and
		// Nyquist terms come out with zero imaginary parts where the
		// arithmetic allows; the rest from detmath, the same bits
		// everywhere.
		switch {
		case i == 0:
			f.tw[i] = 1
		case 4*i == n:
			f.tw[i] = complex(0, -1)
		case 2*i == n:
			f.tw[i] = -1
		case 4*i == 3*n:
			f.tw[i] = complex(0, 1)
		default:
			sn, cs := detmath.Sincos(float64(2*math.Pi*float64(i)) / float64(n))
			f.tw[i] = complex(cs, -sn)
		}
	}
	return f
}

// Coefficients writes X_0..X_{n/2} of x (len n) into dst (grown if short)
// and returns it.
func (f *realFFT) Coefficients(dst []complex128, x []float64) []complex128 {
	n := f.n
	for i, v := range x[:n] {
		f.a[i] = complex(v, 0)
	}
	f.dft(f.b, f.a, n, 1, f.factors)
	m := n/2 + 1
	if cap(dst) < m {
		dst = make([]complex128, m)
	}
	dst = dst[:m]
	copy(dst, f.b[:m])
	return dst
}

// Sequence writes into dst (len n) the real sequence whose coefficients
// X_0..X_{n/2} are coef, times n (the transform is not normalised), and
// returns dst. The imaginary parts of X_0 and, for even n, of X_{n/2} are
// ignored, as they must be zero for a real sequence.
func (f *realFFT) Sequence(dst []float64, coef []complex128) []float64 {
	n := f.n
	// The whole spectrum from its Hermitian half, conjugated: the
	// inverse transform is the conjugate of the forward transform of the
	// conjugate, and only its real part is kept.
	f.a[0] = complex(real(coef[0]), 0)
	for k := 1; 2*k < n; k++ {
		c := coef[k]
		f.a[k] = complex(real(c), -imag(c))
		f.a[n-k] = c
	}
	if n%2 == 0 {
		f.a[n/2] = complex(real(coef[n/2]), 0)
	}
	f.dft(f.b, f.a, n, 1, f.factors)
	for i := range dst[:n] {
		dst[i] = real(f.b[i])
	}
	return dst
}

// dft writes into dst[0:n] the transform of the n values src[0],
// src[stride], ..., src[(n-1)·stride], where n is the product of factors.
// With n = p·m (p = factors[0]) and j = p·j2 + j1, k = k1 + m·k2:
//
//	X[k1 + m·k2] = Σ_{j1} ω_p^{j1·k2} (ω_n^{j1·k1} Y_{j1}[k1]),
//
// Y_{j1} the transform of length m of src[j1 + p·j2]; the p sub-transforms
// go to dst[j1·m:], and the butterflies for each k1 read and write the
// same p places, so they run in place.
func (f *realFFT) dft(dst, src []complex128, n, stride int, factors []int) {
	if len(factors) == 0 { // n = 1
		dst[0] = src[0]
		return
	}
	p := factors[0]
	m := n / p
	if m == 1 {
		f.small(dst, src, p, stride)
		return
	}
	for j1 := 0; j1 < p; j1++ {
		f.dft(dst[j1*m:(j1+1)*m], src[j1*stride:], m, stride*p, factors[1:])
	}
	step := f.n / n // ω_n^e = tw[step·e]
	var t [5]complex128
	for k1 := 0; k1 < m; k1++ {
		for j1 := 0; j1 < p; j1++ {
			t[j1] = cmul(dst[j1*m+k1], f.tw[step*j1*k1])
		}
		f.butterfly(dst, t[:p], k1, m)
	}
}

// small writes into dst[0:p] the transform of the p values src[0],
// src[stride], ..., src[(p-1)·stride].
func (f *realFFT) small(dst, src []complex128, p, stride int) {
	var t [5]complex128
	for j := 0; j < p; j++ {
		t[j] = src[j*stride]
	}
	f.butterfly(dst, t[:p], 0, 1)
}

// butterfly writes the transform of length p of t into dst[k1 + m·k2],
// k2 = 0..p-1: X_k2 = Σ_j t[j] ω_p^{j·k2}, added in order of j.
func (f *realFFT) butterfly(dst []complex128, t []complex128, k1, m int) {
	p := len(t)
	if p == 2 {
		dst[k1] = t[0] + t[1]
		dst[k1+m] = t[0] - t[1]
		return
	}
	step := f.n / p
	for k2 := 0; k2 < p; k2++ {
		s := t[0]
		for j := 1; j < p; j++ {
			s += cmul(t[j], f.tw[step*(j*k2%p)])
		}
		dst[k1+m*k2] = s
	}
}

// cmul is a·b with every product rounded before it is added (Go's own
// complex product may be fused on some architectures).
func cmul(a, b complex128) complex128 {
	ar, ai, br, bi := real(a), imag(a), real(b), imag(b)
	return complex(float64(ar*br)-float64(ai*bi), float64(ar*bi)+float64(ai*br))
}
