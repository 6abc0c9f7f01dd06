//go:build unix

package main

import (
	"context"
	"path/filepath"
	"syscall"
	"testing"
	"time"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

// TestTrustRunsFIFOCanceled: a --run FIFO with no writer does not hold the
// command past a cancellation (Ctrl-C): it ends with exit status 1.
func TestTrustRunsFIFOCanceled(t *testing.T) {
	fifo := filepath.Join(t.TempDir(), "run.csv")
	require.NoError(t, syscall.Mkfifo(fifo, 0o600))
	// The cancellation lands after 200 ms; the bound leaves room for a
	// loaded machine, far below a read that never ends.
	const stopWithin = 5 * time.Second
	ctx, cancel := context.WithTimeout(context.Background(), 200*time.Millisecond)
	defer cancel()
	start := time.Now()
	r := plumbRunCtx(t, ctx, "trust", "--run", "ref="+fifo, "--run", "tol=b.csv", "--quiet")
	assert.Less(t, time.Since(start), stopWithin)
	assert.Equal(t, exitFailed, r.code, r.stderr)
	assert.Contains(t, r.stderr, "--run")
}
