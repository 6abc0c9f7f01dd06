package lyap

import (
	"context"
	"errors"
	"math"
	"math/big"
	"math/rand/v2"
	"testing"

	"github.com/plumbdyn/plumb/integrate"
	"github.com/plumbdyn/plumb/internal/dd"
	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
	"gonum.org/v1/gonum/mat"
)

// ddHenon is the Hénon map with its double-double form.
type ddHenon struct{ henon }

func (m ddHenon) NextDD(x, dst []DoubleDouble) error {
	x0, y0 := x[0], x[1]
	dst[0] = dd.Sub(dd.Add(dd.From(1), y0), dd.MulFloat(dd.Mul(x0, x0), m.a))
	dst[1] = dd.MulFloat(x0, m.b)
	return nil
}

// ddLogistic is the logistic map with its double-double form.
type ddLogistic struct{ logistic }

func (m ddLogistic) NextDD(x, dst []DoubleDouble) error {
	dst[0] = dd.MulFloat(dd.Mul(x[0], dd.Sub(dd.From(1), x[0])), m.r)
	return nil
}

// catMap is the cat map (x, y) -> (2x + y, x + y) mod 1 on the unit torus
// (V. I. Arnold, A. Avez, Ergodic problems of classical mechanics,
// Benjamin 1968): uniformly hyperbolic, eigenvalues (3 ± √5)/2 with
// orthogonal eigenvectors (the matrix is symmetric).
type catMap struct{}

func (catMap) Dim() int               { return 2 }
func (catMap) Periods() []float64     { return []float64{1, 1} }
func (catMap) HasJacobian() bool      { return true }
func (catMap) wrap(v float64) float64 { return v - math.Floor(v) }
func (c catMap) Next(x, dst []float64) {
	a, b := x[0], x[1]
	dst[0], dst[1] = c.wrap(2*a+b), c.wrap(a+b)
}
func (catMap) Jacobian(_ []float64, dst *mat.Dense) {
	dst.Set(0, 0, 2)
	dst.Set(0, 1, 1)
	dst.Set(1, 0, 1)
	dst.Set(1, 1, 1)
}
func (catMap) NextDD(x, dst []DoubleDouble) error {
	a, b := x[0], x[1]
	for k, v := range []DoubleDouble{dd.Add(dd.Add(a, a), b), dd.Add(a, b)} {
		f := math.Floor(v.Float64())
		r := dd.Sub(v, dd.From(f))
		if r.Hi < 0 {
			r = dd.Add(r, dd.From(1))
		}
		dst[k] = r
	}
	return nil
}

// floatOrbit iterates m in float64 from x0 for steps steps.
func floatOrbit(m Map, x0 []float64, steps int) []float64 {
	n := m.Dim()
	p := make([]float64, (steps+1)*n)
	copy(p, x0)
	for i := 0; i < steps; i++ {
		m.Next(p[i*n:(i+1)*n], p[(i+1)*n:(i+2)*n])
	}
	return p
}

// Tolerances of the shadowing tests.
const (
	// publishedShadowDistance is the order of the shadowing distance
	// Hammel, Yorke & Grebogi report for float64-like (about 14 digits)
	// orbits of the logistic map over 10^7 iterates (J. Complexity 3 (1987)
	// 136–145: within 1e-8) and of the Hénon map (Bull. AMS 19 (1988)
	// 465–469, the same order; from memory per REFERENCES.md §6). Shorter
	// orbits with 16-digit rounding can only need less.
	publishedShadowDistance = 1e-8
	// refinedBig is the one-step error a refined orbit must show when
	// checked in 240-bit math/big arithmetic: ShadowTarget with room for
	// the double-double rounding of the stored states.
	refinedBig = 1e-26
)

