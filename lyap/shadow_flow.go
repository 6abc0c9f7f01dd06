package lyap

import (
	"context"
	"fmt"
	"math"

	"github.com/plumbdyn/plumb/integrate"
	"github.com/plumbdyn/plumb/internal/detmath"
	"gonum.org/v1/gonum/mat"
)

// FlowShadowSettings controls ShadowFlow. A nil *FlowShadowSettings means
// the defaults of every field.
type FlowShadowSettings struct {
	// RelTol is the relative and absolute tolerance of the accurate
	// integration of each segment and its tangent map (DormandPrince853;
	// 0: DefaultFlowShadowTol). The refined chain is continuous to about
	// this precision, so it must be far below the run's own.
	RelTol float64
	// MaxStepError is the largest gap between a segment's accurate end and
	// the next joint of the run that is taken for the run's error; a larger
	// one is a jump (*JumpError; 0: 1e-2·max(1, the run's largest
	// component)).
	MaxStepError float64
	// MaxDistance is the largest correction before the refinement is taken
	// to have left the linear regime (0: 1e-2·max(1, the run's largest
	// component)).
	MaxDistance float64
	// TimeWeight weighs a segment's change of duration against a change of
	// state in the least-squares correction, in units of the run's
	// root-mean-square speed (0: DefaultTimeWeight).
	TimeWeight float64
	// MinAngle is the smallest angle, in radians, between the expanding
	// directions of the refined chain and the others at which the shadow
	// is certified (0: DefaultMinAngle); below it the shadow stops at a
	// glitch.
	MinAngle float64
	// Passes bounds the refinement passes (0: DefaultPasses).
	Passes int
}

// Defaults of FlowShadowSettings.
const (
	// DefaultFlowShadowTol is the default tolerance of the segments'
	// accurate integration: two orders above the 1e-15 floor of the
	// integrators' tolerance check, five or more below a typical run's.
	DefaultFlowShadowTol = 1e-13
	// DefaultTimeWeight makes a change of a segment's duration cost a tenth
	// of the same displacement across the flow, so that drift along the
	// orbit is taken up mostly by the time rescaling, as Coomes, Koçak &
	// Palmer allow.
	DefaultTimeWeight = 0.1
	// flowConverged is the factor by which the refined chain's gaps must
	// fall below the run's (or reach the accurate integration's floor).
	flowConverged = 1e-3
)

