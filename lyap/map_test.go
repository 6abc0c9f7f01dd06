package lyap

import (
	"context"
	"math"
	"testing"

	"gonum.org/v1/gonum/mat"
)

const (
	// henonTol: Sprott's Hénon exponents agree with an independent QR run
	// to 2e-3 (REFERENCES.md §9 item 7).
	henonTol = 2e-3
	// identityTol: sum rules that hold per iteration (ln|det J| constant)
	// are broken only by rounding, about 1e-16 per iteration.
	identityTol = 1e-12
	// logistic4Tol: about 1e-3 for 1e6 iterates (REFERENCES.md §9 item 6).
	logistic4Tol = 1e-3
	// cycleTol: on a stable cycle, once the orbit sits on it to machine
	// precision, the estimate over a whole number of periods is the cycle's
	// exponent up to rounding.
	cycleTol = 1e-9
)

func TestHenon(t *testing.T) {
	sp, err := MapExponents(context.Background(), henon{1.4, 0.3}, []float64{0.1, 0.1}, 2, &Settings{Iterations: 1_000_000, Discard: 1000})
	if err != nil {
		t.Fatal(err)
	}
	t.Logf("henon: %v ± %v, checks %+v", sp.Exponents, sp.StdErr, sp.Checks)
	// Sprott, "Common Chaotic Systems" (REFERENCES.md §1b).
	for i, want := range []float64{0.41922, -1.62319} {
		got, se := sp.Exponents[i], sp.StdErr[i]
		if d := math.Abs(got - want); d > henonTol || d > nSigma*se+1e-5 {
			t.Errorf("lambda_%d = %.6f ± %.6f, want %.5f (off by %.2g)", i+1, got, se, want, d)
		}
	}
	// Exact identity: det J = −b, so lambda_1 + lambda_2 = ln 0.3.
	if sum := sp.Exponents[0] + sp.Exponents[1]; math.Abs(sum-math.Log(0.3)) > identityTol {
		t.Errorf("sum = %.15f, want ln 0.3 = %.15f", sum, math.Log(0.3))
	}
	if c, ok := sp.Check(CheckLogDet); !ok || c.Residual > 1e-9 {
		t.Errorf("log det check %+v (present %v)", c, ok)
	}
	if sp.Units != UnitsMap || sp.Kind != "map" {
		t.Errorf("units %q kind %q", sp.Units, sp.Kind)
	}
	// Kaplan–Yorke from the estimate: Sprott's 1.25827 (REFERENCES.md §1b),
	// within the propagated tolerance of the exponents.
	if d := KaplanYorke(sp.Exponents); math.Abs(d-1.25827) > 2e-3 {
		t.Errorf("Kaplan–Yorke %.5f, want 1.25827", d)
	}
}

func TestLogisticChaotic(t *testing.T) {
	sp, err := MapExponents(context.Background(), logistic{4}, []float64{0.3}, 1, &Settings{Iterations: 1_000_000, Discard: 1000})
	if err != nil {
		t.Fatal(err)
	}
	got, se := sp.Exponents[0], sp.StdErr[0]
	t.Logf("logistic r=4: %.10f ± %.2g", got, se)
	// Exact: ln 2 by conjugacy to the tent map (REFERENCES.md §1b).
	if d := math.Abs(got - math.Ln2); d > logistic4Tol || d > nSigma*se+1e-9 {
		t.Errorf("lambda = %.8f ± %.2g, want ln 2 (off by %.2g)", got, se, d)
	}
}

