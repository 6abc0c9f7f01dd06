package main

// plumb ensemble --shard I/N (one block of the releases and lockstep
// groups, written as a shard file) and the ensemble of a merge.

import (
	"context"
	"fmt"
	"io"
	"math"

	"github.com/plumbdyn/plumb"
	"github.com/plumbdyn/plumb/internal/runio"
)

// ensemble computes the ensemble, or joins the pieces in a merge.
func (f *ensembleFlags) ensemble(ctx context.Context, cl *call, sys *plumb.System, s *plumb.EnsembleSettings) (*plumb.EnsembleReport, error) {
	if err := checkNPYOut(cl); err != nil {
		return nil, err
	}
	if cl.merge == nil {
		return plumb.Ensemble(ctx, sys, f.t1, s)
	}
	parts, err := plumb.EnsembleParts(cl.merge.set)
	if err != nil {
		return nil, err
	}
	return plumb.MergeEnsemble(sys, f.t1, s, parts)
}

// runShard computes piece sh of the ensemble and writes its shard file.
func (f *ensembleFlags) runShard(ctx context.Context, cl *call, sh plumb.Shard, sys *plumb.System, s *plumb.EnsembleSettings) error {
	cl.sh.format, cl.sh.plot = "table", "" // the shard file; merge writes the format and draws the pictures
	return cl.runJob(ctx, job{
		what:    "the ensemble of " + sys.Name,
		refusal: "the ensemble's settings were refused",
		run: func(ctx context.Context, _ func(float64)) (*outcome, error) {
			part, runErr := plumb.EnsembleShard(ctx, sys, f.t1, s, sh)
			if part == nil {
				return nil, runErr
			}
			sw, err := cl.shardWriter(sh, plumb.EnsembleUnitsName, part.Total, map[string]string{"members-file": f.membersFile})
			if err != nil {
				return nil, err
			}
			if err := plumb.WriteEnsemblePart(sw, part); err != nil {
				return nil, err
			}
			members, steps := 0, 0
			for _, g := range part.Groups {
				members += g.Count
				steps += g.Run.Stats.Accepted
			}
			what := fmt.Sprintf("shard %s: %s, %s", sh, count(len(part.Groups), "lockstep group"), count(members, "member"))
			if part.Releases != nil {
				what += ", the releases"
			}
			status, _ := runStatus(runErr)
			res := &outcome{done: what + ", " + count(steps, "step"), table: func(io.Writer) error { return sw.Close(status, runErr) }}
			if runErr != nil {
				res.err = fmt.Errorf("shard %s of the ensemble of %s %s (the shard file says so; merge refuses it): %w", sh, sys.Name, statusVerb(status), runErr)
			}
			return res, nil
		},
	})
}

// lockstepNote says how the members were grouped, when not all in one
// lockstep group.
func lockstepNote(rep *plumb.EnsembleReport) string {
	if rep.Lockstep <= 0 || rep.Lockstep >= rep.Members {
		return ""
	}
	return fmt.Sprintf(", members in lockstep groups of %d", rep.Lockstep)
}

// withNPY makes res write --format npy: the rows of the CSV (the curves,
// or with --rows scales the finite-size exponents) as a float64 array,
// NaN where the CSV leaves a cell empty. The array goes out through the
// default writer, the table's.
func (f *ensembleFlags) withNPY(cl *call, res *outcome, rep *plumb.EnsembleReport) *outcome {
	if cl.sh.format != "npy" {
		return res
	}
	res.table = func(w io.Writer) error {
		opt := func(v *float64) float64 {
			if v == nil {
				return math.NaN()
			}
			return *v
		}
		var rows [][]float64
		if f.rows == "scales" {
			for _, sc := range rep.Scales {
				rows = append(rows, []float64{sc.Delta, opt(sc.Lambda), opt(sc.StdErr), float64(sc.Pairs), float64(sc.Unfinished), sc.MeanTime})
			}
		} else {
			for i, t := range rep.Times {
				lp := math.NaN()
				if i < len(rep.LargestPair) {
					lp = rep.LargestPair[i]
				}
				rows = append(rows, []float64{t, rep.MeanSpread[i], lp, rep.Within[i]})
			}
		}
		cols := 4
		if f.rows == "scales" {
			cols = 6
		}
		nw, err := runio.NewNPYWriter(w, cols, len(rows))
		if err != nil {
			return err
		}
		for _, r := range rows {
			if err := nw.Row(r); err != nil {
				return err
			}
		}
		return nw.Close()
	}
	return res
}
