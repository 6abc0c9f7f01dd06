package integrate

import (
	"fmt"
	"math"
)

// Default settings used when a field is zero or Settings is nil.
const (
	DefaultRelTol   = 1e-6
	DefaultAbsTol   = 1e-9
	DefaultMaxSteps = 1_000_000
)

// Settings controls Solve and NewStepper. A nil *Settings means every default.
// Settings are validated at entry and copied; they are never written back.
type Settings struct {
	// RelTol is the relative tolerance of the local error test. Zero means
	// DefaultRelTol. Must be finite and >= 0 and, together with AbsTol, not
	// below 1e-15 relative; otherwise ErrSettings.
	RelTol float64
	// AbsTol is the absolute tolerance of the local error test, in the units
	// of the state. Zero means DefaultAbsTol. Must be finite and >= 0.
	AbsTol float64
	// RelTols and AbsTols, when not nil, give per-component tolerances and
	// override RelTol and AbsTol. Their length must equal the state's
	// (ErrDimension otherwise).
	RelTols, AbsTols []float64

	// InitialStep is the first step size tried (its sign is ignored). Zero
	// means an automatic choice (Hairer, Nørsett & Wanner 1993, Sect. II.4).
	InitialStep float64
	// MinStep is the smallest step size allowed (absolute value); only the
	// last step, which lands on t1, may be shorter. A step of MinStep that
	// fails the error test ends the solve with ErrStepUnderflow. Zero means
	// only the rounding limit applies: a step with 0.1·|h| <= 2.3e-16·|t|
	// (Hairer's test in DOPRI5) ends the solve with ErrStepUnderflow.
	MinStep float64
	// MaxStep bounds the step size (absolute value). Zero means |t1 - t0|.
	MaxStep float64

	// MaxSteps bounds the number of attempted steps. Zero means
	// DefaultMaxSteps, or for a fixed-step method the steps its span needs
	// if that is more; negative is invalid. When exceeded the solve ends
	// with ErrStepBudget and the partial solution.
	MaxSteps int

	// Every, when positive, samples the solution on the grid t0 + i·Every
	// (times computed by multiplication, never by a running sum), always
	// including t0 and t1, into Solution.Samples. Memory grows with the grid,
	// not with the number of steps.
	Every float64
	// Times, when not nil, samples the solution at these times, which must
	// be increasing in the direction of integration and inside the span.
	Times []float64
	// DropSteps, when true, keeps no accepted steps and no dense output in
	// the Solution: only samples, crossings and the final state. Use it for
	// long runs whose memory must stay bounded.
	DropSteps bool

	// Crossings lists functions of the state whose zeros are located on the
	// dense output.
	Crossings []Crossing

	// StiffCheck sets how often (in accepted steps) the stiffness test of the
	// explicit pairs runs while no suspicion is raised. Zero means 1000
	// (Hairer & Wanner's default); negative disables the test.
	StiffCheck int

	// Controller overrides the step-size controller. Nil means the method's
	// own defaults (see Controller).
	Controller *Controller

	// Progress, if not nil, is called after every accepted step with the time
	// reached. It must not keep or modify anything it is given.
	Progress func(t float64)
}

// Controller holds the parameters of the PI step-size controller
//
//	h_new = h · clamp(Safety · err_n^(-Alpha) · err_{n-1}^(Beta), MinFactor, MaxFactor)
//
// (Gustafsson, Lundh & Söderlind 1988; the parameterisation of Hairer & Wanner
// 1996, Sect. IV.2). Zero fields take the method's defaults: Safety 0.9,
// Alpha = 1/(q+1) - 0.75·Beta with q the lower order of the pair, Beta 0.04 for
// DormandPrince54, 0 for DormandPrince853. The powers are evaluated with
// tables and a short polynomial, deterministically and to a relative error
// below 1.2e-7 for the defaults (below 4e-6 for Alpha <= 2); errold is
// max(err, 1e-4), as in Hairer & Wanner's codes.
type Controller struct {
	Safety               float64
	Alpha, Beta          float64
	MinFactor, MaxFactor float64
}

// resolved settings, filled from defaults and validated.
type config struct {
	rtol, atol   []float64
	h0           float64
	hmin, hmax   float64
	maxSteps     int
	every        float64
	times        []float64
	drop         bool
	crossings    []Crossing
	stiffEvery   int
	safety       float64
	alpha, beta  float64
	facMin       float64
	facMax       float64
	progress     func(float64)
	hasSampleSet bool
}