// TestLogisticCycle: at r = 3.5 the orbit settles on a stable 4-cycle, whose
// exponent is ln|prod f'(x_i)|/4 (exact). The cycle is found here by
// iterating to convergence.
func TestLogisticCycle(t *testing.T) {
	m := logistic{3.5}
	x := 0.3
	for i := 0; i < 100_000; i++ {
		x = m.r * x * (1 - x)
	}
	mult := 1.0
	for i := 0; i < 4; i++ {
		mult *= m.deriv(x)
		x = m.r * x * (1 - x)
	}
	want := math.Log(math.Abs(mult)) / 4
	sp, err := MapExponents(context.Background(), m, []float64{0.3}, 1, &Settings{Iterations: 100_000, Discard: 1000})
	if err != nil {
		t.Fatal(err)
	}
	if sp.Duration != 100_000 {
		t.Fatalf("averaged %g iterations, want a whole number of periods", sp.Duration)
	}
	if got := sp.Exponents[0]; !(got < 0) || math.Abs(got-want) > cycleTol {
		t.Errorf("lambda = %.12f, want ln|multiplier|/4 = %.12f", got, want)
	}
}

// TestLogisticClosedForms: stable fixed point and 2-cycle (REFERENCES.md
// §1b, derived closed forms).
func TestLogisticClosedForms(t *testing.T) {
	for _, c := range []struct {
		name string
		r    float64
		want float64
	}{
		{"fixed point r=2.8", 2.8, -0.2231435513142098}, // ln|2−r|
		{"2-cycle r=3.2", 3.2, -0.9162907318741551},     // ½ ln|4+2r−r²|
		{"2-cycle r=3.4", 3.4, -0.1372184228508801},     // ½ ln|4+2r−r²|, slow to settle
	} {
		t.Run(c.name, func(t *testing.T) {
			sp, err := MapExponents(context.Background(), logistic{c.r}, []float64{0.3}, 1, &Settings{Iterations: 20_000, Discard: 20_000})
			if err != nil {
				t.Fatal(err)
			}
			if d := math.Abs(sp.Exponents[0] - c.want); d > cycleTol {
				t.Errorf("lambda = %.15f, want %.15f (off by %.2g)", sp.Exponents[0], c.want, d)
			}
		})
	}
}

// standardMap is Chirikov's standard map p' = p + K sin θ, θ' = θ + p',
// area preserving (B. V. Chirikov, A universal instability of
// many-dimensional oscillator systems, Phys. Rep. 52 (1979) 263–379).
type standardMap struct{ k float64 }

func (standardMap) Dim() int { return 2 }
func (m standardMap) Next(x, dst []float64) {
	p := x[1] + float64(m.k*math.Sin(x[0]))
	dst[0] = math.Mod(x[0]+p, 2*math.Pi)
	dst[1] = p
}
func (m standardMap) Jacobian(x []float64, dst *mat.Dense) {
	c := m.k * math.Cos(x[0])
	dst.Set(0, 0, 1+c)
	dst.Set(0, 1, 1)
	dst.Set(1, 0, c)
	dst.Set(1, 1, 1)
}

func TestSymplecticMap(t *testing.T) {
	sp, err := MapExponents(context.Background(), standardMap{5}, []float64{1, 0.5}, 2, &Settings{Iterations: 200_000, Hamiltonian: true})
	if err != nil {
		t.Fatal(err)
	}
	c, ok := sp.Check(CheckPairing)
	t.Logf("standard map K=5: %v ± %v, pairing %+v", sp.Exponents, sp.StdErr, c)
	// Exact: det J = 1, so the exponents pair as ±lambda.
	if !ok || c.Residual > identityTol {
		t.Errorf("pairing %+v (present %v), want <= %g", c, ok, identityTol)
	}
	if !(sp.Exponents[0] > 0.5) { // strongly chaotic at K = 5 (Chirikov 1979)
		t.Errorf("lambda_1 = %g, want clearly positive", sp.Exponents[0])
	}
}

