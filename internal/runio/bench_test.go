package runio

import (
	"encoding/binary"
	"fmt"
	"io"
	"math"
	"strconv"
	"testing"
)

// rowSource makes a run's bytes on the fly, so that benchmarks and memory
// tests measure the reader alone, with no copy of the input in memory.
// The states are smooth functions of time, written with full precision.
type rowSource struct {
	format  Format
	rows    int
	i       int
	pending []byte
	buf     []byte // reused for every row
	started bool
}

func (s *rowSource) Read(p []byte) (int, error) {
	n := 0
	for n < len(p) {
		if len(s.pending) == 0 {
			if !s.next() {
				if n == 0 {
					return 0, io.EOF
				}
				break
			}
		}
		c := copy(p[n:], s.pending)
		s.pending = s.pending[c:]
		n += c
	}
	return n, nil
}

func (s *rowSource) next() bool {
	b := s.buf[:0]
	if !s.started {
		s.started = true
		switch s.format {
		case CSV:
			s.pending = append(b, "t,x,y,z\n"...)
		case NPY:
			s.pending = makeNPY(npySpec{major: 1, descr: "<f8", shape: fmt.Sprintf("(%d, 4)", s.rows)})
		}
		if len(s.pending) > 0 {
			return true
		}
	}
	if s.i == s.rows {
		return false
	}
	t := float64(s.i) * 0.001
	v := [4]float64{t, 1 + t/3, -2 + float64(t*t)/7, 20 - t/11}
	s.i++
	switch s.format {
	case CSV:
		for j, x := range v {
			if j > 0 {
				b = append(b, ',')
			}
			b = strconv.AppendFloat(b, x, 'g', -1, 64)
		}
		b = append(b, '\n')
	case JSONL:
		b = append(b, `{"t": `...)
		b = strconv.AppendFloat(b, v[0], 'g', -1, 64)
		b = append(b, `, "y": [`...)
		for j, x := range v[1:] {
			if j > 0 {
				b = append(b, ", "...)
			}
			b = strconv.AppendFloat(b, x, 'g', -1, 64)
		}
		b = append(b, "]}\n"...)
	case NPY:
		for _, x := range v {
			b = binary.LittleEndian.AppendUint64(b, math.Float64bits(x))
		}
	}
	s.buf, s.pending = b, b
	return true
}

// size counts the bytes a source yields.
func size(f Format, rows int) int64 {
	n, _ := io.Copy(io.Discard, &rowSource{format: f, rows: rows})
	return n
}

func benchRead(b *testing.B, f Format) {
	const rows = 1_000_000
	b.SetBytes(size(f, rows))
	b.ReportAllocs()
	for b.Loop() {
		r, err := Read(&rowSource{format: f, rows: rows}, f, Options{})
		if err != nil || r.Len() != rows {
			b.Fatal(err)
		}
	}
	// Memory of the float64 data itself (times and three states), for
	// comparison with B/op.
	b.ReportMetric(float64(rows*4*8)/1e6, "data-MB")
}

// Reading a 10^6-row run of a time and three states.
func BenchmarkReadCSV(b *testing.B)   { benchRead(b, CSV) }
func BenchmarkReadNPY(b *testing.B)   { benchRead(b, NPY) }
func BenchmarkReadJSONL(b *testing.B) { benchRead(b, JSONL) }

// Parsing a row allocates nothing: reading twice the rows costs only the
// few extra allocations of the growing result slices T and Y.
func TestReadRowsDoNotAllocate(t *testing.T) {
	// The results double when they grow: a few more allocations for T and
	// Y (measured: at most 6 for the three formats), where one allocation
	// per row would add 20000.
	const growth = 16
	for _, f := range []Format{CSV, NPY, JSONL} {
		allocs := func(rows int) float64 {
			return testing.AllocsPerRun(5, func() {
				if _, err := Read(&rowSource{format: f, rows: rows}, f, Options{}); err != nil {
					t.Fatal(err)
				}
			})
		}
		small, large := allocs(20_000), allocs(40_000)
		if large-small > growth {
			t.Errorf("%v: %v allocations for 20000 rows, %v for 40000: rows allocate", f, small, large)
		}
	}
}
