package main

import (
	"context"
	"encoding/binary"
	"math"
	"os"
	"os/exec"
	"path/filepath"
	"strconv"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

// shardScanArgs is a small orbit diagram split four ways in the tests.
var shardScanArgs = []string{"scan", "--across", "r=2.8:4:25", "--keep", "200", "--discard", "2000", "--quiet"}

// runShards runs args with --shard i/n for i = 1..n and returns the shard
// files, written to dir.
func runShards(t *testing.T, dir string, n int, args ...string) []string {
	t.Helper()
	var files []string
	for i := 1; i <= n; i++ {
		r := plumbRun(t, append(append([]string(nil), args...), "--shard", strings.Join([]string{itoa(i), itoa(n)}, "/"))...)
		require.Equalf(t, exitOK, r.code, "shard %d/%d: stderr %q", i, n, r.stderr)
		name := filepath.Join(dir, "shard-"+itoa(i)+".jsonl")
		require.NoError(t, os.WriteFile(name, []byte(r.stdout), 0o644))
		files = append(files, name)
	}
	return files
}

func itoa(i int) string { return strconv.Itoa(i) }

// TestMergeScanEveryFormat: the merge of 4 shards of a scan is the
// unsharded scan's output byte for byte, in every format (an exact
// identity: each row depends only on its parameters), whatever order the
// files are given in.
func TestMergeScanEveryFormat(t *testing.T) {
	for _, format := range []string{"table", "csv", "json", "jsonl", "npy"} {
		t.Run(format, func(t *testing.T) {
			args := append(append([]string(nil), shardScanArgs...), "--format", format)
			whole := plumbRun(t, args...)
			require.Equal(t, exitOK, whole.code, whole.stderr)
			require.NotEmpty(t, whole.stdout)
			files := runShards(t, t.TempDir(), 4, args...)
			m := plumbRun(t, "merge", files[2], files[0], files[3], files[1])
			require.Equalf(t, exitOK, m.code, "stderr %q", m.stderr)
			assert.Equal(t, whole.stdout, m.stdout, "merged %s differs from the unsharded scan", format)
		})
	}
}

// TestMergeFormatOverride: merge --format writes another format than the
// shards' command line named, as that format's unsharded run does.
func TestMergeFormatOverride(t *testing.T) {
	files := runShards(t, t.TempDir(), 3, append(shardScanArgs, "--format", "csv")...)
	whole := plumbRun(t, append(shardScanArgs, "--format", "json")...)
	m := plumbRun(t, append([]string{"merge", "--format", "json"}, files...)...)
	require.Equal(t, exitOK, m.code, m.stderr)
	assert.Equal(t, whole.stdout, m.stdout)
}

// TestMergeRefuses: missing, repeated, mismatched, unfinished and foreign
// shard files are refused with exit 2 and a message naming them; nothing
// is written on stdout.
func TestMergeRefuses(t *testing.T) {
	dir := t.TempDir()
	files := runShards(t, t.TempDir(), 4, shardScanArgs...)
	other := runShards(t, t.TempDir(), 4, append(append([]string(nil), shardScanArgs...), "--tol", "1e-7")...)
	eight := runShards(t, t.TempDir(), 8, shardScanArgs...)
	full, err := os.ReadFile(files[1])
	require.NoError(t, err)
	lines := strings.SplitAfter(strings.TrimSuffix(string(full), "\n"), "\n")
	cut := filepath.Join(dir, "cut.jsonl")
	require.NoError(t, os.WriteFile(cut, []byte(strings.Join(lines[:len(lines)-1], "")), 0o644))
	junk := filepath.Join(dir, "junk.jsonl")
	require.NoError(t, os.WriteFile(junk, []byte("t,x\n0,1\n"), 0o644))
	for _, c := range []struct {
		name  string
		files []string
		want  string
	}{
		{"missing", []string{files[0], files[1], files[3]}, "shard 3/4 missing"},
		{"repeated", []string{files[0], files[1], files[1], files[2], files[3]}, "shard 2/4 given twice"},
		{"mismatched settings", []string{files[0], files[1], other[2], files[3]}, "differ in settings"},
		{"mismatched count", []string{files[0], files[1], files[2], eight[3]}, "differ in shard count"},
		{"unfinished", []string{files[0], cut, files[2], files[3]}, "did not finish"},
		{"not a shard file", []string{junk}, "not a shard file header"},
		{"no files", nil, "no shard files"},
		{"no such file", []string{filepath.Join(dir, "nope.jsonl")}, "nope.jsonl"},
	} {
		t.Run(c.name, func(t *testing.T) {
			r := plumbRun(t, append([]string{"merge"}, c.files...)...)
			assert.Equal(t, exitUsage, r.code, r.stderr)
			assert.Contains(t, r.stderr, c.want)
			assert.Empty(t, r.stdout)
		})
	}
}

// withEnv makes lookupEnv see env alone for the rest of the test.
func withEnv(t *testing.T, env map[string]string) {
	t.Helper()
	old := lookupEnv
	lookupEnv = func(k string) (string, bool) { v, ok := env[k]; return v, ok }
	t.Cleanup(func() { lookupEnv = old })
}

// TestShardAutoKubernetes: the README's Kubernetes indexed Job runs
// --shard auto with JOB_COMPLETION_INDEX (0-based, set by Kubernetes) and
// PLUMB_SHARD_COUNT (set in the manifest): index 2 of 4 is shard 3/4, says
// so on stderr, and writes the same file as --shard 3/4.
func TestShardAutoKubernetes(t *testing.T) {
	withEnv(t, map[string]string{"JOB_COMPLETION_INDEX": "2", "PLUMB_SHARD_COUNT": "4"})
	args := []string{"scan", "--model", "logistic", "--across", "r=2.5:4:40", "--keep", "100", "--discard", "500", "--format", "csv"}
	auto := plumbRun(t, append(args, "--shard", "auto")...)
	require.Equal(t, exitOK, auto.code, auto.stderr)
	assert.Contains(t, auto.stderr, "plumb scan: shard 3/4 (from JOB_COMPLETION_INDEX=2, PLUMB_SHARD_COUNT=4)")
	fixed := plumbRun(t, append(args, "--shard", "3/4")...)
	require.Equal(t, exitOK, fixed.code, fixed.stderr)
	assert.Equal(t, fixed.stdout, auto.stdout)
	assert.Contains(t, auto.stdout, `"first":20,"end":30`, "shard 3 of 4 of 40 points: the block 20..30 (blocks of 10)")
}

// TestShardAutoSlurm: a Slurm array --array=1-4 (IDs from 1) gives task
// ID 1 the first shard; the environment is read only with --shard auto.
func TestShardAutoSlurm(t *testing.T) {
	withEnv(t, map[string]string{"SLURM_ARRAY_TASK_ID": "1", "SLURM_ARRAY_TASK_MIN": "1", "SLURM_ARRAY_TASK_MAX": "4", "SLURM_ARRAY_TASK_COUNT": "4"})
	auto := plumbRun(t, append(shardScanArgs[:len(shardScanArgs)-1:len(shardScanArgs)-1], "--shard", "auto")...)
	require.Equal(t, exitOK, auto.code, auto.stderr)
	assert.Contains(t, auto.stderr, "shard 1/4 (from SLURM_ARRAY_TASK_ID=1, SLURM_ARRAY_TASK_MIN=1, SLURM_ARRAY_TASK_COUNT=4)")
	plain := plumbRun(t, shardScanArgs...)
	require.Equal(t, exitOK, plain.code, plain.stderr)
	assert.NotContains(t, plain.stdout, "plumb shard file", "without --shard the environment is not read")
	assert.Empty(t, plain.stderr)
}

// TestShardFlagRefused: bad --shard values and an environment without a
// scheduler's variables are usage errors naming --shard.
func TestShardFlagRefused(t *testing.T) {
	withEnv(t, map[string]string{})
	for _, c := range []struct{ value, want string }{
		{"0/4", "--shard 0/4"},
		{"0/0", "--shard 0/0"},
		{"5/4", "--shard 5/4"},
		{"2", "want i/n"},
		{"a/b", "whole numbers"},
		{"auto", "neither SLURM_ARRAY_TASK_ID"},
	} {
		r := plumbRun(t, append(shardScanArgs, "--shard", c.value)...)
		assert.Equal(t, exitUsage, r.code, c.value)
		assert.Contains(t, r.stderr, c.want, c.value)
		assert.Empty(t, r.stdout, c.value)
	}
}

// execLadderArgs is an --exec ladder of six runs of a small sh/awk program
// (x = (1 + perturb + 100·rtol)·e^(0.9 t), mode b adding a slow drift,
// mode c failing), for the merge tests.
func execLadderArgs(t *testing.T) []string {
	t.Helper()
	if _, err := os.Stat("/bin/sh"); err != nil {
		t.Skip("no /bin/sh: the launch test needs a POSIX shell")
	}
	if _, err := exec.LookPath("awk"); err != nil {
		t.Skip("no awk: the ladder's program is an awk script")
	}
	script := filepath.Join(t.TempDir(), "ladder.sh")
	require.NoError(t, os.WriteFile(script, []byte(`[ "$4" = c ] && { echo "mode c stops" >&2; exit 5; }
awk -v r="$1" -v p="$2" -v m="$4" 'BEGIN { print "t,x"; for (i = 0; i <= 40; i++) { t = i * 0.25; x = (1 + p + r * 100) * exp(0.9 * t); if (m == "b") x = x * (1 + 1e-7 * t); printf "%g,%.17g\n", t, x } }' > "$3"
`), 0o644))
	return []string{"trust", "--exec", "/bin/sh " + script + " {rtol} {perturb} {out} {mode}",
		"--vary", "mode=other:a,b,c", "--tol", "1e-3", "--jobs", "2", "--quiet"}
}

// TestMergeExecLadder: the merge of 4 shards of an --exec ladder (6 runs:
// blocks of 2, 2, 1, 1) audits the joined runs into the unsharded audit's
// output byte for byte, in every format, a failed run included (an exact
// identity: the audit sees the same runs in the same order).
func TestMergeExecLadder(t *testing.T) {
	for _, format := range []string{"table", "json", "csv"} {
		t.Run(format, func(t *testing.T) {
			args := append(execLadderArgs(t), "--format", format)
			whole := plumbRun(t, args...)
			require.Equal(t, exitOK, whole.code, whole.stderr)
			require.NotEmpty(t, whole.stdout)
			files := runShards(t, t.TempDir(), 4, args...)
			data, err := os.ReadFile(files[3])
			require.NoError(t, err)
			assert.Contains(t, string(data), `"first":5,"end":6`, "shard 4/4 of 6 runs is the last run")
			assert.Contains(t, string(data), `"exit_status":5`, "the failed run is recorded with its status")
			m := plumbRun(t, "merge", files[3], files[1], files[0], files[2])
			require.Equalf(t, exitOK, m.code, "stderr %q", m.stderr)
			assert.Equal(t, whole.stdout, m.stdout, "merged %s differs from the unsharded audit", format)
		})
	}
	r := plumbRun(t, "trust", "--shard", "1/2", "--quiet")
	assert.Equal(t, exitUsage, r.code)
	assert.Contains(t, r.stderr, "--shard 1/2: applies to --exec runs only")
}

// shardEnsembleArgs is a small ensemble in 4 lockstep groups of 2: with
// the releases, 5 units for 4 pieces.
var shardEnsembleArgs = []string{"ensemble", "--t1", "4", "--members", "8", "--lockstep", "2", "--releases", "6", "--quiet"}

// TestMergeEnsembleEveryFormat: the merge of 4 shards of an ensemble
// computes the unsharded ensemble's output byte for byte, in every format
// (an exact identity: each lockstep group's run depends on its own
// members only, and merge runs the same reduction on the same numbers).
func TestMergeEnsembleEveryFormat(t *testing.T) {
	for _, format := range []string{"table", "json", "csv", "jsonl", "npy"} {
		t.Run(format, func(t *testing.T) {
			args := append(append([]string(nil), shardEnsembleArgs...), "--format", format)
			whole := plumbRun(t, args...)
			require.Equal(t, exitOK, whole.code, whole.stderr)
			require.NotEmpty(t, whole.stdout)
			files := runShards(t, t.TempDir(), 4, args...)
			m := plumbRun(t, "merge", files[1], files[3], files[2], files[0])
			require.Equalf(t, exitOK, m.code, "stderr %q", m.stderr)
			assert.Equal(t, whole.stdout, m.stdout, "merged %s differs from the unsharded ensemble", format)
		})
	}
	other := runShards(t, t.TempDir(), 4, append(append([]string(nil), shardEnsembleArgs...), "--seed", "2")...)
	files := runShards(t, t.TempDir(), 4, shardEnsembleArgs...)
	r := plumbRun(t, "merge", files[0], files[1], other[2], files[3])
	assert.Equal(t, exitUsage, r.code)
	assert.Contains(t, r.stderr, "differ in settings")
}

// npyMatchesCSV checks that the .npy array npy holds the cells of the
// CSV csvText, bit for bit (CSV writes the shortest decimal that reads back
// to the same float64; an empty cell is NaN in the array), and returns
// the .npy header.
func npyMatchesCSV(t *testing.T, npy, csvText string) string {
	t.Helper()
	b := []byte(npy)
	require.Greater(t, len(b), 10)
	require.Equal(t, "\x93NUMPY\x01\x00", string(b[:8]))
	hlen := int(binary.LittleEndian.Uint16(b[8:10]))
	require.Zero(t, (10+hlen)%64, "the header ends on a 64-byte boundary (NEP 1)")
	rows := strings.Split(strings.TrimSpace(csvText), "\n")[1:]
	cols := len(strings.Split(rows[0], ","))
	body := b[10+hlen:]
	require.Len(t, body, len(rows)*cols*8)
	for i, line := range rows {
		for j, cell := range strings.Split(line, ",") {
			got := math.Float64frombits(binary.LittleEndian.Uint64(body[(i*cols+j)*8:]))
			if cell == "" {
				assert.Truef(t, math.IsNaN(got), "row %d column %d: empty in CSV, %v in npy", i, j, got)
				continue
			}
			want, err := strconv.ParseFloat(cell, 64)
			require.NoError(t, err, cell)
			assert.Equalf(t, math.Float64bits(want), math.Float64bits(got), "row %d column %d: %s", i, j, cell)
		}
	}
	return string(b[10 : 10+hlen])
}

// TestEnsembleNPY: an ensemble's --format npy holds its CSV's rows, the
// curves and (--rows scales) the finite-size exponents.
func TestEnsembleNPY(t *testing.T) {
	for _, rows := range []string{"curves", "scales"} {
		args := append(append([]string(nil), shardEnsembleArgs...), "--rows", rows)
		c := plumbRun(t, append(args, "--format", "csv")...)
		require.Equal(t, exitOK, c.code, c.stderr)
		n := plumbRun(t, append(args, "--format", "npy")...)
		require.Equal(t, exitOK, n.code, n.stderr)
		npyMatchesCSV(t, n.stdout, c.stdout)
	}
}

// TestScanNPY: --format npy is a NumPy v1.0 '<f8' C-order array of the
// CSV's columns and rows, every value the CSV's to the bit.
func TestScanNPY(t *testing.T) {
	args := []string{"scan", "--across", "r=2:3.2:4", "--keep", "8", "--discard", "100", "--quiet"}
	csvOut := plumbRun(t, append(args, "--format", "csv")...)
	require.Equal(t, exitOK, csvOut.code, csvOut.stderr)
	npy := plumbRun(t, append(args, "--format", "npy")...)
	require.Equal(t, exitOK, npy.code, npy.stderr)
	head := npyMatchesCSV(t, npy.stdout, csvOut.stdout)
	rows := len(strings.Split(strings.TrimSpace(csvOut.stdout), "\n")) - 1
	assert.Regexp(t, `^\{'descr': '<f8', 'fortran_order': False, 'shape': \(`+itoa(rows)+` *, 4\), \} *\n$`, head)
}

// TestShardCanceled: a piece stopped by Ctrl-C writes a closing line that
// says canceled (exit 1), and merge refuses it, naming the piece.
func TestShardCanceled(t *testing.T) {
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	r := plumbRunCtx(t, ctx, append(shardScanArgs, "--shard", "2/2")...)
	assert.Equal(t, exitFailed, r.code, r.stderr)
	assert.Contains(t, r.stdout, `"status":"canceled"`)
	dir := t.TempDir()
	files := runShards(t, dir, 2, shardScanArgs...)
	require.NoError(t, os.WriteFile(files[1], []byte(r.stdout), 0o644))
	m := plumbRun(t, append([]string{"merge"}, files...)...)
	assert.Equal(t, exitUsage, m.code)
	assert.Contains(t, m.stderr, "shard 2/2 ended canceled")
}

// TestMergeChangedInput: merge refuses pieces whose --members-file has
// changed since they read it (its SHA-256 is in every shard file).
func TestMergeChangedInput(t *testing.T) {
	dir := t.TempDir()
	members := filepath.Join(dir, "members.csv")
	require.NoError(t, os.WriteFile(members, []byte("x,y,z\n1.000001,1,1\n1,1.000001,1\n"), 0o644))
	args := []string{"ensemble", "--members-file", members, "--t1", "1", "--releases", "0", "--tol", "1", "--dt", "0.5", "--lockstep", "1", "--quiet"}
	files := runShards(t, dir, 2, args...)
	whole := plumbRun(t, args...)
	ok := plumbRun(t, append([]string{"merge"}, files...)...)
	require.Equal(t, exitOK, ok.code, ok.stderr)
	assert.Equal(t, whole.stdout, ok.stdout)
	require.NoError(t, os.WriteFile(members, []byte("x,y,z\n1.000002,1,1\n1,1.000001,1\n"), 0o644))
	m := plumbRun(t, append([]string{"merge"}, files...)...)
	assert.Equal(t, exitUsage, m.code)
	assert.Contains(t, m.stderr, "--members-file "+members+" has changed since the pieces read it")
}

// TestRecordedArgs: a shard file's command line leaves out the flags that
// do not change the result (the piece, --quiet, --workers, an output file,
// progress), in both spellings, and keeps every other argument.
func TestRecordedArgs(t *testing.T) {
	got := recordedArgs([]string{"--across", "r=1:2:3", "--shard", "2/4", "--quiet", "--workers=3", "--out", "a.jsonl",
		"--progress=lines", "-shard=auto", "--keep", "5", "--workers", "2", "x"})
	assert.Equal(t, []string{"--across", "r=1:2:3", "--keep", "5", "x"}, got)
	// Pieces run with different --workers and --quiet still join.
	a := plumbRun(t, append(shardScanArgs, "--shard", "1/2", "--workers", "1")...)
	b := plumbRun(t, append(shardScanArgs[:len(shardScanArgs)-1:len(shardScanArgs)-1], "--shard", "2/2", "--workers", "2")...)
	require.Equal(t, exitOK, a.code, a.stderr)
	require.Equal(t, exitOK, b.code, b.stderr)
	dir := t.TempDir()
	fa, fb := filepath.Join(dir, "a.jsonl"), filepath.Join(dir, "b.jsonl")
	require.NoError(t, os.WriteFile(fa, []byte(a.stdout), 0o644))
	require.NoError(t, os.WriteFile(fb, []byte(b.stdout), 0o644))
	m := plumbRun(t, "merge", "--quiet", fa, fb)
	require.Equal(t, exitOK, m.code, m.stderr)
	assert.Equal(t, plumbRun(t, shardScanArgs...).stdout, m.stdout)
}

// FuzzRecordedArgs: no command line panics recordedArgs, and what it
// keeps names none of the unrecorded flags (before a "--").
func FuzzRecordedArgs(f *testing.F) {
	f.Add("--across\x00r=1:2:3\x00--shard\x002/4\x00--quiet")
	f.Add("--out=x\x00--progress\x00lines\x00--\x00--shard")
	f.Add("-shard\x00")
	f.Fuzz(func(t *testing.T, joined string) {
		out := recordedArgs(strings.Split(joined, "\x00"))
		for _, a := range out {
			if a == "--" {
				return
			}
			name, _, _ := strings.Cut(strings.TrimLeft(a, "-"), "=")
			if _, bad := unrecorded[name]; bad && strings.HasPrefix(a, "-") {
				t.Fatalf("%q kept in %q", a, out)
			}
		}
	})
}
