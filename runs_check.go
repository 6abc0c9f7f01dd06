package plumb

import (
	"fmt"
	"math"
	"slices"
	"strings"

	"github.com/plumbdyn/plumb/integrate"
)

// checkRuns validates the runs of TrustRuns and returns the reference's
// index.
func checkRuns(runs []RecordedRun) (int, error) {
	ref := -1
	labels := map[string]int{}
	for i := range runs {
		r := &runs[i]
		bad := func(format string, args ...any) error {
			return &RunsError{Index: i, Label: r.Label, Source: r.Source, Why: fmt.Sprintf(format, args...)}
		}
		if strings.TrimSpace(r.Label) == "" {
			return -1, bad("has no label")
		}
		if j, dup := labels[r.Label]; dup {
			return -1, bad("has the label of run %d; labels must differ", j+1)
		}
		labels[r.Label] = i
		if r.Reference {
			if ref >= 0 {
				return -1, bad("is marked as the reference, and so is run %d %q; mark one", ref+1, runs[ref].Label)
			}
			ref = i
		} else if !slices.Contains(RunEffects, r.Effect) {
			return -1, bad("effect %q is none of %s", r.Effect, joinEffects())
		}
		if !(r.Delta0 >= 0) || math.IsInf(r.Delta0, 0) {
			return -1, bad("Delta0 = %v: must be >= 0 and finite", r.Delta0)
		}
		if r.Failure != nil {
			if r.Reference {
				return -1, bad("the reference run failed: %s", r.Failure.Why)
			}
			continue
		}
		if len(r.Names) == 0 {
			return -1, bad("has no state columns")
		}
		if len(r.T) < 2 {
			return -1, bad("has %d rows; at least 2 are needed", len(r.T))
		}
		if len(r.Y) != len(r.T)*len(r.Names) {
			return -1, bad("holds %d values for %d rows of %d columns", len(r.Y), len(r.T), len(r.Names))
		}
		for k, t := range r.T {
			if !finite(t) {
				return -1, bad("row %d: time %v is not finite", k+1, t)
			}
			if k > 0 && !(t > r.T[k-1]) {
				return -1, bad("row %d: time %v does not follow %v (times must increase)", k+1, t, r.T[k-1])
			}
		}
		for k, v := range r.Y {
			if !finite(v) {
				return -1, bad("row %d, column %q: %v is not finite", k/len(r.Names)+1, r.Names[k%len(r.Names)], v)
			}
		}
	}
	switch {
	case ref < 0:
		return -1, &RunsError{Index: -1, Why: "no run is marked as the reference (the one every other run is compared with)"}
	case len(runs) < 2:
		return -1, &RunsError{Index: ref, Label: runs[ref].Label, Source: runs[ref].Source, Why: "is the only run: an audit compares at least one more run with the reference"}
	}
	return ref, nil
}

// commonSpan is the intersection of the spans of the runs that did not
// fail (restart runs count only with their end: they begin later); the
// first run that leaves it empty is named.
func commonSpan(runs []RecordedRun, ref int) (from, to float64, err error) {
	order := []int{ref}
	for i := range runs {
		if i != ref && runs[i].Failure == nil {
			order = append(order, i)
		}
	}
	for n, i := range order {
		r := &runs[i]
		lo, hi := r.T[0], r.T[len(r.T)-1]
		if n == 0 {
			from, to = lo, hi
			continue
		}
		if r.Effect != VariesRestart {
			from = math.Max(from, lo)
		}
		to = math.Min(to, hi)
		if !(from < to) {
			return 0, 0, &RunsError{Index: i, Label: r.Label, Source: r.Source,
				Why: fmt.Sprintf("its span [%v, %v] does not overlap the span common to the reference and the runs before it", lo, hi)}
		}
	}
	for _, i := range order[1:] {
		r := &runs[i]
		if r.Effect == VariesRestart && r.T[0] >= to {
			return 0, 0, &RunsError{Index: i, Label: r.Label, Source: r.Source,
				Why: fmt.Sprintf("restarts at t = %v, at or after the end %v of the span common to the runs", r.T[0], to)}
		}
	}
	return from, to, nil
}

// runsGrid is the comparison grid on [from, to]: the reference's own times
// there (every = 0), or from + i·every with to last.
func runsGrid(ref *RecordedRun, from, to, every float64) ([]float64, error) {
	var g []float64
	if every == 0 {
		a, _ := slices.BinarySearch(ref.T, from)
		b, found := slices.BinarySearch(ref.T, to)
		if found {
			b++
		}
		g = ref.T[a:b:b]
	} else {
		if (to-from)/every > maxRunsGrid {
			return nil, fmt.Errorf("plumb: RecordedSettings.Every = %v gives more than %d grid times over [%v, %v]: %w", every, maxRunsGrid, from, to, integrate.ErrSettings)
		}
		// As integrate.Audit's grid: from + i·every while short of to by
		// more than 1e-9·every, then to.
		k := int(math.Ceil((to-from)/every - 1e-9))
		g = make([]float64, k+1)
		for i := range k {
			g[i] = from + float64(float64(i)*every)
		}
		g[k] = to
	}
	if len(g) < 2 {
		return nil, &RunsError{Index: -1, Why: fmt.Sprintf("fewer than two comparison times in the common span [%v, %v]", from, to)}
	}
	return g, nil
}

// columnPeriods is the period of each compared column (0: not an angle).
func columnPeriods(cols []string, byName map[string]float64) ([]float64, error) {
	out := make([]float64, len(cols))
	names := make([]string, 0, len(byName))
	for n := range byName {
		names = append(names, n)
	}
	slices.Sort(names)
	for _, n := range names {
		v := byName[n]
		j := indexOf(cols, n)
		switch {
		case j < 0:
			return nil, fmt.Errorf("plumb: RecordedSettings.Periods[%q]: not a compared column (%s): %w", n, joinNames(cols), ErrUnknown)
		case !(v > 0) || math.IsInf(v, 0):
			return nil, fmt.Errorf("plumb: RecordedSettings.Periods[%q] = %v: must be positive and finite: %w", n, v, integrate.ErrSettings)
		}
		out[j] = v
	}
	return out, nil
}

func indexOf(names []string, name string) int { return slices.Index(names, name) }

func joinNames(names []string) string { return strings.Join(names, ", ") }

func joinEffects() string {
	s := make([]string, len(RunEffects))
	for i, e := range RunEffects {
		s[i] = string(e)
	}
	return strings.Join(s, ", ")
}
