package lyap

import (
	"context"
	"math"
	"math/rand/v2"
	"sort"
	"testing"

	"github.com/plumbdyn/plumb/integrate"
	"gonum.org/v1/gonum/mat"
)

// Lorenz (sigma=10, rho=28, beta=8/3) reference spectrum: J. C. Sprott,
// "Common Chaotic Systems" (web table, 1998, rev. 2004), confirmed in
// REFERENCES.md §1a. Sprott notes the last digit is a best estimate.
var lorenzSprott = []float64{0.9056, 0, -14.5723}

const (
	// lorenzDuration is long enough for a standard error near 0.006 on
	// lambda_1 (measured 0.0060, 0.0027, 0.0043 at T = 2000) and short
	// enough to run in a fraction of a second.
	lorenzDuration  = 2000
	lorenzTransient = 50
	// lorenzAbsTol bounds |estimate − published| whatever the error bars
	// say: about 3.3 times the largest standard error measured at
	// lorenzDuration, plus the 1e-4 uncertainty of the published last digit.
	lorenzAbsTol = 0.02
	// sumRelTol: the sum of the exponents equals the constant trace
	// −(sigma+1+beta) up to the integration error of the tangent dynamics
	// (measured 5e-9 relative at RelTol 1e-9); REFERENCES.md §9 asks 1e-6.
	sumRelTol = 1e-6
	// nSigma is the number of standard errors an estimate may lie from an
	// exact or published value (common practice: a 3-sigma band).
	nSigma = 3
)

func TestLorenzSpectrum(t *testing.T) {
	p := modelProblem(t, "lorenz")
	sp, err := Exponents(context.Background(), p, 3, &Settings{Duration: lorenzDuration, Transient: lorenzTransient})
	if err != nil {
		t.Fatal(err)
	}
	if sp.StdErr == nil || sp.Blocks != DefaultBlocks {
		t.Fatalf("blocks = %d, std_err = %v", sp.Blocks, sp.StdErr)
	}
	t.Logf("lorenz: %v ± %v, checks %+v, %d steps, %d QR", sp.Exponents, sp.StdErr, sp.Checks, sp.Stats.Steps, sp.Stats.QR)
	for i, want := range lorenzSprott { // Sprott 1998/2004 (REFERENCES.md §1a)
		got, se := sp.Exponents[i], sp.StdErr[i]
		d := math.Abs(got - want)
		if d > lorenzAbsTol {
			t.Errorf("lambda_%d = %.5f ± %.5f, want %.4f within %g (off by %.2g)", i+1, got, se, want, lorenzAbsTol, d)
		}
		if d > nSigma*se+1e-4 {
			t.Errorf("lambda_%d = %.5f ± %.5f, want %.4f within %d standard errors (off by %.2g)", i+1, got, se, want, nSigma, d)
		}
	}
	// Exact identity: constant divergence −(sigma+1+beta) = −41/3.
	sum := sp.Exponents[0] + sp.Exponents[1] + sp.Exponents[2]
	if want := -41.0 / 3; math.Abs(sum-want) > sumRelTol*math.Abs(want) {
		t.Errorf("sum = %.10f, want %.10f (rel. error %.2g)", sum, want, math.Abs(sum/want-1))
	}
	// The flow direction: lambda_2 = 0 (exact for a flow off fixed points).
	if c, ok := sp.Check(CheckZero); !ok || c.Residual > nSigma*c.StdErr {
		t.Errorf("zero check %+v (present %v), want residual within %d standard errors", c, ok, nSigma)
	}
	if c, ok := sp.Check(CheckTrace); !ok || c.Residual > sumRelTol*41.0/3 {
		t.Errorf("trace check %+v (present %v), want <= %g", c, ok, sumRelTol*41.0/3)
	}
	if _, ok := sp.Check(CheckPairing); ok {
		t.Errorf("pairing check on a dissipative flow")
	}
	if sp.Units != UnitsFlow || sp.Kind != "flow" || sp.Jacobian != "exact" {
		t.Errorf("units %q kind %q jacobian %q", sp.Units, sp.Kind, sp.Jacobian)
	}
	if len(sp.History) != sp.Blocks {
		t.Errorf("history has %d points, blocks %d", len(sp.History), sp.Blocks)
	}
	last := sp.History[len(sp.History)-1]
	for i := range sp.Exponents {
		if last.Exponents[i] != sp.Exponents[i] {
			t.Errorf("last history point %v, spectrum %v", last.Exponents, sp.Exponents)
		}
	}
	if math.Abs(sp.Duration-lorenzDuration) > 1 || sp.Transient < lorenzTransient {
		t.Errorf("duration %g transient %g", sp.Duration, sp.Transient)
	}
}

