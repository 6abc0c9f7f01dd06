package main

import (
	"context"
	"flag"
	"fmt"
	"io"
	"math"
	"path/filepath"
	"strconv"
	"strings"
)

// shared holds the flags every command takes. They are registered in one
// place, addShared, so that every command spells and checks them alike.
type shared struct {
	model  string
	file   string
	sets   paramList
	starts startList
	format string
	plot   string
	// plotSize is --plot-size; zero means defaultPlotSize.
	plotSize plotSize
	quiet    bool
	// out is --out: the file the results go to instead of stdout ("" for
	// stdout), written whole through outFile.
	out string
	// progress is --progress: auto, bar, lines or none.
	progress string
	// given records which flags the command line set (filled after parsing).
	given map[string]bool
	// stdin is read for --file -.
	stdin io.Reader
	// ctx ends the reading of --file early (Ctrl-C while a FIFO waits for
	// a writer, or while a large file compiles).
	ctx context.Context
}

// sharedNames lists the shared flags; help prints them in their own block.
var sharedNames = map[string]bool{"model": true, "file": true, "set": true, "start": true, "format": true, "plot": true, "plot-size": true, "quiet": true, "out": true, "progress": true}

// addShared registers the shared flags on fs with the defaults of cmd.
func addShared(fs *flag.FlagSet, cmd *command) *shared {
	sh := &shared{}
	modelDoc := "built-in system `NAME` (see 'plumb models')"
	if cmd.model == "" {
		modelDoc = "built-in system `NAME` (default: all of them)"
	}
	fs.StringVar(&sh.model, "model", cmd.model, modelDoc)
	fs.StringVar(&sh.file, "file", "", "system defined by formulas in the JSON `FILE`, instead of --model")
	fs.Var(&sh.sets, "set", "set a parameter, given as `NAME=VALUE` (repeatable)")
	fs.Var(&sh.starts, "start", "set the start value of a state component, given as `NAME=VALUE` (repeatable; the others keep the system's start)")
	fs.StringVar(&sh.format, "format", "", "output `FORMAT`: "+strings.Join(cmd.formats, ", ")+" (default "+cmd.formats[0]+")")
	plotDoc := "draw the result into `FILE` (.svg or .png)"
	if !cmd.plots {
		plotDoc = "draw into `FILE` (.svg or .png); this command draws nothing"
	}
	fs.StringVar(&sh.plot, "plot", "", plotDoc)
	fs.Var(&sh.plotSize, "plot-size", "size `WxH` of the --plot picture in pixels (in SVG, CSS pixels at 96 to the inch)")
	fs.BoolVar(&sh.quiet, "quiet", false, "no progress, warnings or wall time on stderr (errors still appear)")
	fs.StringVar(&sh.out, "out", "", "write the results whole into `FILE` instead of stdout (a run that stops early leaves its marked partial result)")
	fs.StringVar(&sh.progress, "progress", progressAuto, "progress on stderr: `MODE` auto (a bar on a terminal), bar, lines (JSON Lines) or none")
	return sh
}

// newFlagSet builds the complete flag set of cmd: shared flags, then the
// command's own. Parse errors are returned, never printed or exited on.
func newFlagSet(cmd *command) (*flag.FlagSet, *shared, func(context.Context, *call) error) {
	fs := flag.NewFlagSet("plumb "+cmd.name, flag.ContinueOnError)
	fs.SetOutput(io.Discard)
	fs.Usage = func() {}
	sh := addShared(fs, cmd)
	work := cmd.setup(fs, sh)
	return fs, sh, work
}

