package plumb

import (
	"bytes"
	"context"
	"encoding/json"
	"fmt"
	"slices"

	"github.com/plumbdyn/plumb/integrate"
)

// EnsemblePart is one piece of an ensemble split into pieces: the units
// First to End-1 of Total, where unit 0 is the releases along the
// control's orbit and unit 1+g the lockstep group g of the members.
type EnsemblePart struct {
	Shard             Shard
	First, End, Total int
	// Releases is what the releases measured (in the piece holding unit 0
	// when the ensemble has releases; else nil).
	Releases *EnsembleReleases
	// Groups are the piece's lockstep groups, in order.
	Groups []*EnsembleGroup
}

// EnsembleShard computes piece sh of the ensemble Ensemble(ctx, sys, t1,
// s) makes: its block of the units (the releases, then one unit per
// lockstep group of s.Lockstep members; set Lockstep to have more units
// than pieces). MergeEnsemble joins the pieces into Ensemble's report, bit
// for bit. After work began it returns the partial piece with the error.
func EnsembleShard(ctx context.Context, sys *System, t1 float64, s *EnsembleSettings, sh Shard) (*EnsemblePart, error) {
	if ctx == nil {
		ctx = context.Background()
	}
	if err := sh.Validate(); err != nil {
		return nil, err
	}
	es, cfg, _, err := ensembleSetup(sys, t1, s)
	if err != nil {
		return nil, err
	}
	part := &EnsemblePart{Shard: sh, Total: 1 + cfg.groups()}
	part.First, part.End = sh.Range(part.Total)
	if part.First == 0 && part.End > 0 && es.Releases > 0 {
		rel, _, err := ensembleReleases(ctx, sys, t1, es, cfg)
		if err != nil {
			part.End = part.First
			return part, err
		}
		part.Releases = rel
	}
	for u := max(part.First, 1); u < part.End; u++ {
		grp, err := ensembleGroup(ctx, sys, t1, es, cfg, u-1)
		if grp != nil && err == nil {
			part.Groups = append(part.Groups, grp)
			continue
		}
		part.End = u
		return part, err
	}
	return part, nil
}

// MergeEnsemble joins the pieces of a split ensemble (EnsembleShard with
// the same system, t1 and settings) into the report Ensemble gives. It
// refuses (ErrShard) pieces that do not cover the units once each, in
// contiguous blocks, or whose groups are not the settings' groups.
func MergeEnsemble(sys *System, t1 float64, s *EnsembleSettings, parts []*EnsemblePart) (*EnsembleReport, error) {
	es, cfg, rep, err := ensembleSetup(sys, t1, s)
	if err != nil {
		return nil, err
	}
	total := 1 + cfg.groups()
	parts = slices.Clone(parts)
	slices.SortFunc(parts, func(a, b *EnsemblePart) int { return a.First - b.First })
	var rel *EnsembleReleases
	var groups []*EnsembleGroup
	next := 0
	for _, p := range parts {
		switch {
		case p == nil:
			return nil, fmt.Errorf("plumb: MergeEnsemble: a nil piece: %w", ErrShard)
		case p.Total != total:
			return nil, fmt.Errorf("plumb: MergeEnsemble: piece %s has %d units; these settings make %d (1 for the releases, %d lockstep groups): %w", p.Shard, p.Total, total, total-1, ErrShard)
		case p.First != next:
			return nil, fmt.Errorf("plumb: MergeEnsemble: piece %s begins at unit %d; unit %d is missing or given twice: %w", p.Shard, p.First, next, ErrShard)
		}
		if p.First == 0 && p.End > 0 {
			if (p.Releases != nil) != (es.Releases > 0) {
				return nil, fmt.Errorf("plumb: MergeEnsemble: piece %s: releases %v, but the settings ask for %d: %w", p.Shard, p.Releases != nil, max(es.Releases, 0), ErrShard)
			}
			rel = p.Releases
		}
		for _, g := range p.Groups {
			if err := checkGroup(cfg, g, len(groups), len(sys.States)); err != nil {
				return nil, fmt.Errorf("plumb: MergeEnsemble: piece %s: %v: %w", p.Shard, err, ErrShard)
			}
			groups = append(groups, g)
		}
		if len(groups) != max(p.End-1, 0) {
			return nil, fmt.Errorf("plumb: MergeEnsemble: piece %s holds %d groups for units %d..%d: %w", p.Shard, len(p.Groups), p.First, p.End, ErrShard)
		}
		next = p.End
	}
	if next != total {
		return nil, fmt.Errorf("plumb: MergeEnsemble: the pieces cover units 0..%d of %d: %w", next, total, ErrShard)
	}
	g := 0
	return ensembleFinish(es, cfg, rep, ensembleSource{
		releases: func() (*EnsembleReleases, string, error) { return rel, "", nil },
		group: func(int) (*EnsembleGroup, error) {
			g++
			return groups[g-1], nil
		},
	})
}

// checkGroup checks that g is group want of the settings, with a run of
// its members.
func checkGroup(cfg *ensembleConfig, g *EnsembleGroup, want, dim int) error {
	first, count := cfg.groupRange(want)
	switch {
	case g == nil || g.Run == nil:
		return fmt.Errorf("group %d has no run", want)
	case g.Index != want || g.First != first || g.Count != count:
		return fmt.Errorf("group %d (members %d..%d) where group %d (members %d..%d) belongs", g.Index, g.First, g.First+g.Count-1, want, first, first+count-1)
	case g.Run.Dim != dim || g.Run.Members != count+1:
		return fmt.Errorf("group %d: a run of %d members of dimension %d, want %d of %d", want, g.Run.Members, g.Run.Dim, count+1, dim)
	}
	for j, smp := range g.Run.Samples {
		if len(smp.Y) != dim*(count+1) {
			return fmt.Errorf("group %d, sample %d: %d values, want %d", want, j, len(smp.Y), dim*(count+1))
		}
	}
	return nil
}

