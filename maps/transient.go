package maps

import (
	"context"
	"fmt"
	"math"

	"github.com/plumbdyn/plumb/integrate"
)

// OrbitAfter iterates m from x0, discards the first discard iterates (the
// transient) and returns the next keep iterates one after another (keep
// blocks of Dim values: iterates discard+1 .. discard+keep). Errors as for
// Orbit; discard or keep < 0 is integrate.ErrSettings, and an iterate that
// is not finite during the transient returns no iterates and the
// *NonFiniteError.
func OrbitAfter(ctx context.Context, m *Map, x0 []float64, discard, keep int) ([]float64, error) {
	if ctx == nil {
		ctx = context.Background()
	}
	if err := checkStart("OrbitAfter", m, x0); err != nil {
		return nil, err
	}
	if discard < 0 || keep < 0 {
		return nil, fmt.Errorf("maps: discard = %d, keep = %d: must be >= 0: %w", discard, keep, integrate.ErrSettings)
	}
	x := append([]float64(nil), x0...)
	for it := 1; it <= discard; it++ {
		if it%1024 == 0 {
			if err := ctx.Err(); err != nil {
				return nil, fmt.Errorf("maps: canceled in the transient after iterate %d: %w", it-1, err)
			}
		}
		m.Next(x, x)
		if i, v, bad := firstNonFinite(x); bad {
			return nil, &NonFiniteError{Iterate: it, Component: i, Value: v}
		}
	}
	orbit, err := Orbit(ctx, m, x, keep)
	if ne, ok := err.(*NonFiniteError); ok {
		ne.Iterate += discard
	}
	if len(orbit) > 0 {
		orbit = orbit[len(x):] // the start of the kept stretch is iterate discard
	}
	return orbit, err
}

// firstNonFinite returns the first component of x that is NaN or ±Inf.
func firstNonFinite(x []float64) (int, float64, bool) {
	for i, v := range x {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return i, v, true
		}
	}
	return 0, 0, false
}

// Cobweb returns the corners of the cobweb (staircase) picture of a
// one-dimensional map: from (x0, x0) the path goes up or down to the graph,
// (x_k, x_{k+1}), then across to the diagonal, (x_{k+1}, x_{k+1}), for
// k = 0 .. steps-1. The result holds 2·steps+1 points as x, y pairs; an
// orbit that leaves the finite numbers ends the picture there, with the
// *NonFiniteError. A map of dimension other than 1 is integrate.ErrDimension.
func Cobweb(m *Map, x0 float64, steps int) ([][2]float64, error) {
	if m.Dim() != 1 {
		return nil, fmt.Errorf("maps: cobweb of a map of dimension %d: needs dimension 1: %w", m.Dim(), integrate.ErrDimension)
	}
	if steps < 0 {
		return nil, fmt.Errorf("maps: cobweb steps = %d: must be >= 0: %w", steps, integrate.ErrSettings)
	}
	if math.IsNaN(x0) || math.IsInf(x0, 0) {
		return nil, fmt.Errorf("maps: cobweb start %v: %w", x0, integrate.ErrNonFinite)
	}
	pts := make([][2]float64, 0, 2*steps+1)
	pts = append(pts, [2]float64{x0, x0})
	x, y := []float64{x0}, []float64{0}
	for k := 1; k <= steps; k++ {
		m.Next(x, y)
		if math.IsNaN(y[0]) || math.IsInf(y[0], 0) {
			return pts, &NonFiniteError{Iterate: k, Component: 0, Value: y[0]}
		}
		pts = append(pts, [2]float64{x[0], y[0]}, [2]float64{y[0], y[0]})
		x[0] = y[0]
	}
	return pts, nil
}
