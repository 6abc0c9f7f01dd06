package integrate

// Kinds returns the kinds of the ladder's rungs, each once, in the order
// of their first rung (DefaultLadder: tolerance, method, precision,
// restart).
func (l Ladder) Kinds() []RungKind {
	var out []RungKind
	seen := map[RungKind]bool{}
	for _, r := range l.Rungs {
		if !seen[r.Kind] {
			seen[r.Kind] = true
			out = append(out, r.Kind)
		}
	}
	return out
}

// Select returns a copy of the ladder with its reference, its KindRun rung
// (the caller's own run, always compared) and the rungs whose kind is one
// of kinds, in the ladder's order. Kinds that no rung has select nothing.
func (l Ladder) Select(kinds ...RungKind) Ladder {
	out := Ladder{Reference: l.Reference, Exact: l.Exact}
	for _, r := range l.Rungs {
		keep := r.Kind == KindRun
		for _, k := range kinds {
			keep = keep || r.Kind == k
		}
		if keep {
			out.Rungs = append(out.Rungs, r)
		}
	}
	return out
}

// WithRestart returns a copy of the ladder whose restart rungs restart at
// time at from the state rounded by rounding (validated by Audit, as every
// rung is).
func (l Ladder) WithRestart(at float64, rounding Rounding) Ladder {
	out := l
	out.Rungs = append([]Rung(nil), l.Rungs...)
	for i := range out.Rungs {
		if out.Rungs[i].Kind == KindRestart {
			out.Rungs[i].RestartAt, out.Rungs[i].Restart = at, rounding
		}
	}
	return out
}
