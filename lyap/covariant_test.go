package lyap

import (
	"context"
	"math"
	"testing"

	"github.com/plumbdyn/plumb/integrate"
	"gonum.org/v1/gonum/mat"
)

// clvAngleTol: the covariant vectors of a linear system are its
// eigenvectors at every time (exact); the forward and backward iterations
// converge geometrically at the rate of the gaps between exponents, so after
// the transients only rounding is left (the brief asks ~1e-8).
const clvAngleTol = 1e-8

// eigenSystem returns A = P D P⁻¹ for the non-orthogonal eigenvector matrix
// P (columns (1,0,1), (1,1,0), (0,1,1)) and the given eigenvalues.
func eigenSystem(t *testing.T, d []float64) (a, p *mat.Dense) {
	p = mat.NewDense(3, 3, []float64{
		1, 1, 0,
		0, 1, 1,
		1, 0, 1,
	})
	var pinv mat.Dense
	if err := pinv.Inverse(p); err != nil {
		t.Fatal(err)
	}
	a = mat.NewDense(3, 3, nil)
	a.Mul(p, mat.NewDiagDense(3, d))
	a.Mul(a, &pinv)
	return a, p
}

func checkEigenvectors(t *testing.T, c *CovariantVectors, p *mat.Dense) {
	t.Helper()
	if len(c.Times) == 0 {
		t.Fatal("no samples")
	}
	col := make([]float64, 3)
	var v []float64
	worst := 0.0
	for s := range c.Times {
		for j := 0; j < 3; j++ {
			mat.Col(col, j, p)
			v = c.Vector(s, j, v)
			worst = math.Max(worst, LineAngle(v, col))
		}
		// The angles between the vectors are those between eigenvectors.
		for i := 0; i < 3; i++ {
			for j := i + 1; j < 3; j++ {
				u, w := mat.Col(nil, i, p), mat.Col(nil, j, p)
				if d := math.Abs(c.Angle(s, i, j) - LineAngle(u, w)); d > clvAngleTol {
					t.Fatalf("sample %d: angle(%d,%d) = %.12f, eigenvectors %.12f", s, i, j, c.Angle(s, i, j), LineAngle(u, w))
				}
			}
		}
	}
	t.Logf("%d samples, worst angle to the eigenvectors %.3g rad", len(c.Times), worst)
	if worst > clvAngleTol {
		t.Errorf("worst angle between covariant vector and eigenvector %.3g, want <= %g", worst, clvAngleTol)
	}
}

func TestMapCovariantLinear(t *testing.T) {
	d := []float64{2, 1, 0.5}
	a, p := eigenSystem(t, d)
	c, err := MapCovariant(context.Background(), linearMap{a}, make([]float64, 3), 3, &Settings{Iterations: 200, Discard: 100, IntervalSteps: 1})
	if err != nil {
		t.Fatal(err)
	}
	if len(c.Times) != 201 {
		t.Errorf("%d samples, want 201 (one per iteration of the window)", len(c.Times))
	}
	checkEigenvectors(t, c, p)
	for i, v := range d { // exact: the stretch of eigenvector i is |d_i| per iteration
		if math.Abs(c.Exponents[i]-math.Log(v)) > 1e-12 {
			t.Errorf("exponent %d = %.15f, want ln %g", i, c.Exponents[i], v)
		}
	}
}

func TestCovariantLinearFlow(t *testing.T) {
	d := []float64{0.5, -0.2, -1}
	a, p := eigenSystem(t, d)
	pr := integrate.Problem{
		F: func(_ float64, y, dy []float64) {
			for i := 0; i < 3; i++ {
				dy[i] = float64(a.At(i, 0)*y[0]) + float64(a.At(i, 1)*y[1]) + float64(a.At(i, 2)*y[2])
			}
		},
		Jac: func(_ float64, _ []float64, dst *mat.Dense) { dst.Copy(a) },
		Y0:  make([]float64, 3),
	}
	c, err := Covariant(context.Background(), pr, 3, &Settings{Duration: 40, Transient: 60})
	if err != nil {
		t.Fatal(err)
	}
	checkEigenvectors(t, c, p)
	// Exact: eigenvector i grows at d_i; the integration tolerance bounds the error.
	for i, v := range d {
		if math.Abs(c.Exponents[i]-v) > 1e-6 {
			t.Errorf("exponent %d = %.9f, want %g", i, c.Exponents[i], v)
		}
	}
}

// flowDirTol: the tangent vector along F(x) is carried exactly by the
// variational equations, so the second covariant vector matches F(x) up to
// the integration error of the augmented system (RelTol 1e-9, amplified by
// the conditioning of the backward iteration; measured 5.6e-9 rad).
const flowDirTol = 1e-6

// TestCovariantLorenz: the covariant vector of the zero exponent is the
// flow direction F(x) (exact for an autonomous flow), and the covariant
// exponents agree with the QR ones.
func TestCovariantLorenz(t *testing.T) {
	pr := modelProblem(t, "lorenz")
	c, err := Covariant(context.Background(), pr, 3, &Settings{Duration: 50, Transient: 30})
	if err != nil {
		t.Fatal(err)
	}
	t.Logf("lorenz covariant exponents %v ± %v, %d samples", c.Exponents, c.StdErr, len(c.Times))
	// Sprott 1998/2004 (REFERENCES.md §1a).
	for i, want := range lorenzSprott {
		if d := math.Abs(c.Exponents[i] - want); d > nSigma*c.StdErr[i]+1e-4 {
			t.Errorf("covariant exponent %d = %.4f ± %.4f, want %.4f", i, c.Exponents[i], c.StdErr[i], want)
		}
	}
	f := make([]float64, 3)
	var v1 []float64
	worst := 0.0
	for s, x := range c.States {
		pr.F(c.Times[s], x, f)
		v1 = c.Vector(s, 1, v1)
		worst = math.Max(worst, LineAngle(v1, f))
	}
	t.Logf("worst angle between the second covariant vector and F(x): %.3g rad", worst)
	if worst > flowDirTol {
		t.Errorf("the covariant vector of the zero exponent is %.3g rad off the flow direction, want <= %g", worst, flowDirTol)
	}
	for _, a := range c.Angles {
		for _, v := range a {
			if !(v >= 0 && v <= math.Pi/2) {
				t.Fatalf("angle %v outside [0, π/2]", v)
			}
		}
	}
}
