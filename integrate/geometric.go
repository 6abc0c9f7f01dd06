package integrate

import (
	"context"
	"fmt"
	"math"

	"github.com/plumbdyn/plumb/internal/detmath"
)

// EnergySettings controls EnergyAudit. A nil *EnergySettings means defaults.
type EnergySettings struct {
	// Energy returns the conserved quantity at the state y. Nil means
	// Problem.Split.H; if that is nil too, EnergyAudit returns ErrMethod.
	Energy func(y []float64) float64
	// Blocks is the number of equal blocks of steps the energy history is
	// cut into. Zero means 10; negative is invalid (ErrSettings).
	Blocks int
	// Progress, if not nil, is called after each accepted step of the main
	// run with the time reached.
	Progress func(t float64)
}

// EnergyBlock summarises the energy error |E(y_k) − E(y_0)| over a block of
// consecutive steps of the main run.
type EnergyBlock struct {
	T0, T1 float64 // time span of the block
	Max    float64 // largest error in the block
	RMS    float64 // root mean square of the errors in the block
}

// EnergyReport is the result of EnergyAudit: the energy error history of a
// fixed-step run and an a-posteriori estimate of its global error at t1.
type EnergyReport struct {
	Method      string  // the method's name
	Order       int     // its published order p
	H           float64 // the step size of the main run
	Steps       int     // steps of the main run
	Evaluations int     // evaluations of the main run (Stats.Evaluations)

	E0       float64       // the energy at the start
	MaxError float64       // max_k |E(y_k) − E0| over the main run
	RMSError float64       // root mean square of |E(y_k) − E0|
	History  []EnergyBlock // the same per block, in time order
	// DriftRatio is History[last].Max / History[0].Max: about 1 for bounded
	// oscillating errors (symplectic methods), about Blocks for an error
	// growing in proportion to t, NaN if the first block's error is 0.
	DriftRatio float64
	// EnergyOrder is log2(MaxError(2h) / MaxError(h)), the measured
	// exponent of the energy error in h (NaN if not measurable).
	EnergyOrder float64

	// Final is the state at t1 of the main run.
	Final []float64
	// ErrorEstimate is the Richardson estimate of the global error of Final,
	// (y_h(t1) − y_2h(t1)) / (2^p − 1), component by component.
	ErrorEstimate []float64
	// ErrorNorm is the largest component of |ErrorEstimate|.
	ErrorNorm float64
	// ObservedOrder is log2(|y_4h − y_2h| / |y_2h − y_h|) at t1 (max norms).
	// The Richardson estimate is trustworthy only when it is close to
	// Order; it is NaN when the span holds fewer than 4 steps of 4h.
	ObservedOrder float64
}