// ShadowFlow looks for a true orbit of the autonomous flow of p near a
// computed run given at joints: times[k] and states[k·n:(k+1)·n], k =
// 0..K. It is multiple shooting after Coomes, Koçak & Palmer: each segment
// is integrated accurately from its joint (DormandPrince853 at RelTol) with
// its tangent map Φ_k; the gaps e_(k+1) = φ_(s_k)(y_k) − y_(k+1) are closed
// by corrections c_k of the joints and τ_k of the segments' durations with
// c_(k+1) = Φ_k c_k + f(y_(k+1)) τ_k + e_(k+1) — the flow direction taken
// up by the time rescaling — pass after pass. Each pass takes the
// minimum-norm solution of that equation, Σ|c_k|² + α²Σ τ_k² least (after
// Wang's least-squares shadowing), by a block-tridiagonal solve of its
// normal equations; it needs no split into stable and unstable directions,
// so it holds where the split is poor.
//
// The result's Distance is the largest correction of a joint; Until the
// time of the last joint shadowed; TimeShift the largest drift of the
// shadow's clock from the run's. Where the refinement diverges or stalls,
// Glitch gives the joint and its time and the run is shadowed up to just
// before it. A gap beyond MaxStepError is refused with a *JumpError. The
// field must not depend on time (the rescaling moves the clock).
//
// Errors before any work (nil Shadow): a nil field or one that depends on
// time (ErrSystem), no Jacobian
// (ErrNoJacobian), states not matching times (ErrDimension), times not
// increasing or values not finite (ErrNonFinite or ErrSettings), invalid
// settings (ErrSettings), a jump (ErrJump). A failed segment integration
// returns its error; a canceled ctx the partial Shadow with ctx's error.
//
// References:
//
//	B. A. Coomes, H. Koçak, K. J. Palmer, Rigorous computational shadowing
//	  of orbits of ordinary differential equations, Numer. Math. 69 (1995)
//	  401–421.
//	Q. Wang, Convergence of the least squares shadowing method for
//	  computing derivative of ergodic averages, SIAM J. Numer. Anal. 52
//	  (2014) 156–170.
func ShadowFlow(ctx context.Context, p integrate.Problem, times, states []float64, s *FlowShadowSettings) (res *Shadow, err error) {
	at := math.NaN()
	defer func() {
		// A panic in the caller's field outside the integrations (which
		// recover their own) ends the work with a CallbackError.
		if v := recover(); v != nil {
			err = fmt.Errorf("lyap: ShadowFlow: %w", integrate.Recovered(integrate.CallbackField, at, v))
		}
	}()
	if ctx == nil {
		ctx = context.Background()
	}
	if p.F == nil {
		return nil, fmt.Errorf("lyap: ShadowFlow: nil vector field: %w", ErrSystem)
	}
	if p.Jac == nil {
		return nil, fmt.Errorf("lyap: ShadowFlow: the problem has no Jacobian: %w", ErrNoJacobian)
	}
	K := len(times) - 1
	if K < 1 || len(states) == 0 || len(states)%len(times) != 0 {
		return nil, fmt.Errorf("lyap: ShadowFlow: %d states values for %d times: %w", len(states), len(times), ErrDimension)
	}
	n := len(states) / len(times)
	for i, v := range states {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return nil, fmt.Errorf("lyap: ShadowFlow: state value %d (joint %d, component %d) is %v: %w", i, i/n, i%n, v, ErrNonFinite)
		}
	}
	for k := 0; k < K; k++ {
		if !(times[k+1] > times[k]) || math.IsInf(times[k+1]-times[k], 0) {
			return nil, settingErr("times", times[k+1], fmt.Sprintf("must increase (joint %d after %v)", k+1, times[k]))
		}
	}
	c := FlowShadowSettings{}
	if s != nil {
		c = *s
	}
	switch {
	case !(c.RelTol >= 0) || c.RelTol >= 1e-3:
		return nil, settingErr("FlowShadowSettings.RelTol", c.RelTol, "must be in [0, 1e-3)")
	case !(c.MaxStepError >= 0) || math.IsInf(c.MaxStepError, 0):
		return nil, settingErr("FlowShadowSettings.MaxStepError", c.MaxStepError, "must be finite and >= 0")
	case !(c.MaxDistance >= 0) || math.IsInf(c.MaxDistance, 0):
		return nil, settingErr("FlowShadowSettings.MaxDistance", c.MaxDistance, "must be finite and >= 0")
	case !(c.TimeWeight >= 0) || math.IsInf(c.TimeWeight, 0):
		return nil, settingErr("FlowShadowSettings.TimeWeight", c.TimeWeight, "must be finite and >= 0")
	case c.Passes < 0:
		return nil, settingErr("FlowShadowSettings.Passes", c.Passes, "must be >= 0")
	case !(c.MinAngle >= 0) || c.MinAngle >= math.Pi/2:
		return nil, settingErr("FlowShadowSettings.MinAngle", c.MinAngle, "must be in [0, π/2)")
	}
	if c.MinAngle == 0 {
		c.MinAngle = DefaultMinAngle
	}
	mag := 1.0
	for _, v := range states {
		mag = math.Max(mag, math.Abs(v))
	}
	if c.RelTol == 0 {
		c.RelTol = DefaultFlowShadowTol
	}
	if c.MaxStepError == 0 {
		c.MaxStepError = 1e-2 * mag
	}
	if c.MaxDistance == 0 {
		c.MaxDistance = 1e-2 * mag
	}
	if c.TimeWeight == 0 {
		c.TimeWeight = DefaultTimeWeight
	}
	if c.Passes == 0 {
		c.Passes = DefaultPasses
	}
	p = p.Own()
	at = times[0]
	if t, ok := timeDependent(p, times, states[:n]); ok {
		return nil, fmt.Errorf("lyap: ShadowFlow: the vector field at the first state differs at t=%g from t=%g: it depends on time, and the shadow rescales time (an autonomous field only): %w",
			t, times[0], ErrSystem)
	}
	fs := &flowShadow{p: p, cfg: c, n: n, times: times, y0: states, mag: mag,
		jm: mat.NewDense(n, n, nil)}
	res = &Shadow{Dim: n, Iterates: K, MinAngle: math.Pi / 2}
	at = times[0]
	for length, attempt := K, 0; ; attempt++ {
		if attempt == maxShadowAttempts || length < 1 {
			res.Shadowed, res.Until = 0, times[0]
			return res, nil
		}
		g, err := fs.try(ctx, length, res, attempt == 0)
		if err != nil {
			return res, err
		}
		if g == nil {
			res.Shadowed, res.Until = length, times[length]
			return res, nil
		}
		res.Glitch = g
		length = g.Index - 1
	}
}

