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

// A system file that is a FIFO with no writer blocks open(2) for ever; a
// canceled run must still end, with exit status 1 and a message naming the
// file, for every command that reads --file.
func TestFileFIFOCanceled(t *testing.T) {
	fifo := filepath.Join(t.TempDir(), "waits.json")
	require.NoError(t, syscall.Mkfifo(fifo, 0o600))
	for _, cmd := range []string{"solve", "spectrum", "trust", "models"} {
		t.Run(cmd, func(t *testing.T) {
			ctx, cancel := context.WithCancel(context.Background())
			timer := time.AfterFunc(50*time.Millisecond, cancel)
			defer timer.Stop()
			done := make(chan result, 1)
			go func() { done <- plumbRunCtx(t, ctx, cmd, "--file", fifo, "--quiet") }()
			select {
			case r := <-done:
				assert.Equal(t, exitFailed, r.code, "stderr: %s", r.stderr)
				assert.Contains(t, r.stderr, "--file "+fifo)
				assert.Contains(t, r.stderr, "stopped before it was read")
			case <-time.After(20 * time.Second):
				t.Fatal("the run did not end after its context was canceled")
			}
		})
	}
}
