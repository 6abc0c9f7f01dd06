package main

import (
	"bufio"
	"encoding/csv"
	"encoding/json"
	"fmt"
	"io"
	"math"
	"os"
	"strconv"

	"github.com/plumbdyn/plumb/internal/runio"
)

// solveSink writes the samples of a flow's solve in one --format as they
// are computed, and then the rest of the result, so that memory does not
// grow with the span. Nothing is written before the first sample: a run
// refused at the start leaves stdout empty.
type solveSink interface {
	// sample writes one sample; y is reused by the caller.
	sample(t float64, y []float64) error
	// finish writes what follows the samples for the finished run r (and
	// the start, if no sample came).
	finish(r *solveRun) error
	// failed is the first error of writing, if any.
	failed() error
}

// newSink returns the sink of the chosen --format; rows is the number of
// samples the grid holds (-1: the accepted steps, unknown up front).
func (r *solveRun) newSink(cl *call, rows int) (solveSink, error) {
	w := cl.stdout
	switch cl.sh.format {
	case "csv":
		return &csvSink{r: r, out: w, w: csv.NewWriter(w), crossings: r.f.rows == "crossings"}, nil
	case "json":
		return &jsonSink{r: r, w: w}, nil
	case "jsonl":
		return &jsonlSink{r: r, w: w}, nil
	case "npy":
		return newNPYSink(cl, len(r.sys.States), rows)
	}
	return newTableSink(r, w), nil
}

// csvSink writes --format csv: the samples as they come, or with --rows
// crossings only the crossings at the end. The header and the crossings
// go through encoding/csv (a name may need quotes); a sample's numbers
// never do, so its row is formatted in place, the same bytes without an
// allocation per value.
type csvSink struct {
	r         *solveRun
	out       io.Writer
	w         *csv.Writer
	crossings bool
	started   bool
	rec       []string
	buf       []byte
	err       error
}

func (s *csvSink) start() error {
	s.started = true
	s.rec = append(append(s.rec[:0], "t"), s.r.sys.States...)
	if s.crossings {
		s.rec = append(s.rec, "crossing", "sense")
	}
	if err := s.w.Write(s.rec); err != nil {
		return err
	}
	s.w.Flush()
	return s.w.Error()
}

func (s *csvSink) sample(t float64, y []float64) error {
	if s.crossings {
		return nil
	}
	if !s.started {
		if s.err = s.start(); s.err != nil {
			return s.err
		}
	}
	b := strconv.AppendFloat(s.buf[:0], t, 'g', -1, 64)
	for _, v := range y {
		b = append(b, ',')
		b = strconv.AppendFloat(b, v, 'g', -1, 64)
	}
	s.buf = append(b, '\n')
	if _, err := s.out.Write(s.buf); err != nil {
		s.err = err
		return err
	}
	return nil
}

func (s *csvSink) finish(r *solveRun) error {
	if s.err != nil {
		return s.err
	}
	if !s.started {
		if err := s.start(); err != nil {
			return err
		}
	}
	if s.crossings {
		for _, h := range r.sol.Hits {
			s.rec = append(s.rec[:0], formatFloat(h.T))
			for _, v := range h.Y {
				s.rec = append(s.rec, formatFloat(v))
			}
			s.rec = append(s.rec, r.cross[h.Which].label(), h.Sense.String())
			if err := s.w.Write(s.rec); err != nil {
				return err
			}
		}
	}
	s.w.Flush()
	return s.w.Error()
}

func (s *csvSink) failed() error { return s.err }

// jsonSink writes --format json as one indented document, byte for byte
// what encoding/json writes for solveJSON: the head, the samples as they
// come, then the tail.
type jsonSink struct {
	r       *solveRun
	w       io.Writer
	started bool
	n       int
	buf     []byte
	err     error
}

func (s *jsonSink) start() error {
	s.started = true
	b, err := indentJSON(s.r.head())
	if err != nil {
		return err
	}
	// Leave the object open: drop the closing "\n}\n".
	b = append(b[:len(b)-3], ",\n  \"samples\": "...)
	_, err = s.w.Write(b)
	return err
}

