package plumb

import (
	"context"

	"github.com/plumbdyn/plumb/integrate"
)

// EnsembleGroup is one lockstep group of an ensemble's members, run beside
// its own copy of the control: members First to First+Count-1 (member 0
// being the control), and their run (member 0 of Run the control's copy).
type EnsembleGroup struct {
	Index int
	First int
	Count int
	Run   *integrate.BatchSolution
}

// groups is the number of lockstep groups.
func (c *ensembleConfig) groups() int {
	m := len(c.starts) - 1
	if c.lockstep <= 0 {
		return 0
	}
	return (m + c.lockstep - 1) / c.lockstep
}

// groupRange is the members [first, first+count) of group g.
func (c *ensembleConfig) groupRange(g int) (first, count int) {
	m := len(c.starts) - 1
	first = 1 + g*c.lockstep
	return first, min(c.lockstep, m+1-first)
}

// ensembleGroup integrates group g with the control in lockstep. It
// returns nil and the error when the run could not begin, else the group
// (partial after an error).
func ensembleGroup(ctx context.Context, sys *System, t1 float64, es *EnsembleSettings, cfg *ensembleConfig, g int) (*EnsembleGroup, error) {
	first, count := cfg.groupRange(g)
	starts := cfg.starts
	if count != len(cfg.starts)-1 {
		starts = append([][]float64{cfg.starts[0]}, cfg.starts[first:first+count]...)
	}
	bp, err := sys.BatchProblem(starts)
	if err != nil {
		return nil, err
	}
	sol, err := integrate.SolveBatch(ctx, bp, t1, cfg.batchSettings(es, t1))
	if sol == nil {
		return nil, err
	}
	return &EnsembleGroup{Index: g, First: first, Count: count, Run: sol}, err
}

// joinGroups returns the members of all groups as one solution (the
// control from the first group, then every group's members in order, on
// the samples every group reached) and, for more than one group, where
// each member's own copy of the control is (nil for one group: member 0).
// The work counts are summed; the status is the first group's that did
// not complete, else completed.
func joinGroups(groups []*EnsembleGroup) (*integrate.BatchSolution, func(j, k int) []float64) {
	if len(groups) == 1 {
		return groups[0].Run, nil
	}
	first := groups[0].Run
	n := first.Dim
	out := &integrate.BatchSolution{Method: first.Method, Dim: n, Members: 1, T0: first.T0, End: first.End, Status: integrate.Completed}
	samples := len(first.Samples)
	for _, g := range groups {
		r := g.Run
		out.Members += r.Members - 1
		samples = min(samples, len(r.Samples))
		out.End = min(out.End, r.End)
		out.Stats.Evaluations += r.Stats.Evaluations
		out.Stats.Accepted += r.Stats.Accepted
		out.Stats.Rejected += r.Stats.Rejected
		out.Stats.NonFinite += r.Stats.NonFinite
		if r.Stats.Stiff && !out.Stats.Stiff {
			out.Stats.Stiff, out.Stats.StiffAt = true, r.Stats.StiffAt
		}
		if out.Status == integrate.Completed && r.Status != integrate.Completed {
			out.Status = r.Status
		}
	}
	// owner[k] is the group of member k (the control: the first).
	owner := make([]int, out.Members)
	k := 1
	for gi, g := range groups {
		for range g.Run.Members - 1 {
			owner[k] = gi
			k++
		}
	}
	join := func(ys func(r *integrate.BatchSolution) []float64) []float64 {
		y := make([]float64, 0, n*out.Members)
		y = append(y, ys(first)[:n]...)
		for _, g := range groups {
			y = append(y, ys(g.Run)[n:]...)
		}
		return y
	}
	out.Samples = make([]integrate.Sample, samples)
	for j := range out.Samples {
		out.Samples[j].T = first.Samples[j].T
		out.Samples[j].Y = join(func(r *integrate.BatchSolution) []float64 { return r.Samples[j].Y })
	}
	if out.Status == integrate.Completed {
		out.Final = join(func(r *integrate.BatchSolution) []float64 { return r.Final })
	}
	ctrl := func(j, k int) []float64 { return groups[owner[k]].Run.Samples[j].Y[:n] }
	return out, ctrl
}
