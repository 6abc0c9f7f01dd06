package embed

import (
	"bufio"
	"fmt"
	"io"
	"math"
	"strconv"
	"strings"
)

// ReadOptions choose what ReadColumn reads.
type ReadOptions struct {
	// Source names the input in errors ("input" when empty).
	Source string
	// Column is the column to read: a header name, or a 1-based column
	// number ("2"). Empty means the only column of a one-column file, or
	// the last column otherwise.
	Column string
	// Time, when set, names the time column (a header name or a 1-based
	// number): the sampling interval is then read from it and checked for
	// uniformity (FromTimes).
	Time string
	// Dt is the sampling interval when there is no time column (0
	// means 1).
	Dt float64
}

// MaxLineLen is the longest line ReadColumn accepts (1 MiB).
const MaxLineLen = 1 << 20

// ReadColumn reads one column of a comma-separated text file as a Series.
// The first line that is not blank and does not start with '#' is a
// header of column names when any of its cells is not a number; otherwise
// it is the first row of data and columns are known by number only. Cells
// are trimmed of spaces and of one pair of double quotes. Blank lines and
// lines starting with '#' are skipped.
//
// Errors say where: an *InputError with the line and column of a cell
// that is empty (a gap), not a number (ErrSyntax), NaN or infinite
// (ErrNonFinite), a row too short for the column (ErrSyntax), an unknown
// column (ErrColumn); a series that NewSeries or FromTimes refuses (too
// short, constant, non-uniform times) keeps their errors. The values read
// before an error are not returned: a series with a gap is not a series.
func ReadColumn(r io.Reader, opt ReadOptions) (*Series, error) {
	src := opt.Source
	if src == "" {
		src = "input"
	}
	if opt.Dt != 0 && opt.Time != "" {
		return nil, settingf("give a time column or a sampling interval, not both")
	}
	dt := opt.Dt
	if dt == 0 {
		dt = 1
	}
	if !(dt > 0) || math.IsInf(dt, 1) {
		return nil, settingf("sampling interval %g (want finite and > 0)", dt)
	}
	sc := bufio.NewScanner(r)
	sc.Buffer(make([]byte, 0, 64*1024), MaxLineLen)
	var (
		line             int
		col, tcol        = -1, -1
		ncols            int
		values, times    []float64
		cells            []string
		headerSeen       bool
		colName, timeNam = opt.Column, opt.Time
	)
	fail := func(c int, err error, format string, a ...any) error {
		return &InputError{Source: src, Line: line, Column: c, Index: -1, Err: err, Detail: fmt.Sprintf(format, a...)}
	}
	for sc.Scan() {
		line++
		text := strings.TrimSpace(sc.Text())
		if text == "" || text[0] == '#' {
			continue
		}
		cells = splitRow(text, cells[:0])
		if !headerSeen {
			headerSeen = true
			ncols = len(cells)
			header := false
			for _, c := range cells {
				if _, err := strconv.ParseFloat(c, 64); err != nil {
					header = true
				}
			}
			var err error
			if col, err = pickColumn(cells, header, colName, ncols); err != nil {
				return nil, fail(0, err, "column %q (%s)", colName, columnList(cells, header))
			}
			if timeNam != "" {
				if tcol, err = pickColumn(cells, header, timeNam, ncols); err != nil {
					return nil, fail(0, err, "time column %q (%s)", timeNam, columnList(cells, header))
				}
				if tcol == col {
					return nil, fail(0, ErrColumn, "the time column %q is the data column", timeNam)
				}
			}
			if header {
				continue
			}
		}
		need := max(col, tcol) + 1
		if len(cells) < need {
			return nil, fail(0, ErrSyntax, "%d cells, want at least %d", len(cells), need)
		}
		v, err := cellValue(cells[col])
		if err != nil {
			return nil, fail(col+1, err, "%s", cellDetail(cells[col]))
		}
		values = append(values, v)
		if tcol >= 0 {
			t, err := cellValue(cells[tcol])
			if err != nil {
				return nil, fail(tcol+1, err, "%s", cellDetail(cells[tcol]))
			}
			times = append(times, t)
		}
	}
	if err := sc.Err(); err != nil {
		if err == bufio.ErrTooLong {
			return nil, &InputError{Source: src, Line: line + 1, Index: -1, Err: ErrSyntax, Detail: fmt.Sprintf("line longer than %d bytes", MaxLineLen)}
		}
		return nil, fmt.Errorf("embed: reading %s: %w", src, err)
	}
	if !headerSeen {
		return nil, &InputError{Source: src, Index: -1, Err: ErrTooShort, Detail: "no data"}
	}
	if len(values) < MinLen {
		return nil, &InputError{Source: src, Index: -1, Err: ErrTooShort, Detail: fmt.Sprintf("%d values (want at least %d)", len(values), MinLen)}
	}
	var s *Series
	var err error
	if tcol >= 0 {
		s, err = FromTimes(times, values)
	} else {
		s, err = NewSeries(values, dt)
	}
	if err != nil {
		return nil, locate(err, src)
	}
	return s, nil
}

// locate adds the source to an *InputError of NewSeries or FromTimes.
func locate(err error, src string) error {
	if ie, ok := err.(*InputError); ok {
		c := *ie
		c.Source = src
		return &c
	}
	return err
}

// splitRow splits a line at commas, trimming spaces and one pair of
// double quotes from each cell.
func splitRow(text string, dst []string) []string {
	for {
		cell, rest, more := strings.Cut(text, ",")
		cell = strings.TrimSpace(cell)
		if len(cell) >= 2 && cell[0] == '"' && cell[len(cell)-1] == '"' {
			cell = strings.TrimSpace(cell[1 : len(cell)-1])
		}
		dst = append(dst, cell)
		if !more {
			return dst
		}
		text = rest
	}
}

// pickColumn returns the 0-based index of the column named by name (a
// header name, or a 1-based number); "" means the only or the last column.
func pickColumn(cells []string, header bool, name string, n int) (int, error) {
	if name == "" {
		return n - 1, nil
	}
	if header {
		for i, c := range cells {
			if c == name {
				return i, nil
			}
		}
	}
	if k, err := strconv.Atoi(name); err == nil {
		if k >= 1 && k <= n {
			return k - 1, nil
		}
	}
	return -1, ErrColumn
}

func columnList(cells []string, header bool) string {
	if !header {
		return fmt.Sprintf("no header; columns are numbered 1..%d", len(cells))
	}
	q := make([]string, len(cells))
	for i, c := range cells {
		q[i] = strconv.Quote(c)
	}
	return "header: " + strings.Join(q, ", ")
}

// cellValue parses a cell: empty is a gap (ErrSyntax), text is
// ErrSyntax, NaN and infinities are ErrNonFinite.
func cellValue(c string) (float64, error) {
	if c == "" {
		return 0, ErrSyntax
	}
	v, err := strconv.ParseFloat(c, 64)
	if err != nil {
		if ne, ok := err.(*strconv.NumError); ok && ne.Err == strconv.ErrRange {
			return 0, ErrNonFinite
		}
		return 0, ErrSyntax
	}
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return 0, ErrNonFinite
	}
	return v, nil
}

func cellDetail(c string) string {
	if c == "" {
		return "empty cell (a gap in the series)"
	}
	if len(c) > 40 {
		c = c[:40] + "..."
	}
	return strconv.Quote(c)
}