// TestLorenzSubset: the first k exponents of a run with k < n estimate the
// same leading exponents; no full-spectrum check applies.
func TestLorenzSubset(t *testing.T) {
	p := modelProblem(t, "lorenz")
	sp, err := Exponents(context.Background(), p, 1, &Settings{Duration: lorenzDuration / 2, Transient: lorenzTransient})
	if err != nil {
		t.Fatal(err)
	}
	if len(sp.Exponents) != 1 || len(sp.Checks) != 0 {
		t.Fatalf("exponents %v checks %v", sp.Exponents, sp.Checks)
	}
	// Sprott 1998/2004 (REFERENCES.md §1a).
	if d := math.Abs(sp.Exponents[0] - lorenzSprott[0]); d > nSigma*sp.StdErr[0]+1e-4 || d > 2*lorenzAbsTol {
		t.Errorf("lambda_1 = %.5f ± %.5f, want %.4f", sp.Exponents[0], sp.StdErr[0], lorenzSprott[0])
	}
}

// TestLargestLorenz: the two-trajectory method needs no Jacobian and finds
// the same largest exponent.
func TestLargestLorenz(t *testing.T) {
	p := modelProblem(t, "lorenz")
	p.Jac = nil
	sp, err := Largest(context.Background(), p, &Settings{Duration: lorenzDuration, Transient: lorenzTransient})
	if err != nil {
		t.Fatal(err)
	}
	t.Logf("largest: %v ± %v, interval %g", sp.Exponents, sp.StdErr, sp.MeanInterval)
	// Sprott 1998/2004 (REFERENCES.md §1a).
	if d := math.Abs(sp.Exponents[0] - lorenzSprott[0]); d > nSigma*sp.StdErr[0]+1e-4 || d > lorenzAbsTol {
		t.Errorf("lambda_1 = %.5f ± %.5f, want %.4f", sp.Exponents[0], sp.StdErr[0], lorenzSprott[0])
	}
	if sp.Jacobian != "two-trajectory" || sp.Stats.Jacobians != 0 {
		t.Errorf("jacobian %q, %d Jacobian calls", sp.Jacobian, sp.Stats.Jacobians)
	}
}

// fdAgreeTol: over a short run, before the two trajectories' step sequences
// have diverged chaotically, the finite-difference tangent dynamics give the
// exact-Jacobian exponents to about the integration tolerance amplified by
// exp(lambda_1·T) (measured below 1e-6 at T = 6).
const fdAgreeTol = 1e-4

// TestFiniteDifferenceJacobian compares the finite-difference tangent
// dynamics with the exact Jacobian (oracle: symbolic vs finite-difference
// Jacobians, STYLE.md item 14).
func TestFiniteDifferenceJacobian(t *testing.T) {
	p := modelProblem(t, "lorenz")
	set := &Settings{Duration: 5, Transient: 1, Blocks: 5}
	exact, err := Exponents(context.Background(), p, 3, set)
	if err != nil {
		t.Fatal(err)
	}
	p.Jac = nil
	fdSp, err := Exponents(context.Background(), p, 3, set)
	if err != nil {
		t.Fatal(err)
	}
	if fdSp.Jacobian != "finite-difference" {
		t.Errorf("jacobian %q", fdSp.Jacobian)
	}
	t.Logf("exact %v, finite differences %v", exact.Exponents, fdSp.Exponents)
	for i := range exact.Exponents {
		if d := math.Abs(fdSp.Exponents[i] - exact.Exponents[i]); d > fdAgreeTol {
			t.Errorf("lambda_%d: finite differences %.8f, exact %.8f (off by %.2g)", i+1, fdSp.Exponents[i], exact.Exponents[i], d)
		}
	}
	if fdSp.Stats.Evaluations <= exact.Stats.Evaluations {
		t.Errorf("finite differences used %d evaluations, exact %d", fdSp.Stats.Evaluations, exact.Stats.Evaluations)
	}
}

