package main

import (
	"errors"
	"io"
	"os"
	"path/filepath"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

// A write that fails part way (as on a full disk) leaves the previous file
// whole and no temporary file behind; one that succeeds replaces it.
func TestWriteFileAtomic(t *testing.T) {
	dir := t.TempDir()
	name := filepath.Join(dir, "curves.svg")
	require.NoError(t, os.WriteFile(name, []byte("previous picture"), 0o644))

	full := errors.New("no space left on device")
	err := writeFileAtomic(name, func(w io.Writer) error {
		if _, err := w.Write([]byte("half of a new pic")); err != nil {
			return err
		}
		return full
	})
	require.ErrorIs(t, err, full)
	got, err := os.ReadFile(name)
	require.NoError(t, err)
	assert.Equal(t, "previous picture", string(got))
	entries, err := os.ReadDir(dir)
	require.NoError(t, err)
	assert.Len(t, entries, 1, "the temporary file is removed")

	require.NoError(t, writeFileAtomic(name, func(w io.Writer) error {
		_, err := w.Write([]byte("new picture"))
		return err
	}))
	got, err = os.ReadFile(name)
	require.NoError(t, err)
	assert.Equal(t, "new picture", string(got))
	st, err := os.Stat(name)
	require.NoError(t, err)
	assert.Equal(t, os.FileMode(0o644), st.Mode().Perm())
}

// The plot goes through it: a picture drawn into a directory that cannot
// be written fails with an error and leaves nothing.
func TestPlotIntoMissingDirectory(t *testing.T) {
	name := filepath.Join(t.TempDir(), "no-such-dir", "p.svg")
	r := plumbRun(t, "solve", "--t1", "1", "--plot", name, "--quiet")
	assert.Equal(t, exitFailed, r.code, r.stderr)
	assert.Contains(t, r.stderr, "--plot")
	_, err := os.Stat(name)
	assert.True(t, os.IsNotExist(err))
}