// timeDependent evaluates the field at y on the first, middle and last
// joint's time: a field that differs is not autonomous (one that agrees at
// these three times is taken to be).
func timeDependent(p integrate.Problem, times, y []float64) (float64, bool) {
	n := len(y)
	ref, f := make([]float64, n), make([]float64, n)
	p.F(times[0], y, ref)
	for _, t := range []float64{times[len(times)/2], times[len(times)-1]} {
		p.F(t, y, f)
		for i := range f {
			if f[i] != ref[i] && !(math.IsNaN(f[i]) && math.IsNaN(ref[i])) {
				return t, true
			}
		}
	}
	return 0, false
}

// flowShadow is the workspace of ShadowFlow.
type flowShadow struct {
	p     integrate.Problem
	cfg   FlowShadowSettings
	n     int
	times []float64
	y0    []float64
	mag   float64
	jm    *mat.Dense

	y, dur   []float64 // joints and segment durations being refined
	gap, phi []float64 // e_(k+1) (row k+1) and Φ_k (n² per segment)
	f        []float64 // f(y_k) at every joint
}

// segments integrates every segment of the chain over 0..L and fills the
// gaps, tangent maps and speeds; it returns the largest gap and its joint.
func (fs *flowShadow) segments(ctx context.Context, L int) (big float64, at int, err error) {
	n := fs.n
	aug := integrate.Problem{F: func(t float64, z, dz []float64) {
		fs.p.F(t, z[:n], dz[:n])
		fs.p.Jac(t, z[:n], fs.jm)
		for r := 0; r < n; r++ {
			for c := 0; c < n; c++ {
				var s float64
				for j := 0; j < n; j++ {
					s += float64(fs.jm.At(r, j) * z[n+j*n+c])
				}
				dz[n+r*n+c] = s
			}
		}
	}}
	z := make([]float64, n+n*n)
	t := fs.times[0]
	for k := 0; k < L; k++ {
		if err := ctx.Err(); err != nil {
			return 0, 0, err
		}
		copy(z, fs.y[k*n:(k+1)*n])
		clear(z[n:])
		for i := 0; i < n; i++ {
			z[n+i*n+i] = 1
		}
		aug.T0, aug.Y0 = t, z
		sol, err := integrate.Solve(ctx, aug, t+fs.dur[k], integrate.DormandPrince853,
			&integrate.Settings{RelTol: fs.cfg.RelTol, AbsTol: fs.cfg.RelTol, DropSteps: true})
		if err != nil {
			return 0, 0, fmt.Errorf("lyap: ShadowFlow: segment %d from t=%g: %w", k, t, err)
		}
		copy(fs.phi[k*n*n:(k+1)*n*n], sol.Final[n:])
		var ss float64
		for i := 0; i < n; i++ {
			d := sol.Final[i] - fs.y[(k+1)*n+i]
			fs.gap[(k+1)*n+i] = d
			ss += float64(d * d)
		}
		if g := math.Sqrt(ss); !(g <= big) {
			big, at = g, k+1
		}
		t += fs.dur[k]
	}
	for k := 0; k <= L; k++ {
		fs.p.F(fs.times[0], fs.y[k*n:(k+1)*n], fs.f[k*n:(k+1)*n])
	}
	return big, at, nil
}

