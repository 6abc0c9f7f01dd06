package plumb

import (
	"bytes"
	"context"
	"encoding/json"
	"fmt"
)

// RunProgramShard launches the runs of piece sh of the program's plan
// (a contiguous block of Plan's runs, sh.Range(len(plan))) as RunProgram
// launches all of them, and returns those runs in plan order with the
// index of the first. The zero Shard runs the whole plan. Join the pieces'
// runs in index order and audit them with TrustProgramRuns: the report is
// the one TrustProgram gives when the program writes the same output on
// every launch.
func RunProgramShard(ctx context.Context, p Program, sh Shard) (runs []RecordedRun, plan []PlannedRun, first int, err error) {
	runs, plan, err = runProgramRange(ctx, p, sh)
	first, _ = sh.Range(len(plan))
	return runs, plan, first, err
}

// RunRecord is a recorded run as a shard file holds it: its place in the
// plan, its label and effect, its data (exact: times and states are
// finite) or its failure.
type RunRecord struct {
	Index     int         `json:"index"`
	Label     string      `json:"label"`
	Source    string      `json:"source"`
	Reference bool        `json:"reference,omitempty"`
	Effect    RunEffect   `json:"effect,omitempty"`
	Delta0    ExactFloat  `json:"delta0"`
	Names     []string    `json:"names"`
	T         []float64   `json:"t"`
	Y         []float64   `json:"y"`
	Failure   *RunFailure `json:"failure,omitempty"`
}

// NewRunRecord returns run r, the index-th of its plan, as a record.
func NewRunRecord(index int, r RecordedRun) RunRecord {
	return RunRecord{Index: index, Label: r.Label, Source: r.Source, Reference: r.Reference, Effect: r.Effect,
		Delta0: ExactFloat(r.Delta0), Names: r.Names, T: r.T, Y: r.Y, Failure: r.Failure}
}

// Run returns the record as a run.
func (rec RunRecord) Run() RecordedRun {
	return RecordedRun{Label: rec.Label, Source: rec.Source, Reference: rec.Reference, Effect: rec.Effect,
		Delta0: float64(rec.Delta0), Names: rec.Names, T: rec.T, Y: rec.Y, Failure: rec.Failure}
}

// ProgramRuns returns the runs of a complete set of shard files of a
// program's ladder (ReadShards), in plan order, each checked: its index
// the next one and, when plan is given, its label the plan's. Errors
// (ErrShard) name the file and record.
func ProgramRuns(set *ShardSet, plan []PlannedRun) ([]RecordedRun, error) {
	h := set.Header()
	if plan != nil && h.Total != len(plan) {
		return nil, fmt.Errorf("plumb: the shard files hold %d runs; the program's plan has %d: %w", h.Total, len(plan), ErrShard)
	}
	var runs []RecordedRun
	for _, p := range set.Pieces {
		err := p.EachRecord(func(k int, raw json.RawMessage) error {
			bad := func(why string) error {
				return fmt.Errorf("plumb: shard file %s, record %d: %s: %w", p.Name, k+1, why, ErrShard)
			}
			var rec RunRecord
			dec := json.NewDecoder(bytes.NewReader(raw))
			dec.DisallowUnknownFields()
			if err := dec.Decode(&rec); err != nil {
				return bad(err.Error())
			}
			want := p.Header.First + k
			switch {
			case rec.Index != want:
				return bad(fmt.Sprintf("run %d where run %d belongs", rec.Index, want))
			case plan != nil && rec.Label != plan[want].Label:
				return bad(fmt.Sprintf("run %q where the plan has %q", rec.Label, plan[want].Label))
			case rec.Failure == nil && len(rec.Names) > 0 && len(rec.Y) != len(rec.T)*len(rec.Names):
				return bad(fmt.Sprintf("%d values for %d times of %d columns", len(rec.Y), len(rec.T), len(rec.Names)))
			}
			runs = append(runs, rec.Run())
			return nil
		})
		if err != nil {
			return nil, err
		}
	}
	return runs, nil
}
