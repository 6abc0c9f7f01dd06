package lyap

import (
	"context"
	"errors"
	"math"
	"testing"

	"github.com/plumbdyn/plumb/integrate"
	"gonum.org/v1/gonum/mat"
)

// TestFiniteTimeDiagonal: for y' = diag(a) y the tangent basis stays the
// unit basis, so every window's exponents are exactly a (exact; the
// integration tolerance 1e-9 bounds the error).
func TestFiniteTimeDiagonal(t *testing.T) {
	a := []float64{0.3, -0.1, -0.7}
	p := integrate.Problem{
		F: func(_ float64, y, d []float64) {
			for i := range y {
				d[i] = a[i] * y[i]
			}
		},
		Jac: func(_ float64, _ []float64, dst *mat.Dense) {
			dst.Zero()
			for i := range a {
				dst.Set(i, i, a[i])
			}
		},
		Y0: make([]float64, 3),
	}
	const tau = 2.5
	w, err := FiniteTime(context.Background(), p, 3, tau, &Settings{Duration: 50, Transient: 5})
	if err != nil {
		t.Fatal(err)
	}
	if len(w.Exponents) != 20 {
		t.Errorf("%d windows, want 20", len(w.Exponents))
	}
	for k, row := range w.Exponents {
		if math.Abs(w.Length[k]-tau) > 0.5 { // up to one step either way
			t.Errorf("window %d is %g long, want %g", k, w.Length[k], tau)
		}
		for i, v := range row {
			if math.Abs(v-a[i]) > 1e-7 {
				t.Errorf("window %d exponent %d = %.10f, want %g", k, i, v, a[i])
			}
		}
	}
	if w.StdDev[0] > 1e-7 {
		t.Errorf("spread %g of constant rates", w.StdDev[0])
	}
}

// TestFiniteTimeLorenz: finite-time exponents scatter widely around the
// mean; their mean over windows of length 1 estimates lambda_1 with an error
// of about sd/sqrt(windows), taking windows one Lyapunov time long as
// roughly independent (common practice).
func TestFiniteTimeLorenz(t *testing.T) {
	p := modelProblem(t, "lorenz")
	w, err := FiniteTime(context.Background(), p, 3, 1, &Settings{Duration: 400, Transient: 20})
	if err != nil {
		t.Fatal(err)
	}
	m := float64(len(w.Exponents))
	t.Logf("%d windows: mean %v, sd %v, min %v, max %v", len(w.Exponents), w.Mean, w.StdDev, w.Min, w.Max)
	if m < 390 {
		t.Fatalf("%d windows", len(w.Exponents))
	}
	if !(w.StdDev[0] > 0.5) || !(w.Min[0] < 0) { // fluctuations are large (Abarbanel et al. 1991)
		t.Errorf("sd %g, min %g: want a wide spread including contraction", w.StdDev[0], w.Min[0])
	}
	// Sprott 1998/2004 (REFERENCES.md §1a).
	if d := math.Abs(w.Mean[0] - lorenzSprott[0]); d > nSigma*w.StdDev[0]/math.Sqrt(m) {
		t.Errorf("mean %.4f, want %.4f within %d·sd/√m = %.3g", w.Mean[0], lorenzSprott[0], nSigma, nSigma*w.StdDev[0]/math.Sqrt(m))
	}
	// Exact per window: the sum equals the trace −41/3.
	for k, row := range w.Exponents {
		if s := row[0] + row[1] + row[2]; math.Abs(s+41.0/3) > 1e-5 {
			t.Fatalf("window %d: sum %.8f, want −41/3", k, s)
		}
	}
}

// TestMapFiniteTime: for the Hénon map every window's sum of exponents is
// ln 0.3 (exact: constant det J), and the windows tile the averaged
// iterations.
func TestMapFiniteTime(t *testing.T) {
	w, err := MapFiniteTime(context.Background(), henon{1.4, 0.3}, []float64{0.1, 0.1}, 2, 10, &Settings{Iterations: 10_000, Discard: 100})
	if err != nil {
		t.Fatal(err)
	}
	if len(w.Exponents) != 1000 {
		t.Fatalf("%d windows, want 1000", len(w.Exponents))
	}
	for k, row := range w.Exponents {
		if w.Length[k] != 10 || w.Start[k] != float64(100+10*k) {
			t.Fatalf("window %d: start %g length %g", k, w.Start[k], w.Length[k])
		}
		if s := row[0] + row[1]; math.Abs(s-math.Log(0.3)) > identityTol {
			t.Fatalf("window %d: sum %.15f, want ln 0.3", k, s)
		}
	}
	t.Logf("hénon, 10-iteration windows: mean %v, sd %v", w.Mean, w.StdDev)
	// Sprott (REFERENCES.md §1b); the mean of equal windows is the overall estimate.
	if d := math.Abs(w.Mean[0] - 0.41922); d > nSigma*w.StdDev[0]/math.Sqrt(1000) {
		t.Errorf("mean %.5f, want 0.41922", w.Mean[0])
	}
	if _, err := MapFiniteTime(context.Background(), henon{1.4, 0.3}, []float64{0.1, 0.1}, 2, 0, nil); !errors.Is(err, ErrSettings) {
		t.Errorf("tau = 0: error %v", err)
	}
}
