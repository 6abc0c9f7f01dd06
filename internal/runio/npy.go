package runio

import (
	"bufio"
	"fmt"
	"io"
	"math"
	"os"
	"strconv"
)

// ReadNPY reads a run from a NumPy .npy array (format versions 1.0, 2.0
// and 3.0): a 2-D array of float64 or float32 ('<f8', '>f8', '<f4', '>f4'),
// in C or Fortran order, one row per time. The time is a column of the
// array (Options.Time, default the first; columns are named by
// Options.Names or by their 0-based index "0", "1", ...), or a separate
// 1-D array given as Options.Times, in which case every column is a state.
// float32 values are widened to float64 exactly.
//
// Errors say what was found: a dtype other than these wraps
// ErrUnsupported, a body shorter than the shape ErrTruncated (with the
// bytes found), a bad header or bytes after the data ErrSyntax, a NaN or
// Inf ErrNumber (with the row and column), times not increasing
// ErrTimeOrder. The body is read in 64 KiB chunks straight into the
// float64 result. When r is a file whose size covers the announced shape,
// the result is allocated once at that size; otherwise it grows
// geometrically as data arrive, never past the announced size.
func ReadNPY(r io.Reader, opt Options) (*Run, error) {
	file := opt.source()
	var times []float64
	if opt.Times != nil {
		if opt.Time != "" {
			return nil, &Error{File: file, Field: opt.Time, Err: ErrOptions, Detail: "a time column and a separate times array both given"}
		}
		tfile := file + " (times)"
		br := bufio.NewReaderSize(opt.Times, 64<<10)
		h, err := readNPYHeader(br, tfile)
		if err != nil {
			return nil, err
		}
		if len(h.shape) != 1 {
			return nil, &Error{File: tfile, Err: ErrUnsupported, Detail: fmt.Sprintf("times array of shape %v, want 1-D", h.shape)}
		}
		names := []string{"t"}
		lay := &layout{col: []int{timeCol}, timeCol: 0, timeName: "t"}
		tr := &Run{}
		if err := readNPYBody(br, tfile, h, h.shape[0], 1, lay, names, tr); err != nil {
			return nil, err
		}
		times = tr.T
	}
	br := bufio.NewReaderSize(r, 64<<10)
	h, err := readNPYHeader(br, file)
	if err != nil {
		return nil, err
	}
	if len(h.shape) != 2 {
		return nil, &Error{File: file, Err: ErrUnsupported, Detail: fmt.Sprintf("array of shape %v, want 2-D (rows, columns)", h.shape)}
	}
	n, k := h.shape[0], h.shape[1]
	if k > maxColumns {
		return nil, &Error{File: file, Err: ErrUnsupported, Detail: fmt.Sprintf("%d columns (at most %d read)", k, maxColumns)}
	}
	if k > 0 && n > (1<<60)/(k*h.size) {
		return nil, &Error{File: file, Err: ErrUnsupported, Detail: fmt.Sprintf("shape %v is too large", h.shape)}
	}
	names := opt.Names
	if names == nil {
		names = make([]string, k)
		for j := range names {
			names[j] = strconv.Itoa(j)
		}
	} else if len(names) != k {
		return nil, &Error{File: file, Err: ErrOptions, Detail: fmt.Sprintf("%d names for %d columns", len(names), k)}
	}
	defTime := 0
	if times != nil {
		defTime = -1
		if len(times) != n {
			return nil, &Error{File: file, Err: ErrRagged, Detail: fmt.Sprintf("%d rows, the times array has %d", n, len(times))}
		}
	}
	lay, err := plan(file, names, &opt, defTime)
	if err != nil {
		return nil, err
	}
	timeName := lay.timeName
	if times != nil {
		timeName = "t"
	}
	run, err := newRun(file, timeName, lay.names, &opt)
	if err != nil {
		return nil, err
	}
	if times != nil {
		run.T = times
	}
	if f, ok := r.(interface{ Stat() (os.FileInfo, error) }); ok {
		if fi, err := f.Stat(); err == nil && fi.Mode().IsRegular() &&
			fi.Size()-h.dataFrom >= int64(n)*int64(k)*int64(h.size) {
			if times == nil {
				run.T = make([]float64, 0, n)
			}
			run.Y = make([]float64, 0, n*len(run.Names))
		}
	}
	if err := readNPYBody(br, file, h, n, k, lay, names, run); err != nil {
		return run, err
	}
	if n == 0 {
		return nil, &Error{File: file, Err: ErrEmpty, Detail: fmt.Sprintf("shape %v", h.shape)}
	}
	return run, nil
}

