package main

import (
	"os"
	"path/filepath"
	"regexp"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

// readmeBlock returns the lines between the README's markers <!-- name -->
// and <!-- end name -->, without the code fence.
func readmeBlock(t *testing.T, name string) []string {
	t.Helper()
	b, err := os.ReadFile(filepath.Join("..", "..", "README.md"))
	require.NoError(t, err)
	text := string(b)
	open, end := "<!-- "+name+" -->\n", "<!-- end "+name+" -->"
	i, j := strings.Index(text, open), strings.Index(text, end)
	require.Truef(t, i >= 0 && j > i, "README.md has no block between %q and %q", open, end)
	var lines []string
	for _, l := range strings.Split(text[i+len(open):j], "\n") {
		if !strings.HasPrefix(l, "```") && l != "" {
			lines = append(lines, l)
		}
	}
	return lines
}

// TestREADMEKubernetesJob: the README's Kubernetes indexed Job runs its
// plumb command in each pod with JOB_COMPLETION_INDEX = 0..completions-1
// (Kubernetes sets it) and the manifest's PLUMB_SHARD_COUNT: each pod
// says it is shard index+1 of completions, from those variables, and the
// pods' files merge into the bytes of the unsharded command.
func TestREADMEKubernetesJob(t *testing.T) {
	lines := readmeBlock(t, "kubernetes indexed job")
	var completions, count, command string
	for k, l := range lines {
		s := strings.TrimSpace(l)
		switch {
		case strings.HasPrefix(s, "completions:"):
			completions = strings.TrimSpace(strings.TrimPrefix(s, "completions:"))
		case s == "- name: PLUMB_SHARD_COUNT" && k+1 < len(lines):
			count = strings.Trim(strings.TrimSpace(strings.TrimPrefix(strings.TrimSpace(lines[k+1]), "value:")), `"`)
		case strings.HasPrefix(s, "- plumb "):
			command = strings.TrimPrefix(s, "- ")
		}
	}
	require.Equal(t, "4", completions, "the manifest's spec.completions")
	require.Equal(t, completions, count, "PLUMB_SHARD_COUNT must equal spec.completions")
	m := regexp.MustCompile(`^plumb (.*) --shard auto > /out/shard-\$JOB_COMPLETION_INDEX\.jsonl$`).FindStringSubmatch(command)
	require.NotNilf(t, m, "the container's command %q: want 'plumb ... --shard auto > /out/shard-$JOB_COMPLETION_INDEX.jsonl'", command)
	args, err := splitWords(m[1])
	require.NoError(t, err)
	dir := t.TempDir()
	var files []string
	for i := range 4 {
		idx := itoa(i)
		withEnv(t, map[string]string{"JOB_COMPLETION_INDEX": idx, "PLUMB_SHARD_COUNT": count})
		r := plumbRun(t, append(append([]string(nil), args...), "--shard", "auto")...)
		require.Equal(t, exitOK, r.code, r.stderr)
		assert.Contains(t, r.stderr, "shard "+itoa(i+1)+"/4 (from JOB_COMPLETION_INDEX="+idx+", PLUMB_SHARD_COUNT=4)")
		name := filepath.Join(dir, "shard-"+idx+".jsonl")
		require.NoError(t, os.WriteFile(name, []byte(r.stdout), 0o644))
		files = append(files, name)
	}
	whole := plumbRun(t, append(args, "--quiet")...)
	require.Equal(t, exitOK, whole.code, whole.stderr)
	merged := plumbRun(t, append([]string{"merge"}, files...)...)
	require.Equal(t, exitOK, merged.code, merged.stderr)
	assert.True(t, whole.stdout == merged.stdout, "the merged pods' output differs from the unsharded scan (%d and %d bytes)", len(whole.stdout), len(merged.stdout))
}

// TestREADMESlurmScript: the README's Slurm job script is an array of four
// tasks whose plumb command takes its piece from the environment
// (.ci/slurm.sh submits this script to a real Slurm).
func TestREADMESlurmScript(t *testing.T) {
	lines := readmeBlock(t, "slurm job script")
	text := strings.Join(lines, "\n")
	assert.Contains(t, text, "#SBATCH --array=0-3")
	assert.Regexp(t, `(?m)^plumb scan .* --shard auto > shard-\$SLURM_ARRAY_TASK_ID\.jsonl$`, text)
}
