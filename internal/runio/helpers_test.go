package runio

import (
	"bytes"
	"encoding/binary"
	"fmt"
	"math"
	"strings"
)

// npySpec describes a .npy file for the tests; makeNPY writes it following
// the published layout of the format (magic, version, little-endian header
// length, a Python dict literal padded with spaces to a multiple of 64
// bytes and ending in a newline, then the raw data).
type npySpec struct {
	major   byte   // 1, 2 or 3
	descr   string // '<f8', '>f4', ...
	fortran bool
	shape   string // "(3, 2)"
	rows    [][]float64
	cut     int // bytes removed from the end of the data
	extra   int // bytes added after the data
}

func makeNPY(s npySpec) []byte {
	order := "False"
	if s.fortran {
		order = "True"
	}
	dict := fmt.Sprintf("{'descr': '%s', 'fortran_order': %s, 'shape': %s, }", s.descr, order, s.shape)
	pre := 10
	if s.major >= 2 {
		pre = 12
	}
	pad := 64 - (pre+len(dict)+1)%64
	dict += strings.Repeat(" ", pad%64) + "\n"
	var b bytes.Buffer
	b.WriteString("\x93NUMPY")
	b.WriteByte(s.major)
	b.WriteByte(0)
	if s.major >= 2 {
		binary.Write(&b, binary.LittleEndian, uint32(len(dict)))
	} else {
		binary.Write(&b, binary.LittleEndian, uint16(len(dict)))
	}
	b.WriteString(dict)
	var bo binary.ByteOrder = binary.LittleEndian
	if len(s.descr) > 0 && s.descr[0] == '>' {
		bo = binary.BigEndian
	}
	put := func(v float64) {
		if strings.HasSuffix(s.descr, "4") {
			var w [4]byte
			bo.PutUint32(w[:], math.Float32bits(float32(v)))
			b.Write(w[:])
		} else {
			var w [8]byte
			bo.PutUint64(w[:], math.Float64bits(v))
			b.Write(w[:])
		}
	}
	if len(s.rows) > 0 {
		if s.fortran {
			for j := range s.rows[0] {
				for i := range s.rows {
					put(s.rows[i][j])
				}
			}
		} else {
			for _, r := range s.rows {
				for _, v := range r {
					put(v)
				}
			}
		}
	}
	out := b.Bytes()
	out = out[:len(out)-s.cut]
	return append(out, make([]byte, s.extra)...)
}

// npy1D writes a 1-D float64 array.
func npy1D(v []float64) []byte {
	rows := make([][]float64, len(v))
	for i := range v {
		rows[i] = []float64{v[i]}
	}
	return makeNPY(npySpec{major: 1, descr: "<f8", shape: fmt.Sprintf("(%d,)", len(v)), rows: rows})
}

func itoa(i int) string { return fmt.Sprint(i) }

func nan() float64 { return math.NaN() }