// ensembleUnit is one record of an ensemble's shard file: unit 0 the
// releases (null without releases), unit 1+g group g.
type ensembleUnit struct {
	Unit     int               `json:"unit"`
	Releases *EnsembleReleases `json:"releases,omitempty"`
	Group    *groupRecord      `json:"group,omitempty"`
}

// groupRecord is a lockstep group as a shard file holds it.
type groupRecord struct {
	Index       int         `json:"index"`
	First       int         `json:"first"`
	Count       int         `json:"count"`
	Method      string      `json:"method"`
	Dim         int         `json:"dim"`
	T0          float64     `json:"t0"`
	End         float64     `json:"end"`
	Times       []float64   `json:"times"`
	States      [][]float64 `json:"states"`
	Final       []float64   `json:"final"`
	Evaluations int         `json:"evaluations"`
	Accepted    int         `json:"accepted"`
	Rejected    int         `json:"rejected"`
	NonFinite   int         `json:"non_finite"`
	Stiff       bool        `json:"stiff,omitempty"`
	StiffAt     float64     `json:"stiff_at,omitempty"`
	Status      string      `json:"status"`
}

// WriteEnsemblePart writes the piece's units as records of a shard file
// whose header says Units "ensemble units" and Total part.Total.
func WriteEnsemblePart(sw *ShardWriter, part *EnsemblePart) error {
	if part.First == 0 && part.End > 0 {
		if err := sw.Record(ensembleUnit{Unit: 0, Releases: part.Releases}); err != nil {
			return err
		}
	}
	for _, g := range part.Groups {
		r := g.Run
		rec := &groupRecord{Index: g.Index, First: g.First, Count: g.Count, Method: r.Method, Dim: r.Dim, T0: r.T0, End: r.End,
			Times: make([]float64, len(r.Samples)), States: make([][]float64, len(r.Samples)), Final: r.Final,
			Evaluations: r.Stats.Evaluations, Accepted: r.Stats.Accepted, Rejected: r.Stats.Rejected, NonFinite: r.Stats.NonFinite,
			Stiff: r.Stats.Stiff, StiffAt: r.Stats.StiffAt, Status: r.Status.String()}
		for j, smp := range r.Samples {
			rec.Times[j], rec.States[j] = smp.T, smp.Y
		}
		if err := sw.Record(ensembleUnit{Unit: 1 + g.Index, Group: rec}); err != nil {
			return err
		}
	}
	return nil
}

// EnsembleUnitsName is the Units of an ensemble's shard file.
const EnsembleUnitsName = "ensemble units"

// EnsembleParts decodes the pieces of a complete set of an ensemble's
// shard files (ReadShards), for MergeEnsemble. Errors (ErrShard) name the
// file and record.
func EnsembleParts(set *ShardSet) ([]*EnsemblePart, error) {
	var parts []*EnsemblePart
	for _, p := range set.Pieces {
		h := p.Header
		if h.Units != EnsembleUnitsName {
			return nil, fmt.Errorf("plumb: shard file %s holds %s, not %s: %w", p.Name, h.Units, EnsembleUnitsName, ErrShard)
		}
		part := &EnsemblePart{Shard: Shard{Index: h.Shard.Index, Count: h.Shard.Count}, First: h.First, End: h.End, Total: h.Total}
		err := p.EachRecord(func(k int, raw json.RawMessage) error {
			bad := func(why string) error {
				return fmt.Errorf("plumb: shard file %s, record %d: %s: %w", p.Name, k+1, why, ErrShard)
			}
			var u ensembleUnit
			dec := json.NewDecoder(bytes.NewReader(raw))
			dec.DisallowUnknownFields()
			if err := dec.Decode(&u); err != nil {
				return bad(err.Error())
			}
			if want := h.First + k; u.Unit != want || (u.Unit == 0) != (u.Group == nil) {
				return bad(fmt.Sprintf("unit %d where unit %d belongs", u.Unit, want))
			}
			if u.Unit == 0 {
				part.Releases = u.Releases
				return nil
			}
			g := u.Group
			if g.Index != u.Unit-1 || len(g.Times) != len(g.States) {
				return bad(fmt.Sprintf("group %d in unit %d, %d times for %d samples", g.Index, u.Unit, len(g.Times), len(g.States)))
			}
			status, ok := map[string]integrate.Status{"completed": integrate.Completed, "canceled": integrate.Canceled, "failed": integrate.Failed}[g.Status]
			if !ok {
				return bad(fmt.Sprintf("status %q", g.Status))
			}
			run := &integrate.BatchSolution{Method: g.Method, Dim: g.Dim, Members: g.Count + 1, T0: g.T0, End: g.End, Final: g.Final,
				Samples: make([]integrate.Sample, len(g.Times)), Status: status,
				Stats: integrate.Stats{Evaluations: g.Evaluations, Accepted: g.Accepted, Rejected: g.Rejected, NonFinite: g.NonFinite, Stiff: g.Stiff, StiffAt: g.StiffAt}}
			for j := range g.Times {
				run.Samples[j] = integrate.Sample{T: g.Times[j], Y: g.States[j]}
			}
			part.Groups = append(part.Groups, &EnsembleGroup{Index: g.Index, First: g.First, Count: g.Count, Run: run})
			return nil
		})
		if err != nil {
			return nil, err
		}
		parts = append(parts, part)
	}
	return parts, nil
}
