package main

import (
	"context"
	"encoding/csv"
	"flag"
	"fmt"
	"io"
	"math"
	"strconv"
	"strings"

	"github.com/plumbdyn/plumb"
	"github.com/plumbdyn/plumb/maps"
)

var cyclesCmd = &command{
	name:    "cycles",
	summary: "every cycle of a period of a map, with its multipliers and stability",
	doc: `Find every cycle of least period --period of a map whose points lie in the
box (--box x=0:1, one per state; by default the range an orbit from the
start visits, widened by a tenth, which holds the attractor but may leave
out repelling cycles off it). A one-dimensional map is searched by
bracketing f^p(x) - x on a partition of --cells cells refined until f^p is
resolved, so that no crossing is missed except a cycle that only touches
the diagonal (at the parameter of its birth); a map of higher dimension by
Newton's method from --starts seeded starts, so its list is what was found,
not a proof that nothing else exists. Each cycle comes with its points, its
multiplier (1-D: the product of f' over the cycle) or the eigenvalues of
the Jacobian of f^p, and whether it attracts (all below 1 in modulus).

--forced-up-to N (one-dimensional maps) applies Sharkovsky's theorem: the
periods up to N that a cycle of period --period forces in a continuous map
of an interval, each searched for and counted.

The table lists the cycles; CSV one line per point of a cycle; --format
json one object; JSON keys: plumb_version, arch, command, system, settings,
units, status, error, cycles, forced (when --forced-up-to is
given). --plot draws,
for a one-dimensional map, the graph of f, the diagonal, the cobweb of the
orbit from the start and the cycles' points; for a larger map the cycles'
points in the first two components.`,
	model:   "logistic",
	formats: []string{"table", "csv", "json"},
	plots:   true,
	setup:   setupCycles,
}

// cyclesFlags are the flags of plumb cycles beyond the shared ones.
type cyclesFlags struct {
	period int
	box    boxList
	cells  int
	starts int
	seed   uint64
	tol    float64
	forced int
	cobweb int
}

func setupCycles(fs *flag.FlagSet, sh *shared) func(context.Context, *call) error {
	f := &cyclesFlags{}
	fs.IntVar(&f.period, "period", 1, fmt.Sprintf("least period `P` of the cycles (1 to %d)", maps.MaxCyclePeriod))
	fs.Var(&f.box, "box", "search a state between bounds, given as `NAME=LO:HI` (repeatable)")
	fs.IntVar(&f.cells, "cells", 4096, "first partition of a one-dimensional map's interval into `N` cells")
	fs.IntVar(&f.starts, "starts", 4000, "Newton starts, `N`, for a map of two or more dimensions")
	fs.Uint64Var(&f.seed, "seed", 1, "seed `S` of the Newton starts")
	finiteVar(fs, &f.tol, "tol", 1e-7, "points within `TOL` (relative to 1+|x|) are the same point")
	fs.IntVar(&f.forced, "forced-up-to", 0, fmt.Sprintf("check the periods up to `N` (at most %d) that --period forces (Sharkovsky; 1-D maps)", maps.MaxForcedBound))
	fs.IntVar(&f.cobweb, "cobweb", 40, "steps `N` of the cobweb --plot draws (1-D maps)")
	return func(ctx context.Context, cl *call) error { return f.run(ctx, cl) }
}

var cyclesSettingFlags = map[string]string{"Low": "box", "Cells": "cells", "Starts": "starts", "Tol": "tol"}

type cyclesJSON struct {
	header
	System   systemJSON         `json:"system"`
	Settings cyclesSettingsJSON `json:"settings"`
	Units    cyclesUnitsJSON    `json:"units"`
	Status   string             `json:"status"`
	Error    errText            `json:"error"`
	Cycles   []cycleJSON        `json:"cycles"`
	Forced   []forcedJSON       `json:"forced,omitempty"`
}

type cyclesSettingsJSON struct {
	Period     int       `json:"period"`
	Low        []float64 `json:"low"`
	High       []float64 `json:"high"`
	BoxFrom    string    `json:"box_from"`
	Cells      int       `json:"cells"`
	Starts     int       `json:"starts"`
	Seed       uint64    `json:"seed"`
	Tol        float64   `json:"tol"`
	ForcedUpTo int       `json:"forced_up_to"`
}

type cyclesUnitsJSON struct {
	Points     string `json:"points"`
	Multiplier string `json:"multiplier"`
}

