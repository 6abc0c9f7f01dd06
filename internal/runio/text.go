package runio

import (
	"bufio"
	"errors"
	"fmt"
	"io"
	"math"
	"strconv"
)

// lines reads a text input line by line. The returned slice is valid until
// the next call; lines longer than the buffer are gathered in one reused
// slice, so no line is ever copied into a string.
type lines struct {
	r    *bufio.Reader
	long []byte
	n    int // number of the line last returned, 1-based
}

func newLines(r io.Reader) *lines {
	return &lines{r: bufio.NewReaderSize(r, 64<<10)}
}

// next returns the next line without its "\n" or "\r\n", or io.EOF.
func (l *lines) next() ([]byte, error) {
	b, err := l.r.ReadSlice('\n')
	if err == bufio.ErrBufferFull {
		l.long = append(l.long[:0], b...)
		for err == bufio.ErrBufferFull {
			b, err = l.r.ReadSlice('\n')
			l.long = append(l.long, b...)
		}
		b = l.long
	}
	if err != nil && err != io.EOF {
		return nil, err
	}
	if err == io.EOF && len(b) == 0 {
		return nil, io.EOF
	}
	l.n++
	if n := len(b); n > 0 && b[n-1] == '\n' {
		b = b[:n-1]
	}
	if n := len(b); n > 0 && b[n-1] == '\r' {
		b = b[:n-1]
	}
	return b, nil
}

// nextData returns the next line that is not blank, or io.EOF; a read
// error names file and the line being read.
func (l *lines) nextData(file string) ([]byte, error) {
	for {
		b, err := l.next()
		if err == io.EOF {
			return nil, err
		}
		if err != nil {
			return nil, fmt.Errorf("runio: %s:%d: %w", file, l.n+1, err)
		}
		if !blank(b) {
			return b, nil
		}
	}
}

// blank reports whether a line holds only spaces and tabs.
func blank(b []byte) bool {
	for _, c := range b {
		if c != ' ' && c != '\t' {
			return false
		}
	}
	return true
}

func trimSpace(b []byte) []byte {
	for len(b) > 0 && (b[0] == ' ' || b[0] == '\t') {
		b = b[1:]
	}
	for len(b) > 0 && (b[len(b)-1] == ' ' || b[len(b)-1] == '\t') {
		b = b[:len(b)-1]
	}
	return b
}

// errNotNumber and friends describe why parseNumber refused a token.
var (
	errEmptyCell = errors.New("empty cell")
	errNotNumber = errors.New("not a decimal number")
	errNonFinite = errors.New("not finite")
	errRange     = errors.New("out of the float64 range")
)

// parseNumber reads a finite decimal number: digits, sign, point and
// exponent only (no hex, no underscores, no NaN or Inf spelled out).
// Values below the float64 range round to zero as strconv rounds them.
func parseNumber(b []byte) (float64, error) {
	if len(b) == 0 {
		return 0, errEmptyCell
	}
	for _, c := range b {
		if (c < '0' || c > '9') && c != '.' && c != '-' && c != '+' && c != 'e' && c != 'E' {
			return 0, errNotNumber
		}
	}
	// The conversion does not allocate: strconv keeps no reference to its
	// argument, so the compiler passes the bytes in a stack buffer.
	v, err := strconv.ParseFloat(string(b), 64)
	if err != nil {
		var ne *strconv.NumError
		if errors.As(err, &ne) && ne.Err == strconv.ErrRange {
			if math.IsInf(v, 0) {
				return 0, errRange
			}
			return v, nil
		}
		return 0, errNotNumber
	}
	if math.IsInf(v, 0) || math.IsNaN(v) {
		return 0, errNonFinite
	}
	return v, nil
}

// numberDetail says what parseNumber refused.
func numberDetail(b []byte, err error) string {
	if err == errEmptyCell {
		return "empty cell"
	}
	return found(b)
}
