package runio

import (
	"bytes"
	"errors"
	"io"
	"math"
	"os"
	"path/filepath"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

// npyWriteRows are values whose bits a writer could lose: a subnormal, a
// negative zero, the largest float64, a value with all 52 fraction bits set.
var npyWriteRows = [][]float64{
	{0, 5e-324, math.Copysign(0, -1), math.MaxFloat64},
	{0.1, -1.0 / 3, math.Nextafter(1, 2), -math.SmallestNonzeroFloat64},
	{1e300, math.Pi, -math.E, 123456789.125},
}

func writeNPYRows(t *testing.T, w io.Writer, rows int, data [][]float64) {
	t.Helper()
	nw, err := NewNPYWriter(w, len(data[0]), rows)
	require.NoError(t, err)
	for _, r := range data {
		require.NoError(t, nw.Row(r))
	}
	assert.Equal(t, len(data), nw.Rows())
	require.NoError(t, nw.Close())
}

func TestNPYWriterRoundTrip(t *testing.T) {
	// Exact identity: a .npy body is the IEEE 754 bits, so reading back
	// gives every value bit for bit.
	dir := t.TempDir()
	p := filepath.Join(dir, "run.npy")
	f, err := os.Create(p)
	require.NoError(t, err)
	writeNPYRows(t, f, -1, npyWriteRows)
	require.NoError(t, f.Close())

	b, err := os.ReadFile(p)
	require.NoError(t, err)
	head := len(b) - 8*4*len(npyWriteRows)
	assert.Equal(t, 0, head%64, "NumPy aligns the data to 64 bytes (the .npy format description)")
	assert.Contains(t, string(b[:head]), "'shape': (3                   , 4)")

	r, err := Open(p, Options{})
	require.NoError(t, err)
	var wantT, wantY []float64
	for _, row := range npyWriteRows {
		wantT = append(wantT, row[0])
		wantY = append(wantY, row[1:]...)
	}
	assert.True(t, equalFloats(wantT, r.T), "times %v, want %v", r.T, wantT)
	assert.True(t, equalFloats(wantY, r.Y), "values %v, want %v", r.Y, wantY)

	// A count given up front writes the same bytes to a stream.
	var buf bytes.Buffer
	writeNPYRows(t, &buf, len(npyWriteRows), npyWriteRows)
	assert.Equal(t, b, buf.Bytes())
}

func TestNPYWriterAfterPrefix(t *testing.T) {
	// The header is patched where the array began, not at offset 0.
	f, err := os.Create(filepath.Join(t.TempDir(), "x"))
	require.NoError(t, err)
	defer f.Close()
	_, err = f.WriteString("prefix")
	require.NoError(t, err)
	writeNPYRows(t, f, -1, npyWriteRows)
	_, err = f.WriteString("tail")
	require.NoError(t, err, "Close leaves the position at the end of the data")
	b, err := os.ReadFile(f.Name())
	require.NoError(t, err)
	require.True(t, bytes.HasPrefix(b, []byte("prefix")) && bytes.HasSuffix(b, []byte("tail")))
	r, err := ReadNPY(bytes.NewReader(b[6:len(b)-4]), Options{})
	require.NoError(t, err)
	assert.Equal(t, len(npyWriteRows), r.Len())
}

func TestNPYWriterErrors(t *testing.T) {
	// Unknown count on a writer that cannot seek: refused before a byte.
	var buf bytes.Buffer
	_, err := NewNPYWriter(&buf, 3, -1)
	assert.ErrorIs(t, err, ErrNoSeek)
	assert.Zero(t, buf.Len())

	// A pipe is an *os.File whose Seek fails.
	pr, pw, err := os.Pipe()
	require.NoError(t, err)
	defer pr.Close()
	defer pw.Close()
	_, err = NewNPYWriter(pw, 3, -1)
	assert.ErrorIs(t, err, ErrNoSeek)

	_, err = NewNPYWriter(&buf, 0, 1)
	assert.ErrorIs(t, err, ErrOptions)

	nw, err := NewNPYWriter(&buf, 2, 1)
	require.NoError(t, err)
	assert.ErrorIs(t, nw.Row([]float64{1, 2, 3}), ErrRagged)
	require.NoError(t, nw.Row([]float64{1, 2}))
	assert.ErrorIs(t, nw.Row([]float64{3, 4}), ErrRowCount)
	require.NoError(t, nw.Close())

	nw, err = NewNPYWriter(&buf, 2, 5)
	require.NoError(t, err)
	require.NoError(t, nw.Row([]float64{1, 2}))
	assert.ErrorIs(t, nw.Close(), ErrRowCount, "fewer rows than announced")

	// A failing writer: the error sticks.
	nw, err = NewNPYWriter(failWriter{}, 1, 1<<20)
	require.NoError(t, err)
	var werr error
	for i := 0; i < 1<<14 && werr == nil; i++ {
		werr = nw.Row([]float64{1})
	}
	assert.ErrorIs(t, werr, errFail)
	assert.ErrorIs(t, nw.Row([]float64{1}), errFail)
	assert.ErrorIs(t, nw.Close(), errFail)
}

var errFail = errors.New("disk full")

type failWriter struct{}

func (failWriter) Write([]byte) (int, error) { return 0, errFail }

func TestNPYWriterAppendMode(t *testing.T) {
	// A file opened for appending cannot be patched: Close says so.
	p := filepath.Join(t.TempDir(), "a.npy")
	f, err := os.OpenFile(p, os.O_CREATE|os.O_WRONLY|os.O_APPEND, 0o600)
	require.NoError(t, err)
	defer f.Close()
	nw, err := NewNPYWriter(f, 2, -1)
	require.NoError(t, err)
	require.NoError(t, nw.Row([]float64{1, 2}))
	assert.ErrorContains(t, nw.Close(), "appending")
}

func TestNPYWriterEmpty(t *testing.T) {
	f, err := os.Create(filepath.Join(t.TempDir(), "e.npy"))
	require.NoError(t, err)
	defer f.Close()
	nw, err := NewNPYWriter(f, 3, -1)
	require.NoError(t, err)
	require.NoError(t, nw.Close())
	b, err := os.ReadFile(f.Name())
	require.NoError(t, err)
	assert.Contains(t, string(b), "'shape': (0                   , 3)")
	_, err = ReadNPY(bytes.NewReader(b), Options{})
	assert.ErrorIs(t, err, ErrEmpty)
}

func TestNPYWriterRowAllocs(t *testing.T) {
	nw, err := NewNPYWriter(io.Discard, 4, 1<<20)
	require.NoError(t, err)
	row := []float64{1, 2, 3, 4}
	allocs := testing.AllocsPerRun(1000, func() {
		if err := nw.Row(row); err != nil {
			t.Fatal(err)
		}
	})
	assert.Zero(t, allocs, "Row must not allocate")
}