// bigStepErrors checks the refined orbit of a map given as a math/big
// function: the largest one-step error over every step.
func bigStepErrors(q []DoubleDouble, n int, f func(x []*big.Float) []*big.Float) float64 {
	worst := 0.0
	steps := len(q)/n - 1
	x := make([]*big.Float, n)
	for i := 0; i < steps; i++ {
		for k := 0; k < n; k++ {
			x[k] = new(big.Float).SetPrec(240).Set(q[i*n+k].Big())
		}
		fx := f(x)
		var ss float64
		for k := 0; k < n; k++ {
			d, _ := new(big.Float).SetPrec(240).Sub(fx[k], q[(i+1)*n+k].Big()).Float64()
			ss += d * d
		}
		worst = math.Max(worst, math.Sqrt(ss))
	}
	return worst
}

func TestShadowLogistic(t *testing.T) {
	// r = 3.8: the parameter of Hammel, Yorke & Grebogi (1987) (from memory,
	// REFERENCES.md §6), chaotic.
	m := ddLogistic{logistic{r: 3.8}}
	for _, steps := range []int{10_000, 100_000} {
		if testing.Short() && steps > 10_000 {
			continue
		}
		p := floatOrbit(m, []float64{0.3}, steps)
		sh, err := ShadowMap(context.Background(), m, p, nil)
		require.NoError(t, err)
		require.Nil(t, sh.Glitch, "glitch %+v", sh.Glitch)
		assert.Equal(t, steps, sh.Shadowed)
		assert.Equal(t, 1, sh.Unstable)
		assert.LessOrEqualf(t, sh.Distance, publishedShadowDistance, "steps %d: Hammel, Yorke & Grebogi (1987): within 1e-8 for 1e7 iterates", steps)
		// c_(i+1) − f'(p_i) c_i = e_(i+1) and |f'| ≤ r: max|c|·(1+r) ≥
		// max|e| (exact identity of the correction equation).
		assert.GreaterOrEqual(t, sh.Distance*(1+3.8), sh.StepErrorBefore)
		assert.LessOrEqual(t, sh.StepErrorBefore, 1e-15, "a float64 orbit errs by rounding")
		assert.LessOrEqual(t, sh.StepErrorAfter, ShadowTarget)
		if steps == 10_000 {
			got := bigStepErrors(sh.Refined, 1, func(x []*big.Float) []*big.Float {
				r := new(big.Float).SetPrec(240).SetFloat64(3.8)
				one := new(big.Float).SetPrec(240).SetInt64(1)
				v := new(big.Float).SetPrec(240).Sub(one, x[0])
				v.Mul(v, x[0]).Mul(v, r)
				return []*big.Float{v}
			})
			assert.LessOrEqualf(t, got, refinedBig, "one-step errors of the refined orbit in math/big")
		}
		t.Logf("logistic %d iterates: distance %.3g at %d, before %.3g, after %.3g, passes %d, amplification %.3g",
			steps, sh.Distance, sh.DistanceAt, sh.StepErrorBefore, sh.StepErrorAfter, sh.Passes, sh.Amplification)
	}
}