// try shadows the chain of the first L segments; nil on success (res
// filled), else the glitch that stopped it.
func (fs *flowShadow) try(ctx context.Context, L int, res *Shadow, first bool) (*Glitch, error) {
	n := fs.n
	fs.y = append([]float64(nil), fs.y0[:(L+1)*n]...)
	fs.dur = make([]float64, L)
	for k := range fs.dur {
		fs.dur[k] = fs.times[k+1] - fs.times[k]
	}
	fs.gap = make([]float64, (L+1)*n)
	fs.phi = make([]float64, L*n*n)
	fs.f = make([]float64, (L+1)*n)
	before, at, err := fs.segments(ctx, L)
	if err != nil {
		return nil, err
	}
	if first {
		if before > fs.cfg.MaxStepError {
			return nil, &JumpError{Index: at, Size: before, Limit: fs.cfg.MaxStepError}
		}
		res.StepErrorBefore, res.StepErrorBeforeAt = before, at
	}
	floor := 100 * fs.cfg.RelTol * fs.mag
	goal := math.Max(flowConverged*before, floor)
	sol := newLSS(n, L)
	gap, passes := before, 0
	var far float64
	var farAt int
	for gap > goal {
		if passes == fs.cfg.Passes {
			return fs.glitch(at, fmt.Sprintf("the refinement did not close the gaps to %.3g in %d passes (%.3g left)", goal, passes, gap)), nil
		}
		passes++
		sol.solve(fs, L)
		far, farAt = 0, 0
		for k := 0; k <= L; k++ {
			var ss float64
			for i := 0; i < n; i++ {
				fs.y[k*n+i] += sol.c[k*n+i]
				d := fs.y[k*n+i] - fs.y0[k*n+i]
				ss += float64(d * d)
			}
			if d := math.Sqrt(ss); !(d <= far) {
				far, farAt = d, k
			}
		}
		for k := 0; k < L; k++ {
			fs.dur[k] += sol.tau[k]
		}
		if !(far <= fs.cfg.MaxDistance) {
			return fs.glitch(farAt, fmt.Sprintf("the corrections grow to %.3g at joint %d, beyond %.3g where the linearised chain holds", far, farAt, fs.cfg.MaxDistance)), nil
		}
		var g float64
		if g, at, err = fs.segments(ctx, L); err != nil {
			return nil, err
		}
		if g > goal && !(g <= gap/2) {
			return fs.glitch(at, fmt.Sprintf("the refinement stalled with a gap of %.3g at joint %d", g, at)), nil
		}
		gap = g
	}
	if g, err := fs.flowAngles(ctx, L, fs.cfg.MinAngle, res); g != nil || err != nil {
		return g, err
	}
	res.Distance, res.DistanceAt = far, farAt
	res.StepErrorAfter, res.Passes = gap, passes
	if res.StepErrorBefore > 0 {
		res.Amplification = far / res.StepErrorBefore
	}
	shift, clock := 0.0, fs.times[0]
	for k := 0; k < L; k++ {
		clock += fs.dur[k]
		shift = math.Max(shift, math.Abs(clock-fs.times[k+1]))
	}
	res.TimeShift = shift
	return nil, nil
}

func (fs *flowShadow) glitch(k int, why string) *Glitch {
	return &Glitch{Index: k, Time: fs.times[k], Reason: why + " (no split measured: the chain did not converge)"}
}

// lss solves one least-squares correction: minimise Σ|c_k|² + α²Σ τ_k²
// subject to c_(k+1) = Φ_k c_k + f_(k+1) τ_k + e_(k+1). With multipliers
// w_1..w_L (w_0 = w_(L+1) = 0): c_k = w_k − Φ_kᵀ w_(k+1), τ_k =
// −f_(k+1)ᵀ w_(k+1)/α², and
//
//	(I + Φ_(j−1)Φ_(j−1)ᵀ + f_j f_jᵀ/α²) w_j − Φ_(j−1) w_(j−1) − Φ_jᵀ w_(j+1) = e_j,
//
// a symmetric positive definite block-tridiagonal system solved by block
// elimination (every diagonal block stays ⪰ I).
type lss struct {
	n, L   int
	dinv   []float64 // D_j⁻¹ per joint
	g, w   []float64
	c, tau []float64
	a, m   []float64 // n×n scratch
	work   []float64
	v      []float64
}

func newLSS(n, L int) *lss {
	return &lss{n: n, L: L, dinv: make([]float64, (L+1)*n*n), g: make([]float64, (L+1)*n), w: make([]float64, (L+2)*n),
		c: make([]float64, (L+1)*n), tau: make([]float64, L), a: make([]float64, n*n), m: make([]float64, n*n),
		work: make([]float64, n*n), v: make([]float64, n)}
}