func (s *jsonSink) sample(t float64, y []float64) error {
	if !s.started {
		if s.err = s.start(); s.err != nil {
			return s.err
		}
	}
	b := s.buf[:0]
	if s.n == 0 {
		b = append(b, "[\n    {\n      \"t\": "...)
	} else {
		b = append(b, ",\n    {\n      \"t\": "...)
	}
	var err error
	if b, err = appendJSONFloat(b, t); err != nil {
		s.err = err
		return err
	}
	b = append(b, ",\n      \"y\": "...)
	if len(y) == 0 {
		b = append(b, "[]"...)
	} else {
		b = append(b, "[\n"...)
		for i, v := range y {
			b = append(b, "        "...)
			if b, err = appendJSONFloat(b, v); err != nil {
				s.err = err
				return err
			}
			if i < len(y)-1 {
				b = append(b, ',')
			}
			b = append(b, '\n')
		}
		b = append(b, "      ]"...)
	}
	b = append(b, "\n    }"...)
	s.buf = b
	s.n++
	if _, err := s.w.Write(b); err != nil {
		s.err = err
		return err
	}
	return nil
}

func (s *jsonSink) finish(r *solveRun) error {
	if s.err != nil {
		return s.err
	}
	if !s.started {
		if err := s.start(); err != nil {
			return err
		}
	}
	closing := "[]"
	if s.n > 0 {
		closing = "\n  ]"
	}
	if _, err := io.WriteString(s.w, closing+",\n"); err != nil {
		return err
	}
	b, err := indentJSON(r.tail())
	if err != nil {
		return err
	}
	// Continue the object: drop the opening "{\n".
	_, err = s.w.Write(b[2:])
	return err
}

func (s *jsonSink) failed() error { return s.err }

// indentJSON encodes v as writeJSON does, into a slice.
func indentJSON(v any) ([]byte, error) {
	var b bytesBuffer
	if err := writeJSON(&b, v); err != nil {
		return nil, err
	}
	return b, nil
}

// bytesBuffer is an io.Writer that appends to itself.
type bytesBuffer []byte

func (b *bytesBuffer) Write(p []byte) (int, error) {
	*b = append(*b, p...)
	return len(p), nil
}

// appendJSONFloat appends v as encoding/json writes a float64: the
// shortest decimal that reads back to the same bits, in exponent form
// below 1e-6 and from 1e21 on, without a leading zero in the exponent.
// NaN and Inf are an error, as in encoding/json.
func appendJSONFloat(b []byte, v float64) ([]byte, error) {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return b, fmt.Errorf("json: unsupported value: %s", strconv.FormatFloat(v, 'g', -1, 64))
	}
	format := byte('f')
	if a := math.Abs(v); a != 0 && (a < 1e-6 || a >= 1e21) {
		format = 'e'
	}
	b = strconv.AppendFloat(b, v, format, -1, 64)
	if format == 'e' {
		// e-09 to e-9
		if n := len(b); n >= 4 && b[n-4] == 'e' && b[n-3] == '-' && b[n-2] == '0' {
			b[n-2] = b[n-1]
			b = b[:n-1]
		}
	}
	return b, nil
}

// jsonlSink writes --format jsonl: the head on the first line, then one
// line per sample {"t": T, "y": [...]}, then the tail on the last line.
type jsonlSink struct {
	r       *solveRun
	w       io.Writer
	started bool
	buf     []byte
	err     error
}

func (s *jsonlSink) start() error {
	s.started = true
	return encodeLine(s.w, s.r.head())
}

// encodeLine writes v as one line of compact JSON.
func encodeLine(w io.Writer, v any) error {
	enc := json.NewEncoder(w)
	enc.SetEscapeHTML(false)
	return enc.Encode(v)
}

