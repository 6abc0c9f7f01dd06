package main

import (
	"encoding/json"
	"io"
	"strings"
	"testing"
	"time"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

// progressRecords parses the --progress lines records on stderr (every
// line that starts with "{") and checks that no other line does.
func progressRecords(t *testing.T, stderr string) []progressRecord {
	t.Helper()
	var recs []progressRecord
	for _, line := range strings.Split(strings.TrimSuffix(stderr, "\n"), "\n") {
		if !strings.HasPrefix(line, "{") {
			assert.True(t, line == "" || strings.HasPrefix(line, "plumb ") || strings.HasPrefix(line, "hint: "), "stderr line %q", line)
			continue
		}
		dec := json.NewDecoder(strings.NewReader(line))
		dec.DisallowUnknownFields()
		var r progressRecord
		require.NoError(t, dec.Decode(&r), line)
		recs = append(recs, r)
	}
	return recs
}

// --progress lines writes a start event, progress events with done rising
// to the total, and an end event with the status; trust names its stages.
// stdout is the same as without it.
func TestProgressLines(t *testing.T) {
	for _, c := range []struct {
		args   []string
		total  float64 // exact: the span the run reports in
		status string
		code   int
	}{
		{[]string{"solve", "--t1", "2", "--format", "csv"}, 2, "completed", exitOK},
		{[]string{"scan", "--across", "r=3:4:7", "--keep", "8", "--format", "csv"}, 7, "completed", exitOK},
		{[]string{"trust", "--model", "henon", "--horizon", "40", "--format", "csv"}, 1, "completed", exitOK},
		{[]string{"solve", "--t1", "1", "--max-steps", "5", "--format", "csv"}, 1, "failed", exitFailed},
	} {
		t.Run(strings.Join(c.args, " "), func(t *testing.T) {
			plain := plumbRun(t, c.args...)
			r := plumbRun(t, append(c.args, "--progress", "lines")...)
			require.Equal(t, c.code, r.code, r.stderr)
			assert.Equal(t, plain.stdout, r.stdout)
			recs := progressRecords(t, r.stderr)
			require.GreaterOrEqual(t, len(recs), 3)
			first, last := recs[0], recs[len(recs)-1]
			assert.Equal(t, "start", first.Event)
			assert.Equal(t, "end", last.Event)
			assert.Equal(t, c.status, last.Status)
			prev, prevStage := -1.0, ""
			stages := map[string]bool{}
			for _, rec := range recs {
				stages[rec.Stage] = true
				assert.Equal(t, c.args[0], rec.Command)
				require.NotNil(t, rec.Done)
				require.NotNil(t, rec.Total)
				require.NotNil(t, rec.Fraction)
				assert.Equal(t, c.total, *rec.Total)
				// the fixed clock of the tests: no time passes
				assert.Equal(t, 0.0, rec.ElapsedS)
				if rec.Event == "progress" {
					if rec.Stage == prevStage {
						assert.Greater(t, *rec.Fraction, prev, "each progress record in a stage is a new whole percentage")
					}
					prev, prevStage = *rec.Fraction, rec.Stage
				}
			}
			if c.args[0] == "trust" {
				// plumb.StageExponent and plumb.StageAudit, as the SDK reports them
				assert.True(t, stages["exponent"] && stages["audit"], "stages %v", stages)
			}
			if c.code == exitOK {
				assert.Equal(t, 1.0, prev, "the last run record is at the end of the span")
			}
		})
	}
}

// A run that reports no progress (models) still writes start and end, with
// done and total null.
func TestProgressLinesNoSpan(t *testing.T) {
	r := plumbRun(t, "models", "--progress", "lines")
	require.Equal(t, exitOK, r.code, r.stderr)
	recs := progressRecords(t, r.stderr)
	require.Len(t, recs, 2)
	assert.Equal(t, "start", recs[0].Event)
	assert.Equal(t, "end", recs[1].Event)
	assert.Equal(t, "run", recs[1].Stage)
	assert.Equal(t, "completed", recs[1].Status)
	assert.Nil(t, recs[1].Done)
	assert.Nil(t, recs[1].Total)
}

// --progress and --quiet: quiet silences progress, so asking for both is
// a usage error naming --progress; an unknown mode is one too.
func TestProgressFlagRefused(t *testing.T) {
	for _, c := range []struct {
		args []string
		want string
	}{
		{[]string{"solve", "--progress", "lines", "--quiet"}, "--progress lines and --quiet"},
		{[]string{"solve", "--progress", "bar", "--quiet"}, "--progress bar and --quiet"},
		{[]string{"solve", "--progress", "dots"}, "--progress dots: want one of auto, bar, lines, none"},
	} {
		r := plumbRun(t, c.args...)
		assert.Equal(t, exitUsage, r.code, "%v", c.args)
		assert.Contains(t, r.stderr, c.want)
	}
	r := plumbRun(t, "solve", "--t1", "1", "--progress", "none", "--quiet")
	assert.Equal(t, exitOK, r.code, "--progress none with --quiet agrees: %s", r.stderr)
}

// --progress bar draws the bar when stderr is not a terminal too, and
// --progress none draws nothing on a terminal.
func TestProgressBarForced(t *testing.T) {
	r := plumbRun(t, "solve", "--t1", "2", "--format", "csv", "--progress", "bar")
	assert.Contains(t, r.stderr, "plumb solve [")
	assert.Contains(t, r.stderr, "100%")
	saved := isTerminal
	defer func() { isTerminal = saved }()
	isTerminal = func(io.Writer) bool { return true }
	r = plumbRun(t, "solve", "--t1", "2", "--format", "csv", "--progress", "none")
	assert.NotContains(t, r.stderr, "[")
}

// The bar appears only once the run has taken barDelay: a quick run draws
// nothing.
func TestBarDelay(t *testing.T) {
	savedNow, savedDelay := now, barDelay
	defer func() { now, barDelay = savedNow, savedDelay }()
	clock := time.Date(2026, 1, 1, 0, 0, 0, 0, time.UTC)
	now = func() time.Time { return clock }
	barDelay = time.Second
	var b strings.Builder
	p := newProgressBar(&b, "x", 0, 10)
	clock = clock.Add(999 * time.Millisecond)
	p.at(5)
	assert.Empty(t, b.String(), "no bar before a second has passed")
	p.clear()
	assert.Empty(t, b.String(), "nothing to clear")
	clock = clock.Add(2 * time.Millisecond)
	p.at(6)
	assert.True(t, strings.HasSuffix(b.String(), " 60%"), b.String())
}
