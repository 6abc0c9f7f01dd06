package plumb

import (
	"bytes"
	"context"
	"encoding/json"
	"errors"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

// reportJSON is the report with its members' run, as JSON (floats in the
// shortest form that reads back to the same bits), for bit comparisons.
func reportJSON(t *testing.T, rep *EnsembleReport) string {
	t.Helper()
	b, err := json.Marshal(struct {
		Rep     *EnsembleReport
		Samples any
		Stats   any
		Members int
	}{rep, rep.Run.Samples, rep.Run.Stats, rep.Run.Members})
	require.NoError(t, err)
	return string(b)
}

// TestEnsembleShardsMergeToEnsemble: pieces of an ensemble, computed
// apart, written as shard files, read back and joined, give Ensemble's
// report bit for bit (an exact identity), for several splits, with and
// without releases.
func TestEnsembleShardsMergeToEnsemble(t *testing.T) {
	sys, err := Model("lorenz")
	require.NoError(t, err)
	for _, c := range []struct {
		name string
		s    EnsembleSettings
		n    int
	}{
		{"releases, 4 groups in 4 pieces", EnsembleSettings{Members: 8, Delta: 1e-6, Lockstep: 2, Releases: 6, Seed: 3}, 4},
		{"releases, 3 groups in 2 pieces", EnsembleSettings{Members: 7, Delta: 1e-6, Lockstep: 3, Releases: 4, Seed: 3}, 2},
		{"no releases, more pieces than units", EnsembleSettings{Members: 4, Delta: 1e-6, Lockstep: 2, Releases: -1, Tol: 0.5}, 5},
	} {
		t.Run(c.name, func(t *testing.T) {
			const t1 = 3
			s := c.s
			whole, err := Ensemble(context.Background(), sys, t1, &s)
			require.NoError(t, err)
			var files []NamedReader
			for i := 1; i <= c.n; i++ {
				sh := Shard{Index: i, Count: c.n}
				part, err := EnsembleShard(context.Background(), sys, t1, &s, sh)
				require.NoError(t, err)
				var buf bytes.Buffer
				sw, err := NewShardWriter(&buf, ShardHeader{Version: "test", Command: "ensemble", Shard: ShardJSON{i, c.n},
					Units: EnsembleUnitsName, Total: part.Total, First: part.First, End: part.End})
				require.NoError(t, err)
				require.NoError(t, WriteEnsemblePart(sw, part))
				require.NoError(t, sw.Close("completed", nil))
				files = append(files, NamedReader{Name: sh.String(), R: &buf})
			}
			set, err := ReadShards(files)
			require.NoError(t, err)
			parts, err := EnsembleParts(set)
			require.NoError(t, err)
			merged, err := MergeEnsemble(sys, t1, &s, parts)
			require.NoError(t, err)
			assert.Equal(t, reportJSON(t, whole), reportJSON(t, merged))
			if len(parts) > 1 {
				_, err = MergeEnsemble(sys, t1, &s, parts[1:])
				assert.True(t, errors.Is(err, ErrShard), "a missing piece: %v", err)
			}
		})
	}
}

// TestEnsembleLockstepWhole: Lockstep at or above the number of members
// is one group, the same run bit for bit as Lockstep 0 (exact identity).
func TestEnsembleLockstepWhole(t *testing.T) {
	sys, err := Model("lorenz")
	require.NoError(t, err)
	a, err := Ensemble(context.Background(), sys, 2, &EnsembleSettings{Members: 5, Delta: 1e-6, Releases: 3})
	require.NoError(t, err)
	b, err := Ensemble(context.Background(), sys, 2, &EnsembleSettings{Members: 5, Delta: 1e-6, Releases: 3, Lockstep: 9})
	require.NoError(t, err)
	assert.Equal(t, reportJSON(t, a), reportJSON(t, b))
	_, err = Ensemble(context.Background(), sys, 2, &EnsembleSettings{Members: 5, Delta: 1e-6, Lockstep: -1})
	assert.Error(t, err)
}