var cyclesUnits = cyclesUnitsJSON{
	Points:     "each state component in the model's own unit (cycles[].points, settings.low, settings.high)",
	Multiplier: "dimensionless: the factor by which f^p stretches a small offset (cycles[].multiplier, eigenvalues, modulus)",
}

type cycleJSON struct {
	Period      int         `json:"period"`
	Points      [][]float64 `json:"points"`
	Multiplier  *float64    `json:"multiplier,omitempty"`
	Eigenvalues []complexJS `json:"eigenvalues"`
	Modulus     float64     `json:"modulus"`
	Stable      bool        `json:"stable"`
}

// complexJS is a complex number in JSON.
type complexJS struct {
	Re float64 `json:"re"`
	Im float64 `json:"im"`
}

type forcedJSON struct {
	Period int `json:"period"`
	Cycles int `json:"cycles"`
}

// run checks the flags and searches.
func (f *cyclesFlags) run(ctx context.Context, cl *call) error {
	sys, err := cl.sh.loadSystem(cl.sh.model)
	if err != nil {
		return err
	}
	if sys.Kind() != plumb.KindMap {
		return usagef("--model %s: plumb cycles looks for cycles of maps; %s is a %s", sys.Name, sys.Name, sys.Kind())
	}
	if f.period < 1 || f.period > maps.MaxCyclePeriod {
		return usagef("--period %d: must be 1 to %d", f.period, maps.MaxCyclePeriod)
	}
	n := len(sys.States)
	if cl.sh.given["forced-up-to"] && (n != 1 || f.forced < 1 || f.forced > maps.MaxForcedBound) {
		if n != 1 {
			return usagef("--forced-up-to: Sharkovsky's theorem is about maps of an interval; %s has %d states", sys.Name, n)
		}
		return usagef("--forced-up-to %d: must be 1 to %d", f.forced, maps.MaxForcedBound)
	}
	if f.cells < 1 {
		return usagef("--cells %d: must be >= 1", f.cells)
	}
	if f.starts < 1 {
		return usagef("--starts %d: must be >= 1", f.starts)
	}
	if f.cobweb < 1 || f.cobweb > 100_000 {
		return usagef("--cobweb %d: must be 1 to 100000", f.cobweb)
	}
	m, err := sys.Map()
	if err != nil {
		return fmt.Errorf("preparing the map %s failed: %w", sys.Name, err)
	}
	low, high, from, err := f.bounds(ctx, sys, m)
	if err != nil {
		return err
	}
	set := maps.CycleSettings{Low: low, High: high, Cells: f.cells, Starts: f.starts, Seed: f.seed, Tol: f.tol}
	if err := set.WithDefaults().Validate(n); err != nil {
		return settingUsage(err, cyclesSettingFlags)
	}
	out := cyclesJSON{header: newHeader("cycles"), System: describe(sys), Units: cyclesUnits,
		Settings: cyclesSettingsJSON{Period: f.period, Low: low, High: high, BoxFrom: from, Cells: f.cells, Starts: f.starts, Seed: f.seed, Tol: f.tol, ForcedUpTo: f.forced}}
	return cl.runJob(ctx, job{
		what:    "the cycle search of " + sys.Name,
		refusal: "the cycle search refused the settings",
		run: func(ctx context.Context, _ func(float64)) (*outcome, error) {
			cs, runErr := maps.Cycles(ctx, m, f.period, &set)
			if runErr != nil && cs == nil && ctx.Err() == nil {
				return nil, runErr
			}
			if runErr == nil && f.forced > 0 {
				var checks []maps.PeriodCheck
				if len(cs) > 0 {
					checks, runErr = maps.ConfirmForced(ctx, m, f.period, f.forced, &set)
				}
				for _, c := range checks {
					out.Forced = append(out.Forced, forcedJSON{Period: c.Period, Cycles: c.Cycles})
				}
			}
			return f.result(sys, m, cs, out, runErr), nil
		},
	})
}

