package runio

import (
	"fmt"
	"io"
	"strconv"
)

// ReadJSONL reads a run from JSON Lines: one JSON object per line, in one
// of two shapes, fixed by the first line:
//
//	{"t": 0.5, "y": [1.0, 2.0, 3.0]}       the state as an array "y"
//	{"t": 0.5, "x": 1.0, "v": 2.0}         the state as named fields
//
// The time field is Options.Time (default "t"). In the array shape the
// entries are named by Options.Names or "y0", "y1", ...; in the named shape
// the state columns are the first line's numeric fields other than the
// time, in order, unless Options.Columns chooses. Fields outside the run
// are skipped whatever they hold; blank lines are skipped.
//
// Errors name the line and field: a missing field or a value that is not a
// finite number wraps ErrNumber, a "y" of another length ErrRagged, a line
// that is not a JSON object ErrSyntax, times not increasing ErrTimeOrder.
// Lines are parsed in place, one at a time; memory is the float64 data
// plus one line.
func ReadJSONL(r io.Reader, opt Options) (*Run, error) {
	file := opt.source()
	tname := opt.Time
	if tname == "" {
		tname = "t"
	}
	in := newLines(r)
	sc := &jscan{}
	var (
		run     *Run
		pos     map[string]int // field -> state index (named shape)
		arrayed bool
		sel     []int // array shape: entry -> state index or skipCol
		arrLen  int
		seen    []bool
		row     []float64
		prev    float64
	)
	for {
		b, err := in.nextData(file)
		if err == io.EOF {
			break
		}
		if err != nil {
			return run, err
		}
		line := in.n
		fail := func(field string, kind error, detail string) error {
			return &Error{File: file, Line: line, Field: field, Err: kind, Detail: detail}
		}
		if run == nil {
			// The first line fixes the shape and the columns.
			first, err := sc.fields(b)
			if err != nil {
				kind := err.kind
				if kind == nil {
					kind = ErrSyntax
				}
				return nil, fail(err.field, kind, err.detail)
			}
			all := []string{}
			hasTime := false
			for _, f := range first {
				switch {
				case f.name == tname:
					hasTime = true
				case f.name == "y" && f.arr >= 0:
					arrayed = true
					arrLen = f.arr
				case f.num:
					// A number named "y" is a field like any other (only
					// an array "y" is the state).
					all = append(all, f.name)
				}
			}
			if !hasTime {
				return nil, fail(tname, ErrColumn, "time field missing")
			}
			if arrayed {
				all = opt.Names
				if all == nil {
					all = make([]string, arrLen)
					for j := range all {
						all[j] = "y" + strconv.Itoa(j)
					}
				} else if len(all) != arrLen {
					return nil, fail("y", ErrOptions, fmt.Sprintf("%d names for %d entries", len(all), arrLen))
				}
			}
			popt := opt
			popt.Time = "" // the time is a field of its own, outside all
			lay, err2 := plan(file, all, &popt, -1)
			if err2 != nil {
				if e, ok := err2.(*Error); ok {
					e.Line = line
				}
				return nil, err2
			}
			run, err2 = newRun(file, tname, lay.names, &opt)
			if err2 != nil {
				return nil, err2
			}
			run.TimeName = tname
			if arrayed {
				sel = lay.col
			} else {
				pos = make(map[string]int, len(lay.names))
				for j, n := range lay.names {
					pos[n] = j
				}
			}
			seen = make([]bool, len(lay.names)+1)
			row = make([]float64, len(lay.names)+1) // row[0] is the time
		}
		clear(seen)
		var t float64
		perr := sc.each(b, func(key []byte, isArr bool) *jerr {
			if string(key) == tname {
				if seen[0] {
					return &jerr{field: tname, kind: ErrSyntax, detail: "field appears twice"}
				}
				seen[0] = true
				return sc.number(tname, &t)
			}
			if arrayed {
				if string(key) != "y" {
					return sc.skipValue(string(key))
				}
				if seen[1] && len(seen) > 1 {
					return &jerr{field: "y", kind: ErrSyntax, detail: "field appears twice"}
				}
				m, e := sc.array(sel, row[1:])
				if e != nil {
					return e
				}
				if m != arrLen {
					return &jerr{field: "y", kind: ErrRagged, detail: fmt.Sprintf("%d entries, the first line has %d", m, arrLen)}
				}
				for j := 1; j < len(seen); j++ {
					seen[j] = true
				}
				return nil
			}
			j, ok := pos[string(key)]
			if !ok {
				return sc.skipValue(string(key))
			}
			if seen[j+1] {
				return &jerr{field: string(key), kind: ErrSyntax, detail: "field appears twice"}
			}
			seen[j+1] = true
			return sc.number(run.Names[j], &row[j+1])
		})
		if perr != nil {
			kind := perr.kind
			if kind == nil {
				kind = ErrSyntax
			}
			return run, fail(perr.field, kind, perr.detail)
		}
		for j, ok := range seen {
			if !ok {
				name, what := tname, "time field missing"
				if j > 0 {
					name, what = run.Names[j-1], "field missing"
					if arrayed {
						name = "y"
					}
				}
				return run, fail(name, ErrNumber, what)
			}
		}
		if len(run.T) > 0 && !(t > prev) {
			return run, fail(tname, ErrTimeOrder, fmt.Sprintf("%v after %v", t, prev))
		}
		prev = t
		run.T = grow(run.T, 1, 0) // doubling: less copying than append's 1.25x
		run.T[len(run.T)-1] = t
		run.Y = grow(run.Y, len(run.Names), 0)
		copy(run.Y[len(run.Y)-len(run.Names):], row[1:])
	}
	if run == nil || len(run.T) == 0 {
		return nil, &Error{File: file, Err: ErrEmpty, Detail: "no JSON lines"}
	}
	return run, nil
}
