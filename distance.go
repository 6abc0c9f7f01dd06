package plumb

import (
	"fmt"
	"math"
	"strconv"
	"strings"

	"github.com/plumbdyn/plumb/integrate"
)

// Distance chooses how an audit measures the difference between two
// states: over which components (the quantities the caller forecasts), and
// in what unit each (so that components in mixed units compare). The zero
// Distance is the plain Euclidean distance over every component.
//
// A component's difference is wrapped first (periodic components, see
// System.Periods), then divided by its scale; the distance is the Euclidean
// norm of what remains over the observed components:
//
//	d(x, y) = sqrt( sum over observed i of (wrap(x_i - y_i) / s_i)^2 )
//
// The tolerance, the spread (and so a relative tolerance), the a-priori
// perturbations delta0 and the predicted horizons are all in this distance.
type Distance struct {
	// Observe names the state components compared, in any order; nil or
	// empty means every component. Unknown and repeated names are errors.
	Observe []string
	// Scales divides the difference of the named component by Value before
	// the norm; a component not listed has scale 1. Each Value must be
	// positive and finite, each name an observed component, and no name
	// may appear twice.
	Scales []Scale
}

// Scale is the scale of one state component: a difference of Value in it
// counts as 1 in the distance.
type Scale struct {
	Name  string
	Value float64
}

// DistanceError reports an unusable Distance: which field (Observe or
// Scales), which entry, and why. It wraps ErrUnknown (a name that is no
// state component, or one that Observe leaves out) or integrate.ErrSettings
// (a repeated name, a scale that is not positive and finite).
type DistanceError struct {
	// Field is "Observe" or "Scales"; Index is the entry in it, Name its
	// component name.
	Field string
	Index int
	Name  string
	// Why says what is wrong with it.
	Why string
	Err error
}

func (e *DistanceError) Error() string {
	return fmt.Sprintf("plumb: Distance.%s[%d] (%s): %s: %v", e.Field, e.Index, e.Name, e.Why, e.Err)
}

// Unwrap returns ErrUnknown or integrate.ErrSettings.
func (e *DistanceError) Unwrap() error { return e.Err }

// PerComponent returns, for a state whose components are named states, the
// scale of each component (0 for a component not observed): the form
// integrate.AuditSettings.Scales takes. It returns nil when d is the plain
// distance (every component observed at scale 1). Errors: *DistanceError.
func (d Distance) PerComponent(states []string) ([]float64, error) {
	index := func(name string) int {
		for i, s := range states {
			if s == name {
				return i
			}
		}
		return -1
	}
	known := "states: " + strings.Join(states, ", ")
	scales := make([]float64, len(states))
	if len(d.Observe) == 0 {
		for i := range scales {
			scales[i] = 1
		}
	}
	for k, name := range d.Observe {
		i := index(name)
		switch {
		case i < 0:
			return nil, &DistanceError{Field: "Observe", Index: k, Name: name, Why: "no state component has this name (" + known + ")", Err: ErrUnknown}
		case scales[i] != 0:
			return nil, &DistanceError{Field: "Observe", Index: k, Name: name, Why: "named twice", Err: integrate.ErrSettings}
		}
		scales[i] = 1
	}
	seen := make([]bool, len(states))
	for k, sc := range d.Scales {
		i := index(sc.Name)
		switch {
		case i < 0:
			return nil, &DistanceError{Field: "Scales", Index: k, Name: sc.Name, Why: "no state component has this name (" + known + ")", Err: ErrUnknown}
		case seen[i]:
			return nil, &DistanceError{Field: "Scales", Index: k, Name: sc.Name, Why: "scaled twice", Err: integrate.ErrSettings}
		case !(sc.Value > 0) || math.IsInf(sc.Value, 0):
			return nil, &DistanceError{Field: "Scales", Index: k, Name: sc.Name, Why: "scale " + formatScale(sc.Value) + " must be positive and finite", Err: integrate.ErrSettings}
		case scales[i] == 0:
			return nil, &DistanceError{Field: "Scales", Index: k, Name: sc.Name, Why: "not an observed component", Err: ErrUnknown}
		}
		seen[i] = true
		scales[i] = sc.Value
	}
	for _, v := range scales {
		if v != 1 {
			return scales, nil
		}
	}
	return nil, nil
}