func TestShadowHenon(t *testing.T) {
	m := ddHenon{henon{a: 1.4, b: 0.3}}
	for _, steps := range []int{10_000, 100_000} {
		if testing.Short() && steps > 10_000 {
			continue
		}
		p := floatOrbit(m, []float64{0.1, 0.1}, steps)
		sh, err := ShadowMap(context.Background(), m, p, nil)
		require.NoError(t, err)
		require.Nil(t, sh.Glitch, "glitch %+v", sh.Glitch)
		assert.Equal(t, steps, sh.Shadowed)
		assert.Equal(t, 1, sh.Unstable)
		// λ1 + λ2 = ln|det J| = ln 0.3 for every orbit (exact identity).
		assert.InDeltaf(t, math.Log(0.3), sh.Exponents[0]+sh.Exponents[1], 1e-9, "exponent sum = ln b")
		assert.LessOrEqualf(t, sh.Distance, publishedShadowDistance, "steps %d: Hammel, Yorke & Grebogi (1988): of order 1e-8 for 1e7 iterates", steps)
		// ‖J‖ ≤ 1 + 2a|x| + b on the orbit, |x| < 1.5: max|c|·(1+‖J‖) ≥ max|e|.
		assert.GreaterOrEqual(t, sh.Distance*(2+2*1.4*1.5+0.3), sh.StepErrorBefore)
		assert.LessOrEqual(t, sh.StepErrorAfter, ShadowTarget*2)
		if steps == 10_000 {
			got := bigStepErrors(sh.Refined, 2, func(x []*big.Float) []*big.Float {
				a := new(big.Float).SetPrec(240).SetFloat64(1.4)
				b := new(big.Float).SetPrec(240).SetFloat64(0.3)
				u := new(big.Float).SetPrec(240).Mul(x[0], x[0])
				u.Mul(u, a)
				v := new(big.Float).SetPrec(240).SetInt64(1)
				v.Add(v, x[1]).Sub(v, u)
				return []*big.Float{v, new(big.Float).SetPrec(240).Mul(x[0], b)}
			})
			assert.LessOrEqualf(t, got, refinedBig, "one-step errors of the refined orbit in math/big")
		}
		t.Logf("hénon %d iterates: distance %.3g at %d, before %.3g, after %.3g, passes %d, min angle %.3g at %d, exponents %v",
			steps, sh.Distance, sh.DistanceAt, sh.StepErrorBefore, sh.StepErrorAfter, sh.Passes, sh.MinAngle, sh.MinAngleAt, sh.Exponents)
	}
}

func TestShadowJumpRefused(t *testing.T) {
	m := ddHenon{henon{a: 1.4, b: 0.3}}
	const at = 5000
	p := floatOrbit(m, []float64{0.1, 0.1}, 10_000)
	p[at*2] += 1e-6 // far beyond rounding, yet a small change of state
	sh, err := ShadowMap(context.Background(), m, p, nil)
	require.Error(t, err)
	assert.Nil(t, sh)
	var je *JumpError
	require.ErrorAs(t, err, &je)
	assert.ErrorIs(t, err, ErrJump)
	assert.Equal(t, at, je.Index)
	assert.InDelta(t, 1e-6, je.Size, 1e-12, "the jump's size")
	assert.Contains(t, err.Error(), "iterate 5000")
}

func TestShadowCatMapLemma(t *testing.T) {
	// For the cat map with orthogonal eigenvectors, the split corrections
	// obey |a| ≤ δ Σ_(k≥1) λ^-k = δ/(λ−1) = δ/φ (unstable, backward) and
	// |b| ≤ δ Σ_(k≥0) λ^-k = δ·λ/(λ−1) = δ·φ (stable, forward), λ =
	// (3+√5)/2, φ the golden ratio; so |c| ≤ δ·√(φ²+φ⁻²) = δ·√3: the
	// shadowing lemma's bound, distance proportional to the one-step error
	// (geometric series; exact identity).
	lambda := (3 + math.Sqrt(5)) / 2
	lemma := math.Sqrt(3)
	const steps = 2000
	var amp []float64
	for _, delta := range []float64{1e-9, 1e-7, 1e-5} {
		rng := rand.New(rand.NewPCG(7, 11))
		p := make([]float64, (steps+1)*2)
		p[0], p[1] = 0.2, 0.7
		for i := 0; i < steps; i++ {
			catMap{}.Next(p[2*i:2*i+2], p[2*i+2:2*i+4])
			th := 2 * math.Pi * rng.Float64()
			p[2*i+2] = catMap{}.wrap(p[2*i+2] + delta*math.Cos(th))
			p[2*i+3] = catMap{}.wrap(p[2*i+3] + delta*math.Sin(th))
		}
		sh, err := ShadowMap(context.Background(), catMap{}, p, &ShadowSettings{MaxStepError: 1e-4})
		require.NoError(t, err)
		require.Nil(t, sh.Glitch)
		assert.Equal(t, steps, sh.Shadowed)
		assert.InDelta(t, math.Log(lambda), sh.Exponents[0], 1e-2, "ln λ, eigenvalue of the cat matrix")
		assert.InDelta(t, math.Pi/2, sh.MinAngle, 1e-6, "orthogonal eigenvectors")
		assert.LessOrEqualf(t, sh.Distance, lemma*sh.StepErrorBefore, "delta %g: shadowing lemma bound √3·δ", delta)
		assert.GreaterOrEqual(t, sh.Distance, sh.StepErrorBefore/(1+lambda), "max|c|(1+‖J‖) ≥ max|e|")
		amp = append(amp, sh.Amplification)
		t.Logf("cat map δ=%g: distance %.6g, amplification %.6g (bound √3 = %.6g)", delta, sh.Distance, sh.Amplification, lemma)
	}
	// The map is linear: the corrections scale with the errors exactly, up to
	// the float64 rounding of the pseudo-orbit (1e-16 against δ = 1e-9).
	for _, a := range amp[1:] {
		assert.InEpsilon(t, amp[0], a, 1e-5, "distance proportional to the one-step error")
	}
}

