package runio

import (
	"bufio"
	"encoding/binary"
	"fmt"
	"io"
	"math"
	"strconv"
)

// npyCountWidth is the width reserved for the row count in a written
// header: the 20 digits of the largest uint64, so that any count fits
// when the header is rewritten in place.
const npyCountWidth = 20

// NPYWriter writes a 2-D little-endian float64 array in NumPy's .npy
// format (version 1.0, C order), one row at a time, without holding the
// rows: each row goes through a 64 KiB buffer to the underlying writer.
//
// The header is always the same length for a given column count: its
// row count is padded with spaces to 20 digits, the whole header to a
// multiple of 64 bytes, as NumPy aligns it. So a file written with the
// row count known up front and one whose count was patched in on Close
// hold the same bytes.
type NPYWriter struct {
	w      io.Writer
	bw     *bufio.Writer
	seek   io.WriteSeeker // nil unless the header is patched on Close
	start  int64          // offset of the header in seek
	cols   int
	want   int // announced rows, or -1
	rows   int
	buf    []byte
	err    error
	closed bool
}

// NewNPYWriter starts an array of cols columns on w and writes its header.
// rows is the number of rows that will follow, or negative when unknown.
// An unknown count needs a w that can seek (an *os.File on a regular file):
// the header is written with a placeholder count and patched on Close,
// after which the file position is back at the end of the data. When w
// cannot seek (a pipe, a terminal) and rows is negative, NewNPYWriter
// writes nothing and returns an error wrapping ErrNoSeek.
func NewNPYWriter(w io.Writer, cols, rows int) (*NPYWriter, error) {
	if cols < 1 || cols > maxColumns {
		return nil, fmt.Errorf("runio: .npy writer: %d columns (1 to %d): %w", cols, maxColumns, ErrOptions)
	}
	nw := &NPYWriter{w: w, cols: cols, want: rows, buf: make([]byte, 8*cols)}
	if rows < 0 {
		nw.want = -1
		s, ok := w.(io.WriteSeeker)
		if !ok {
			return nil, fmt.Errorf("runio: .npy writer: %w", ErrNoSeek)
		}
		at, err := s.Seek(0, io.SeekCurrent)
		if err != nil {
			return nil, fmt.Errorf("runio: .npy writer: %w (%v)", ErrNoSeek, err)
		}
		nw.seek, nw.start = s, at
	}
	nw.bw = bufio.NewWriterSize(w, 64<<10)
	count := rows
	if count < 0 {
		count = 0
	}
	if _, err := nw.bw.Write(npyHeaderBytes(cols, count)); err != nil {
		return nil, err
	}
	return nw, nil
}

// npyHeaderBytes is the version 1.0 header of a (rows, cols) little-endian
// float64 C-order array, its count padded to npyCountWidth and its length
// to a multiple of 64 bytes, ending in a newline.
func npyHeaderBytes(cols, rows int) []byte {
	count := strconv.Itoa(rows)
	for len(count) < npyCountWidth {
		count += " "
	}
	dict := "{'descr': '<f8', 'fortran_order': False, 'shape': (" + count + ", " + strconv.Itoa(cols) + "), }"
	n := 10 + len(dict) + 1
	pad := (64 - n%64) % 64
	h := make([]byte, 0, n+pad)
	h = append(h, npyMagic...)
	h = append(h, 1, 0)
	h = binary.LittleEndian.AppendUint16(h, uint16(len(dict)+pad+1))
	h = append(h, dict...)
	for range pad {
		h = append(h, ' ')
	}
	return append(h, '\n')
}

// Row appends one row of exactly the writer's column count. It does not
// allocate. After an error every later call returns the same error.
func (nw *NPYWriter) Row(row []float64) error {
	if nw.err != nil {
		return nw.err
	}
	if nw.closed {
		return fmt.Errorf("runio: .npy writer: row after Close: %w", ErrOptions)
	}
	if len(row) != nw.cols {
		return fmt.Errorf("runio: .npy writer: row %d has %d values, the array %d columns: %w", nw.rows+1, len(row), nw.cols, ErrRagged)
	}
	if nw.want >= 0 && nw.rows == nw.want {
		return fmt.Errorf("runio: .npy writer: row %d beyond the %d rows announced: %w", nw.rows+1, nw.want, ErrRowCount)
	}
	for j, v := range row {
		binary.LittleEndian.PutUint64(nw.buf[8*j:], math.Float64bits(v))
	}
	if _, err := nw.bw.Write(nw.buf); err != nil {
		nw.err = err
		return err
	}
	nw.rows++
	return nil
}

// Rows returns the number of rows written so far.
func (nw *NPYWriter) Rows() int { return nw.rows }

// Close flushes the buffered rows and, when the count was not known up
// front, rewrites the header with the rows written. With a count given
// to NewNPYWriter, fewer rows than announced is an error wrapping
// ErrRowCount (the array on w is short; a reader refuses it). Close does
// not close w.
func (nw *NPYWriter) Close() error {
	if nw.closed {
		return nw.err
	}
	nw.closed = true
	if nw.err != nil {
		return nw.err
	}
	if err := nw.bw.Flush(); err != nil {
		nw.err = err
		return err
	}
	if nw.want >= 0 {
		if nw.rows != nw.want {
			nw.err = fmt.Errorf("runio: .npy writer: %d rows written of the %d announced: %w", nw.rows, nw.want, ErrRowCount)
		}
		return nw.err
	}
	end, err := nw.seek.Seek(0, io.SeekCurrent)
	if err == nil {
		_, err = nw.seek.Seek(nw.start, io.SeekStart)
	}
	head := npyHeaderBytes(nw.cols, nw.rows)
	if err == nil {
		_, err = nw.seek.Write(head)
	}
	if err == nil {
		// A file opened for appending writes at its end whatever the
		// position: the header would land after the data.
		var at int64
		if at, err = nw.seek.Seek(0, io.SeekCurrent); err == nil && at != nw.start+int64(len(head)) {
			err = fmt.Errorf("the header went to byte %d, not %d (is the output opened for appending?)", at-int64(len(head)), nw.start)
		}
	}
	if err == nil {
		_, err = nw.seek.Seek(end, io.SeekStart)
	}
	if err != nil {
		nw.err = fmt.Errorf("runio: .npy writer: patching the row count: %w", err)
	}
	return nw.err
}
