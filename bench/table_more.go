package main

import (
	"fmt"
	"io"
	"math"
)

// writeMore prints the tables after Lorenz's: the Arenstorf orbit (time to
// reach an error at the end of one period, where the exact solution is the
// start again), then Lorenz-96 and the 1000 trajectories, each at its one
// tolerance (equal tolerance, not equal error: no reference is at hand for
// them, so the ratios there compare cost, not cost per accuracy).
func writeMore(w io.Writer, all map[string]runs) error {
	if r := all["arenstorf"]; len(r) > 0 {
		curves, keys := r.curves(func(s sample) (float64, float64) {
			return math.NaN(), maxErr(s.YEnd, arenstorfStart)
		})
		fmt.Fprintln(w)
		fmt.Fprintln(w, "Arenstorf orbit over one period; err: the largest distance of the end state from the start, which the exact orbit returns to.")
		fmt.Fprintln(w)
		fmt.Fprintln(w, "| method | tol | accepted | rejected | evaluations | CPU time (ms) | spread | ns/step | err |")
		fmt.Fprintln(w, "| --- | --- | ---: | ---: | ---: | ---: | ---: | ---: | ---: |")
		for _, k := range keys {
			for _, p := range curves[k] {
				fmt.Fprintf(w, "| %s | %.0e | %d | %d | %d | %.3f | %.0f%% | %.0f | %.1e |\n", k, p.tol, p.acc, p.rej, p.nfev,
					p.sec*1e3, 100*p.spread, p.nsStp, p.err20)
			}
		}
		fmt.Fprintln(w)
		fmt.Fprintln(w, "CPU time to reach an error at the end of the period (interpolated across tolerances); ratio > 1: plumb is slower.")
		fmt.Fprintln(w)
		ratioTable(w, curves, keys, arenstorfTargets)
	}
	for _, pb := range []struct{ name, title string }{
		{"l96-40", "Lorenz-96, 40 sites, [0, 10], rtol = atol = 1e-8"},
		{"l96-1000", "Lorenz-96, 1000 sites, [0, 10], rtol = atol = 1e-8"},
		{"many", "1000 Lorenz trajectories to t = 20, rtol = atol = 1e-10 (counts summed over the trajectories; ns per trajectory step)"},
	} {
		r := all[pb.name]
		if len(r) == 0 {
			continue
		}
		curves, keys := r.curves(func(sample) (float64, float64) { return math.NaN(), math.NaN() })
		fmt.Fprintln(w)
		fmt.Fprintf(w, "%s; equal tolerance, not equal error.\n", pb.title)
		fmt.Fprintln(w)
		fmt.Fprintln(w, "| method | accepted | rejected | evaluations | CPU time (ms) | spread | ns/step | plumb / peer |")
		fmt.Fprintln(w, "| --- | ---: | ---: | ---: | ---: | ---: | ---: | --- |")
		for _, k := range keys {
			for _, p := range curves[k] {
				fmt.Fprintf(w, "| %s | %d | %d | %d | %.3f | %.0f%% | %.0f | %s |\n", k, p.acc, p.rej, p.nfev,
					p.sec*1e3, 100*p.spread, p.nsStp, equalTolRatios(k, p, curves, keys))
			}
		}
	}
	return nil
}

// equalTolRatios lists, for a plumb method, its time over that of every
// peer method of the same order at the same tolerance.
func equalTolRatios(pk key, p point, curves map[key][]point, keys []key) string {
	if pk.peer != "plumb" {
		return ""
	}
	out := ""
	for _, qk := range keys {
		if qk.peer == "plumb" || orders[qk] != orders[pk] {
			continue
		}
		for _, q := range curves[qk] {
			if q.tol == p.tol {
				if out != "" {
					out += ", "
				}
				out += fmtRatio(p.sec/q.sec) + " (" + qk.String() + ")"
			}
		}
	}
	return out
}
