package integrate

import (
	"context"
	"errors"
	"testing"

	"github.com/stretchr/testify/require"
)

// Samples on a long grid grow in blocks: they cross several block
// boundaries here, and each must equal the dense output at its time bit for
// bit (exact identity: Solve samples with the same interpolant as At).
func TestSamplesGrowInBlocks(t *testing.T) {
	p := Problem{F: lorenzField(), Y0: []float64{1, 1, 1}}
	sol, err := Solve(context.Background(), p, 30, nil, &Settings{RelTol: 1e-8, AbsTol: 1e-8, Every: 0.01})
	require.NoError(t, err)
	require.Len(t, sol.Samples, 3001, "t = 0, 0.01, ..., 30")
	y := make([]float64, 3)
	for i, s := range sol.Samples {
		sol.At(s.T, y)
		require.Equalf(t, y, s.Y, "sample %d at t=%v", i, s.T)
		require.Lenf(t, s.Y, 3, "sample %d", i)
		require.Equalf(t, 3, cap(s.Y), "sample %d: Y must not reach into its neighbour's storage", i)
	}
}

// A grid of 10^8 samples is not stored before the run starts: a run
// canceled at once returns its one sample without having made room for
// the rest (it used to zero 3 GB first, deaf to Ctrl-C meanwhile).
func TestSamplesNotPreallocated(t *testing.T) {
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	p := Problem{F: lorenzField(), Y0: []float64{1, 1, 1}}
	sol, err := Solve(ctx, p, 1e8, nil, &Settings{Every: 1, MaxSteps: 1 << 40})
	require.True(t, errors.Is(err, context.Canceled), "err = %v", err)
	require.Len(t, sol.Samples, 1)
	require.LessOrEqual(t, cap(sol.Samples), firstSamples)
}
