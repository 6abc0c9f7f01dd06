package lyap

import (
	"errors"
	"fmt"

	"github.com/plumbdyn/plumb/internal/dd"
)

// ErrJump reports an orbit handed to ShadowMap with a one-step error far
// beyond rounding (see JumpError).
var ErrJump = errors.New("orbit jumps")

// DoubleDouble is an unevaluated sum Hi + Lo of two float64 values, about 32
// significant digits: the arithmetic a shadow is refined in.
type DoubleDouble = dd.Float

// ShadowableMap is a Map that can also be evaluated in double-double
// arithmetic, as the refinement of a shadow needs: NextDD writes f(x) into
// dst, both of length Dim(), and returns an error when f is not defined at
// x. A map with angle components says so with a method Periods() []float64
// (the period per component, 0 for the others); differences are then taken
// modulo the period. The maps package's Map satisfies this interface.
type ShadowableMap interface {
	Map
	NextDD(x, dst []DoubleDouble) error
}

// ShadowSettings controls ShadowMap. A nil *ShadowSettings means the
// defaults of every field.
type ShadowSettings struct {
	// Unstable is the number of expanding directions of the orbit (0: the
	// number of positive Lyapunov exponents measured along the given orbit
	// by the QR method). Must be in 0..Dim.
	Unstable int
	// MaxStepError is the largest one-step error |f(p_i) − p_(i+1)| of the
	// given orbit that is taken for rounding; a larger one is a jump, and
	// the orbit is refused with a *JumpError (0: DefaultJumpFactor units of
	// float64 rounding at the orbit's magnitude, max(1, |f(p_i)|)·2^-53).
	MaxStepError float64
	// MaxDistance is the largest correction the refinement may make before
	// it is taken to have left the region where the linearised map is valid
	// (0: DefaultMaxDistance·max(1, the orbit's largest component)).
	MaxDistance float64
	// MinAngle is the smallest angle, in radians, between the stable and
	// unstable directions at which the split is trusted (0:
	// DefaultMinAngle). Below it the shadow stops at a glitch.
	MinAngle float64
	// Passes bounds the refinement passes (0: DefaultPasses).
	Passes int
}

// Defaults of ShadowSettings.
const (
	// DefaultJumpFactor is the default one-step error limit in units of
	// float64 rounding (2^-53) at the orbit's magnitude: about 1.2e-10
	// relative. A float64 map evaluation errs by a few units; a million is
	// room for maps with long formulas, yet far below any deliberate change
	// of state.
	DefaultJumpFactor = 1 << 20
	// DefaultMaxDistance is the default largest correction relative to the
	// orbit's magnitude: beyond 1e-4 the quadratic terms the Newton-like
	// step neglects are no longer small next to the errors it removes from
	// a float64 orbit.
	DefaultMaxDistance = 1e-4
	// DefaultMinAngle is the default smallest angle between stable and
	// unstable directions (radians): the split amplifies errors by about
	// 1/sin(angle), 1e6 at this angle.
	DefaultMinAngle = 1e-6
	// DefaultPasses is the default number of refinement passes: each pass
	// squares the relative one-step error, so 1e-16 reaches the
	// double-double floor in two or three.
	DefaultPasses = 8
	// ShadowTarget is the one-step error, relative to max(1, |x|), that the
	// refined orbit must reach: about 1e6 units of double-double rounding,
	// ten orders below a float64 orbit's.
	ShadowTarget = 1e-26
)

// Shadow is the result of ShadowMap: how far from the given orbit a
// refined orbit lies whose one-step errors are at double-double level, and
// for how many iterates. By the shadowing lemma a true orbit of the map
// lies within about (the amplification) × ShadowTarget of that refined
// orbit, so Distance is the distance of a true orbit from the given one to
// the precision shown. It is a statement about the map as computed in
// double-double arithmetic, not a proof in interval arithmetic, and about
// the model, not the system the model describes.
type Shadow struct {
	// Dim is the state dimension; Iterates the given orbit's length in
	// steps (it holds Iterates+1 states; for a flow, the segments between
	// joints).
	Dim      int `json:"dim"`
	Iterates int `json:"iterates"`
	// Shadowed is the number of steps shadowed from the start: iterates
	// 0..Shadowed of the given orbit lie within Distance of a refined
	// orbit. It equals Iterates unless Glitch says why it stops.
	Shadowed int `json:"shadowed"`
	// Until is where the shadow ends: the iterate Shadowed for a map, the
	// time of joint Shadowed for a flow.
	Until float64 `json:"until"`
	// TimeShift is, for a flow, the largest difference between the
	// shadow's clock and the run's at a joint (the time rescaling); 0 for
	// a map.
	TimeShift float64 `json:"time_shift"`
	// Distance is the largest correction over the shadowed part (the
	// shadowing distance, Euclidean, angle components modulo their
	// period), at iterate DistanceAt.
	Distance   float64 `json:"distance"`
	DistanceAt int     `json:"distance_at"`
	// StepErrorBefore is the largest one-step error |f(p_i) − p_(i+1)| of
	// the given orbit (measured in double-double), at step
	// StepErrorBeforeAt (the index of p_(i+1)); StepErrorAfter is the
	// largest of the refined orbit over the shadowed part.
	StepErrorBefore   float64 `json:"step_error_before"`
	StepErrorBeforeAt int     `json:"step_error_before_at"`
	StepErrorAfter    float64 `json:"step_error_after"`
	// Amplification is Distance over the largest one-step error of the
	// shadowed part of the given orbit: the shadowing lemma's constant as
	// measured on this orbit.
	Amplification float64 `json:"amplification"`
	// Unstable is the number of expanding directions used in the split;
	// Exponents the Lyapunov exponents per iterate measured along the given
	// orbit when Unstable was counted from them (nil when it was given).
	Unstable  int       `json:"unstable"`
	Exponents []float64 `json:"exponents"`
	// MinAngle is the smallest angle (radians) between the stable and
	// unstable directions over the shadowed part, at iterate MinAngleAt
	// (π/2 when one of them is empty).
	MinAngle   float64 `json:"min_angle"`
	MinAngleAt int     `json:"min_angle_at"`
	// Passes is the number of refinement passes made.
	Passes int `json:"passes"`
	// Glitch, when not nil, says where and why the shadow stops before the
	// end of the given orbit.
	Glitch *Glitch `json:"glitch"`
	// Refined is the refined orbit over the shadowed part, (Shadowed+1)·Dim
	// values, state after state.
	Refined []DoubleDouble `json:"-"`
}

// Glitch is where a shadow stops: an iterate at which the stable and
// unstable directions are nearly tangent, or the refinement fails.
type Glitch struct {
	// Index is the iterate (or, for a flow, the joint) where the split or
	// the refinement fails; Time its time for a flow.
	Index int     `json:"index"`
	Time  float64 `json:"time"`
	// Angle is the angle (radians) between stable and unstable directions
	// there.
	Angle float64 `json:"angle"`
	// Reason says what failed.
	Reason string `json:"reason"`
}

// JumpError reports a given orbit whose one-step error at Index (the index
// of the state that f(p_(Index−1)) should equal) exceeds the limit: a jump,
// not rounding, which no true orbit near the given one follows.
type JumpError struct {
	Index int
	Size  float64
	Limit float64
}

func (e *JumpError) Error() string {
	return fmt.Sprintf("lyap: the orbit jumps at iterate %d: one-step error %.3g exceeds %.3g (a change of state, not rounding): %v",
		e.Index, e.Size, e.Limit, ErrJump)
}

// Unwrap returns ErrJump.
func (e *JumpError) Unwrap() error { return ErrJump }
