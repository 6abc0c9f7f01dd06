package lyap

import (
	"context"
	"fmt"
	"math"

	"github.com/plumbdyn/plumb/integrate"
	"github.com/plumbdyn/plumb/internal/dd"
	"gonum.org/v1/gonum/mat"
)

// ShadowMap looks for a true orbit of the map m near the given orbit (a
// float64 pseudo-orbit: states p_0..p_N, state after state, as maps.Orbit
// returns them) by the refinement of Hammel, Yorke & Grebogi: the one-step
// errors e_(i+1) = f(p_i) − p_(i+1) are measured in double-double, and the
// Newton-like correction c with c_(i+1) = J_i c_i + e_(i+1) is split along
// the stable and unstable directions of the orbit — the stable part
// propagated forward from c_0's stable part = 0, the unstable part backward
// from c_N's unstable part = 0, so that neither grows — and added to the
// orbit in double-double, pass after pass, until every one-step error is
// below ShadowTarget relative to the state. The unstable directions are the
// forward QR basis of the tangent map along the orbit; the stable ones the
// orthogonal complement of the backward QR basis of its transpose (both
// subspaces are carried exactly into each other by the tangent map, so the
// split is consistent at every iterate).
//
// Where the angle between the stable and unstable directions falls below
// MinAngle, a tangent map stops stretching, or the refinement diverges
// (the corrections outgrow MaxDistance) or stalls, the shadow stops: the
// result's Glitch names the iterate, the angle and the reason, and the
// orbit up to just before it is shadowed instead. A one-step error of the
// given orbit beyond MaxStepError is refused with a *JumpError naming the
// iterate (nil Shadow): a jump is not rounding.
//
// Errors before any work (nil Shadow): a nil m (ErrSystem), a map without a
// Jacobian (ErrNoJacobian), an orbit that is not whole states or shorter
// than two (ErrDimension), a non-finite value in it (ErrNonFinite), invalid
// settings (ErrSettings), a jump (ErrJump), an error of NextDD. A canceled
// ctx returns the partial Shadow with ctx's error.
//
// Cost: per pass O(N·n²) float64 work and N double-double evaluations of
// the map; memory O(N·n·u) for the directions (u the number of unstable
// directions) and O(N·n) for the orbit.
//
// References:
//
//	S. M. Hammel, J. A. Yorke, C. Grebogi, Do numerical orbits of chaotic
//	  dynamical processes represent true orbits?, J. Complexity 3 (1987)
//	  136–145.
//	S. M. Hammel, J. A. Yorke, C. Grebogi, Numerical orbits of chaotic
//	  processes represent true orbits, Bull. AMS 19 (1988) 465–469.
//	C. Grebogi, S. M. Hammel, J. A. Yorke, T. Sauer, Shadowing of physical
//	  trajectories in chaotic dynamics: containment and refinement, Phys.
//	  Rev. Lett. 65 (1990) 1527–1530.
func ShadowMap(ctx context.Context, m ShadowableMap, orbit []float64, s *ShadowSettings) (res *Shadow, err error) {
	var sh *shadower
	defer func() {
		// A panic in the caller's map ends the work with a CallbackError
		// naming the function and the iterate.
		if v := recover(); v != nil {
			name, at := integrate.CallbackMap, 0
			if sh != nil {
				name, at = sh.calling, sh.at
			}
			err = fmt.Errorf("lyap: ShadowMap: %w", integrate.Recovered(name, float64(at), v))
		}
	}()
	if ctx == nil {
		ctx = context.Background()
	}
	if m == nil {
		return nil, fmt.Errorf("lyap: ShadowMap: nil map: %w", ErrSystem)
	}
	if !hasJacobian(m) {
		return nil, fmt.Errorf("lyap: ShadowMap: the map has no Jacobian: %w", ErrNoJacobian)
	}
	n := m.Dim()
	if n < 1 || len(orbit)%n != 0 || len(orbit) < 2*n {
		return nil, fmt.Errorf("lyap: ShadowMap: %d orbit values are not two or more states of dimension %d: %w", len(orbit), n, ErrDimension)
	}
	for i, v := range orbit {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return nil, fmt.Errorf("lyap: ShadowMap: orbit value %d (iterate %d, component %d) is %v: %w", i, i/n, i%n, v, ErrNonFinite)
		}
	}
	cfg, err := shadowConfig(s, n)
	if err != nil {
		return nil, err
	}
	sh = newShadower(m, orbit, n, cfg)
	res = &Shadow{Dim: n, Iterates: sh.steps, MinAngle: math.Pi / 2}
	if err := sh.measureBefore(res); err != nil {
		return nil, err
	}
	sh.u = cfg.Unstable
	if sh.u == 0 {
		res.Exponents = sh.exponents()
		for _, l := range res.Exponents {
			if l > 0 {
				sh.u++
			}
		}
	}
	res.Unstable = sh.u
	for length, attempt := sh.steps, 0; ; attempt++ {
		if err := ctx.Err(); err != nil {
			return res, err
		}
		if attempt == maxShadowAttempts || length < 1 {
			res.Shadowed = 0
			return res, nil
		}
		g, err := sh.try(ctx, length, res)
		if err != nil {
			return res, err
		}
		if g == nil {
			res.Shadowed, res.Until = length, float64(length)
			return res, nil
		}
		res.Glitch = g
		length = g.Index - 1
	}
}

