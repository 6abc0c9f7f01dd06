package plumb

import (
	"bufio"
	"errors"
	"fmt"
	"io"
	"math"
	"strconv"
	"strings"

	"github.com/plumbdyn/plumb/integrate"
)

// MembersFileError says where a members file is wrong: its line and
// column (1-based; column 0 when the whole line is meant) and why.
type MembersFileError struct {
	Line, Column int
	Why          string
}

func (e *MembersFileError) Error() string {
	if e.Column > 0 {
		return fmt.Sprintf("plumb: members file, line %d, column %d: %s", e.Line, e.Column, e.Why)
	}
	return fmt.Sprintf("plumb: members file, line %d: %s", e.Line, e.Why)
}

// Unwrap returns ErrMembersFile.
func (e *MembersFileError) Unwrap() error { return ErrMembersFile }

// Limits of ReadMembers: a line longer than maxMembersLine bytes or more
// than maxMembersRows members is refused rather than read without end.
const (
	maxMembersLine = 1 << 20
	maxMembersRows = 1_000_000
)

// ReadMembers reads the starts of an ensemble's members (for
// EnsembleSettings.Starts) from comma-separated text: a header naming
// every state component once, in any order, then one member per line with
// a finite number per column. Blank lines and lines starting with # are
// skipped; spaces around fields are ignored. The starts come back in the
// order of states. Errors are *MembersFileError values naming the line
// and column.
func ReadMembers(r io.Reader, states []string) ([][]float64, error) {
	sc := bufio.NewScanner(r)
	sc.Buffer(make([]byte, 0, 64*1024), maxMembersLine)
	var order []int // column -> state index
	var out [][]float64
	line := 0
	for sc.Scan() {
		line++
		text := strings.TrimSpace(sc.Text())
		if text == "" || strings.HasPrefix(text, "#") {
			continue
		}
		fields := strings.Split(text, ",")
		if order == nil {
			seen := make(map[string]int, len(fields))
			for c, f := range fields {
				name := strings.TrimSpace(f)
				i := -1
				for j, s := range states {
					if s == name {
						i = j
					}
				}
				switch {
				case i < 0:
					return nil, &MembersFileError{Line: line, Column: c + 1, Why: fmt.Sprintf("%q is not a state component (states: %s)", name, strings.Join(states, ", "))}
				case seen[name] > 0:
					return nil, &MembersFileError{Line: line, Column: c + 1, Why: fmt.Sprintf("%q named twice (first in column %d)", name, seen[name])}
				}
				seen[name] = c + 1
				order = append(order, i)
			}
			if len(order) != len(states) {
				var missing []string
				for _, s := range states {
					if seen[s] == 0 {
						missing = append(missing, s)
					}
				}
				return nil, &MembersFileError{Line: line, Why: "the header lacks " + strings.Join(missing, ", ")}
			}
			continue
		}
		if len(fields) != len(order) {
			return nil, &MembersFileError{Line: line, Why: fmt.Sprintf("%d fields, the header has %d", len(fields), len(order))}
		}
		if len(out) == maxMembersRows {
			return nil, &MembersFileError{Line: line, Why: fmt.Sprintf("more than %d members", maxMembersRows)}
		}
		y := make([]float64, len(states))
		for c, f := range fields {
			v, err := strconv.ParseFloat(strings.TrimSpace(f), 64)
			if err != nil || math.IsNaN(v) || math.IsInf(v, 0) {
				return nil, &MembersFileError{Line: line, Column: c + 1, Why: fmt.Sprintf("%q is not a finite number", strings.TrimSpace(f))}
			}
			y[order[c]] = v
		}
		out = append(out, y)
	}
	if err := sc.Err(); err != nil {
		if errors.Is(err, bufio.ErrTooLong) {
			return nil, &MembersFileError{Line: line + 1, Why: fmt.Sprintf("a line longer than %d bytes", maxMembersLine)}
		}
		return nil, fmt.Errorf("plumb: reading the members file: %w", err)
	}
	if order == nil {
		return nil, &MembersFileError{Line: line, Why: "no header (want the state names, e.g. " + strings.Join(states, ",") + ")"}
	}
	if len(out) == 0 {
		return nil, &MembersFileError{Line: line, Why: "no members after the header"}
	}
	return out, nil
}

// WriteMembers writes starts (each of len(states)) in the form ReadMembers
// reads, with the shortest decimals that read back to the same bits.
func WriteMembers(w io.Writer, states []string, starts [][]float64) error {
	bw := bufio.NewWriter(w)
	bw.WriteString(strings.Join(states, ",") + "\n")
	for k, y := range starts {
		if len(y) != len(states) {
			return fmt.Errorf("plumb: WriteMembers: member %d has %d components, want %d: %w", k, len(y), len(states), integrate.ErrDimension)
		}
		for i, v := range y {
			if i > 0 {
				bw.WriteByte(',')
			}
			bw.WriteString(strconv.FormatFloat(v, 'g', -1, 64))
		}
		bw.WriteByte('\n')
	}
	return bw.Flush()
}