// TestMapLargest: the two-trajectory estimate needs only Next and agrees
// with the published Hénon exponent and with ln 2 for the logistic map.
func TestMapLargest(t *testing.T) {
	h := henon{1.4, 0.3}
	sp, err := MapLargest(context.Background(), MapFunc{N: 2, F: h.Next}, []float64{0.1, 0.1}, &Settings{Iterations: 500_000, Discard: 1000})
	if err != nil {
		t.Fatal(err)
	}
	t.Logf("hénon two-trajectory: %v ± %v, interval %g", sp.Exponents, sp.StdErr, sp.MeanInterval)
	// Sprott (REFERENCES.md §1b).
	if d := math.Abs(sp.Exponents[0] - 0.41922); d > henonTol || d > nSigma*sp.StdErr[0]+1e-4 {
		t.Errorf("lambda_1 = %.5f ± %.5f, want 0.41922", sp.Exponents[0], sp.StdErr[0])
	}
	sp, err = MapLargest(context.Background(), logistic{4}, []float64{0.3}, &Settings{Iterations: 500_000, Discard: 1000})
	if err != nil {
		t.Fatal(err)
	}
	// Exact: ln 2 (REFERENCES.md §1b). The finite separation adds a bias
	// of order d0·MaxGrowth, far below the tolerance.
	if d := math.Abs(sp.Exponents[0] - math.Ln2); d > logistic4Tol {
		t.Errorf("lambda = %.6f ± %.2g, want ln 2", sp.Exponents[0], sp.StdErr[0])
	}
}

// coupledStandard is a 4-dimensional symplectic kick map: p' = p + f(θ),
// θ' = θ + p' with f = −∇V for V = −K1 cos θ1 − K2 cos θ2 − eps cos(θ1+θ2)
// (two standard maps coupled through a potential, after C. Froeschlé,
// Numerical study of a four-dimensional mapping, Astron. Astrophys. 16
// (1972) 172–189). The state is (θ1, θ2, p1, p2).
type coupledStandard struct{ k1, k2, eps float64 }

func (coupledStandard) Dim() int { return 4 }
func (m coupledStandard) Next(x, dst []float64) {
	s12 := float64(m.eps * math.Sin(x[0]+x[1]))
	p1 := x[2] + float64(m.k1*math.Sin(x[0])) + s12
	p2 := x[3] + float64(m.k2*math.Sin(x[1])) + s12
	dst[0] = math.Mod(x[0]+p1, 2*math.Pi)
	dst[1] = math.Mod(x[1]+p2, 2*math.Pi)
	dst[2], dst[3] = p1, p2
}
func (m coupledStandard) Jacobian(x []float64, dst *mat.Dense) {
	c12 := m.eps * math.Cos(x[0]+x[1])
	h11, h22 := float64(m.k1*math.Cos(x[0]))+c12, float64(m.k2*math.Cos(x[1]))+c12
	for i, v := range [16]float64{
		1 + h11, c12, 1, 0,
		c12, 1 + h22, 0, 1,
		h11, c12, 1, 0,
		c12, h22, 0, 1,
	} {
		dst.Set(i/4, i%4, v)
	}
}

// TestSymplecticPairing: a symplectic map's exponents pair as ±lambda
// (exact in the limit; Benettin et al. 1980); their sum is 0 at every
// iteration (exact: det J = 1).
func TestSymplecticPairing(t *testing.T) {
	sp, err := MapExponents(context.Background(), coupledStandard{3, 3, 0.5}, []float64{1, 2, 0.3, -0.2}, 4, &Settings{Iterations: 100_000, Hamiltonian: true})
	if err != nil {
		t.Fatal(err)
	}
	c, ok := sp.Check(CheckPairing)
	t.Logf("coupled standard maps: %v ± %v, pairing %+v", sp.Exponents, sp.StdErr, c)
	if !ok || c.Residual > nSigma*c.StdErr {
		t.Errorf("pairing %+v (present %v), want within %d standard errors", c, ok, nSigma)
	}
	var sum float64
	for _, v := range sp.Exponents {
		sum += v
	}
	if math.Abs(sum) > identityTol {
		t.Errorf("sum %.3g, want 0", sum)
	}
	if !(sp.Exponents[1] > 0.1) { // both degrees of freedom chaotic at K = 3
		t.Errorf("lambda_2 = %g, want clearly positive", sp.Exponents[1])
	}
}
