package main

import (
	"io"
	"strconv"

	"github.com/plumbdyn/plumb/internal/runio"
)

// mapHeadJSON and mapTailJSON are the first and last lines of a map's
// orbit in --format jsonl: the keys of the JSON result before and after
// orbit.
type mapHeadJSON struct {
	header
	System   systemJSON           `json:"system"`
	Settings mapSolveSettingsJSON `json:"settings"`
	Units    mapSolveUnitsJSON    `json:"units"`
}

type mapTailJSON struct {
	Status string    `json:"status"`
	Error  errText   `json:"error"`
	End    int       `json:"end"`
	Final  []float64 `json:"final"`
}

// orbitRows returns the writer of a map's orbit in --format jsonl or npy,
// nil for the formats maps.go writes. The orbit is held whole (maps.Orbit
// computes it so), so the row count of the .npy header is known.
func (f *solveFlags) orbitRows(out mapSolveJSON) func(w io.Writer) error {
	switch f.format {
	case "jsonl":
		return func(w io.Writer) error { return orbitJSONL(w, out) }
	case "npy":
		return func(w io.Writer) error { return orbitNPY(w, out) }
	}
	return nil
}

// orbitJSONL writes the head, one line {"n": N, "x": [...]} per iterate,
// then the tail.
func orbitJSONL(w io.Writer, out mapSolveJSON) error {
	if err := encodeLine(w, mapHeadJSON{header: out.header, System: out.System, Settings: out.Settings, Units: out.Units}); err != nil {
		return err
	}
	var b []byte
	var err error
	for _, it := range out.Orbit {
		b = strconv.AppendInt(append(b[:0], `{"n":`...), int64(it.N), 10)
		b = append(b, `,"x":[`...)
		for j, v := range it.X {
			if j > 0 {
				b = append(b, ',')
			}
			if b, err = appendJSONFloat(b, v); err != nil {
				return err
			}
		}
		b = append(b, "]}\n"...)
		if _, err := w.Write(b); err != nil {
			return err
		}
	}
	return encodeLine(w, mapTailJSON{Status: out.Status, Error: out.Error, End: out.End, Final: out.Final})
}

// orbitNPY writes the iterates as an N x (1+d) float64 array, the
// iterate n first.
func orbitNPY(w io.Writer, out mapSolveJSON) error {
	d := len(out.Final)
	nw, err := runio.NewNPYWriter(w, 1+d, len(out.Orbit))
	if err != nil {
		return err
	}
	row := make([]float64, 1+d)
	for _, it := range out.Orbit {
		row[0] = float64(it.N)
		copy(row[1:], it.X)
		if err := nw.Row(row); err != nil {
			return err
		}
	}
	return nw.Close()
}