// EnergyAudit integrates p to t1 with the fixed-step method family(h) and
// records the energy error at every step, then repeats the run with steps 2h
// and 4h to estimate the global error at t1 by Richardson extrapolation
// (step doubling) and to measure the exponents of the state and energy
// errors in h. family is a fixed-step constructor such as Verlet, Yoshida4 or
// func(h float64) Method { return GaussLegendre(2, h) }.
//
// The cost is that of 1.75 runs at step h. Memory is O(n + Blocks). The
// energy comes from s.Energy or Problem.Split.H.
//
// The Richardson estimate assumes the error behaves as C·h^p; for a chaotic
// orbit integrated beyond its predictability time that fails, and
// ObservedOrder then departs from Order: read ErrorEstimate only when they
// agree. For a symplectic method the energy error stays bounded (DriftRatio
// near 1) over exponentially long times, while the state error still grows.
//
// Errors: ErrMethod if family(h) is not a fixed-step method or no energy is
// known; ErrSettings for bad h or Blocks; the solve's own errors (with
// ErrNoConvergence from implicit methods) with the partial report.
//
// # Caution
//
// A small energy error does not prove a correct trajectory: it is a
// necessary check, not a certificate.
//
// References:
//
//	L. F. Richardson, J. A. Gaunt, The deferred approach to the limit, Phil.
//	  Trans. R. Soc. A 226 (1927) 299–361.
//	E. Hairer, C. Lubich, G. Wanner, Geometric Numerical Integration, 2nd
//	  ed., Springer 2006, Sect. IX.8 (long-time energy conservation).
func EnergyAudit(ctx context.Context, p Problem, t1 float64, family func(h float64) Method, h float64, s *EnergySettings) (*EnergyReport, error) {
	if ctx == nil {
		ctx = context.Background()
	}
	var z EnergySettings
	if s == nil {
		s = &z
	}
	if family == nil {
		return nil, fmt.Errorf("integrate: EnergyAudit: nil method family: %w", ErrMethod)
	}
	if !(h > 0) || math.IsInf(h, 0) {
		return nil, fmt.Errorf("integrate: EnergyAudit: step h = %v: must be finite and > 0: %w", h, ErrSettings)
	}
	blocks := s.Blocks
	if blocks < 0 {
		return nil, fmt.Errorf("integrate: EnergySettings.Blocks = %d: must be >= 0: %w", blocks, ErrSettings)
	}
	if blocks == 0 {
		blocks = 10
	}
	energy := s.Energy
	if energy == nil && p.Split != nil && p.Split.H != nil {
		n := len(p.Y0) / 2
		hf := p.Split.H
		energy = func(y []float64) float64 { return hf(y[:n:n], y[n:2*n:2*n]) }
	}
	if energy == nil {
		return nil, fmt.Errorf("integrate: EnergyAudit needs EnergySettings.Energy or Problem.Split.H: %w", ErrMethod)
	}
	m := family(h)
	if m == nil || !(m.fixedStep() > 0) {
		return nil, fmt.Errorf("integrate: EnergyAudit needs a fixed-step method: %w", ErrMethod)
	}
	if err := p.validate(t1); err != nil {
		return nil, err
	}
	span := math.Abs(t1 - p.T0)
	steps := int(math.Ceil(span/h - 1e-9))
	if steps < 1 {
		steps = 1
	}
	if blocks > steps {
		blocks = steps
	}
	rep := &EnergyReport{Method: m.Name(), Order: m.Order(), H: h, Steps: steps,
		History: make([]EnergyBlock, blocks), DriftRatio: math.NaN(), EnergyOrder: math.NaN(), ObservedOrder: math.NaN()}
	rep.E0 = energy(p.Y0)

	// Main run.
	st, err := NewStepper(p, t1, m, &Settings{MaxSteps: steps + 2, Progress: s.Progress})
	if err != nil {
		return nil, err
	}
	var sumSq float64
	k := 0
	blk := 0
	var bSum float64
	var bCount int
	rep.History[0].T0 = p.T0
	for st.Next(ctx) {
		e := math.Abs(energy(st.Y()) - rep.E0)
		k++
		sumSq += float64(e * e)
		rep.MaxError = math.Max(rep.MaxError, e)
		b := (k - 1) * blocks / steps
		if b >= blocks {
			b = blocks - 1
		}
		if b != blk {
			rep.History[blk].RMS = math.Sqrt(bSum / float64(bCount))
			blk, bSum, bCount = b, 0, 0
			rep.History[b].T0 = rep.History[b-1].T1
		}
		hb := &rep.History[b]
		hb.T1 = st.T()
		hb.Max = math.Max(hb.Max, e)
		bSum += float64(e * e)
		bCount++
	}
	if bCount > 0 {
		rep.History[blk].RMS = math.Sqrt(bSum / float64(bCount))
	}
	rep.Steps = k
	rep.Evaluations = st.Stats().Evaluations
	rep.Final = append([]float64(nil), st.Y()...)
	if k > 0 {
		rep.RMSError = math.Sqrt(sumSq / float64(k))
	}
	if err := st.Err(); err != nil {
		return rep, err
	}
	if rep.History[0].Max > 0 {
		rep.DriftRatio = rep.History[blocks-1].Max / rep.History[0].Max
	}

	// Step doubling.
	y2, e2, err := auditCoarseRun(ctx, p, t1, family(2*h), energy, rep.E0)
	if err != nil {
		return rep, err
	}
	if rep.MaxError > 0 && e2 > 0 {
		rep.EnergyOrder = detmath.Log(e2/rep.MaxError) / math.Ln2
	}
	den := detmath.Pow(2, float64(rep.Order)) - 1
	rep.ErrorEstimate = make([]float64, len(rep.Final))
	var d12 float64
	for i := range rep.Final {
		d := rep.Final[i] - y2[i]
		rep.ErrorEstimate[i] = d / den
		d12 = math.Max(d12, math.Abs(d))
	}
	rep.ErrorNorm = d12 / den
	if span >= 16*h {
		y4, _, err := auditCoarseRun(ctx, p, t1, family(4*h), energy, rep.E0)
		if err != nil {
			return rep, err
		}
		var d24 float64
		for i := range y4 {
			d24 = math.Max(d24, math.Abs(y2[i]-y4[i]))
		}
		if d12 > 0 && d24 > 0 {
			rep.ObservedOrder = detmath.Log(d24/d12) / math.Ln2
		}
	}
	return rep, nil
}