// maxShadowAttempts bounds the shorter prefixes tried after glitches: each
// ends before the last glitch found, so a few suffice unless glitches
// crowd, when the shadow is short anyway.
const maxShadowAttempts = 8

func shadowConfig(s *ShadowSettings, n int) (ShadowSettings, error) {
	var c ShadowSettings
	if s != nil {
		c = *s
	}
	switch {
	case c.Unstable < 0 || c.Unstable > n:
		return c, settingErr("ShadowSettings.Unstable", c.Unstable, fmt.Sprintf("must be in 0..%d (0: counted)", n))
	case !(c.MaxStepError >= 0) || math.IsInf(c.MaxStepError, 0):
		return c, settingErr("ShadowSettings.MaxStepError", c.MaxStepError, "must be finite and >= 0")
	case !(c.MaxDistance >= 0) || math.IsInf(c.MaxDistance, 0):
		return c, settingErr("ShadowSettings.MaxDistance", c.MaxDistance, "must be finite and >= 0")
	case !(c.MinAngle >= 0) || c.MinAngle >= math.Pi/2:
		return c, settingErr("ShadowSettings.MinAngle", c.MinAngle, "must be in [0, π/2)")
	case c.Passes < 0:
		return c, settingErr("ShadowSettings.Passes", c.Passes, "must be >= 0")
	}
	if c.MinAngle == 0 {
		c.MinAngle = DefaultMinAngle
	}
	if c.Passes == 0 {
		c.Passes = DefaultPasses
	}
	return c, nil
}

// shadower is the workspace of ShadowMap.
type shadower struct {
	m       ShadowableMap
	cfg     ShadowSettings
	n, u    int
	steps   int
	periods []float64
	p0      []float64 // the given orbit (not modified)
	mag     float64   // max(1, largest |component|)
	before  []float64 // |e_i| of the given orbit, i = 1..steps (index 0 unused)

	calling string // the caller's function running last, and at which iterate
	at      int
	jm      *mat.Dense
	jd      []float64 // J row-major
	tangent []float64 // a flow chain's tangent maps (n² per segment), in place of m
	xd      []DoubleDouble
	fx      []DoubleDouble

	dirs splitDirs
	q    []DoubleDouble // the refined orbit
	e    []float64      // one-step errors e_i, i = 1..L (row i)
	c    []float64      // corrections
	al   []float64      // unstable coordinates of e_i
	t, a []float64
}

func newShadower(m ShadowableMap, orbit []float64, n int, cfg ShadowSettings) *shadower {
	sh := &shadower{m: m, cfg: cfg, n: n, steps: len(orbit)/n - 1, p0: orbit, mag: 1,
		jm: mat.NewDense(n, n, nil), jd: make([]float64, n*n),
		xd: make([]DoubleDouble, n), fx: make([]DoubleDouble, n), t: make([]float64, n)}
	if p, ok := m.(interface{ Periods() []float64 }); ok {
		if ps := p.Periods(); len(ps) == n {
			sh.periods = ps
		}
	}
	for _, v := range orbit {
		sh.mag = math.Max(sh.mag, math.Abs(v))
	}
	if sh.cfg.MaxDistance == 0 {
		sh.cfg.MaxDistance = DefaultMaxDistance * sh.mag
	}
	return sh
}

// jac evaluates the Jacobian at iterate i of the given orbit into sh.jd
// (for a flow's chain, the tangent map of segment i).
func (sh *shadower) jac(i int) {
	n := sh.n
	if sh.tangent != nil {
		copy(sh.jd, sh.tangent[i*n*n:(i+1)*n*n])
		return
	}
	sh.calling, sh.at = integrate.CallbackMapJacobian, i
	sh.m.Jacobian(sh.p0[i*n:(i+1)*n], sh.jm)
	raw := sh.jm.RawMatrix()
	for r := 0; r < n; r++ {
		copy(sh.jd[r*n:(r+1)*n], raw.Data[r*raw.Stride:r*raw.Stride+n])
	}
}

// wrapDiff reduces a difference of component k modulo its period.
func (sh *shadower) wrapDiff(d float64, k int) float64 {
	if sh.periods == nil || sh.periods[k] <= 0 {
		return d
	}
	p := sh.periods[k]
	return d - float64(p*math.Round(d/p))
}

// wrapState brings component k of the double-double x back into [0, p)
// after a correction (which is far smaller than the period).
func (sh *shadower) wrapState(x DoubleDouble, k int) DoubleDouble {
	if sh.periods == nil || sh.periods[k] <= 0 {
		return x
	}
	p := dd.From(sh.periods[k])
	if x.Hi < 0 {
		return dd.Add(x, p)
	}
	if dd.Cmp(x, p) >= 0 {
		return dd.Sub(x, p)
	}
	return x
}