func TestShadowCriticalPointGlitch(t *testing.T) {
	// A logistic orbit through the critical point x = 1/2 (f' = 0): built
	// backward by 300 preimages of 1/2 (contracting on average, so the
	// one-step errors stay at rounding), then forward from 1/2. No split
	// exists at iterate 300: the shadow must stop before it.
	const r, back, fwd = 3.8, 300, 700
	m := ddLogistic{logistic{r: r}}
	rng := rand.New(rand.NewPCG(3, 5))
	p := make([]float64, back+fwd+1)
	p[back] = 0.5
	for i := back; i > 0; i-- {
		s := math.Sqrt(1 - 4*p[i]/r)
		// The right branch unless it leaves no preimage (above r/4).
		if p[i-1] = (1 + s) / 2; rng.IntN(2) == 0 || p[i-1] > r/4 {
			p[i-1] = (1 - s) / 2
		}
	}
	for i := back; i < back+fwd; i++ {
		m.Next(p[i:i+1], p[i+1:i+2])
	}
	sh, err := ShadowMap(context.Background(), m, p, nil)
	require.NoError(t, err)
	require.NotNil(t, sh.Glitch, "an orbit through the critical point is not certified")
	assert.Equal(t, back, sh.Glitch.Index)
	assert.Less(t, sh.Shadowed, back)
	t.Logf("glitch %+v, shadowed %d, distance %.3g", *sh.Glitch, sh.Shadowed, sh.Distance)
}

func TestShadowNearTangency(t *testing.T) {
	// The Hénon orbit's smallest angle between stable and unstable
	// directions, made the threshold: the shadow must stop there and say so.
	m := ddHenon{henon{a: 1.4, b: 0.3}}
	p := floatOrbit(m, []float64{0.1, 0.1}, 5000)
	full, err := ShadowMap(context.Background(), m, p, nil)
	require.NoError(t, err)
	sh, err := ShadowMap(context.Background(), m, p, &ShadowSettings{MinAngle: full.MinAngle * 1.0001})
	require.NoError(t, err)
	require.NotNil(t, sh.Glitch)
	assert.Equal(t, full.MinAngleAt, sh.Glitch.Index)
	assert.InEpsilon(t, full.MinAngle, sh.Glitch.Angle, 1e-12)
	assert.Less(t, sh.Shadowed, full.MinAngleAt)
	assert.Contains(t, sh.Glitch.Reason, "near-tangency")
	t.Logf("min angle %.3g at %d; glitch shadowed %d", full.MinAngle, full.MinAngleAt, sh.Shadowed)
}

