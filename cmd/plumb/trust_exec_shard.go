package main

// plumb trust --exec --shard I/N: launch one block of the ladder's runs and
// write them as a shard file; plumb merge joins the blocks and audits.

import (
	"context"
	"fmt"
	"io"

	"github.com/plumbdyn/plumb"
)

// execShardUnits names the units an --exec ladder splits.
const execShardUnits = "runs"

// runExecShard launches piece sh of the ladder and writes its runs.
func (f *trustFlags) runExecShard(ctx context.Context, cl *call, sh plumb.Shard) error {
	p, plan, _, err := f.program(cl)
	if err != nil {
		return err
	}
	lo, hi := sh.Range(len(plan))
	cl.sh.format, cl.sh.plot = "table", "" // the shard file; merge audits and writes the format
	return cl.runJob(ctx, job{
		what:    "the runs of --exec",
		refusal: "the program's settings were refused",
		run: func(ctx context.Context, _ func(float64)) (*outcome, error) {
			sw, err := cl.shardWriter(sh, execShardUnits, len(plan), nil)
			if err != nil {
				return nil, err
			}
			if !cl.sh.quiet && hi > lo {
				fmt.Fprintf(cl.stderr, "plumb trust: launching runs %d to %d of %d (%s to %s), %d at a time\n",
					lo+1, hi, len(plan), plan[lo].Label, plan[hi-1].Label, f.recorded.exec.jobs)
			}
			runs, _, first, runErr := plumb.RunProgramShard(ctx, p, sh)
			if runs == nil && runErr != nil {
				return nil, runErr
			}
			res := &outcome{done: fmt.Sprintf("shard %s: %s", sh, count(len(runs), "run"))}
			for k, r := range runs {
				if err := sw.Record(plumb.NewRunRecord(first+k, r)); err != nil {
					return nil, err
				}
				if r.Failure != nil {
					res.warnings = append(res.warnings, fmt.Sprintf("run %q failed: %s", r.Label, r.Failure.Why))
				}
			}
			status, _ := runStatus(runErr)
			res.table = func(io.Writer) error { return sw.Close(status, runErr) }
			if runErr != nil {
				res.err = fmt.Errorf("shard %s of the --exec runs %s (the shard file says so; merge refuses it): %w", sh, statusVerb(status), runErr)
			}
			return res, nil
		},
	})
}