func (s *jsonlSink) sample(t float64, y []float64) error {
	if !s.started {
		if s.err = s.start(); s.err != nil {
			return s.err
		}
	}
	b := append(s.buf[:0], `{"t":`...)
	var err error
	if b, err = appendJSONFloat(b, t); err != nil {
		s.err = err
		return err
	}
	b = append(b, `,"y":[`...)
	for i, v := range y {
		if i > 0 {
			b = append(b, ',')
		}
		if b, err = appendJSONFloat(b, v); err != nil {
			s.err = err
			return err
		}
	}
	b = append(b, "]}\n"...)
	s.buf = b
	if _, err := s.w.Write(b); err != nil {
		s.err = err
		return err
	}
	return nil
}

func (s *jsonlSink) finish(r *solveRun) error {
	if s.err != nil {
		return s.err
	}
	if !s.started {
		if err := s.start(); err != nil {
			return err
		}
	}
	return encodeLine(s.w, r.tail())
}

func (s *jsonlSink) failed() error { return s.err }

// npySink writes --format npy: the samples as an N x (1+d) float64 array,
// the time first. On a regular file the row count is patched into the
// header at the end; on a pipe the grid's count is announced up front and
// the rows a run that stopped early did not reach are written as NaN, so
// that the array stays whole (the status and error go to stderr, as
// always). The accepted steps (--dt 0) have no count up front and need a
// file.
type npySink struct {
	out     *bufio.Writer // cl.stdout, flushed before the raw writes
	w       io.Writer     // where the array goes
	cols    int
	rows    int // announced rows, -1 when patched on Close
	nw      *runio.NPYWriter
	row     []float64
	started bool
	err     error
}

func newNPYSink(cl *call, d, rows int) (*npySink, error) {
	null := isDevNull(cl.rawStdout)
	if isTerminal(cl.rawStdout) && !null {
		return nil, usagef("--format npy writes binary data, not for a terminal: redirect stdout to a file (plumb solve --format npy > run.npy)")
	}
	s := &npySink{cols: 1 + d, rows: rows, row: make([]float64, 1+d), w: cl.stdout}
	if bw, ok := cl.stdout.(*bufio.Writer); ok {
		s.out = bw
	}
	if ws, ok := cl.rawStdout.(io.WriteSeeker); ok && !null && s.out != nil && s.out.Buffered() == 0 {
		if _, err := ws.Seek(0, io.SeekCurrent); err == nil {
			// A file: write it directly and patch the count at the end.
			s.w, s.rows = ws, -1
		}
	}
	if s.rows < 0 && s.w == cl.stdout {
		return nil, usagef("--format npy with --dt 0 writes every accepted step, a count known only at the end, which a pipe cannot take: redirect stdout to a file, or sample on a grid with --dt")
	}
	return s, nil
}

// isDevNull reports whether w is the null device, a character device that
// is no terminal and whose seeks go nowhere (it takes the pipe's way).
func isDevNull(w io.Writer) bool {
	f, ok := w.(*os.File)
	if !ok {
		return false
	}
	fi, err := f.Stat()
	if err != nil {
		return false
	}
	null, err := os.Stat(os.DevNull)
	return err == nil && os.SameFile(fi, null)
}

func (s *npySink) start() error {
	s.started = true
	nw, err := runio.NewNPYWriter(s.w, s.cols, s.rows)
	s.nw = nw
	return err
}

func (s *npySink) sample(t float64, y []float64) error {
	if !s.started {
		if s.err = s.start(); s.err != nil {
			return s.err
		}
	}
	s.row[0] = t
	copy(s.row[1:], y)
	if err := s.nw.Row(s.row); err != nil {
		s.err = err
		return err
	}
	return nil
}

func (s *npySink) finish(r *solveRun) error {
	if s.err != nil {
		return s.err
	}
	if !s.started {
		if err := s.start(); err != nil {
			return err
		}
	}
	if s.rows >= 0 {
		for j := range s.row {
			s.row[j] = math.NaN()
		}
		for s.nw.Rows() < s.rows {
			if err := s.nw.Row(s.row); err != nil {
				return err
			}
		}
	}
	return s.nw.Close()
}

func (s *npySink) failed() error { return s.err }
