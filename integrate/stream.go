package integrate

import (
	"context"
	"fmt"
	"math"
)

// Stream integrates p from p.T0 to t1 like Solve, but hands every sample
// to each as soon as it is computed instead of keeping it, so that memory
// stays flat whatever the span: the samples of Settings.Every or
// Settings.Times, or, when the settings ask for neither, the start and
// the end of every accepted step (the located crossing instead of the
// step's end when a stopping crossing ends the run).
//
// y is a buffer reused for the next call: each must copy what it keeps.
// The samples are the bits Solve would store. The returned Solution holds
// no samples and no steps (At is not available); it has the crossings
// (Hits), End, Final, Status and Stats as Solve's would. DropSteps is
// implied.
//
// When each returns an error the run stops: Stream returns the partial
// solution, Status Failed, End and Final at the start of the step whose
// sample failed (the last point all of whose samples were delivered), and
// that error unchanged. A panic in each is recovered into a *CallbackError
// naming CallbackSample. Otherwise errors are those of Solve.
//
// Per sample, one evaluation of the continuous extension and the call;
// Stream allocates nothing per step or per sample beyond what Solve does
// for crossings.
func Stream(ctx context.Context, p Problem, t1 float64, m Method, s *Settings, each func(t float64, y []float64) error) (*Solution, error) {
	if each == nil {
		return nil, fmt.Errorf("integrate: Stream needs a function to receive the samples: %w", ErrSettings)
	}
	return solve(ctx, p, t1, m, s, each)
}

// SampleCount returns how many samples Solve and Stream deliver from t0 to
// t1 with settings s: the points of the Every grid (t0 + i·Every while
// short of t1 by more than 1e-9·Every, then t1) or the number of Times;
// -1 when the samples are the accepted steps, whose number is known only
// at the end. A run that stops early delivers fewer. The count is that of
// the grid Solve walks, so that a caller can size an output up front.
func SampleCount(t0, t1 float64, s *Settings) int {
	switch {
	case s == nil:
		return -1
	case s.Every > 0 && !math.IsInf(s.Every, 0) && t1 != t0:
		return newEveryGrid(t0, t1, s.Every).n
	case s.Every == 0 && s.Times != nil:
		return len(s.Times)
	}
	return -1
}
