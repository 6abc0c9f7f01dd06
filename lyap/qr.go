package lyap

import (
	"math"

	"gonum.org/v1/gonum/blas/blas64"
	"gonum.org/v1/gonum/lapack/lapack64"
)

// qrWork re-orthonormalises k tangent vectors of dimension n by gonum's
// Householder QR (LAPACK Dgeqrf and Dorgqr), with workspaces made once.
// Signs are fixed so that every diagonal entry of R is positive; then Q
// varies continuously along a trajectory and R is the stretch of the basis.
type qrWork struct {
	n, k int
	a    []float64 // n×k, row-major, stride k: the matrix, then Q
	tau  []float64
	work []float64
	r    []float64 // k×k upper triangle of the last factorisation
	logR []float64 // ln R_ii of the last factorisation
}

func newQR(n, k int) *qrWork {
	w := &qrWork{n: n, k: k, a: make([]float64, n*k), tau: make([]float64, k), r: make([]float64, k*k), logR: make([]float64, k)}
	g := blas64.General{Rows: n, Cols: k, Stride: k, Data: w.a}
	q := make([]float64, 1)
	lapack64.Geqrf(g, w.tau, q, -1)
	lw := int(q[0])
	lapack64.Orgqr(g, w.tau, q, -1)
	lw = max(lw, int(q[0]), k, 1)
	w.work = make([]float64, lw)
	return w
}

// factor replaces v (n×k, row-major) by the orthonormal factor Q of v = QR,
// keeps R in w.r and ln R_ii in w.logR. It returns the index of the first
// tangent vector whose stretch is zero or not finite, with the offending
// value (v is then left as it was), or -1.
func (w *qrWork) factor(v []float64) (int, float64) {
	n, k := w.n, w.k
	for i, x := range v[:n*k] {
		if math.IsNaN(x) || math.IsInf(x, 0) {
			return i % k, x
		}
	}
	copy(w.a, v[:n*k])
	g := blas64.General{Rows: n, Cols: k, Stride: k, Data: w.a}
	lapack64.Geqrf(g, w.tau, w.work, len(w.work))
	for i := 0; i < k; i++ {
		for j := 0; j < k; j++ {
			if j >= i {
				w.r[i*k+j] = w.a[i*k+j]
			} else {
				w.r[i*k+j] = 0
			}
		}
	}
	for j := 0; j < k; j++ {
		d := w.r[j*k+j]
		if d == 0 || math.IsNaN(d) || math.IsInf(d, 0) {
			return j, d
		}
	}
	lapack64.Orgqr(g, w.tau, w.work, len(w.work))
	for j := 0; j < k; j++ {
		d := w.r[j*k+j]
		if d < 0 {
			for i := 0; i < n; i++ {
				w.a[i*k+j] = -w.a[i*k+j]
			}
			for c := j; c < k; c++ {
				w.r[j*k+c] = -w.r[j*k+c]
			}
			d = -d
		}
		w.logR[j] = math.Log(d)
	}
	copy(v[:n*k], w.a)
	return -1, 0
}

// spread is the growth measure the adaptive interval steers by: the largest
// |ln R_ii| and the spread max − min of ln R_ii, whichever is larger.
func spread(logR []float64) float64 {
	lo, hi, big := math.Inf(1), math.Inf(-1), 0.0
	for _, v := range logR {
		lo = math.Min(lo, v)
		hi = math.Max(hi, v)
		big = math.Max(big, math.Abs(v))
	}
	return math.Max(big, hi-lo)
}

// intervalRule chooses the next re-orthonormalisation interval from the
// growth measured over the last one: the elapsed interval is rescaled so
// that the growth measure approaches the target, by a factor in [1/2, 2],
// and capped by target / (the fastest growth rate seen so far), so that a
// burst of stretching like the worst one met cannot push the basis near
// 1/eps. The rate memory makes the interval conservative, never unsafe.
type intervalRule struct {
	target  float64 // ln MaxGrowth
	maxRate float64 // the largest growth measure per unit interval seen
}

func (ir *intervalRule) next(elapsed, s float64) float64 {
	if !(elapsed > 0) {
		return 0
	}
	ir.maxRate = math.Max(ir.maxRate, s/elapsed)
	f := 2.0
	if s > 0 {
		f = math.Min(2, math.Max(0.5, ir.target/s))
	}
	d := elapsed * f
	if ir.maxRate > 0 {
		d = math.Min(d, ir.target/ir.maxRate)
	}
	return d
}
