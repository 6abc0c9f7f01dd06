package lyap

import (
	"errors"
	"fmt"
	"math"

	"github.com/plumbdyn/plumb/integrate"
	"github.com/plumbdyn/plumb/internal/detmath"
)

// Defaults used when a field of Settings is zero or Settings is nil.
const (
	DefaultDuration   = 1000    // time units averaged (flows)
	DefaultIterations = 100_000 // iterations averaged (maps)
	DefaultRelTol     = 1e-9    // relative tolerance of the augmented system
	DefaultAbsTol     = 1e-9    // absolute tolerance of the augmented system
	DefaultMaxGrowth  = 1e3     // largest stretch ratio between re-orthonormalisations
	DefaultBlocks     = 32      // batch-means blocks
	// MinBlocks is the fewest completed blocks for which a standard error is
	// trusted: a run stops early on Settings.Target only after this many,
	// and Converged needs them (Schmeiser 1982 advises 10 to 30 batches).
	MinBlocks = 10
)

// Settings controls the spectrum estimators. A nil *Settings means every
// default. Settings are validated at entry and copied, never written back;
// an invalid field gets an error wrapping ErrSettings that names it.
//
// Flows use Duration, Transient, Interval and the integration fields; maps
// use Iterations, Discard and IntervalSteps. The other fields serve both.
type Settings struct {
	// Method integrates the trajectory together with its tangent vectors.
	// Nil means integrate.DormandPrince54. Any method of package integrate
	// may drive the estimate.
	Method integrate.Method
	// RelTol and AbsTol are the tolerances of the augmented system
	// (trajectory and tangent vectors together). Zero means DefaultRelTol
	// and DefaultAbsTol. Invalid values (integrate's rule, see Validate)
	// get an error naming lyap's Settings.
	RelTol, AbsTol float64
	// MaxSteps bounds the attempted integration steps. Zero means 1<<40
	// (no practical bound); negative is invalid.
	MaxSteps int

	// Duration is the averaging time of a flow, after the transient, in the
	// time units of the problem. Zero means DefaultDuration. Must be finite
	// and >= 0.
	Duration float64
	// Transient is the time integrated and discarded before averaging, so
	// that the trajectory reaches its attractor and the tangent vectors
	// align. Zero means Duration/10 (there is no setting that discards
	// nothing: an unaligned basis biases the estimate). Must be finite and >= 0.
	Transient float64
	// Iterations is the number of map iterations averaged after the
	// discarded ones. Zero means DefaultIterations; negative is invalid.
	Iterations int
	// Discard is the number of map iterations discarded first. Zero means
	// Iterations/10; negative is invalid.
	Discard int

	// Interval fixes the time between re-orthonormalisations of a flow's
	// tangent vectors (each happens at the end of the first accepted step
	// at or after it is due). Zero means adaptive (see MaxGrowth). Must be
	// finite and >= 0.
	Interval float64
	// IntervalSteps fixes the number of map iterations between
	// re-orthonormalisations. Zero means adaptive; negative is invalid.
	IntervalSteps int
	// MaxGrowth steers the adaptive interval: the interval is rescaled after
	// every re-orthonormalisation so that the largest stretch factor, and
	// the ratio of the largest to the smallest, stay near MaxGrowth — far
	// from 1/eps, where the small directions would be lost to rounding.
	// Zero means DefaultMaxGrowth; valid range (1, 1e12].
	MaxGrowth float64

	// Blocks is the number of batch-means blocks the averaging run is cut
	// into for the standard errors. Zero means DefaultBlocks; valid range
	// 2..100000 (memory for the history grows with it).
	Blocks int
	// Target is the standard error the caller wants on every exponent, in
	// the spectrum's units. When positive, the run stops as soon as every
	// standard error is at or below Target after at least MinBlocks
	// completed blocks, and Spectrum.Converged says whether it was reached
	// before the end. Zero means no target (Converged is then false).
	// Must be finite and >= 0.
	Target float64

	// FDStep is the step of the central-difference Jacobian used when a
	// flow has no Problem.Jac. Zero means the gonum default for central
	// differences (fd.Central.Step, about 6e-6). Must be finite and >= 0.
	FDStep float64

	// Separation is the distance between the two trajectories of Largest,
	// restored at every renormalisation, in the units of the state
	// (Euclidean norm). Zero means 1e-8·(1 + |x0|). Must be finite and >= 0.
	Separation float64

	// Hamiltonian declares a Hamiltonian flow or a symplectic map, whose
	// exponents come in pairs ±lambda; the spectrum then carries the
	// pairing check. A flow with Problem.Split set is taken as Hamiltonian.
	Hamiltonian bool

	// Tangent3, if not nil, is the flow's vector field and Jacobian product
	// in one call (see Tangent3), which a full spectrum (k = n = 3) of a
	// flow with Problem.Jac uses in place of F, Jac and the product: the
	// same bits at lower cost. Other runs ignore it. Set-up compares its
	// bits with those of F and Jac at the start and refuses a Tangent3 that
	// disagrees (an error wrapping ErrSettings).
	Tangent3 Tangent3

	// Progress, if not nil, is called after every re-orthonormalisation with
	// the work done and the total (time units for flows, iterations for
	// maps, both counted from the start, transient included). It must not
	// block for long.
	Progress func(done, total float64)
}