// auditCoarseRun integrates with m and returns the final state and the largest
// energy error.
func auditCoarseRun(ctx context.Context, p Problem, t1 float64, m Method, energy func([]float64) float64, e0 float64) ([]float64, float64, error) {
	steps := int(math.Ceil(math.Abs(t1-p.T0)/m.fixedStep())) + 1
	st, err := NewStepper(p, t1, m, &Settings{MaxSteps: steps})
	if err != nil {
		return nil, 0, err
	}
	var emax float64
	for st.Next(ctx) {
		emax = math.Max(emax, math.Abs(energy(st.Y())-e0))
	}
	if err := st.Err(); err != nil {
		return nil, 0, err
	}
	return append([]float64(nil), st.Y()...), emax, nil
}

// Asymptotic reports whether the step-doubling runs behave as C·h^p, so
// that ErrorEstimate can be read: the observed order is within 0.5 of the
// published one (common practice; the error ratios of an orbit whose phase
// error has saturated, or of a chaotic orbit past its predictability time,
// give orders far from p).
func (r *EnergyReport) Asymptotic() bool {
	return math.Abs(r.ObservedOrder-float64(r.Order)) <= 0.5
}

// SuggestStep returns the step size at which the largest energy error is
// expected to be target, from the measured error at h and its scaling
// C·h^q: h·(target/MaxError)^(1/q), with q the measured EnergyOrder when it
// is finite and within 1 of Order, else Order.
//
// Special cases:
//
//	target <= 0 or NaN:  0
//	MaxError == 0:       +Inf (no measurable error at h)
func (r *EnergyReport) SuggestStep(target float64) float64 {
	if !(target > 0) {
		return 0
	}
	if r.MaxError == 0 {
		return math.Inf(1)
	}
	q := float64(r.Order)
	if e := r.EnergyOrder; !math.IsNaN(e) && math.Abs(e-q) <= 1 {
		q = e
	}
	return r.H * detmath.Pow(target/r.MaxError, 1/q)
}

// StepScale is the step-density function of SolveReversible: steps are
// h ≈ eps·S(y), so S should be small where the solution changes fast (for
// a close encounter at distance r, S = r^(3/2), the local orbital time).
type StepScale struct {
	// S returns s(y) > 0.
	S func(y []float64) float64
	// Grad writes ∇s(y) (length n) into dst.
	Grad func(y, dst []float64)
}

// DistanceScale returns the step density s(y) = |q|^alpha, q the first half
// of the state: alpha = 3/2 makes the steps proportional to the local
// Kepler time scale near a centre of attraction at the origin.
func DistanceScale(alpha float64) StepScale {
	return StepScale{
		S: func(y []float64) float64 {
			n := len(y) / 2
			var r2 float64
			for _, v := range y[:n] {
				r2 += float64(v * v)
			}
			return detmath.Pow(r2, alpha/2)
		},
		Grad: func(y, dst []float64) {
			n := len(y) / 2
			var r2 float64
			for _, v := range y[:n] {
				r2 += float64(v * v)
			}
			c := alpha * detmath.Pow(r2, float64(alpha/2)-1)
			for i := 0; i < n; i++ {
				dst[i] = float64(c * y[i])
			}
			for i := n; i < len(dst); i++ {
				dst[i] = 0
			}
		},
	}
}

func symAllZero(v []float64) bool {
	for _, x := range v {
		if x != 0 {
			return false
		}
	}
	return true
}

// varStepper is a symmetric one-step map with a step size chosen per call.
type varStepper interface {
	stepVar(t, h float64, y, y1 []float64) (evals int, err error)
}

func (w *splitWork) stepVar(_, h float64, y, y1 []float64) (int, error) {
	return w.step(h, y, y1), nil
}

