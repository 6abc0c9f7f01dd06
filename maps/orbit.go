package maps

import (
	"context"
	"fmt"
	"math"

	"github.com/plumbdyn/plumb/integrate"
)

// NonFiniteError says where an orbit left the finite numbers. It wraps
// integrate.ErrNonFinite.
type NonFiniteError struct {
	// Iterate is the first iterate with a component that is NaN or ±Inf,
	// Component its index and Value its value.
	Iterate, Component int
	Value              float64
}

func (e *NonFiniteError) Error() string {
	return fmt.Sprintf("maps: iterate %d: component %d = %v is not finite", e.Iterate, e.Component, e.Value)
}

// Unwrap returns integrate.ErrNonFinite.
func (e *NonFiniteError) Unwrap() error { return integrate.ErrNonFinite }

// Orbit iterates m from x0 for steps iterations and returns the iterates
// 0..end one after another (end+1 blocks of Dim values; end = steps unless
// the orbit stopped). Errors before any work (nil orbit): a nil or zero map,
// x0 of another length (integrate.ErrDimension), steps < 0
// (integrate.ErrSettings). An iterate that is not finite ends the orbit
// before it with a *NonFiniteError; a canceled ctx (checked every 1024
// iterates) ends it with the context's error wrapped. Either way the
// iterates so far are returned.
func Orbit(ctx context.Context, m *Map, x0 []float64, steps int) ([]float64, error) {
	if ctx == nil {
		ctx = context.Background()
	}
	if err := checkStart("Orbit", m, x0); err != nil {
		return nil, err
	}
	if steps < 0 {
		return nil, fmt.Errorf("maps: steps = %d: must be >= 0: %w", steps, integrate.ErrSettings)
	}
	n := m.Dim()
	x := append([]float64(nil), x0...)
	orbit := make([]float64, 0, n*(steps+1))
	orbit = append(orbit, x...)
	for it := 1; it <= steps; it++ {
		if it%1024 == 0 {
			if err := ctx.Err(); err != nil {
				return orbit, fmt.Errorf("maps: canceled after iterate %d: %w", it-1, err)
			}
		}
		m.Next(x, x)
		for i, v := range x {
			if math.IsNaN(v) || math.IsInf(v, 0) {
				return orbit, &NonFiniteError{Iterate: it, Component: i, Value: v}
			}
		}
		orbit = append(orbit, x...)
	}
	return orbit, nil
}

// checkStart refuses a nil or zero map and a start x0 of another length,
// for the entry point named what.
func checkStart(what string, m *Map, x0 []float64) error {
	switch n := m.Dim(); {
	case n == 0:
		return fmt.Errorf("maps: %s of a nil or zero map: %w", what, integrate.ErrSettings)
	case len(x0) != n:
		return fmt.Errorf("maps: start of length %d for a map of dimension %d: %w", len(x0), n, integrate.ErrDimension)
	}
	return nil
}