// bounds is the search box: --box where given, else the range an orbit
// from the start visits (200 iterates dropped, 2000 kept), widened by a
// tenth of it on each side.
func (f *cyclesFlags) bounds(ctx context.Context, sys *plumb.System, m *maps.Map) (low, high []float64, from string, err error) {
	n := len(sys.States)
	low, high = make([]float64, n), make([]float64, n)
	given := make([]bool, n)
	for _, b := range f.box {
		i := -1
		for k, s := range sys.States {
			if s == b.name {
				i = k
			}
		}
		if i < 0 {
			return nil, nil, "", usagef("--box %s: %s has the states %s", b.name, sys.Name, strings.Join(sys.States, ", "))
		}
		low[i], high[i], given[i] = b.lo, b.hi, true
	}
	from = "--box"
	all := true
	for _, g := range given {
		all = all && g
	}
	if all {
		return low, high, from, nil
	}
	orbit, oerr := maps.OrbitAfter(ctx, m, sys.Start(), 200, 2000)
	if oerr != nil {
		return nil, nil, "", usagef("--box: the orbit from the start does not stay finite (%v), so give the box for every state", oerr)
	}
	from = "orbit from the start, widened by a tenth"
	for i := range n {
		if given[i] {
			continue
		}
		lo, hi := math.Inf(1), math.Inf(-1)
		for k := i; k < len(orbit); k += n {
			lo, hi = math.Min(lo, orbit[k]), math.Max(hi, orbit[k])
		}
		pad := 0.1 * (hi - lo)
		if pad == 0 {
			pad = 0.1 * (1 + math.Abs(lo))
		}
		low[i], high[i] = lo-pad, hi+pad
	}
	return low, high, from, nil
}

// result makes the outcome of a search.
func (f *cyclesFlags) result(sys *plumb.System, m *maps.Map, cs []maps.Cycle, out cyclesJSON, runErr error) *outcome {
	out.Status, out.Error = runStatus(runErr)
	out.Cycles = []cycleJSON{}
	stable := 0
	for _, c := range cs {
		cj := cycleJSON{Period: c.Period, Points: c.Points, Modulus: c.Modulus, Stable: c.Stable, Eigenvalues: []complexJS{}}
		if m.Dim() == 1 {
			v := c.Multiplier
			cj.Multiplier = &v
		}
		for _, e := range c.Eigenvalues {
			cj.Eigenvalues = append(cj.Eigenvalues, complexJS{real(e), imag(e)})
		}
		if c.Stable {
			stable++
		}
		out.Cycles = append(out.Cycles, cj)
	}
	res := &outcome{
		json:  func() any { return out },
		table: func(w io.Writer) error { return cyclesTable(w, sys, out) },
		csv:   func(w io.Writer) error { return cyclesCSV(w, sys, out) },
		chart: func() *lineChart { return cyclesChart(sys, m, out, f.cobweb) },
		done:  fmt.Sprintf("%s of period %d (%d attracting)", count(len(cs), "cycle"), f.period, stable),
	}
	for _, fc := range out.Forced {
		if fc.Cycles == 0 {
			res.warnings = append(res.warnings, fmt.Sprintf("period %d is forced by %d (Sharkovsky) but none was found: the search missed it, or the map does not take the box into itself", fc.Period, f.period))
		}
	}
	if runErr != nil {
		res.err = fmt.Errorf("the cycle search of %s %s (the cycles found are written): %w", sys.Name, statusVerb(out.Status), runErr)
	}
	return res
}

func cyclesTable(w io.Writer, sys *plumb.System, out cyclesJSON) error {
	tw := newTable(w)
	fmt.Fprintf(tw, "cycle\tstable\tmodulus\tmultipliers\tpoints (%s)\n", strings.Join(sys.States, ", "))
	for i, c := range out.Cycles {
		var mults []string
		for _, e := range c.Eigenvalues {
			if e.Im == 0 {
				mults = append(mults, tableFloat(e.Re))
			} else {
				mults = append(mults, fmt.Sprintf("%s%+si", tableFloat(e.Re), tableFloat(e.Im)))
			}
		}
		var pts []string
		for _, p := range c.Points {
			var xs []string
			for _, v := range p {
				xs = append(xs, tableFloat(v))
			}
			pts = append(pts, strings.Join(xs, ","))
		}
		stable := "no"
		if c.Stable {
			stable = "yes"
		}
		fmt.Fprintf(tw, "%d\t%s\t%s\t%s\t%s\n", i+1, stable, tableFloat(c.Modulus), strings.Join(mults, " "), strings.Join(pts, "  "))
	}
	if err := tw.Flush(); err != nil {
		return err
	}
	if len(out.Forced) > 0 {
		fmt.Fprintln(w)
		tw = newTable(w)
		fmt.Fprintf(tw, "forced period\tcycles found\n")
		for _, fc := range out.Forced {
			fmt.Fprintf(tw, "%d\t%d\n", fc.Period, fc.Cycles)
		}
		if err := tw.Flush(); err != nil {
			return err
		}
	}
	fmt.Fprintln(w)
	tw = newTable(w)
	fmt.Fprintf(tw, "system\t%s\n", describe(sys).heading())
	var box []string
	for i, s := range sys.States {
		box = append(box, fmt.Sprintf("%s in [%s, %s]", s, tableFloat(out.Settings.Low[i]), tableFloat(out.Settings.High[i])))
	}
	fmt.Fprintf(tw, "searched\t%s (%s)\n", strings.Join(box, ", "), out.Settings.BoxFrom)
	if out.Settings.BoxFrom != "--box" {
		// The orbit's range holds the attractor; a repelling cycle (the
		// logistic map's x = 0, say) may lie outside it.
		fmt.Fprintf(tw, "\tcycles outside this range, repelling ones typically, were not searched: give --box to widen it\n")
	}
	fmt.Fprintf(tw, "status\t%s, %s of least period %d\n", out.Status, count(len(out.Cycles), "cycle"), out.Settings.Period)
	return tw.Flush()
}

