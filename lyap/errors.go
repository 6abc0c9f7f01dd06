package lyap

import (
	"errors"
	"fmt"

	"github.com/plumbdyn/plumb/integrate"
)

// Sentinel errors. Every error returned by this package wraps one of them (or
// an error of package integrate, or the context's error), so callers can test
// with errors.Is.
var (
	// ErrSettings reports an invalid field of Settings.
	ErrSettings = errors.New("invalid setting")
	// ErrCount reports a number of exponents that is not in 1..dimension.
	ErrCount = errors.New("invalid number of exponents")
	// ErrDimension reports a start state whose length does not match the
	// system, or an empty one.
	ErrDimension = errors.New("dimension mismatch")
	// ErrNoJacobian reports a map that declares it has no Jacobian (see
	// MapFunc and the HasJacobian method) passed to a tangent-space method.
	ErrNoJacobian = errors.New("no jacobian")
	// ErrNonFinite reports a non-finite start state, trajectory or tangent
	// growth: a stretch factor R_ii that is zero, NaN or infinite, or tangent
	// vectors that overflowed between two re-orthonormalisations.
	ErrNonFinite = errors.New("non-finite tangent growth")
	// ErrSystem reports a system that cannot be used: a nil vector field or
	// map.
	ErrSystem = errors.New("unusable system")
	// ErrTooShort reports an averaging run that completed fewer than two
	// blocks (steps longer than a block, or fewer iterations than two), so
	// that no standard error exists. The estimate is returned with it.
	ErrTooShort = errors.New("averaging run too short")
)

// GrowthError says where the tangent growth stopped being finite: the time
// (or iteration) of the re-orthonormalisation, and which tangent vector.
type GrowthError struct {
	T      float64 // time (flows) or iteration (maps) of the failed step
	Map    bool    // T counts map iterations
	Vector int     // index of the offending tangent vector, or -1 for the state
	Value  float64 // the offending value (a stretch factor or state component)
}

func (e *GrowthError) Error() string {
	at := fmt.Sprintf("t=%g", e.T)
	if e.Map {
		at = fmt.Sprintf("iteration %d", int64(e.T))
	}
	if e.Vector < 0 {
		return fmt.Sprintf("lyap: state is %v at %s: %v", e.Value, at, ErrNonFinite)
	}
	return fmt.Sprintf("lyap: stretch factor of tangent vector %d is %v at %s: %v", e.Vector, e.Value, at, ErrNonFinite)
}

// Unwrap returns ErrNonFinite.
func (e *GrowthError) Unwrap() error { return ErrNonFinite }

func settingErr(field string, v any, why string) error {
	return &integrate.SettingError{Pkg: "lyap", Type: "Settings", Field: field, Value: v, Reason: why, Err: ErrSettings}
}

// withSentinel prefixes an error of another package with "lyap: " and makes
// it match a sentinel of this package as well, without repeating its text.
type withSentinel struct {
	err, sentinel error
}

func (e *withSentinel) Error() string   { return "lyap: " + e.err.Error() }
func (e *withSentinel) Unwrap() []error { return []error{e.err, e.sentinel} }

// needErrorBars turns a completed run without standard errors into
// ErrTooShort, so that no estimate leaves without its error bar unnoticed.
func needErrorBars(sp *Spectrum, err error) error {
	if err != nil || sp == nil || sp.StdErr != nil {
		return err
	}
	return fmt.Errorf("lyap: %d block(s) completed over a length of %g, need 2 for a standard error (lengthen the run or lower Settings.Blocks): %w", sp.Blocks, sp.Duration, ErrTooShort)
}
