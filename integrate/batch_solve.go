package integrate

import (
	"context"
	"errors"
)

// BatchSolution is the result of SolveBatch: every member's state on the
// requested grid and at the end, the work counts and why it ended.
type BatchSolution struct {
	Method  string // the method's name
	Dim     int    // the state dimension of one member
	Members int    // the number of members
	T0      float64
	// End is the last time reached (t1, or where it failed or was
	// canceled); Final holds every member's state there, member-major
	// (member k's state at Final[k*Dim:(k+1)*Dim]).
	End   float64
	Final []float64
	// Samples holds the states on Settings.Every or Settings.Times; each
	// Sample's Y holds every member, member-major.
	Samples []Sample
	Stats   Stats
	Status  Status
}

// Member returns member k's state in sample j (a view into Samples[j].Y),
// or nil when j or k is out of range.
func (s *BatchSolution) Member(j, k int) []float64 {
	if j < 0 || j >= len(s.Samples) || k < 0 || k >= s.Members {
		return nil
	}
	return s.Samples[j].Y[k*s.Dim : (k+1)*s.Dim : (k+1)*s.Dim]
}

// SolveBatch integrates the members of p from p.T0 to t1 in lockstep with
// DormandPrince54 (see BatchStepper) and settings s (nil: defaults; see
// BatchSettings for which apply). t1 may be below p.T0.
//
// It returns the solution and nil, or, once stepping has begun, the
// partial solution (samples up to the last accepted step, the states
// there) and an error wrapping one of the package's sentinels or the
// context's error. Before stepping it returns nil and the error. A panic in
// the field or the progress function is recovered into a *CallbackError
// returned with the partial solution.
//
// Cost: per step, 6 evaluations of the batch field (each over all members)
// plus O(n·M) work, shared by the workers; per sample, O(n·M). A batch
// keeps no steps: memory is the samples' and O(n·M) workspace.
func SolveBatch(ctx context.Context, p BatchProblem, t1 float64, s *BatchSettings) (out *BatchSolution, err error) {
	if ctx == nil {
		ctx = context.Background()
	}
	st, err := NewBatchStepper(p, t1, s)
	if err != nil {
		return nil, err
	}
	defer st.Close()
	c := st.cfg
	n, m := st.n, st.m
	sol := &BatchSolution{Method: DormandPrince54.Name(), Dim: n, Members: m, T0: p.T0, End: p.T0}
	var sb sampleBlocks
	defer func() {
		if v := recover(); v != nil {
			name := CallbackField
			if st.inProgress {
				name = CallbackProgress
			}
			out, err = sol, Recovered(name, st.t, v)
			sol.Stats = st.stats
			sol.Status = Failed
			// A panic in the field comes in a trial step, after every
			// sample up to the last accepted step was written.
			sol.End, sol.Final = st.t, st.State(nil)
		}
	}()
	var grid gridIter
	if c.every > 0 {
		grid = newEveryGrid(p.T0, t1, c.every)
	} else if c.times != nil {
		grid = gridIter{times: c.times, n: len(c.times)}
	}
	for grid.i < grid.n && grid.at(grid.i) == p.T0 {
		smp := sb.next(&sol.Samples, n*m, grid.n)
		smp.T = p.T0
		st.State(smp.Y)
		grid.i++
	}
	for st.Next(ctx) {
		ta, tb := st.tPrev, st.t
		h := tb - ta
		for grid.i < grid.n {
			tg := grid.at(grid.i)
			if (tg-tb)*st.dir > 0 {
				break
			}
			smp := sb.next(&sol.Samples, n*m, grid.n)
			smp.T = tg
			if tg == tb {
				st.State(smp.Y)
			} else {
				st.denseAt((tg-ta)/h, smp.Y)
			}
			grid.i++
		}
		sol.End = tb
	}
	sol.Stats = st.stats
	sol.End = st.t
	sol.Final = st.State(nil)
	if err := st.Err(); err != nil {
		sol.Status = Failed
		if errors.Is(err, context.Canceled) || errors.Is(err, context.DeadlineExceeded) {
			sol.Status = Canceled
		}
		return sol, err
	}
	sol.Status = Completed
	return sol, nil
}

// sampleBlocks hands out samples whose Y come from blocks that double in
// size (as Solution.newSample does), so the step loop allocates only
// O(log total) times.
type sampleBlocks struct {
	flat []float64
}

// next appends a sample with Y of length per to *samples and returns it.
func (sb *sampleBlocks) next(samples *[]Sample, per, total int) *Sample {
	if len(sb.flat) < per {
		k := len(*samples)
		grow := min(max(k, 16), total-k)
		grow = max(grow, 1)
		sb.flat = make([]float64, grow*per)
		if cap(*samples) < total {
			next := make([]Sample, k, min(total, max(2*k, 16)))
			copy(next, *samples)
			*samples = next
		}
	}
	y := sb.flat[:per:per]
	sb.flat = sb.flat[per:]
	*samples = append(*samples, Sample{Y: y})
	return &(*samples)[len(*samples)-1]
}