// linearRealPartTol: for y' = A y the QR exponents over T converge to the
// real parts of A's eigenvalues with an error O(1/T) from the initial basis
// orientation, largest for a complex pair whose plane rotates (measured
// 1.3e-3 at T = 400, 5e-4 at T = 1000, after a transient of T/10).
const linearRealPartTol = 2e-3

// TestLinearFlow: dy/dt = A y has exponents equal to the real parts of the
// eigenvalues of A (exact; reference library gonum mat.Eigen).
func TestLinearFlow(t *testing.T) {
	const n = 4
	rng := rand.New(rand.NewPCG(1, 2))
	a := mat.NewDense(n, n, nil)
	for i := 0; i < n; i++ {
		for j := 0; j < n; j++ {
			a.Set(i, j, rng.NormFloat64())
		}
	}
	var eig mat.Eigen
	if !eig.Factorize(a, mat.EigenNone) {
		t.Fatal("eigen decomposition failed")
	}
	var want []float64
	for _, v := range eig.Values(nil) {
		want = append(want, real(v))
	}
	sort.Sort(sort.Reverse(sort.Float64Slice(want)))
	p := integrate.Problem{
		F: func(_ float64, y, d []float64) {
			for i := 0; i < n; i++ {
				var s float64
				for j := 0; j < n; j++ {
					s += float64(a.At(i, j) * y[j])
				}
				d[i] = s
			}
		},
		Jac: func(_ float64, _ []float64, dst *mat.Dense) { dst.Copy(a) },
		Y0:  make([]float64, n), // the fixed point 0: the tangent dynamics are exactly A
	}
	sp, err := Exponents(context.Background(), p, n, &Settings{Duration: 1000})
	if err != nil {
		t.Fatal(err)
	}
	t.Logf("linear: got %v, want %v", sp.Exponents, want)
	for i := range want { // gonum mat.Eigen
		if d := math.Abs(sp.Exponents[i] - want[i]); d > linearRealPartTol {
			t.Errorf("lambda_%d = %.6f, want Re(eig) = %.6f (off by %.2g)", i+1, sp.Exponents[i], want[i], d)
		}
	}
	var trace float64
	for i := 0; i < n; i++ {
		trace += a.At(i, i)
	}
	var sum float64
	for _, v := range sp.Exponents {
		sum += v
	}
	if math.Abs(sum-trace) > 1e-6*(1+math.Abs(trace)) { // exact identity: Liouville
		t.Errorf("sum = %.9f, trace = %.9f", sum, trace)
	}
	if _, ok := sp.Check(CheckZero); ok {
		t.Errorf("zero check reported at a fixed point")
	}
}

// TestHamiltonianPairing: the Hénon–Heiles flow is Hamiltonian, so its
// exponents pair up as ±lambda and sum to zero (exact identities of
// symplectic tangent dynamics; Benettin et al. 1980).
func TestHamiltonianPairing(t *testing.T) {
	p := modelProblem(t, "henon-heiles")
	sp, err := Exponents(context.Background(), p, 4, &Settings{Duration: 1000, Transient: 50})
	if err != nil {
		t.Fatal(err)
	}
	c, ok := sp.Check(CheckPairing)
	if !ok {
		t.Fatal("no pairing check on a Hamiltonian flow")
	}
	t.Logf("henon-heiles: %v ± %v, pairing %+v", sp.Exponents, sp.StdErr, c)
	if c.Residual > nSigma*c.StdErr+1e-6 {
		t.Errorf("pairing residual %.3g, want within %d standard errors %.3g", c.Residual, nSigma, c.StdErr)
	}
	if tr, _ := sp.Check(CheckTrace); tr.Residual > 1e-6 { // trace 0: exact
		t.Errorf("trace residual %.3g", tr.Residual)
	}
}