func positiveFinite(v float64) bool { return v >= 0 && !math.IsInf(v, 0) && !math.IsNaN(v) }

// WithDefaults returns a shallow copy of s (of the zero Settings for a nil
// s) whose zero RelTol and AbsTol are replaced by DefaultRelTol and
// DefaultAbsTol, the tolerances Solve and NewStepper use for them: what a
// caller echoes as the tolerances of its run. It does not validate (see
// Validate).
func (s *Settings) WithDefaults() Settings {
	var c Settings
	if s != nil {
		c = *s
	}
	if c.RelTol == 0 {
		c.RelTol = DefaultRelTol
	}
	if c.AbsTol == 0 {
		c.AbsTol = DefaultAbsTol
	}
	return c
}

// Validate reports the first field of s that is invalid whatever the
// problem, as a *SettingError wrapping ErrSettings; nil means valid (a nil
// s is). Solve and NewStepper call it first, then check what needs the
// problem: the lengths of RelTols and AbsTols, Times inside the span and in
// its direction, MinStep against the span, the number of Every samples,
// and the Controller against the method's defaults.
//
// The tolerance rule: RelTol, AbsTol and every entry of RelTols and
// AbsTols are finite and >= 0 (zero RelTol and AbsTol mean the defaults,
// see WithDefaults); per component, the two tolerances are not both zero,
// and a relative tolerance below 1e-15 needs an absolute one (without it
// the test asks for less than float64 rounding can deliver).
func (s *Settings) Validate() error {
	if s == nil {
		return nil
	}
	if !positiveFinite(s.RelTol) {
		return settingErr("RelTol", s.RelTol, "must be finite and >= 0")
	}
	if !positiveFinite(s.AbsTol) {
		return settingErr("AbsTol", s.AbsTol, "must be finite and >= 0")
	}
	for i, v := range s.RelTols {
		if !positiveFinite(v) {
			return settingErr(fmt.Sprintf("RelTols[%d]", i), v, "must be finite and >= 0")
		}
	}
	for i, v := range s.AbsTols {
		if !positiveFinite(v) {
			return settingErr(fmt.Sprintf("AbsTols[%d]", i), v, "must be finite and >= 0")
		}
	}
	d := s.WithDefaults()
	for i := range max(len(s.RelTols), len(s.AbsTols), 1) {
		rt, at := d.RelTol, d.AbsTol
		if i < len(s.RelTols) {
			rt = s.RelTols[i]
		}
		if i < len(s.AbsTols) {
			at = s.AbsTols[i]
		}
		if rt == 0 && at == 0 {
			return settingErr(fmt.Sprintf("RelTols[%d]/AbsTols[%d]", i, i), 0, "both tolerances zero")
		}
		if rt < 1e-15 && at == 0 {
			return settingErr("RelTol", rt, "below 1e-15 with no absolute tolerance")
		}
	}
	for _, f := range []struct {
		name string
		v    float64
	}{{"InitialStep", s.InitialStep}, {"MinStep", s.MinStep}, {"MaxStep", s.MaxStep}, {"Every", s.Every}} {
		if math.IsNaN(f.v) || math.IsInf(f.v, 0) {
			return settingErr(f.name, f.v, "must be finite")
		}
	}
	if s.MinStep < 0 {
		return settingErr("MinStep", s.MinStep, "must be >= 0")
	}
	if s.MaxStep < 0 {
		return settingErr("MaxStep", s.MaxStep, "must be >= 0")
	}
	if s.MaxStep > 0 && s.MinStep > s.MaxStep {
		return settingErr("MinStep", s.MinStep, fmt.Sprintf("larger than MaxStep %g", s.MaxStep))
	}
	if s.MaxSteps < 0 {
		return settingErr("MaxSteps", s.MaxSteps, "must be >= 0")
	}
	if s.Every < 0 {
		return settingErr("Every", s.Every, "must be >= 0")
	}
	for i, tt := range s.Times {
		if math.IsNaN(tt) || math.IsInf(tt, 0) {
			return settingErr(fmt.Sprintf("Times[%d]", i), tt, "must be finite")
		}
	}
	for i, cr := range s.Crossings {
		if cr.G == nil {
			return settingErr(fmt.Sprintf("Crossings[%d].G", i), "nil", "function missing")
		}
		if cr.Sense < Either || cr.Sense > Falling {
			return settingErr(fmt.Sprintf("Crossings[%d].Sense", i), int(cr.Sense), "unknown sense")
		}
	}
	if u := s.Controller; u != nil {
		for _, f := range []struct {
			name string
			v    float64
		}{{"Safety", u.Safety}, {"Alpha", u.Alpha}, {"Beta", u.Beta}, {"MinFactor", u.MinFactor}, {"MaxFactor", u.MaxFactor}} {
			if !positiveFinite(f.v) {
				return settingErr("Controller."+f.name, f.v, "must be finite and >= 0")
			}
		}
	}
	return nil
}

