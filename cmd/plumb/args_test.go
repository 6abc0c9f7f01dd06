package main

import (
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/stretchr/testify/require"
)

// TestFlagsAfterArguments: flags that follow a command's positional
// arguments take effect before the run, as those before them do (an
// --out after FILE once went unnoticed and the result went to stdout).
func TestFlagsAfterArguments(t *testing.T) {
	dir := t.TempDir()
	out := filepath.Join(dir, "report.json")
	r := plumbRun(t, "series", seriesFile, "--column", "x", "--surrogates", "0", "--format", "json", "--out", out)
	require.Equal(t, exitOK, r.code, r.stderr)
	require.Empty(t, r.stdout, "the result goes to --out, not stdout")
	b, err := os.ReadFile(out)
	require.NoError(t, err)
	require.True(t, strings.HasPrefix(string(b), "{"), "the --out file holds the JSON result")

	// The pieces of a split scan, then plumb merge with a flag after them.
	var pieces []string
	for _, p := range []string{"1/2", "2/2"} {
		name := filepath.Join(dir, strings.Replace(p, "/", "of", 1)+".shard")
		r := plumbRun(t, "scan", "--across", "r=3.5:4:10", "--keep", "10", "--format", "csv", "--shard", p, "--out", name, "--quiet")
		require.Equal(t, exitOK, r.code, r.stderr)
		pieces = append(pieces, name)
	}
	r = plumbRun(t, append(append([]string{"merge"}, pieces...), "--quiet")...)
	require.Equal(t, exitOK, r.code, r.stderr)
	require.Empty(t, r.stderr, "--quiet after the files silences stderr")
	whole := plumbRun(t, "scan", "--across", "r=3.5:4:10", "--keep", "10", "--format", "csv", "--quiet")
	require.Equal(t, whole.stdout, r.stdout, "the merge of the pieces is the unsharded scan's bytes")

	// After "--" everything is an argument, even what looks like a flag.
	r = plumbRun(t, "merge", "--", "--quiet")
	require.Equal(t, exitUsage, r.code)
	require.Contains(t, r.stderr, "--quiet", "the file named --quiet is what merge could not open")
}

// TestUnsplitInArrayJob: a scan without --shard inside a Slurm array task
// computes the whole run, as outside one, and says on stderr how to split it.
func TestUnsplitInArrayJob(t *testing.T) {
	args := []string{"scan", "--across", "r=3.5:4:10", "--keep", "10", "--format", "csv"}
	outside := plumbRun(t, args...)
	require.Equal(t, exitOK, outside.code, outside.stderr)
	require.NotContains(t, outside.stderr, "--shard")
	withEnv(t, map[string]string{"SLURM_ARRAY_TASK_ID": "2", "SLURM_ARRAY_TASK_MIN": "0", "SLURM_ARRAY_TASK_COUNT": "4"})
	inside := plumbRun(t, args...)
	require.Equal(t, exitOK, inside.code, inside.stderr)
	require.Equal(t, outside.stdout, inside.stdout, "the whole scan, unsplit")
	require.Contains(t, inside.stderr, "SLURM_ARRAY_TASK_ID=2 is set but --shard is not")
	quiet := plumbRun(t, append(args, "--quiet")...)
	require.Empty(t, quiet.stderr, "--quiet silences the warning")
}