func (w *gaussWork) stepVar(t, h float64, y, y1 []float64) (int, error) {
	w.f(t, y, w.fpred)
	ev, err := w.solve(t, h, y, w.fpred, y1)
	return ev + 1, err
}

// SolveReversible integrates p from p.T0 to t1 with variable steps chosen by
// the explicit, time-reversible step-size control of Hairer & Söderlind: a
// control variable ρ, advanced by a leapfrog step in a fictive time τ with
// dt = dτ/ρ,
//
//	ρ_{n+1/2} = ρ_{n−1/2} + eps·G(y_n),  G(y) = −∇s(y)·F(y) / s(y)
//	y_{n+1} = Φ_{h_n}(y_n),  h_n = eps / ρ_{n+1/2},  ρ_0 = 1/s(y_0)
//
// with Φ a symmetric method built by family (its own step is ignored:
// Verlet, Yoshida4, ..., or a GaussLegendre constructor). The map
// (y_n, ρ_{n−1/2}) → (y_{n+1}, ρ_{n+1/2}) is time-reversible, so for
// reversible problems (Kepler, any H(q, −p) = H(q, p)) the energy error stays
// bounded without drift, as for fixed steps, while the steps shrink at close
// encounters. It is not symplectic. The step density s (see StepScale,
// DistanceScale) is a time transformation in the sense of Sundman; eps is
// the step in τ, and the global error is O(eps^p). The last step is cut to
// land on t1 (that one step is not reversible).
//
// Settings: MaxSteps, DropSteps and Progress are honoured; Every, Times and
// Crossings are not supported (ErrSettings). The Solution keeps the steps
// and a cubic Hermite dense output (one more evaluation of F per step)
// unless DropSteps. Stats.Evaluations counts evaluations of ∇V (splittings)
// or F (Gauss–Legendre) plus those of F for G and the dense output.
//
// References:
//
//	E. Hairer, G. Söderlind, Explicit, time reversible, adaptive step size
//	  control, SIAM J. Sci. Comput. 26 (2005) 1838–1851.
//	K. F. Sundman, Mémoire sur le problème des trois corps, Acta Math. 36
//	  (1913) 105–179.
//	E. Hairer, C. Lubich, G. Wanner, Geometric Numerical Integration, 2nd
//	  ed., Springer 2006, Sect. VIII.3.
func SolveReversible(ctx context.Context, p Problem, t1 float64, family func(h float64) Method, eps float64, scale StepScale, s *Settings) (*Solution, error) {
	if ctx == nil {
		ctx = context.Background()
	}
	var z Settings
	if s == nil {
		s = &z
	}
	if family == nil {
		return nil, fmt.Errorf("integrate: SolveReversible: nil method family: %w", ErrMethod)
	}
	if !(eps > 0) || math.IsInf(eps, 0) {
		return nil, fmt.Errorf("integrate: SolveReversible: eps = %v: must be finite and > 0: %w", eps, ErrSettings)
	}
	if scale.S == nil || scale.Grad == nil {
		return nil, fmt.Errorf("integrate: SolveReversible: StepScale.S and StepScale.Grad are required: %w", ErrSettings)
	}
	if s.Every != 0 || s.Times != nil || len(s.Crossings) > 0 {
		return nil, fmt.Errorf("integrate: SolveReversible: Settings.Every, Times and Crossings are not supported: %w", ErrSettings)
	}
	if s.MaxSteps < 0 {
		return nil, settingErr("MaxSteps", s.MaxSteps, "must be >= 0")
	}
	if err := p.validate(t1); err != nil {
		return nil, err
	}
	p = p.Own()
	m := family(eps)
	if m == nil {
		return nil, fmt.Errorf("integrate: SolveReversible: nil method: %w", ErrMethod)
	}
	n := len(p.Y0)
	sc, err := m.newScheme(&p, n)
	if err != nil {
		return nil, err
	}
	vs, ok := sc.(varStepper)
	if sp, isSplit := m.(*splitting); !ok || (isSplit && !sp.symmetric) {
		return nil, fmt.Errorf("integrate: SolveReversible needs a symmetric method from this package, got %s: %w", m.Name(), ErrMethod)
	}
	maxSteps := s.MaxSteps
	if maxSteps == 0 {
		maxSteps = DefaultMaxSteps
	}
	dir := math.Copysign(1, t1-p.T0)
	buf := make([]float64, 6*n)
	y, y1, f, grad, f0, f1 := buf[:n:n], buf[n:2*n:2*n], buf[2*n:3*n:3*n], buf[3*n:4*n:4*n], buf[4*n:5*n:5*n], buf[5*n:6*n:6*n]
	copy(y, p.Y0)
	sol := &Solution{Method: m.Name() + " (reversible adaptive)", Dim: n, T0: p.T0, End: p.T0, sc: sc, coef: newChunks(sc.denseSize() * n)}
	denseBuf := make([]float64, sc.denseSize()*n)
	keep := !s.DropSteps
	if keep {
		sol.T = append(sol.T, p.T0)
		sol.Y = append(sol.Y, p.Y0...)
		p.F(p.T0, y, f0)
		sol.Stats.Evaluations++
	}
	// G(y) = −∇s·F/s.
	control := func(t float64, y []float64) (float64, error) {
		sv := scale.S(y)
		if !(sv > 0) || math.IsInf(sv, 0) {
			return 0, fmt.Errorf("integrate: SolveReversible: step density s(y) = %v at t=%g: must be finite and > 0: %w", sv, t, ErrSettings)
		}
		scale.Grad(y, grad)
		var dot float64
		if half := n / 2; p.Split != nil && symAllZero(grad[half:]) {
			// s depends on q only: ∇s·F = ∇_q s·∂T/∂p, no force needed.
			p.Split.DT(y[half:], f[:half])
			for i := 0; i < half; i++ {
				dot += float64(grad[i] * f[i])
			}
		} else {
			p.F(t, y, f)
			sol.Stats.Evaluations++
			for i := range f {
				dot += float64(grad[i] * f[i])
			}
		}
		return -dot / sv, nil
	}
	t := p.T0
	g, err := control(t, y)
	if err != nil {
		return nil, err
	}
	rho := 1/scale.S(y) + float64(float64(0.5*eps)*g)
	fail := func(err error) (*Solution, error) {
		sol.End = t
		sol.Final = append([]float64(nil), y...)
		sol.Status = Failed
		if ctx.Err() != nil {
			sol.Status = Canceled
		}
		return sol, err
	}
	for steps := 0; ; steps++ {
		if err := ctx.Err(); err != nil {
			return fail(fmt.Errorf("integrate: canceled at t=%g: %w", t, err))
		}
		if steps >= maxSteps {
			return fail(&StepError{T: t, H: eps / rho, Err: fmt.Errorf("%d steps: %w", maxSteps, ErrStepBudget)})
		}
		if !(rho > 0) || math.IsInf(rho, 0) {
			return fail(&StepError{T: t, H: eps / rho, Err: fmt.Errorf("step control variable rho = %v: %w", rho, ErrStepUnderflow)})
		}
		h := dir * eps / rho
		last := false
		if (t+h-t1)*dir >= 0 {
			h = t1 - t
			last = true
		}
		if math.Abs(h) <= math.Abs(t)*epsRound {
			return fail(&StepError{T: t, H: h, Err: ErrStepUnderflow})
		}
		ev, err := vs.stepVar(t, h, y, y1)
		sol.Stats.Evaluations += ev
		if err != nil {
			return fail(&StepError{T: t, H: h, Err: err})
		}
		if i := firstNonFinite(y1); i >= 0 {
			return fail(&StepError{T: t, H: h, Err: &FieldError{T: t + h, Index: i, Value: y1[i], What: "state"}})
		}
		tNew := t + h
		if last {
			tNew = t1
		}
		if keep {
			p.F(tNew, y1, f1)
			sol.Stats.Evaluations++
			sc.dense(t, h, y, f0, y1, f1, denseBuf)
			sol.coef.add(denseBuf)
			sol.T = append(sol.T, tNew)
			sol.Y = append(sol.Y, y1...)
			f0, f1 = f1, f0
		}
		y, y1 = y1, y
		t = tNew
		sol.Stats.Accepted++
		if s.Progress != nil {
			s.Progress(t)
		}
		if last {
			break
		}
		g, err := control(t, y)
		if err != nil {
			return fail(err)
		}
		rho += float64(eps * g)
	}
	sol.End = t
	sol.Final = append([]float64(nil), y...)
	sol.Status = Completed
	return sol, nil
}
