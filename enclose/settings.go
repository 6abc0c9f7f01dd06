package enclose

import (
	"math"
	"strconv"
)

// Settings control an enclosure. A nil *Settings means the defaults
// (WithDefaults says what each zero stands for); settings are copied,
// never written back.
type Settings struct {
	// Order is the order p of the Taylor polynomials (0: 20). Valid: 2
	// to 60.
	Order int
	// Tol is the width (state units) the user can accept: the proven
	// horizon is the last step time up to which the enclosure's width
	// stayed below it at every step (0: 1e-3). Valid: positive, finite.
	Tol float64
	// GiveUp is the width at which the enclosure is abandoned as blown
	// up (0: the larger of 1 and 1000·Tol). Valid: at least Tol, finite.
	GiveUp float64
	// Radius is the half-width of the start box around the start point
	// in every component (0: the start is a point). Valid: >= 0, finite.
	Radius float64
	// MaxSteps bounds the steps (iterates of a map) taken (0: 100000).
	// Valid: >= 0.
	MaxSteps int
	// Stops are times (flows) the steps land on exactly, besides the
	// end; times outside the span are ignored. Valid: finite.
	Stops []float64
	// Direct carries the box itself from step to step instead of
	// Lohner's c + A·r form: a naive interval method, whose width grows
	// by the wrapping effect far faster than the dynamics demand. For
	// comparison only.
	Direct bool
	// Progress, if not nil, is called after every step with the fraction
	// of the span (of the iterates) enclosed so far, from 0 to 1. It must
	// not block for long.
	Progress func(done float64)
}

// Defaults.
const (
	DefaultOrder    = 20
	DefaultTol      = 1e-3
	DefaultMaxSteps = 100000
)

// WithDefaults returns a copy with every zero field set to its default.
func (s *Settings) WithDefaults() Settings {
	var out Settings
	if s != nil {
		out = *s
		out.Stops = append([]float64(nil), s.Stops...)
	}
	if out.Order == 0 {
		out.Order = DefaultOrder
	}
	if out.Tol == 0 {
		out.Tol = DefaultTol
	}
	if out.GiveUp == 0 {
		out.GiveUp = max(1, 1000*out.Tol)
	}
	if out.MaxSteps == 0 {
		out.MaxSteps = DefaultMaxSteps
	}
	return out
}

// Validate returns a *SettingError (wrapping ErrSettings) naming the
// first field out of range, or nil. A nil *Settings is valid.
func (s *Settings) Validate() error {
	if s == nil {
		return nil
	}
	bad := func(field string, v float64, why string) error {
		return &SettingError{Field: field, Value: strconv.FormatFloat(v, 'g', -1, 64), Reason: why}
	}
	fin := func(v float64) bool { return !math.IsNaN(v) && !math.IsInf(v, 0) }
	switch {
	case s.Order != 0 && (s.Order < 2 || s.Order > 60):
		return bad("Order", float64(s.Order), "want 2 to 60")
	case s.Tol < 0 || !fin(s.Tol):
		return bad("Tol", s.Tol, "want a positive finite width")
	case s.GiveUp < 0 || !fin(s.GiveUp):
		return bad("GiveUp", s.GiveUp, "want a positive finite width")
	case s.GiveUp != 0 && s.GiveUp < s.WithDefaults().Tol:
		return bad("GiveUp", s.GiveUp, "want at least Tol")
	case s.Radius < 0 || !fin(s.Radius):
		return bad("Radius", s.Radius, "want a finite half-width >= 0")
	case s.MaxSteps < 0:
		return bad("MaxSteps", float64(s.MaxSteps), "want >= 0")
	}
	for _, v := range s.Stops {
		if !fin(v) {
			return bad("Stops", v, "want finite times")
		}
	}
	return nil
}