// resolve validates s for a problem of dimension n on [t0, t1] with method m.
func resolve(s *Settings, n int, t0, t1 float64, m Method) (*config, error) {
	if err := s.Validate(); err != nil {
		return nil, err
	}
	eff := s.WithDefaults()
	s = &eff
	c := &config{rtol: make([]float64, n), atol: make([]float64, n)}
	for i := range c.rtol {
		c.rtol[i], c.atol[i] = s.RelTol, s.AbsTol
	}
	if s.RelTols != nil {
		if len(s.RelTols) != n {
			return nil, fmt.Errorf("integrate: Settings.RelTols has length %d, state has %d: %w", len(s.RelTols), n, ErrDimension)
		}
		copy(c.rtol, s.RelTols)
	}
	if s.AbsTols != nil {
		if len(s.AbsTols) != n {
			return nil, fmt.Errorf("integrate: Settings.AbsTols has length %d, state has %d: %w", len(s.AbsTols), n, ErrDimension)
		}
		copy(c.atol, s.AbsTols)
	}
	span := math.Abs(t1 - t0)
	c.h0 = math.Abs(s.InitialStep)
	c.hmin = s.MinStep
	c.hmax = s.MaxStep
	if c.hmax == 0 || c.hmax > span {
		c.hmax = span
	}
	if c.hmin > c.hmax {
		return nil, settingErr("MinStep", s.MinStep, fmt.Sprintf("larger than MaxStep %g", c.hmax))
	}
	c.maxSteps = s.MaxSteps
	if c.maxSteps == 0 {
		c.maxSteps = DefaultMaxSteps
		// A fixed-step run's length is known: never stop it short.
		if hf := m.fixedStep(); hf > 0 {
			if need := math.Ceil(span/hf) + 1; need > float64(c.maxSteps) && need < math.MaxInt32 {
				c.maxSteps = int(need)
			}
		}
	}
	c.every = s.Every
	if c.every > 0 && span/c.every > 1e8 {
		return nil, settingErr("Every", s.Every, fmt.Sprintf("gives more than 1e8 samples over a span of %g", span))
	}
	if s.Times != nil {
		dir := math.Copysign(1, t1-t0)
		for i, tt := range s.Times {
			if (tt-t0)*dir < 0 || (tt-t1)*dir > 0 {
				return nil, settingErr(fmt.Sprintf("Times[%d]", i), tt, fmt.Sprintf("outside the span [%g, %g]", t0, t1))
			}
			if i > 0 && (tt-s.Times[i-1])*dir < 0 {
				return nil, settingErr(fmt.Sprintf("Times[%d]", i), tt, "not in the direction of integration")
			}
		}
		c.times = append([]float64(nil), s.Times...)
	}
	c.hasSampleSet = c.every > 0 || c.times != nil
	c.drop = s.DropSteps
	c.crossings = append([]Crossing(nil), s.Crossings...)
	c.stiffEvery = s.StiffCheck
	if c.stiffEvery == 0 {
		c.stiffEvery = 1000
	}
	c.progress = s.Progress

	d := m.controller()
	if s.Controller != nil {
		u := *s.Controller
		if u.Safety != 0 {
			d.Safety = u.Safety
		}
		if u.Beta != 0 {
			d.Beta = u.Beta
			if u.Alpha == 0 {
				d.Alpha = 1/float64(m.errOrder()+1) - float64(0.75*d.Beta)
			}
		}
		if u.Alpha != 0 {
			d.Alpha = u.Alpha
		}
		if u.MinFactor != 0 {
			d.MinFactor = u.MinFactor
		}
		if u.MaxFactor != 0 {
			d.MaxFactor = u.MaxFactor
		}
		if d.Safety > 1 || d.MinFactor > 1 || d.MaxFactor < 1 || d.Alpha <= 0 {
			return nil, settingErr("Controller", u, "needs Safety <= 1, MinFactor <= 1 <= MaxFactor, Alpha > 0")
		}
	}
	c.safety, c.alpha, c.beta, c.facMin, c.facMax = d.Safety, d.Alpha, d.Beta, d.MinFactor, d.MaxFactor
	return c, nil
}