// stepErrors fills sh.e with the one-step errors of the orbit x over steps
// 1..L and returns the largest norm, its index and the largest norm
// relative to max(1, |f(x_(i-1))|).
func (sh *shadower) stepErrors(ctx context.Context, x []DoubleDouble, L int) (big float64, at int, rel float64, err error) {
	n := sh.n
	for i := 0; i < L; i++ {
		if i&1023 == 1023 {
			if err := ctx.Err(); err != nil {
				return 0, 0, 0, err
			}
		}
		sh.calling, sh.at = integrate.CallbackMap, i
		if err := sh.m.NextDD(x[i*n:(i+1)*n], sh.fx); err != nil {
			return 0, 0, 0, fmt.Errorf("lyap: ShadowMap: the map at iterate %d: %w", i, err)
		}
		var ss, fm float64
		row := sh.e[(i+1)*n : (i+2)*n]
		for k := 0; k < n; k++ {
			d := sh.wrapDiff(dd.Sub(sh.fx[k], x[(i+1)*n+k]).Float64(), k)
			row[k] = d
			ss += float64(d * d)
			fm = math.Max(fm, math.Abs(sh.fx[k].Hi))
		}
		nrm := math.Sqrt(ss)
		if !(nrm <= math.MaxFloat64) {
			return 0, 0, 0, fmt.Errorf("lyap: ShadowMap: the one-step error at iterate %d is %v: %w", i+1, nrm, ErrNonFinite)
		}
		if nrm > big {
			big, at = nrm, i+1
		}
		rel = math.Max(rel, nrm/math.Max(1, fm))
	}
	return big, at, rel, nil
}

// measureBefore measures the given orbit's one-step errors and refuses a
// jump.
func (sh *shadower) measureBefore(res *Shadow) error {
	n, N := sh.n, sh.steps
	sh.e = make([]float64, (N+1)*n)
	sh.before = make([]float64, N+1)
	for i := 0; i < N; i++ {
		for k := 0; k < n; k++ {
			sh.xd[k] = dd.From(sh.p0[i*n+k])
		}
		sh.calling, sh.at = integrate.CallbackMap, i
		if err := sh.m.NextDD(sh.xd, sh.fx); err != nil {
			return fmt.Errorf("lyap: ShadowMap: the map at iterate %d: %w", i, err)
		}
		var ss, fm float64
		for k := 0; k < n; k++ {
			d := sh.wrapDiff(dd.Sub(sh.fx[k], dd.From(sh.p0[(i+1)*n+k])).Float64(), k)
			ss += float64(d * d)
			fm = math.Max(fm, math.Abs(sh.fx[k].Hi))
		}
		nrm := math.Sqrt(ss)
		limit := sh.cfg.MaxStepError
		if limit == 0 {
			limit = DefaultJumpFactor * 0x1p-53 * math.Max(1, fm)
		}
		if !(nrm <= limit) {
			return &JumpError{Index: i + 1, Size: nrm, Limit: limit}
		}
		sh.before[i+1] = nrm
		if nrm > res.StepErrorBefore {
			res.StepErrorBefore, res.StepErrorBeforeAt = nrm, i+1
		}
	}
	return nil
}

// exponents measures the Lyapunov exponents per iterate along the given
// orbit by the QR method (re-orthonormalising every iterate); an iterate
// where a direction stops stretching restarts the basis.
func (sh *shadower) exponents() []float64 {
	n := sh.n
	qr := newQR(n, n)
	v, w := identity(n), make([]float64, n*n)
	sum := make([]float64, n)
	count := 0
	for i := 0; i < sh.steps; i++ {
		sh.jac(i)
		mulInto(w, sh.jd, v, n, n)
		if k, _ := qr.factor(w); k >= 0 {
			copy(v, identity(n))
			continue
		}
		copy(v, w)
		for j := range sum {
			sum[j] += qr.logR[j]
		}
		count++
	}
	if count == 0 {
		return make([]float64, n)
	}
	for j := range sum {
		sum[j] /= float64(count)
	}
	return sum
}

// mulInto writes the n×n matrix a times the n×k matrix b (row-major) into
// dst, sums in a fixed order with every product rounded.
func mulInto(dst, a, b []float64, n, k int) {
	for r := 0; r < n; r++ {
		for c := 0; c < k; c++ {
			var s float64
			for j := 0; j < n; j++ {
				s += float64(a[r*n+j] * b[j*k+c])
			}
			dst[r*k+c] = s
		}
	}
}

// mulTInto writes aᵀ (a n×n) times the n×k matrix b into dst.
func mulTInto(dst, a, b []float64, n, k int) {
	for r := 0; r < n; r++ {
		for c := 0; c < k; c++ {
			var s float64
			for j := 0; j < n; j++ {
				s += float64(a[j*n+r] * b[j*k+c])
			}
			dst[r*k+c] = s
		}
	}
}