// check validates the shared flags for cmd after parsing.
func (sh *shared) check(cmd *command) error {
	for _, name := range cmd.refuses {
		if sh.given[name] {
			why := cmd.refuseWhy
			if why == "" {
				why = "plumb " + cmd.name + " does not take it"
			}
			return usagef("--%s: %s", name, why)
		}
	}
	if sh.format == "" {
		sh.format = cmd.formats[0]
	}
	ok := false
	for _, f := range cmd.formats {
		ok = ok || f == sh.format
	}
	if !ok {
		return usagef("--format %s: plumb %s writes %s", sh.format, cmd.name, strings.Join(cmd.formats, ", "))
	}
	if sh.plot != "" {
		if !cmd.plots {
			return usagef("--plot %s: plumb %s draws no picture", sh.plot, cmd.name)
		}
		if _, err := plotFormat(sh.plot); err != nil {
			return usagef("--plot %s: %v", sh.plot, err)
		}
	}
	if sh.given["plot-size"] && sh.plot == "" {
		return usagef("--plot-size %s: give --plot FILE too; the size is that picture's", sh.plotSize.String())
	}
	if sh.out != "" && sh.out == sh.plot {
		return usagef("--out %s and --plot %s: give the results and the picture different files", sh.out, sh.plot)
	}
	if sh.given["file"] && sh.given["model"] {
		return usagef("--model %s and --file %s: give one system, not both", sh.model, sh.file)
	}
	return nil
}

// plotFormat returns "svg" or "png" from a file name's extension.
func plotFormat(name string) (string, error) {
	switch strings.ToLower(filepath.Ext(name)) {
	case ".svg":
		return "svg", nil
	case ".png":
		return "png", nil
	}
	return "", fmt.Errorf("want a file name ending in .svg or .png")
}

// paramSetting is one --set name=value.
type paramSetting struct {
	name  string
	value float64
}

// paramList is the repeatable --set flag.
type paramList []paramSetting

func (l *paramList) String() string {
	if l == nil {
		return ""
	}
	parts := make([]string, len(*l))
	for i, s := range *l {
		parts[i] = s.name + "=" + formatFloat(s.value)
	}
	return strings.Join(parts, ",")
}

// Set parses name=value.
func (l *paramList) Set(s string) error {
	name, val, ok := strings.Cut(s, "=")
	name = strings.TrimSpace(name)
	if !ok || name == "" {
		return fmt.Errorf("want name=value, e.g. rho=28")
	}
	v, err := parseFinite(val)
	if err != nil {
		return fmt.Errorf("parameter %s: %v", name, err)
	}
	*l = append(*l, paramSetting{name: name, value: v})
	return nil
}

// startList is the repeatable --start flag: state names with start values.
type startList struct{ paramList }

// Set parses name=value.
func (l *startList) Set(s string) error {
	name, val, ok := strings.Cut(s, "=")
	name = strings.TrimSpace(name)
	if !ok || name == "" {
		return fmt.Errorf("want name=value, e.g. x=0.8")
	}
	v, err := parseFinite(val)
	if err != nil {
		return fmt.Errorf("state %s: %v", name, err)
	}
	l.paramList = append(l.paramList, paramSetting{name: name, value: v})
	return nil
}

// finite is a float64 flag that accepts only finite numbers.
type finite float64

func (f *finite) String() string { return formatFloat(float64(*f)) }

// Set parses a finite number.
func (f *finite) Set(s string) error {
	v, err := parseFinite(s)
	if err != nil {
		return err
	}
	*f = finite(v)
	return nil
}

// finiteVar registers a finite float flag.
func finiteVar(fs *flag.FlagSet, p *float64, name string, value float64, usage string) {
	*p = value
	fs.Var((*finite)(p), name, usage)
}

// parseFinite parses a finite float64.
func parseFinite(s string) (float64, error) {
	v, err := strconv.ParseFloat(strings.TrimSpace(s), 64)
	if err != nil {
		return 0, fmt.Errorf("%q is not a number", s)
	}
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return 0, fmt.Errorf("%q is not a finite number", s)
	}
	return v, nil
}

// choice checks that the value of flag name is one of allowed.
func choice(name, value string, allowed ...string) error {
	for _, a := range allowed {
		if value == a {
			return nil
		}
	}
	return usagef("--%s %s: want one of %s", name, value, strings.Join(allowed, ", "))
}
