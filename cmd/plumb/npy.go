package main

import (
	"bufio"
	"encoding/binary"
	"fmt"
	"io"
	"math"
	"strings"
)

// npyWriter writes a 2-D NumPy .npy array of little-endian float64
// ('<f8', C order), format version 1.0, row by row. The shape is fixed
// up front (the header comes first); Close checks that exactly that many
// rows came.
//
// Format: NumPy Enhancement Proposal 1 (the .npy format): the magic
// "\x93NUMPY", version 1.0, a little-endian uint16 header length, a
// Python dict literal padded with spaces to a multiple of 64 bytes and
// ended by a newline, then the data.
type npyWriter struct {
	bw         *bufio.Writer
	rows, cols int
	done       int
	buf        [8]byte
}

// newNPYWriter writes the header of a rows×cols array.
func newNPYWriter(w io.Writer, rows, cols int) (*npyWriter, error) {
	dict := fmt.Sprintf("{'descr': '<f8', 'fortran_order': False, 'shape': (%d, %d), }", rows, cols)
	// magic (6) + version (2) + length (2) + dict + padding + '\n' ≡ 0 (mod 64)
	pad := 64 - (10+len(dict)+1)%64
	if pad == 64 {
		pad = 0
	}
	head := dict + strings.Repeat(" ", pad) + "\n"
	if len(head) > math.MaxUint16 {
		return nil, fmt.Errorf("npy header of %d bytes", len(head))
	}
	bw := bufio.NewWriterSize(w, 64<<10)
	bw.WriteString("\x93NUMPY\x01\x00")
	var n [2]byte
	binary.LittleEndian.PutUint16(n[:], uint16(len(head)))
	bw.Write(n[:])
	if _, err := bw.WriteString(head); err != nil {
		return nil, err
	}
	return &npyWriter{bw: bw, rows: rows, cols: cols}, nil
}

// row writes one row of cols values.
func (nw *npyWriter) row(vals ...float64) error {
	if len(vals) != nw.cols || nw.done >= nw.rows {
		return fmt.Errorf("npy row %d of %d values: the array is %d×%d", nw.done+1, len(vals), nw.rows, nw.cols)
	}
	for _, v := range vals {
		binary.LittleEndian.PutUint64(nw.buf[:], math.Float64bits(v))
		if _, err := nw.bw.Write(nw.buf[:]); err != nil {
			return err
		}
	}
	nw.done++
	return nil
}

// close flushes the array, which must be whole.
func (nw *npyWriter) close() error {
	if nw.done != nw.rows {
		return fmt.Errorf("npy array of %d rows: %d written", nw.rows, nw.done)
	}
	return nw.bw.Flush()
}