// readNPYBody reads n rows of k values into run.T (the time column, if
// lay has one) and run.Y, then checks for bytes after the data and for
// strictly increasing times.
func readNPYBody(br *bufio.Reader, file string, h *npyHeader, n, k int, lay *layout, names []string, run *Run) error {
	dim := len(lay.names)
	hasTime := lay.timeCol >= 0
	total := int64(n) * int64(k) * int64(h.size)
	var got int64
	decode := func(b []byte) float64 {
		if h.size == 8 {
			return math.Float64frombits(h.order.Uint64(b))
		}
		return float64(math.Float32frombits(h.order.Uint32(b)))
	}
	short := func() error {
		return &Error{File: file, Offset: h.dataFrom + got, Err: ErrTruncated,
			Detail: fmt.Sprintf("shape (%d, %d) of %d-byte values needs %d bytes of data, found %d", n, k, h.size, total, got)}
	}
	nonFinite := func(i, j int, v float64) error {
		return &Error{File: file, Row: i + 1, Column: j + 1, Field: names[j], Err: ErrNumber, Detail: fmt.Sprintf("found %v", v)}
	}
	const chunk = 64 << 10
	buf := make([]byte, chunk-chunk%(h.size*k)+h.size*k)
	if !h.fortran {
		// Row-major: whole rows per chunk.
		rowBytes := h.size * k
		for i := 0; i < n; {
			rows := min(n-i, len(buf)/rowBytes)
			m, err := io.ReadFull(br, buf[:rows*rowBytes])
			got += int64(m)
			rows = m / rowBytes
			if hasTime {
				run.T = grow(run.T, rows, n)
			}
			y := len(run.Y)
			run.Y = grow(run.Y, rows*dim, n*dim)
			for r := 0; r < rows; r++ {
				row := buf[r*rowBytes : (r+1)*rowBytes]
				for j := 0; j < k; j++ {
					c := lay.col[j]
					if c == skipCol {
						continue
					}
					v := decode(row[j*h.size:])
					if math.IsInf(v, 0) || math.IsNaN(v) {
						run.T, run.Y = run.T[:len(run.T)-rows+r], run.Y[:y]
						return nonFinite(i+r, j, v)
					}
					if c == timeCol {
						run.T[len(run.T)-rows+r] = v
					} else {
						run.Y[y+c] = v
					}
				}
				if dim > 0 {
					y += dim
				}
			}
			i += rows
			if err != nil {
				return short()
			}
		}
	} else {
		// Column-major: column j holds all n rows. The first column read
		// proves the rows exist; the result grows while it is read.
		per := len(buf) / h.size
		for j := 0; j < k; j++ {
			c := lay.col[j]
			for i := 0; i < n; {
				cnt := min(n-i, per)
				m, err := io.ReadFull(br, buf[:cnt*h.size])
				got += int64(m)
				cnt = m / h.size
				if j == 0 {
					if hasTime {
						run.T = grow(run.T, cnt, n)
					}
					run.Y = grow(run.Y, cnt*dim, n*dim)
				}
				for r := 0; r < cnt && c != skipCol; r++ {
					v := decode(buf[r*h.size:])
					if math.IsInf(v, 0) || math.IsNaN(v) {
						return nonFinite(i+r, j, v)
					}
					if c == timeCol {
						run.T[i+r] = v
					} else {
						run.Y[(i+r)*dim+c] = v
					}
				}
				i += cnt
				if err != nil {
					// Every row misses a later column: keep none.
					run.T, run.Y = run.T[:0], run.Y[:0]
					return short()
				}
			}
		}
	}
	if _, err := br.ReadByte(); err == nil {
		return &Error{File: file, Offset: h.dataFrom + got, Err: ErrSyntax,
			Detail: fmt.Sprintf("bytes after the %d bytes of data that shape (%d, %d) needs", total, n, k)}
	}
	for i := 1; i < len(run.T); i++ {
		if !(run.T[i] > run.T[i-1]) {
			return &Error{File: file, Row: i + 1, Column: lay.timeCol + 1, Field: run.TimeName, Err: ErrTimeOrder,
				Detail: fmt.Sprintf("%v after %v", run.T[i], run.T[i-1])}
		}
	}
	return nil
}