// config is Settings resolved and validated.
type config struct {
	Settings
	maxGrowthLog float64
}

func finiteNonNeg(v float64) bool { return v >= 0 && !math.IsInf(v, 0) && !math.IsNaN(v) }

// WithDefaults returns a shallow copy of s (of the zero Settings for a nil
// s) with every zero field that has a default replaced by the value the
// estimators use: Duration, Transient (Duration/10), Iterations, Discard
// (Iterations/10), RelTol, AbsTol, MaxSteps (1<<40), MaxGrowth, Blocks and
// Method (integrate.DormandPrince54). It does not validate (see Validate).
func (s *Settings) WithDefaults() Settings {
	var c Settings
	if s != nil {
		c = *s
	}
	if c.Duration == 0 {
		c.Duration = DefaultDuration
	}
	if c.Transient == 0 {
		c.Transient = c.Duration / 10
	}
	if c.Iterations == 0 {
		c.Iterations = DefaultIterations
	}
	if c.Discard == 0 {
		c.Discard = c.Iterations / 10
	}
	if c.RelTol == 0 {
		c.RelTol = DefaultRelTol
	}
	if c.AbsTol == 0 {
		c.AbsTol = DefaultAbsTol
	}
	if c.MaxSteps == 0 {
		c.MaxSteps = 1 << 40
	}
	if c.MaxGrowth == 0 {
		c.MaxGrowth = DefaultMaxGrowth
	}
	if c.Blocks == 0 {
		c.Blocks = DefaultBlocks
	}
	if c.Method == nil {
		c.Method = integrate.DormandPrince54
	}
	return c
}

// Validate reports the first invalid field of s as an
// *integrate.SettingError naming lyap's Settings and wrapping ErrSettings;
// nil means valid (a nil s is). Every estimator calls it first. RelTol and
// AbsTol follow integrate's rule (see integrate.Settings.Validate): finite
// and >= 0, zero meaning DefaultRelTol and DefaultAbsTol.
func (s *Settings) Validate() error {
	if s == nil {
		return nil
	}
	for _, f := range []struct {
		name string
		v    float64
	}{{"Duration", s.Duration}, {"Transient", s.Transient}, {"Interval", s.Interval}, {"Target", s.Target}, {"FDStep", s.FDStep}, {"MaxGrowth", s.MaxGrowth}, {"Separation", s.Separation}} {
		if !finiteNonNeg(f.v) {
			return settingErr(f.name, f.v, "must be finite and >= 0")
		}
	}
	for _, f := range []struct {
		name string
		v    int
	}{{"MaxSteps", s.MaxSteps}, {"Iterations", s.Iterations}, {"Discard", s.Discard}, {"IntervalSteps", s.IntervalSteps}, {"Blocks", s.Blocks}} {
		if f.v < 0 {
			return settingErr(f.name, f.v, "must be >= 0")
		}
	}
	tol := integrate.Settings{RelTol: s.RelTol, AbsTol: s.AbsTol}
	if err := tol.Validate(); err != nil {
		var se *integrate.SettingError
		if errors.As(err, &se) {
			return settingErr(se.Field, se.Value, se.Reason)
		}
		return err
	}
	if s.MaxGrowth != 0 && (s.MaxGrowth <= 1 || s.MaxGrowth > 1e12) {
		return settingErr("MaxGrowth", s.MaxGrowth, "must be in (1, 1e12]")
	}
	if s.Blocks != 0 && (s.Blocks < 2 || s.Blocks > 1e5) {
		return settingErr("Blocks", s.Blocks, "must be in 2..100000")
	}
	return nil
}

func resolve(s *Settings) (*config, error) {
	if err := s.Validate(); err != nil {
		return nil, err
	}
	c := config{Settings: s.WithDefaults()}
	c.maxGrowthLog = detmath.Log(c.MaxGrowth)
	return &c, nil
}

// checkCount validates the number of exponents k for dimension n.
func checkCount(k, n int) error {
	if k <= 0 {
		return fmt.Errorf("lyap: %d exponents requested, need at least 1: %w", k, ErrCount)
	}
	if k > n {
		return fmt.Errorf("lyap: %d exponents requested, the dimension is %d: %w", k, n, ErrCount)
	}
	return nil
}