// TestDeterministic: the same input gives the same bits, and a nil Method
// means DormandPrince54.
func TestDeterministic(t *testing.T) {
	p := modelProblem(t, "lorenz")
	a, err := Exponents(context.Background(), p, 3, &Settings{Duration: 20})
	if err != nil {
		t.Fatal(err)
	}
	b, err := Exponents(context.Background(), p, 3, &Settings{Duration: 20, Method: integrate.DormandPrince54})
	if err != nil {
		t.Fatal(err)
	}
	for i := range a.Exponents {
		if a.Exponents[i] != b.Exponents[i] || a.StdErr[i] != b.StdErr[i] {
			t.Errorf("run 1 %v ± %v, run 2 %v ± %v", a.Exponents, a.StdErr, b.Exponents, b.StdErr)
		}
	}
	if a.Method != integrate.DormandPrince54.Name() {
		t.Errorf("method %q", a.Method)
	}
}

// TestFixedInterval: a caller's interval is kept, and the estimate does not
// depend on it beyond the statistical error.
func TestFixedInterval(t *testing.T) {
	p := modelProblem(t, "lorenz")
	sp, err := Exponents(context.Background(), p, 3, &Settings{Duration: 500, Transient: 20, Interval: 0.1})
	if err != nil {
		t.Fatal(err)
	}
	if sp.MeanInterval < 0.1 || sp.MeanInterval > 0.12 {
		t.Errorf("mean interval %g, want 0.1 (up to one step)", sp.MeanInterval)
	}
	sum := sp.Exponents[0] + sp.Exponents[1] + sp.Exponents[2]
	if math.Abs(sum+41.0/3) > sumRelTol*41/3 { // exact identity
		t.Errorf("sum %.10f", sum)
	}
	for i, want := range lorenzSprott { // Sprott 1998/2004
		if d := math.Abs(sp.Exponents[i] - want); d > nSigma*sp.StdErr[i]+1e-4 {
			t.Errorf("lambda_%d = %.5f ± %.5f, want %.4f", i+1, sp.Exponents[i], sp.StdErr[i], want)
		}
	}
}

// TestTarget: with a target error the run stops once every standard error
// reaches it, and says so.
func TestTarget(t *testing.T) {
	p := modelProblem(t, "lorenz")
	const target = 0.02
	sp, err := Exponents(context.Background(), p, 3, &Settings{Duration: 5000, Transient: 20, Target: target, Blocks: 200})
	if err != nil {
		t.Fatal(err)
	}
	if !sp.Converged || sp.Blocks < MinBlocks || sp.Duration >= 5000 {
		t.Fatalf("converged %v after %d blocks, duration %g", sp.Converged, sp.Blocks, sp.Duration)
	}
	for i, se := range sp.StdErr {
		if se > target {
			t.Errorf("std_err[%d] = %g > target %g", i, se, target)
		}
	}
	// Not reached: a target far below what the duration allows.
	sp, err = Exponents(context.Background(), p, 3, &Settings{Duration: 50, Target: 1e-6})
	if err != nil {
		t.Fatal(err)
	}
	if sp.Converged {
		t.Errorf("converged with std_err %v against 1e-6", sp.StdErr)
	}
}

// TestSettingsUnchanged: settings are copied, never written back (STYLE.md
// item 2), and a nil *Settings takes the defaults.
func TestSettingsUnchanged(t *testing.T) {
	p := modelProblem(t, "lorenz")
	s := &Settings{Duration: 10}
	before := *s
	if _, err := Exponents(context.Background(), p, 3, s); err != nil {
		t.Fatal(err)
	}
	if s.Transient != before.Transient || s.Method != nil || s.RelTol != 0 || s.Blocks != 0 {
		t.Errorf("settings written back: %+v", *s)
	}
	sp, err := MapExponents(context.Background(), henon{1.4, 0.3}, []float64{0.1, 0.1}, 2, nil)
	if err != nil {
		t.Fatal(err)
	}
	if sp.Duration != DefaultIterations || sp.Transient != DefaultIterations/10 || sp.Blocks != DefaultBlocks {
		t.Errorf("defaults: duration %g transient %g blocks %d", sp.Duration, sp.Transient, sp.Blocks)
	}
}