func cyclesCSV(dst io.Writer, sys *plumb.System, out cyclesJSON) error {
	w := csv.NewWriter(dst)
	rec := append([]string{"cycle", "index"}, sys.States...)
	rec = append(rec, "modulus", "stable")
	if err := w.Write(rec); err != nil {
		return err
	}
	for i, c := range out.Cycles {
		for k, p := range c.Points {
			rec = append(rec[:0], strconv.Itoa(i+1), strconv.Itoa(k))
			for _, v := range p {
				rec = append(rec, formatFloat(v))
			}
			rec = append(rec, formatFloat(c.Modulus), strconv.FormatBool(c.Stable))
			if err := w.Write(rec); err != nil {
				return err
			}
		}
	}
	w.Flush()
	return w.Error()
}

// cyclesChart is the cobweb picture of a one-dimensional map (the graph of
// f across the box, the diagonal, the cobweb from the start, the cycles'
// points on the diagonal) or, for a larger map, the cycles' points.
func cyclesChart(sys *plumb.System, m *maps.Map, out cyclesJSON, steps int) *lineChart {
	c := &lineChart{}
	if m.Dim() != 1 {
		if len(out.Cycles) == 0 {
			return nil // no points to draw
		}
		c.Scatter = true
		c.Title = fmt.Sprintf("%s: cycles of period %d", sys.Title, out.Settings.Period)
		c.XLabel, c.YLabel = sys.States[0], sys.States[1]
		for i, cy := range out.Cycles {
			s := series{Name: fmt.Sprintf("cycle %d", i+1)}
			if i >= 7 {
				s.Name = "others"
			}
			for _, p := range cy.Points {
				s.X = append(s.X, p[0])
				s.Y = append(s.Y, p[1])
			}
			if i >= 7 && len(c.Series) == 8 {
				last := &c.Series[7]
				last.X, last.Y = append(last.X, s.X...), append(last.Y, s.Y...)
				continue
			}
			c.Series = append(c.Series, s)
		}
		return c
	}
	lo, hi := out.Settings.Low[0], out.Settings.High[0]
	c.Title = fmt.Sprintf("%s: cobweb from %s and cycles of period %d", sys.Title, tableFloat(sys.Start()[0]), out.Settings.Period)
	name := sys.States[0]
	c.XLabel, c.YLabel = name+"_n", name+"_(n+1)"
	graph := series{Name: "f"}
	x, y := []float64{0}, []float64{0}
	const samples = 1000
	for i := range samples + 1 {
		x[0] = lo + (hi-lo)*float64(i)/samples
		m.Next(x, y)
		graph.X, graph.Y = append(graph.X, x[0]), append(graph.Y, y[0])
	}
	diag := series{Name: "diagonal", X: []float64{lo, hi}, Y: []float64{lo, hi}}
	web := series{Name: "cobweb"}
	if pts, _ := maps.Cobweb(m, sys.Start()[0], steps); len(pts) > 0 {
		for _, p := range pts {
			web.X, web.Y = append(web.X, p[0]), append(web.Y, p[1])
		}
	}
	c.Series = []series{graph, diag, web}
	// The cycles' points as vertical marks, while they are few enough to
	// tell apart.
	total := 0
	for _, cy := range out.Cycles {
		total += len(cy.Points)
	}
	if total <= 12 {
		for i, cy := range out.Cycles {
			for k, p := range cy.Points {
				label := ""
				if k == 0 {
					label = fmt.Sprintf("cycle %d", i+1)
				}
				c.Marks = append(c.Marks, mark{X: p[0], Label: label})
			}
		}
	}
	return c
}
