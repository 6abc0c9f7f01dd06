package runio

import (
	"bytes"
	"fmt"
	"io"
)

// ReadCSV reads a run from comma-separated text. The first line is a
// header of column names (surrounding spaces and double quotes removed);
// every later line is a row of decimal numbers, one per header name. Blank
// lines are skipped. Only the time and the chosen state columns are
// parsed; the others may hold anything but must be present.
//
// Errors name the line and column: a cell that is not a finite decimal
// number (text, NaN, Inf, empty) wraps ErrNumber, a row with a different
// number of cells ErrRagged, a time not above the previous one
// ErrTimeOrder. The input is read line by line; memory is the float64 data
// plus one line.
func ReadCSV(r io.Reader, opt Options) (*Run, error) {
	file := opt.source()
	in := newLines(r)
	head, err := in.nextData(file)
	if err == io.EOF {
		return nil, &Error{File: file, Err: ErrEmpty, Detail: "no header line"}
	}
	if err != nil {
		return nil, err
	}
	headLine := in.n
	head = bytes.TrimPrefix(head, []byte("\xef\xbb\xbf")) // a UTF-8 byte-order mark, as spreadsheets write
	var all []string
	for j, cell := range splitCells(head) {
		name, ok := unquote(trimSpace(cell))
		if !ok {
			return nil, &Error{File: file, Line: headLine, Column: j + 1, Err: ErrSyntax, Detail: "unbalanced quotes in header: " + found(cell)}
		}
		if name == "" {
			return nil, &Error{File: file, Line: headLine, Column: j + 1, Err: ErrSyntax, Detail: "empty column name in header"}
		}
		all = append(all, name)
	}
	lay, err := plan(file, all, &opt, 0)
	if err != nil {
		if e, ok := err.(*Error); ok {
			e.Line = headLine
		}
		return nil, err
	}
	run, err := newRun(file, lay.timeName, lay.names, &opt)
	if err != nil {
		return nil, err
	}
	dim := len(lay.names)
	row := make([]float64, dim)
	var t, prev float64
	for {
		b, err := in.nextData(file)
		if err == io.EOF {
			break
		}
		if err != nil {
			return run, err
		}
		j := 0
		for start := 0; ; j++ {
			end := start
			for end < len(b) && b[end] != ',' {
				end++
			}
			if j < len(lay.col) && lay.col[j] != skipCol {
				cell := trimSpace(b[start:end])
				if len(cell) >= 2 && cell[0] == '"' && cell[len(cell)-1] == '"' {
					cell = trimSpace(cell[1 : len(cell)-1])
				}
				v, perr := parseNumber(cell)
				if perr != nil {
					return run, &Error{File: file, Line: in.n, Column: j + 1, Field: all[j], Err: ErrNumber, Detail: numberDetail(cell, perr)}
				}
				if c := lay.col[j]; c == timeCol {
					t = v
				} else {
					row[c] = v
				}
			}
			if end == len(b) {
				break
			}
			start = end + 1
		}
		if j+1 != len(all) {
			return run, &Error{File: file, Line: in.n, Err: ErrRagged, Detail: fmt.Sprintf("%d cells, the header has %d", j+1, len(all))}
		}
		if len(run.T) > 0 && !(t > prev) {
			return run, &Error{File: file, Line: in.n, Column: lay.timeCol + 1, Field: lay.timeName, Err: ErrTimeOrder,
				Detail: fmt.Sprintf("%v after %v", t, prev)}
		}
		prev = t
		run.T = grow(run.T, 1, 0) // doubling: less copying than append's 1.25x
		run.T[len(run.T)-1] = t
		run.Y = grow(run.Y, len(run.Names), 0)
		copy(run.Y[len(run.Y)-len(run.Names):], row)
	}
	if len(run.T) == 0 {
		return nil, &Error{File: file, Line: headLine, Err: ErrEmpty, Detail: "a header and no rows"}
	}
	return run, nil
}

// splitCells splits a header line at commas outside double quotes.
func splitCells(b []byte) [][]byte {
	var cells [][]byte
	quoted := false
	start := 0
	for i, c := range b {
		switch {
		case c == '"':
			quoted = !quoted
		case c == ',' && !quoted:
			cells = append(cells, b[start:i])
			start = i + 1
		}
	}
	return append(cells, b[start:])
}

// unquote removes surrounding double quotes and undoubles inner ones.
func unquote(b []byte) (string, bool) {
	if len(b) == 0 || b[0] != '"' {
		for _, c := range b {
			if c == '"' {
				return "", false
			}
		}
		return string(b), true
	}
	if len(b) < 2 || b[len(b)-1] != '"' {
		return "", false
	}
	b = b[1 : len(b)-1]
	out := make([]byte, 0, len(b))
	for i := 0; i < len(b); i++ {
		if b[i] == '"' {
			if i+1 < len(b) && b[i+1] == '"' {
				i++
			} else {
				return "", false
			}
		}
		out = append(out, b[i])
	}
	return string(trimSpace(out)), true
}
