package plumb

import (
	"fmt"
	"math"
	"math/rand/v2"

	"github.com/plumbdyn/plumb/integrate"
	"github.com/plumbdyn/plumb/internal/detmath"
)

// Spread says how an ensemble's members are placed around the start.
type Spread int

const (
	// SpreadBall puts every member at distance Delta from the start, in a
	// direction drawn at random (uniformly on the sphere, from the seed)
	// in the space of the perturbed components.
	SpreadBall Spread = iota
	// SpreadLine puts member k (k = 1..Members) at k·Delta from the start
	// along one component: releases a fixed step apart.
	SpreadLine
)

// String returns "ball" or "line".
func (s Spread) String() string {
	if s == SpreadLine {
		return "line"
	}
	return "ball"
}

// ParseSpread returns the Spread named "ball" or "line".
func ParseSpread(name string) (Spread, error) {
	switch name {
	case "ball":
		return SpreadBall, nil
	case "line":
		return SpreadLine, nil
	}
	return 0, fmt.Errorf("plumb: unknown spread %q (ball, line): %w", name, ErrUnknown)
}

// ensMetric measures differences as the ensemble's Distance does:
// periodic components wrapped into [-P/2, P/2], then divided by their
// scale, over the observed components.
type ensMetric struct {
	scales  []float64 // per component, 0 when not observed; nil: all at 1
	periods []float64
}

func (e ensMetric) diff(i int, a, b float64) (float64, bool) {
	if e.scales != nil && e.scales[i] == 0 {
		return 0, false
	}
	d := a - b
	if i < len(e.periods) && e.periods[i] > 0 {
		d = math.Remainder(d, e.periods[i])
	}
	if e.scales != nil {
		d /= e.scales[i]
	}
	return d, true
}

func (e ensMetric) dist(x, y []float64) float64 {
	var s float64
	for i := range x {
		if d, ok := e.diff(i, x[i], y[i]); ok {
			s += float64(d * d)
		}
	}
	return math.Sqrt(s)
}

// scale returns the scale of component i (1 when none was given).
func (e ensMetric) scale(i int) float64 {
	if e.scales == nil || e.scales[i] == 0 {
		return 1
	}
	return e.scales[i]
}

// unitDirections returns count unit vectors over the components in along
// (indices), drawn from the seed with the Box–Muller transform of
// detmath.Log, Sin and Cos (the same bits on every machine), as
// coefficients per component.
//
// References:
//
//	G. E. P. Box, M. E. Muller, A note on the generation of random normal
//	  deviates, Ann. Math. Statist. 29 (1958) 610–611.
//	M. E. Muller, A note on a method for generating points uniformly on
//	  n-dimensional spheres, Comm. ACM 2 (1959) 19–20.
func unitDirections(seed uint64, count, n int, along []int) [][]float64 {
	rng := rand.New(rand.NewPCG(seed, 0x656e73656d626c65)) // second word fixed: "ensemble"
	out := make([][]float64, count)
	for k := range out {
		u := make([]float64, n)
		for {
			var s float64
			for j, i := range along {
				if j%2 == 0 {
					// Two deviates per pair of uniforms; the first is in
					// (0, 1], k/2^53 with k = 1..2^53 (exact).
					lg := detmath.Log(float64(float64(rng.Uint64()>>11+1) * 0x1p-53))
					r := math.Sqrt(float64(-2 * lg))
					a := float64(2*math.Pi) * rng.Float64()
					u[i] = float64(r * detmath.Cos(a))
					if j+1 < len(along) {
						u[along[j+1]] = float64(r * detmath.Sin(a))
					}
				}
				s += float64(u[i] * u[i])
			}
			if s > 0 {
				norm := math.Sqrt(s)
				for _, i := range along {
					u[i] /= norm
				}
				break
			}
		}
		out[k] = u
	}
	return out
}

// perturbedStarts returns the members' starts: the control (start itself)
// first, then the members placed by spread.
func perturbedStarts(start []float64, members int, delta float64, spread Spread, along []int, seed uint64, m ensMetric) [][]float64 {
	n := len(start)
	out := [][]float64{append([]float64(nil), start...)}
	switch spread {
	case SpreadLine:
		i := along[0]
		for k := 1; k <= members; k++ {
			y := append([]float64(nil), start...)
			y[i] += float64(float64(float64(k)*delta) * m.scale(i))
			out = append(out, y)
		}
	default:
		for _, u := range unitDirections(seed, members, n, along) {
			y := append([]float64(nil), start...)
			for _, i := range along {
				y[i] += float64(float64(delta*u[i]) * m.scale(i))
			}
			out = append(out, y)
		}
	}
	return out
}

// componentIndex returns the indices of names among states, or an error
// naming the unknown one (field names the setting).
func componentIndex(field string, names, states []string) ([]int, error) {
	var out []int
	seen := map[int]bool{}
	for _, name := range names {
		i := -1
		for j, s := range states {
			if s == name {
				i = j
			}
		}
		if i < 0 {
			return nil, fmt.Errorf("plumb: EnsembleSettings.%s: %q is not a state component (states: %v): %w", field, name, states, ErrUnknown)
		}
		if seen[i] {
			return nil, fmt.Errorf("plumb: EnsembleSettings.%s: %q named twice: %w", field, name, integrate.ErrSettings)
		}
		seen[i] = true
		out = append(out, i)
	}
	return out, nil
}
