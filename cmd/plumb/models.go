package main

import (
	"context"
	"flag"
	"fmt"
	"io"
	"strings"

	"github.com/plumbdyn/plumb"
)

var modelsCmd = &command{
	name:    "models",
	summary: "list the built-in systems, their parameters and sources",
	doc: `List the built-in systems: state names with start values, parameters with
their defaults, and where the equations and values are published. With
--model NAME only that system is listed, and --set and --start show the
values it would run with.

--format json writes one object; JSON keys: plumb_version, arch, command,
status, error, models. Each model has name, title, source, kind (flow,
map or hamiltonian), states and parameters.`,
	formats: []string{"table", "json"},
	setup: func(fs *flag.FlagSet, sh *shared) func(context.Context, *call) error {
		return runModels
	},
}

// modelsJSON is the --format json result of plumb models.
type modelsJSON struct {
	header
	// Status is completed and Error null: a failure writes no result.
	Status string  `json:"status"`
	Error  errText `json:"error"`
	// Models lists the systems in name order.
	Models []systemJSON `json:"models"`
}

func runModels(ctx context.Context, cl *call) error {
	names := plumb.Models()
	if cl.sh.model != "" || cl.sh.file != "" {
		names = []string{cl.sh.model}
	} else if len(cl.sh.sets) > 0 {
		return usagef("--set %s: give --model too; parameters belong to one system", cl.sh.sets.String())
	} else if len(cl.sh.starts.paramList) > 0 {
		return usagef("--start %s: give --model too; a start belongs to one system", cl.sh.starts.String())
	}
	var systems []*plumb.System
	for _, n := range names {
		sys, err := cl.sh.loadSystem(n)
		if err != nil {
			return err
		}
		systems = append(systems, sys)
	}
	return cl.runJob(ctx, job{
		what:    "the listing of the models",
		refusal: "the catalog refused the input",
		run: func(context.Context, func(float64)) (*outcome, error) {
			out := modelsJSON{header: newHeader("models"), Status: "completed", Models: []systemJSON{}}
			for _, s := range systems {
				out.Models = append(out.Models, describe(s))
			}
			return &outcome{json: func() any { return out }, table: func(w io.Writer) error { return modelTables(w, systems) }}, nil
		},
	})
}

// modelTables writes the systems as blocks of aligned lines, a blank line
// between two.
func modelTables(w io.Writer, systems []*plumb.System) error {
	for i, s := range systems {
		if i > 0 {
			fmt.Fprintln(w)
		}
		if err := modelTable(w, s); err != nil {
			return err
		}
	}
	return nil
}

// modelTable writes one system as a block of aligned lines.
func modelTable(w io.Writer, s *plumb.System) error {
	d := describe(s)
	fmt.Fprintf(w, "%s: %s (%s)\n", d.Name, d.Title, kindWords(s.Kind()))
	if d.TimeUnit != "" {
		fmt.Fprintf(w, "  time unit: %s\n", d.TimeUnit)
	}
	// A unit column only where the system file gives units.
	stateUnits, paramUnits := false, false
	for _, st := range d.States {
		stateUnits = stateUnits || st.Unit != ""
	}
	for _, p := range d.Parameters {
		paramUnits = paramUnits || p.Unit != ""
	}
	unitCell := func(on bool, u string) string {
		switch {
		case !on:
			return ""
		case u == "":
			return "\t-"
		}
		return "\t" + u
	}
	tw := newTable(w)
	fmt.Fprintf(tw, "  state\tstart\tperiod%s\n", unitCell(stateUnits, "unit"))
	for _, st := range d.States {
		period := "-"
		if st.Period != 0 {
			period = formatFloat(st.Period)
		}
		fmt.Fprintf(tw, "  %s\t%s\t%s%s\n", st.Name, formatFloat(st.Start), period, unitCell(stateUnits, st.Unit))
	}
	if err := tw.Flush(); err != nil {
		return err
	}
	tw = newTable(w)
	if len(d.Parameters) == 0 {
		fmt.Fprintf(tw, "  (no parameters)\n")
	} else {
		fmt.Fprintf(tw, "  parameter\tvalue%s\tmeaning\n", unitCell(paramUnits, "unit"))
	}
	for _, p := range d.Parameters {
		fmt.Fprintf(tw, "  %s\t%s%s\t%s\n", p.Name, formatFloat(p.Value), unitCell(paramUnits, p.Unit), p.Doc)
	}
	if err := tw.Flush(); err != nil {
		return err
	}
	_, err := fmt.Fprintf(w, "  source: %s\n", strings.TrimSpace(d.Source))
	return err
}

// kindWords is a system's kind as the tables write it: "flow", "map" or
// "hamiltonian flow".
func kindWords(k plumb.Kind) string {
	if k == plumb.KindHamiltonian {
		return "hamiltonian flow"
	}
	return string(k)
}