func (q *lss) solve(fs *flowShadow, L int) {
	n := q.n
	// α from the run's root-mean-square speed.
	var ss float64
	for _, v := range fs.f[:(L+1)*n] {
		ss += float64(v * v)
	}
	alpha := fs.cfg.TimeWeight * math.Sqrt(ss/float64(L+1))
	a2 := math.Max(float64(alpha*alpha), 1e-300)
	for j := 1; j <= L; j++ {
		phi := fs.phi[(j-1)*n*n : j*n*n]
		fj := fs.f[j*n : (j+1)*n]
		// A_j = I + Φ Φᵀ + f fᵀ/α².
		for r := 0; r < n; r++ {
			for c := 0; c < n; c++ {
				var s float64
				for k := 0; k < n; k++ {
					s += float64(phi[r*n+k] * phi[c*n+k])
				}
				s += float64(fj[r]*fj[c]) / a2
				if r == c {
					s++
				}
				q.a[r*n+c] = s
			}
		}
		copy(q.g[j*n:(j+1)*n], fs.gap[j*n:(j+1)*n])
		if j > 1 {
			// D_j = A_j − Φ_(j−1) D_(j−1)⁻¹ Φ_(j−1)ᵀ; g_j += Φ_(j−1) D_(j−1)⁻¹ g_(j−1).
			prev := q.dinv[(j-1)*n*n : j*n*n]
			mulInto(q.m, phi, prev, n, n) // Φ D⁻¹
			for r := 0; r < n; r++ {
				for c := 0; c < n; c++ {
					var s float64
					for k := 0; k < n; k++ {
						s += float64(q.m[r*n+k] * phi[c*n+k])
					}
					q.a[r*n+c] -= s
				}
				var s float64
				for k := 0; k < n; k++ {
					s += float64(q.m[r*n+k] * q.g[(j-1)*n+k])
				}
				q.g[j*n+r] += s
			}
		}
		invertSmall(q.a, q.dinv[j*n*n:(j+1)*n*n], q.work, n)
	}
	// Back substitution: w_L = D_L⁻¹ g_L, w_j = D_j⁻¹ (g_j + Φ_jᵀ w_(j+1)).
	clear(q.w)
	for j := L; j >= 1; j-- {
		copy(q.v, q.g[j*n:(j+1)*n])
		if j < L {
			phi := fs.phi[j*n*n : (j+1)*n*n]
			for r := 0; r < n; r++ {
				var s float64
				for k := 0; k < n; k++ {
					s += float64(phi[k*n+r] * q.w[(j+1)*n+k])
				}
				q.v[r] += s
			}
		}
		mulInto(q.w[j*n:(j+1)*n], q.dinv[j*n*n:(j+1)*n*n], q.v, n, 1)
	}
	// c_k = w_k − Φ_kᵀ w_(k+1) (w_0 = 0, w_(L+1) = 0); τ_k = −f_(k+1)ᵀ w_(k+1)/α².
	for k := 0; k <= L; k++ {
		for r := 0; r < n; r++ {
			s := q.w[k*n+r]
			if k < L {
				phi := fs.phi[k*n*n : (k+1)*n*n]
				for i := 0; i < n; i++ {
					s -= float64(phi[i*n+r] * q.w[(k+1)*n+i])
				}
			}
			q.c[k*n+r] = s
		}
		if k < L {
			var s float64
			for i := 0; i < n; i++ {
				s += float64(fs.f[(k+1)*n+i] * q.w[(k+1)*n+i])
			}
			q.tau[k] = -s / a2
		}
	}
}

// flowAngles measures, on the refined chain of L segments, the split of
// the tangent maps Φ_k into expanding directions and the rest (the flow
// direction and the contracting ones), as ShadowMap does for a map: the
// smallest angle between them and where. The expanding directions are
// those whose growth per unit time exceeds the band the flow direction's
// own growth can reach (ln of the speed's range over the span), so that
// the neutral direction is not counted. A split below minAngle is a
// glitch at that joint.
func (fs *flowShadow) flowAngles(ctx context.Context, L int, minAngle float64, res *Shadow) (*Glitch, error) {
	n := fs.n
	sh := &shadower{n: n, steps: L, tangent: fs.phi[:L*n*n], jd: make([]float64, n*n),
		cfg: ShadowSettings{MinAngle: minAngle}}
	var span float64 // the refined chain's own duration
	for _, d := range fs.dur[:L] {
		span += d
	}
	lo, hi := math.Inf(1), 0.0
	for k := 0; k <= L; k++ {
		var ss float64
		for _, v := range fs.f[k*n : (k+1)*n] {
			ss += float64(v * v)
		}
		lo, hi = math.Min(lo, math.Sqrt(ss)), math.Max(hi, math.Sqrt(ss))
	}
	band := 2 * math.Abs(detmath.Log(math.Max(hi, 1e-300)/math.Max(lo, 1e-300))) / span
	res.Exponents = sh.exponents()
	for i := range res.Exponents {
		res.Exponents[i] *= float64(L) / span // per unit time
		if res.Exponents[i] > band {
			sh.u++
		}
	}
	res.Unstable = sh.u
	if sh.u == 0 || sh.u == n {
		return nil, nil
	}
	g, err := sh.directions(ctx, L)
	res.MinAngle, res.MinAngleAt = sh.dirs.minAngle, sh.dirs.minAt
	if g != nil {
		sh.angleOf(g)
		g.Time = fs.times[g.Index]
		g.Reason = fmt.Sprintf("the expanding directions and the others are %.3g rad apart at joint %d (t = %g; below %.3g): a near-tangency",
			g.Angle, g.Index, g.Time, minAngle)
	}
	return g, err
}
