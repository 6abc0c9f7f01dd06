package lyap

import (
	"math"

	"github.com/plumbdyn/plumb/internal/detmath"
)

// qrWork re-orthonormalises k tangent vectors of dimension n by a
// Householder QR factorisation, with workspaces made once. Signs are fixed
// so that every diagonal entry of R is positive; then Q varies
// continuously along a trajectory and R is the stretch of the basis.
//
// The factorisation is written here, not taken from a LAPACK: every sum
// runs in a fixed order and every product is rounded explicitly
// (float64(x*y)), and ln R_ii is detmath.Log, so Q, R and the exponents
// have the same bits on every architecture (gonum's kernels and math.Log
// differ between amd64 and arm64 in the last bits, and a tangent basis
// that feeds the step-size control then changes the whole run).
//
// References:
//
//	A. S. Householder, Unitary triangularization of a nonsymmetric matrix,
//	  J. ACM 5 (1958) 339–342.
//	G. H. Golub, C. F. Van Loan, Matrix Computations, 4th ed., Johns
//	  Hopkins 2013, Sect. 5.1–5.2 (Householder vectors, QR, forming Q by
//	  backward accumulation).
type qrWork struct {
	n, k int
	a    []float64 // n×k, row-major, stride k: the matrix, reflectors below the diagonal
	beta []float64 // the reflectors' factors: H_j = I - beta_j·v_j·v_jᵀ, v_jj = 1
	q    []float64 // n×k: Q
	r    []float64 // k×k upper triangle of the last factorisation
	logR []float64 // ln R_ii of the last factorisation
}

func newQR(n, k int) *qrWork {
	return &qrWork{n: n, k: k, a: make([]float64, n*k), beta: make([]float64, k), q: make([]float64, n*k),
		r: make([]float64, k*k), logR: make([]float64, k)}
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
	a := w.a[:n*k]
	copy(a, v[:n*k])
	for j := 0; j < k; j++ {
		// Column j from row j down: x. The reflector maps x to alpha·e_j
		// with alpha = -sign(x_j)·|x| (no cancellation in v_j = x_j - alpha).
		// |x| is scaled by its largest entry, so no square overflows.
		amax := 0.0
		for i := j; i < n; i++ {
			amax = math.Max(amax, math.Abs(a[i*k+j]))
		}
		if amax == 0 {
			return j, 0
		}
		var ss float64
		for i := j; i < n; i++ {
			u := a[i*k+j] / amax
			ss += float64(u * u)
		}
		norm := float64(amax * math.Sqrt(ss))
		xj := a[j*k+j]
		alpha := -norm
		if xj < 0 {
			alpha = norm
		}
		vj := xj - alpha
		// v = (1, x_(j+1)/vj, ...), beta = -vj/alpha, so that
		// H = I - beta·v·vᵀ and H·x = alpha·e_j.
		for i := j + 1; i < n; i++ {
			a[i*k+j] /= vj
		}
		beta := -vj / alpha
		w.beta[j] = beta
		a[j*k+j] = alpha
		// Apply H to the columns right of j.
		w.reflect(a, j, j+1, beta)
	}
	for i := 0; i < k; i++ {
		for j := 0; j < k; j++ {
			if j >= i {
				w.r[i*k+j] = a[i*k+j]
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
	// Q = H_0 H_1 ... H_(k-1) applied to the first k columns of the
	// identity, accumulated backward (H_j touches rows j.. only).
	q := w.q[:n*k]
	clear(q)
	for j := 0; j < k; j++ {
		q[j*k+j] = 1
	}
	for j := k - 1; j >= 0; j-- {
		w.reflect(q, j, j, w.beta[j])
	}
	for j := 0; j < k; j++ {
		d := w.r[j*k+j]
		if d < 0 {
			for i := 0; i < n; i++ {
				q[i*k+j] = -q[i*k+j]
			}
			for c := j; c < k; c++ {
				w.r[j*k+c] = -w.r[j*k+c]
			}
			d = -d
		}
		w.logR[j] = detmath.Log(d)
	}
	copy(v[:n*k], q)
	return -1, 0
}

// reflect applies the reflector H_j = I - beta·v·vᵀ (v_j = 1, v_i for
// i > j below the diagonal of w.a) to the columns c0.. of the n×k matrix t.
func (w *qrWork) reflect(t []float64, j, c0 int, beta float64) {
	n, k, a := w.n, w.k, w.a
	for c := c0; c < k; c++ {
		d := t[j*k+c]
		for i := j + 1; i < n; i++ {
			d += float64(a[i*k+j] * t[i*k+c])
		}
		d = float64(beta * d)
		t[j*k+c] -= d
		for i := j + 1; i < n; i++ {
			t[i*k+c] -= float64(d * a[i*k+j])
		}
	}
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