func TestShadowMapErrors(t *testing.T) {
	m := ddHenon{henon{a: 1.4, b: 0.3}}
	ctx := context.Background()
	for _, tc := range []struct {
		name  string
		orbit []float64
		s     *ShadowSettings
		want  error
	}{
		{"odd length", []float64{0, 0, 1}, nil, ErrDimension},
		{"one state", []float64{0, 0}, nil, ErrDimension},
		{"NaN", []float64{0, 0, math.NaN(), 0}, nil, ErrNonFinite},
		{"unstable too many", []float64{0, 0, 1, 0}, &ShadowSettings{Unstable: 3}, ErrSettings},
		{"negative angle", []float64{0, 0, 1, 0}, &ShadowSettings{MinAngle: -1}, ErrSettings},
	} {
		_, err := ShadowMap(ctx, m, tc.orbit, tc.s)
		assert.ErrorIs(t, err, tc.want, tc.name)
	}
	_, err := ShadowMap(ctx, nil, []float64{0, 1}, nil)
	assert.ErrorIs(t, err, ErrSystem)
	ctx2, cancel := context.WithCancel(ctx)
	cancel()
	_, err = ShadowMap(ctx2, m, floatOrbit(m, []float64{0.1, 0.1}, 100), nil)
	assert.True(t, errors.Is(err, context.Canceled))
}

// BenchmarkShadowHenon shadows 10^5 float64 iterates of the Hénon map.
func BenchmarkShadowHenon(b *testing.B) {
	m := ddHenon{henon{a: 1.4, b: 0.3}}
	const steps = 100_000
	p := floatOrbit(m, []float64{0.1, 0.1}, steps)
	b.ReportAllocs()
	for b.Loop() {
		sh, err := ShadowMap(context.Background(), m, p, nil)
		if err != nil || sh.Shadowed != steps {
			b.Fatalf("shadowed %v, err %v", sh, err)
		}
	}
	b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(b.N)/steps, "ns/iterate")
}

func TestShadowMapAllocsDoNotGrow(t *testing.T) {
	// The work per iterate allocates nothing: the slices are made once per
	// attempt, so 10 times the iterates costs the same number of
	// allocations.
	m := ddHenon{henon{a: 1.4, b: 0.3}}
	short, long := floatOrbit(m, []float64{0.1, 0.1}, 1000), floatOrbit(m, []float64{0.1, 0.1}, 10_000)
	count := func(p []float64) float64 {
		return testing.AllocsPerRun(3, func() {
			if _, err := ShadowMap(context.Background(), m, p, nil); err != nil {
				t.Fatal(err)
			}
		})
	}
	a, b := count(short), count(long)
	assert.Equal(t, a, b, "allocations for 1000 and 10000 iterates")
}

// panicky panics in its double-double form at x > 1.2 (a user's bug).
type panicky struct{ ddHenon }

func (m panicky) NextDD(x, dst []DoubleDouble) error {
	if x[0].Hi > 1.2 {
		panic("index out of range in the user's map")
	}
	return m.ddHenon.NextDD(x, dst)
}

func TestShadowMapPanicRecovered(t *testing.T) {
	m := panicky{ddHenon{henon{a: 1.4, b: 0.3}}}
	p := floatOrbit(m, []float64{0.1, 0.1}, 200)
	var sh *Shadow
	var err error
	require.NotPanics(t, func() { sh, err = ShadowMap(context.Background(), m, p, nil) })
	if sh != nil { // the partial result certifies nothing
		assert.Zero(t, sh.Shadowed)
	}
	assert.ErrorContains(t, err, "index out of range in the user's map")
	var ce *integrate.CallbackError
	require.ErrorAs(t, err, &ce)
	assert.Equal(t, integrate.CallbackMap, ce.Callback)
	assert.Greater(t, p[2*int(ce.T)], 1.2, "the iterate named is where the map panicked")
}