// DistanceReport is the distance an audit used, as reported.
type DistanceReport struct {
	// FullState is true for the plain Euclidean distance over every
	// component at scale 1.
	FullState bool `json:"full_state"`
	// Components are the compared components in state order, with their
	// scales (1 when none was given) and the periods of angles (omitted
	// for the others).
	Components []DistanceComponent `json:"components"`
	// Omitted names the components not compared.
	Omitted []string `json:"omitted,omitempty"`
}

// DistanceComponent is one compared component of DistanceReport.
type DistanceComponent struct {
	Name   string  `json:"name"`
	Scale  float64 `json:"scale"`
	Period float64 `json:"period,omitempty"`
}

// newDistanceReport describes the distance over the components named
// states with the per-component scales (nil: all at 1) and periods (nil:
// none).
func newDistanceReport(states []string, scales, periods []float64) DistanceReport {
	rep := DistanceReport{FullState: scales == nil, Components: []DistanceComponent{}}
	for i, name := range states {
		c := DistanceComponent{Name: name, Scale: 1}
		if scales != nil {
			if scales[i] == 0 {
				rep.Omitted = append(rep.Omitted, name)
				continue
			}
			c.Scale = scales[i]
		}
		if i < len(periods) {
			c.Period = periods[i]
		}
		rep.Components = append(rep.Components, c)
	}
	return rep
}

// String is the distance as the summaries write it, e.g. "Euclidean over
// x, z with scales x/2, z/10 (y not compared)".
func (d DistanceReport) String() string {
	var names, scaled, wrapped []string
	for _, c := range d.Components {
		names = append(names, c.Name)
		if c.Scale != 1 {
			scaled = append(scaled, c.Name+"/"+formatScale(c.Scale))
		}
		if c.Period > 0 {
			wrapped = append(wrapped, c.Name)
		}
	}
	s := "Euclidean over " + strings.Join(names, ", ")
	if len(scaled) > 0 {
		s += " with scales " + strings.Join(scaled, ", ")
	}
	if len(wrapped) > 0 {
		s += "; angles wrapped: " + strings.Join(wrapped, ", ")
	}
	if len(d.Omitted) > 0 {
		s += " (" + strings.Join(d.Omitted, ", ") + " not compared)"
	}
	return s
}

// stateNames returns names, or "y[0]", "y[1]", ... for a state of n
// components when names is nil; an error wrapping integrate.ErrDimension
// when the lengths differ. field names the settings field in the message.
func stateNames(field string, names []string, n int) ([]string, error) {
	if names == nil {
		names = make([]string, n)
		for i := range names {
			names[i] = "y[" + strconv.Itoa(i) + "]"
		}
		return names, nil
	}
	if len(names) != n {
		return nil, fmt.Errorf("plumb: %s has %d names, the state has %d components: %w", field, len(names), n, integrate.ErrDimension)
	}
	return names, nil
}

// minScale is the smallest scale of an observed component, 1 when scales
// is nil.
func minScale(scales []float64) float64 {
	m := math.Inf(1)
	for _, v := range scales {
		if v > 0 {
			m = math.Min(m, v)
		}
	}
	if math.IsInf(m, 1) {
		return 1
	}
	return m
}

func formatScale(v float64) string { return strconv.FormatFloat(v, 'g', -1, 64) }

// deltaNote is what the prediction line adds for a distance other than the
// plain one: delta0 is measured in it too.
func (d DistanceReport) deltaNote() string {
	if d.FullState {
		return ""
	}
	return " (delta0 in the same distance)"
}
