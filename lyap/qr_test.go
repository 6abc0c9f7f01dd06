package lyap

import (
	"math"
	"math/rand/v2"
	"testing"

	"github.com/plumbdyn/plumb/internal/detmath"
	"gonum.org/v1/gonum/mat"
)

// TestQRFactor checks the Householder factorisation on random n×k
// matrices, k <= n, against exact identities and against gonum's QR (a
// general-purpose reference library): QᵀQ = I, Q·R = V, R upper triangular
// with a positive diagonal, ln R_ii = logR, and |R| equal to gonum's R up
// to the signs of its rows. Entries are scaled by 10^±6 to exercise the
// scaled norm.
func TestQRFactor(t *testing.T) {
	// tol: a backward-stable factorisation is exact to a few ulps times the
	// dimension (Golub & Van Loan 2013, Sect. 5.2); 1e-13 relative covers
	// n = 8.
	const tol = 1e-13
	rng := rand.New(rand.NewPCG(3, 4))
	for _, sz := range [][2]int{{1, 1}, {2, 1}, {2, 2}, {3, 3}, {4, 2}, {6, 6}, {8, 3}} {
		n, k := sz[0], sz[1]
		for trial := range 20 {
			scale := math.Pow(10, float64(trial%13-6))
			v := make([]float64, n*k)
			for i := range v {
				v[i] = scale * rng.NormFloat64()
			}
			orig := append([]float64(nil), v...)
			w := newQR(n, k)
			if j, x := w.factor(v); j >= 0 {
				t.Fatalf("%dx%d: column %d stretch %v", n, k, j, x)
			}
			for a := range k {
				for b := range k {
					var d float64
					for i := range n {
						d += v[i*k+a] * v[i*k+b]
					}
					want := 0.0
					if a == b {
						want = 1
					}
					if math.Abs(d-want) > tol {
						t.Errorf("%dx%d: (QᵀQ)[%d][%d] = %v", n, k, a, b, d)
					}
				}
			}
			for i := range n {
				for c := range k {
					var s float64
					for j := 0; j <= c; j++ {
						s += v[i*k+j] * w.r[j*k+c]
					}
					if math.Abs(s-orig[i*k+c]) > tol*scale*float64(n) {
						t.Errorf("%dx%d: (QR)[%d][%d] = %v, want %v", n, k, i, c, s, orig[i*k+c])
					}
				}
			}
			var gq mat.QR
			gq.Factorize(mat.NewDense(n, k, append([]float64(nil), orig...)))
			var gr mat.Dense
			gq.RTo(&gr)
			for i := range k {
				if d := w.r[i*k+i]; !(d > 0) || w.logR[i] != detmath.Log(d) {
					t.Errorf("%dx%d: R[%d][%d] = %v, logR %v", n, k, i, i, d, w.logR[i])
				}
				for c := range k {
					if c < i && w.r[i*k+c] != 0 {
						t.Errorf("%dx%d: R[%d][%d] = %v below the diagonal", n, k, i, c, w.r[i*k+c])
					}
					if math.Abs(math.Abs(w.r[i*k+c])-math.Abs(gr.At(i, c))) > tol*scale*float64(n) {
						t.Errorf("%dx%d: |R[%d][%d]| = %v, gonum %v", n, k, i, c, math.Abs(w.r[i*k+c]), math.Abs(gr.At(i, c)))
					}
				}
			}
		}
	}
	// A zero column has no stretch: reported, v unchanged.
	v := []float64{1, 0, 2, 0, 3, 0}
	if j, _ := newQR(3, 2).factor(v); j != 1 || v[1] != 0 || v[0] != 1 {
		t.Errorf("zero column: index %d, v %v; want 1 and v unchanged", j, v)
	}
}
