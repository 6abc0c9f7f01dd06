package main

import (
	"context"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"slices"
	"strings"

	"github.com/plumbdyn/plumb"
)

// loadSystem returns the system the shared flags name: --file, else --model
// (name defaults to the command's own), with every --set, then every
// --start, applied in order. This is the one place where a command gets
// its system.
func (sh *shared) loadSystem(name string) (*plumb.System, error) {
	if sh.file != "" {
		sys, err := sh.loadFile()
		if err != nil {
			return nil, err
		}
		return sh.applySets(sys)
	}
	sys, err := plumb.Model(name)
	if err != nil {
		return nil, usagef("--model %s: unknown model (known: %s)", name, strings.Join(plumb.Models(), ", "))
	}
	return sh.applySets(sys)
}

// loadFile reads the system file --file names ("-": standard input). Every
// problem in it is a usage error that names the file and the field, line or
// position (plumb.FileError).
//
// Opening, reading and compiling run beside the command, so that Ctrl-C
// ends them: a FIFO with no writer blocks in open(2), a large formula takes
// a while to compile, and neither may hold the process past a signal.
func (sh *shared) loadFile() (*plumb.System, error) {
	ctx := sh.ctx
	if ctx == nil {
		ctx = context.Background()
	}
	if err := ctx.Err(); err != nil {
		return nil, fmt.Errorf("reading --file %s: %w", sh.file, err)
	}
	type loaded struct {
		sys *plumb.System
		err error
	}
	done := make(chan loaded, 1) // buffered: an abandoned load does not leak a blocked send
	go func() {
		sys, err := sh.readFile()
		done <- loaded{sys, err}
	}()
	select {
	case l := <-done:
		if l.err != nil {
			return nil, l.err
		}
		if l.sys.Name == "" {
			l.sys.Name = fileSystemName(sh.file)
		}
		return l.sys, nil
	case <-ctx.Done():
		return nil, fmt.Errorf("reading --file %s: stopped before it was read: %w", sh.file, ctx.Err())
	}
}

// readFile opens and compiles the system file; see loadFile.
func (sh *shared) readFile() (*plumb.System, error) {
	var r io.Reader
	if sh.file == "-" {
		if sh.stdin == nil {
			return nil, usagef("--file -: no standard input")
		}
		r = sh.stdin
	} else {
		f, err := os.Open(sh.file)
		if err != nil {
			return nil, usagef("--file %s: %v", sh.file, err)
		}
		defer f.Close()
		r = f
	}
	sys, err := plumb.LoadSystem(r)
	if err != nil {
		return nil, usagef("--file %s: %w", sh.file, err)
	}
	return sys, nil
}

// fileSystemName names a system file that gives no name: its file name
// without the directory and the .json extension, or "stdin" for "-".
func fileSystemName(path string) string {
	if path == "-" {
		return "stdin"
	}
	base := filepath.Base(path)
	if name := strings.TrimSuffix(base, filepath.Ext(base)); name != "" {
		return name
	}
	return base
}

// applySets applies every --set, then every --start, in order.
func (sh *shared) applySets(sys *plumb.System) (*plumb.System, error) {
	for _, s := range sh.sets {
		if err := sys.Set(s.name, s.value); err != nil {
			if slices.Contains(sys.States, s.name) {
				return nil, usagef("--set %s=%s: %s is a state component, not a parameter; its start is set with --start %s=%s", s.name, formatFloat(s.value), s.name, s.name, formatFloat(s.value))
			}
			return nil, usagef("--set %s=%s: %v", s.name, formatFloat(s.value), err)
		}
	}
	for _, s := range sh.starts.paramList {
		if err := sys.SetStartValue(s.name, s.value); err != nil {
			return nil, usagef("--start %s=%s: %v", s.name, formatFloat(s.value), err)
		}
	}
	return sys, nil
}

// systemJSON describes a system in JSON results.
type systemJSON struct {
	// Name is the catalog name (--model).
	Name string `json:"name"`
	// Title is a human name.
	Title string `json:"title"`
	// Source is where the equations and default parameters are published.
	Source string `json:"source"`
	// Kind is flow, map or hamiltonian.
	Kind string `json:"kind"`
	// TimeUnit is the unit of t a system file gives (omitted when none).
	TimeUnit string `json:"time_unit,omitempty"`
	// States lists the state components in order with their start values.
	States []stateJSON `json:"states"`
	// Parameters lists the parameters with the values used (after --set).
	Parameters []paramJSON `json:"parameters"`
}

// stateJSON is one state component.
type stateJSON struct {
	Name  string  `json:"name"`
	Start float64 `json:"start"`
	// Period is the period of an angle component (omitted for others).
	Period float64 `json:"period,omitempty"`
	// Unit is the component's unit as a system file gives it (omitted
	// when none).
	Unit string `json:"unit,omitempty"`
}

// paramJSON is one parameter.
type paramJSON struct {
	Name  string  `json:"name"`
	Value float64 `json:"value"`
	Doc   string  `json:"doc,omitempty"`
	// Unit is the parameter's unit as a system file gives it (omitted
	// when none).
	Unit string `json:"unit,omitempty"`
}

// describe returns the JSON form of sys at its current parameters and start.
func describe(sys *plumb.System) systemJSON {
	out := systemJSON{Name: sys.Name, Title: sys.Title, Source: sys.Source, Kind: string(sys.Kind()), TimeUnit: sys.TimeUnit(), States: []stateJSON{}, Parameters: []paramJSON{}}
	start := sys.Start()
	periods := sys.Periods()
	units := sys.Units()
	for i, n := range sys.States {
		st := stateJSON{Name: n, Start: start[i]}
		if periods != nil {
			st.Period = periods[i]
		}
		if i < len(units) {
			st.Unit = units[i]
		}
		out.States = append(out.States, st)
	}
	for _, p := range sys.Params() {
		out.Parameters = append(out.Parameters, paramJSON{Name: p.Name, Value: p.Value, Doc: p.Doc, Unit: p.Unit})
	}
	return out
}

// withUnit is name followed by the unit in brackets, "x [m]", or name
// alone when the unit is not known.
func withUnit(name, unit string) string {
	if unit == "" {
		return name
	}
	return name + " [" + unit + "]"
}

// timeUnit describes the time unit in a result's units: the unit itself
// first when the system file gives one ("s: the model's time unit
// (...)").
func (s systemJSON) timeUnit(desc string) string {
	if s.TimeUnit == "" {
		return desc
	}
	return s.TimeUnit + ": " + desc
}

// heading names the system as the tables do: "name (title) p=v q=w [unit],
// t in s", the parameters in their order, each value in its shortest exact
// form, with the units a system file gives.
func (s systemJSON) heading() string {
	params := make([]string, len(s.Parameters))
	for i, p := range s.Parameters {
		params[i] = withUnit(p.Name+"="+formatFloat(p.Value), p.Unit)
	}
	h := s.Name
	if s.Title != "" {
		h += " (" + s.Title + ")"
	}
	if len(params) > 0 {
		h += " " + strings.Join(params, " ")
	}
	if s.TimeUnit != "" {
		h += ", t in " + s.TimeUnit
	}
	return h
}
