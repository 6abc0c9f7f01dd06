package integrate

import (
	"math"
	"sort"
)

// Status says why a solve ended.
type Status int

const (
	// Completed: t1 was reached.
	Completed Status = iota
	// Stopped: a Crossing with Stop set was found; End is its time.
	Stopped
	// Canceled: the context was canceled; the solution holds what was done.
	Canceled
	// Failed: stepping failed (see the error); the solution holds what was done.
	Failed
)

// String returns the status in lower case.
func (s Status) String() string {
	switch s {
	case Completed:
		return "completed"
	case Stopped:
		return "stopped"
	case Canceled:
		return "canceled"
	}
	return "failed"
}

// Sample is the state at one time of the sampling grid.
type Sample struct {
	T float64
	Y []float64
}

// Solution is the result of Solve: the accepted steps (unless
// Settings.DropSteps), samples on the requested grid, located crossings,
// the final state, the work counts and why it ended.
type Solution struct {
	Method string // the method's name
	Dim    int    // the state dimension
	T0     float64
	// End is the last time reached (t1, a stopping crossing, or where it failed).
	End float64
	// Final is the state at End.
	Final []float64

	// T holds the times of the initial point and of every accepted step;
	// Y their states, row after row (Y[i*Dim:(i+1)*Dim] is the state at
	// T[i]). Both are empty with Settings.DropSteps. After a stopping
	// crossing the last stored step is the whole step that contains it, so
	// T's last entry may lie beyond End; At answers only up to End.
	T []float64
	Y []float64

	// Samples holds the states on Settings.Every or Settings.Times.
	Samples []Sample
	// Hits holds the located crossings in time order.
	Hits []Hit

	Stats  Stats
	Status Status

	sc   scheme
	coef []float64 // dense output per step, denseSize*Dim each
	nd   int       // denseSize*Dim
}

// State returns the state at T[i] in dst (grown if short).
func (s *Solution) State(i int, dst []float64) []float64 {
	if i < 0 || i >= len(s.T) {
		return nil
	}
	if cap(dst) < s.Dim {
		dst = make([]float64, s.Dim)
	}
	dst = dst[:s.Dim]
	copy(dst, s.Y[i*s.Dim:(i+1)*s.Dim])
	return dst
}

// At writes the solution at time t into dst (grown if short) and returns it,
// using the method's continuous extension on the step that contains t; at a
// step's own time it returns the stored state exactly.
//
// Special cases:
//
//	t outside [T0, End] (or NaN): returns nil
//	Settings.DropSteps was set:   returns nil
func (s *Solution) At(t float64, dst []float64) []float64 {
	if len(s.T) == 0 || s.sc == nil || math.IsNaN(t) {
		return nil
	}
	dir := 1.0
	if s.End < s.T0 {
		dir = -1
	}
	if (t-s.T0)*dir < 0 || (t-s.End)*dir > 0 {
		return nil
	}
	// Find the step k with T[k] <= t <= T[k+1] (in the direction of time).
	k := sort.Search(len(s.T), func(i int) bool { return (s.T[i]-t)*dir >= 0 })
	if k < len(s.T) && s.T[k] == t {
		return s.State(k, dst)
	}
	if k == 0 || k >= len(s.T) {
		if t == s.End && s.Final != nil {
			if cap(dst) < s.Dim {
				dst = make([]float64, s.Dim)
			}
			dst = dst[:s.Dim]
			copy(dst, s.Final)
			return dst
		}
		return nil
	}
	k--
	if cap(dst) < s.Dim {
		dst = make([]float64, s.Dim)
	}
	dst = dst[:s.Dim]
	theta := (t - s.T[k]) / (s.T[k+1] - s.T[k])
	s.sc.interp(s.coef[k*s.nd:(k+1)*s.nd], theta, dst)
	return dst
}
