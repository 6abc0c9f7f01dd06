package plumb

import (
	"encoding/json"
	"errors"
	"math"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

// TestShardRange: the blocks of n shards partition 0..total in order, and
// their sizes differ by at most one (exact identities of the split).
func TestShardRange(t *testing.T) {
	for _, total := range []int{0, 1, 3, 4, 7, 25, 1000} {
		for n := 1; n <= 9; n++ {
			next, small, large := 0, total, 0
			for i := 1; i <= n; i++ {
				lo, hi := Shard{Index: i, Count: n}.Range(total)
				require.Equalf(t, next, lo, "total %d, shard %d/%d starts where the previous ended", total, i, n)
				require.GreaterOrEqual(t, hi, lo)
				small, large = min(small, hi-lo), max(large, hi-lo)
				next = hi
			}
			assert.Equalf(t, total, next, "total %d in %d shards: covered", total, n)
			assert.LessOrEqualf(t, large-small, 1, "total %d in %d shards: balanced", total, n)
		}
	}
	lo, hi := Shard{}.Range(12)
	assert.Equal(t, [2]int{0, 12}, [2]int{lo, hi}, "the whole run takes everything")
}

// TestParseShard: i/n parses; everything else is refused with ErrShard.
func TestParseShard(t *testing.T) {
	s, err := ParseShard(" 2/4 ")
	require.NoError(t, err)
	assert.Equal(t, Shard{Index: 2, Count: 4}, s)
	assert.Equal(t, "2/4", s.String())
	for _, bad := range []string{"", "2", "0/4", "5/4", "-1/4", "1/0", "a/4", "1/b", "1/2/3", "1/2000000", "0/0"} {
		_, err := ParseShard(bad)
		assert.Truef(t, errors.Is(err, ErrShard), "%q: %v", bad, err)
	}
}

// TestShardFromEnv: the Slurm array and Kubernetes indexed Job variables
// give the shard and say where it came from; irregular, conflicting and
// incomplete environments are refused.
func TestShardFromEnv(t *testing.T) {
	for _, c := range []struct {
		name string
		env  map[string]string
		want Shard
		from string
		err  string
	}{
		{"slurm 0-3", map[string]string{"SLURM_ARRAY_TASK_ID": "0", "SLURM_ARRAY_TASK_MIN": "0", "SLURM_ARRAY_TASK_MAX": "3", "SLURM_ARRAY_TASK_COUNT": "4"}, Shard{1, 4}, "SLURM_ARRAY_TASK_ID=0", ""},
		{"slurm 1-4", map[string]string{"SLURM_ARRAY_TASK_ID": "4", "SLURM_ARRAY_TASK_MIN": "1", "SLURM_ARRAY_TASK_MAX": "4"}, Shard{4, 4}, "SLURM_ARRAY_TASK_MAX=4", ""},
		{"slurm step", map[string]string{"SLURM_ARRAY_TASK_ID": "8", "SLURM_ARRAY_TASK_MIN": "0", "SLURM_ARRAY_TASK_MAX": "12", "SLURM_ARRAY_TASK_STEP": "4", "SLURM_ARRAY_TASK_COUNT": "4"}, Shard{3, 4}, "SLURM_ARRAY_TASK_STEP=4", ""},
		{"slurm list", map[string]string{"SLURM_ARRAY_TASK_ID": "3", "SLURM_ARRAY_TASK_MIN": "1", "SLURM_ARRAY_TASK_MAX": "7", "SLURM_ARRAY_TASK_COUNT": "3"}, Shard{}, "", "irregular"},
		{"slurm no min", map[string]string{"SLURM_ARRAY_TASK_ID": "3"}, Shard{}, "", "SLURM_ARRAY_TASK_MIN is not set"},
		{"slurm junk", map[string]string{"SLURM_ARRAY_TASK_ID": "x"}, Shard{}, "", "not a whole number"},
		{"kube", map[string]string{"JOB_COMPLETION_INDEX": "0", "PLUMB_SHARD_COUNT": "3"}, Shard{1, 3}, "JOB_COMPLETION_INDEX=0, PLUMB_SHARD_COUNT=3", ""},
		{"kube no count", map[string]string{"JOB_COMPLETION_INDEX": "0"}, Shard{}, "", "PLUMB_SHARD_COUNT is not set"},
		{"kube past count", map[string]string{"JOB_COMPLETION_INDEX": "3", "PLUMB_SHARD_COUNT": "3"}, Shard{}, "", "must lie in 0..2"},
		{"both", map[string]string{"JOB_COMPLETION_INDEX": "0", "SLURM_ARRAY_TASK_ID": "0"}, Shard{}, "", "two schedulers"},
		{"none", map[string]string{}, Shard{}, "", "neither"},
	} {
		t.Run(c.name, func(t *testing.T) {
			s, from, err := ShardFromEnv(func(k string) (string, bool) { v, ok := c.env[k]; return v, ok })
			if c.err != "" {
				require.Error(t, err)
				assert.True(t, errors.Is(err, ErrShard))
				assert.Contains(t, err.Error(), c.err)
				return
			}
			require.NoError(t, err)
			assert.Equal(t, c.want, s)
			assert.Contains(t, from, c.from)
		})
	}
}

// TestExactFloat: every float64, NaN and the infinities included, reads
// back from its JSON to the same bits (an exact identity).
func TestExactFloat(t *testing.T) {
	for _, v := range []float64{0, math.Copysign(0, -1), 1, -0.1, math.Pi, math.SmallestNonzeroFloat64, math.MaxFloat64, math.Inf(1), math.Inf(-1), math.NaN(), 2.8499999999999996} {
		b, err := json.Marshal(ExactFloat(v))
		require.NoError(t, err)
		var back ExactFloat
		require.NoError(t, json.Unmarshal(b, &back))
		assert.Equalf(t, math.Float64bits(v), math.Float64bits(float64(back)), "%v via %s", v, b)
	}
	var f ExactFloat
	assert.Error(t, json.Unmarshal([]byte(`"inf"`), &f))
}

// FuzzReadShardPiece: no input panics the shard file reader; what it
// accepts has one record per unit of its block.
func FuzzReadShardPiece(f *testing.F) {
	head := `{"format":"plumb shard file 1","plumb_version":"v","command":"scan","args":[],"shard":{"index":1,"count":2},"units":"parameter points","total":3,"first":0,"end":2}`
	f.Add(head + "\n{\"index\":0}\n{\"index\":1}\n{\"status\":\"completed\",\"error\":\"\",\"done\":2}\n")
	f.Add(head + "\n{\"index\":0}\n")
	f.Add(head + "\n{\"status\":\"canceled\",\"error\":\"x\",\"done\":0}\n")
	f.Add("")
	f.Add("{}\n")
	ens := strings.Replace(head, "parameter points", "ensemble units", 1)
	f.Add(ens + "\n{\"unit\":0,\"releases\":{\"times\":[0,1],\"separations\":[[1,2]]}}\n{\"unit\":1,\"group\":{\"index\":0,\"first\":1,\"count\":1,\"dim\":1,\"times\":[0],\"states\":[[1,2]],\"status\":\"completed\"}}\n{\"status\":\"completed\",\"error\":\"\",\"done\":2}\n")
	f.Add(head + "\n{\"unit\":0,\"releases\":null}\n{\"unit\":1,\"group\":{\"index\":0,\"times\":[0],\"states\":[]}}\n{\"status\":\"completed\",\"error\":\"\",\"done\":2}\n")
	f.Add(head + "\n{\"index\":0,\"label\":\"reference\",\"t\":[0],\"y\":[1,2],\"names\":[\"x\"]}\n{\"index\":1,\"params\":[1,2]}\n{\"status\":\"completed\",\"error\":\"\",\"done\":2}\n")
	f.Fuzz(func(t *testing.T, text string) {
		p, err := ReadShardPiece("f", strings.NewReader(text))
		if err != nil {
			if !errors.Is(err, ErrShard) {
				t.Fatalf("error without ErrShard: %v", err)
			}
			return
		}
		if len(p.Records) != p.Header.End-p.Header.First {
			t.Fatalf("%d records for %d..%d", len(p.Records), p.Header.First, p.Header.End)
		}
		// The decoders of each command's records refuse what is not
		// theirs, without a panic.
		set, err := JoinShards([]*ShardPiece{p})
		if err != nil {
			return
		}
		if _, err := ScanRows(set, 1); err != nil && !errors.Is(err, ErrShard) {
			t.Fatalf("scan rows: %v", err)
		}
		if _, err := ProgramRuns(set, nil); err != nil && !errors.Is(err, ErrShard) {
			t.Fatalf("runs: %v", err)
		}
		if _, err := EnsembleParts(set); err != nil && !errors.Is(err, ErrShard) {
			t.Fatalf("ensemble parts: %v", err)
		}
	})
}

// FuzzShardFromEnv: no environment panics ShardFromEnv; a shard it
// returns is valid.
func FuzzShardFromEnv(f *testing.F) {
	f.Add("2", "0", "3", "4", "", "", "")
	f.Add("8", "0", "12", "4", "4", "", "")
	f.Add("", "", "", "", "", "1", "3")
	f.Add("3", "1", "7", "3", "", "", "")
	f.Fuzz(func(t *testing.T, id, lo, hi, count, step, kube, kcount string) {
		env := map[string]string{SlurmTaskIDEnv: id, SlurmTaskMinEnv: lo, SlurmTaskMaxEnv: hi, SlurmTaskCountEnv: count,
			SlurmTaskStepEnv: step, KubeIndexEnv: kube, ShardCountEnv: kcount}
		s, _, err := ShardFromEnv(func(k string) (string, bool) { v := env[k]; return v, v != "" })
		if err != nil {
			if !errors.Is(err, ErrShard) {
				t.Fatalf("error without ErrShard: %v", err)
			}
			return
		}
		if s.Whole() || s.Validate() != nil {
			t.Fatalf("invalid shard %v", s)
		}
	})
}

// FuzzParseShard: no input panics ParseShard; what it accepts prints back
// to the same shard.
func FuzzParseShard(f *testing.F) {
	for _, s := range []string{"1/1", "2/4", "0/4", "4/3", "x", "1/", "/1", " 3 / 9 "} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, text string) {
		s, err := ParseShard(text)
		if err != nil {
			return
		}
		back, err := ParseShard(s.String())
		if err != nil || back != s {
			t.Fatalf("%q -> %v -> %v, %v", text, s, back, err)
		}
	})
}
