package main

import (
	"bufio"
	"bytes"
	"context"
	"encoding/binary"
	"encoding/json"
	"io"
	"math"
	"math/rand/v2"
	"os"
	"path/filepath"
	"regexp"
	"strconv"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"github.com/plumbdyn/plumb"
	"github.com/plumbdyn/plumb/internal/runio"
)

// plumbRunFile runs plumb with stdout a regular file, as a shell's
// redirection gives it, and returns what the file holds.
func plumbRunFile(t *testing.T, args ...string) result {
	t.Helper()
	f, err := os.Create(filepath.Join(t.TempDir(), "out"))
	require.NoError(t, err)
	defer f.Close()
	var errb bytes.Buffer
	code := run(context.Background(), args, strings.NewReader(""), f, &errb)
	b, err := os.ReadFile(f.Name())
	require.NoError(t, err)
	return result{code: code, stdout: string(b), stderr: errb.String()}
}

// csvRun reads a solve's CSV output back (the shortest decimals: the same bits).
func csvRun(t *testing.T, out string) *runio.Run {
	t.Helper()
	r, err := runio.ReadCSV(strings.NewReader(out), runio.Options{})
	require.NoError(t, err)
	return r
}

var goldenNPY = []string{"solve", "--t1", "1", "--dt", "0.1", "--format", "npy"}

// TestSolveNPY: the .npy array holds the CSV's samples bit for bit (exact
// identity: both are the same float64s), to a pipe and to a file alike.
func TestSolveNPY(t *testing.T) {
	pipe := plumbRun(t, goldenNPY...)
	require.Equal(t, exitOK, pipe.code, pipe.stderr)
	golden(t, "solve_lorenz.npy", pipe.stdout)
	file := plumbRunFile(t, goldenNPY...)
	require.Equal(t, exitOK, file.code, file.stderr)
	assert.Equal(t, pipe.stdout, file.stdout, "a count announced and a count patched in give the same bytes")

	got, err := runio.ReadNPY(strings.NewReader(pipe.stdout), runio.Options{})
	require.NoError(t, err)
	csv := plumbRun(t, "solve", "--t1", "1", "--dt", "0.1", "--format", "csv")
	want := csvRun(t, csv.stdout)
	assert.True(t, sameBits(want.T, got.T), "times %v, want %v", got.T, want.T)
	assert.True(t, sameBits(want.Y, got.Y), "states differ from the CSV's")

	// Every accepted step (--dt 0) has no count up front: a file takes it.
	steps := plumbRunFile(t, "solve", "--t1", "1", "--dt", "0", "--format", "npy")
	require.Equal(t, exitOK, steps.code, steps.stderr)
	got, err = runio.ReadNPY(strings.NewReader(steps.stdout), runio.Options{})
	require.NoError(t, err)
	want = csvRun(t, plumbRun(t, "solve", "--t1", "1", "--dt", "0", "--format", "csv").stdout)
	assert.True(t, sameBits(want.T, got.T) && sameBits(want.Y, got.Y), "the steps differ from the CSV's")
}

// npyShape reads the shape of a .npy header written by runio.NPYWriter
// and returns it with the data.
func npyShape(t *testing.T, b string) (rows, cols int, data []float64) {
	t.Helper()
	require.True(t, strings.HasPrefix(b, "\x93NUMPY\x01\x00"))
	hlen := int(binary.LittleEndian.Uint16([]byte(b[8:10])))
	m := regexp.MustCompile(`'shape': \((\d+) *, (\d+)\)`).FindStringSubmatch(b[10 : 10+hlen])
	require.NotNil(t, m, "header %q", b[10:10+hlen])
	rows, _ = strconv.Atoi(m[1])
	cols, _ = strconv.Atoi(m[2])
	body := []byte(b[10+hlen:])
	data = make([]float64, len(body)/8)
	for i := range data {
		data[i] = math.Float64frombits(binary.LittleEndian.Uint64(body[8*i:]))
	}
	return rows, cols, data
}

// TestSolveNPYStoppedEarly: a run that fails keeps what it computed. On a
// file the header counts the rows written; on a pipe the grid's rows were
// announced, and those not reached are NaN.
func TestSolveNPYStoppedEarly(t *testing.T) {
	args := []string{"solve", "--max-steps", "40", "--dt", "0.01", "--quiet"}
	csv := plumbRun(t, append(args, "--format", "csv")...)
	require.Equal(t, exitFailed, csv.code)
	want := csvRun(t, csv.stdout)
	require.Greater(t, want.Len(), 1)

	file := plumbRunFile(t, append(args, "--format", "npy")...)
	require.Equal(t, exitFailed, file.code)
	assert.Contains(t, file.stderr, "step budget")
	got, err := runio.ReadNPY(strings.NewReader(file.stdout), runio.Options{})
	require.NoError(t, err)
	assert.True(t, sameBits(want.T, got.T) && sameBits(want.Y, got.Y), "the file's rows differ from the CSV's")

	pipe := plumbRun(t, append(args, "--format", "npy")...)
	require.Equal(t, exitFailed, pipe.code)
	rows, cols, data := npyShape(t, pipe.stdout)
	assert.Equal(t, 2001, rows, "t = 0, 0.01, ..., 20: 2001 grid points")
	require.Equal(t, 4, cols)
	require.Len(t, data, rows*cols)
	n := want.Len()
	for i := 0; i < rows; i++ {
		row := data[i*cols : (i+1)*cols]
		if i < n {
			require.True(t, sameBits(append([]float64{want.T[i]}, want.Row(i)...), row), "row %d", i)
			continue
		}
		for _, v := range row {
			require.True(t, math.IsNaN(v), "row %d beyond the stop holds %v, want NaN", i, v)
		}
	}
}

// TestSolveStreamRefusals: what the formats cannot hold is refused before
// the run, naming the flag, with nothing on stdout.
func TestSolveStreamRefusals(t *testing.T) {
	cases := []struct {
		name string
		args []string
		want []string
	}{
		{"npy steps to a pipe", []string{"--format", "npy", "--dt", "0"}, []string{"--format npy", "--dt"}},
		{"npy crossings", []string{"--format", "npy", "--cross-state", "x=0"}, []string{"--cross-state", "--format npy"}},
		{"npy on a map", []string{"--format", "npy", "--model", "henon"}, []string{"--format npy", "henon"}},
		{"jsonl on a map", []string{"--format", "jsonl", "--model", "henon"}, []string{"--format jsonl"}},
		{"fixed step beyond the budget", []string{"--method", "rk4", "--step", "0.01", "--max-steps", "1000"}, []string{"--max-steps 1000", "2000 steps"}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			r := plumbRun(t, append([]string{"solve"}, c.args...)...)
			assert.Equal(t, exitUsage, r.code, r.stderr)
			assert.Empty(t, r.stdout)
			for _, w := range c.want {
				assert.Contains(t, r.stderr, w)
			}
		})
	}
	saved := isTerminal
	defer func() { isTerminal = saved }()
	isTerminal = func(io.Writer) bool { return true }
	r := plumbRun(t, "solve", "--format", "npy")
	assert.Equal(t, exitUsage, r.code)
	assert.Contains(t, r.stderr, "terminal")
	assert.Empty(t, r.stdout)
}

// TestSolveJSONStreamIsEncoding: the streamed document is byte for byte
// what encoding/json writes for the same result (exact identity), for a
// run with crossings, one of every step, a failed and a canceled one.
func TestSolveJSONStreamIsEncoding(t *testing.T) {
	canceled, cancel := context.WithCancel(context.Background())
	cancel()
	cases := []struct {
		name string
		ctx  context.Context
		args []string
	}{
		{"crossings", context.Background(), goldenSolve[1:]},
		{"steps", context.Background(), []string{"--t1", "0.5", "--dt", "0", "--model", "rossler"}},
		{"failed", context.Background(), []string{"--max-steps", "40"}},
		{"canceled", canceled, nil},
		{"tiny values", context.Background(), []string{"--model", "rossler", "--set", "c=4", "--t1", "2", "--dt", "0.5", "--atol", "1e-12"}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			r := plumbRunCtx(t, c.ctx, append(append([]string{"solve"}, c.args...), "--format", "json", "--quiet")...)
			var out solveJSON
			require.NoError(t, json.Unmarshal([]byte(r.stdout), &out), r.stdout)
			require.NotEmpty(t, out.Samples)
			var b bytes.Buffer
			require.NoError(t, writeJSON(&b, out))
			assert.Equal(t, b.String(), r.stdout)
		})
	}
}

// TestSolveJSONL: the lines are the JSON result split: the head, one
// sample per line (the JSON's samples), the tail.
func TestSolveJSONL(t *testing.T) {
	whole, r := decodeSolve(t, goldenSolve[1:]...)
	require.Equal(t, exitOK, r.code)
	lines := plumbRun(t, append(goldenSolve, "--format", "jsonl")...)
	require.Equal(t, exitOK, lines.code)
	ls := strings.Split(strings.TrimSuffix(lines.stdout, "\n"), "\n")
	require.Len(t, ls, 2+len(whole.Samples))

	var head solveHeadJSON
	require.NoError(t, json.Unmarshal([]byte(ls[0]), &head))
	assert.Equal(t, whole.solveHeadJSON, head)
	var tail solveTailJSON
	require.NoError(t, json.Unmarshal([]byte(ls[len(ls)-1]), &tail))
	assert.Equal(t, whole.solveTailJSON, tail)
	for i, l := range ls[1 : len(ls)-1] {
		var s sampleJSON
		require.NoError(t, json.Unmarshal([]byte(l), &s))
		assert.Equal(t, whole.Samples[i], s)
	}
	// The sample lines are what plumb reads as a run.
	run, err := runio.ReadJSONL(strings.NewReader(strings.Join(ls[1:len(ls)-1], "\n")), runio.Options{})
	require.NoError(t, err)
	want := csvRun(t, plumbRun(t, append(goldenSolve, "--format", "csv")...).stdout)
	assert.True(t, sameBits(want.T, run.T) && sameBits(want.Y, run.Y))
}

// TestAppendJSONFloat: the JSON numbers written by hand are encoding/json's
// (exact identity), over random bit patterns and the format's edges.
func TestAppendJSONFloat(t *testing.T) {
	rng := rand.New(rand.NewPCG(1, 2))
	vals := []float64{0, math.Copysign(0, -1), 1, -1, 1e-6, math.Nextafter(1e-6, 0), 1e-7, 1e21, math.Nextafter(1e21, 0),
		1e20, 5e-324, math.MaxFloat64, -math.MaxFloat64, 0.1, 123456789e-15, 1e-9, 2.5e-10}
	for range 100000 {
		v := math.Float64frombits(rng.Uint64())
		if !math.IsNaN(v) && !math.IsInf(v, 0) {
			vals = append(vals, v)
		}
	}
	for _, v := range vals {
		want, err := json.Marshal(v)
		require.NoError(t, err)
		got, err := appendJSONFloat(nil, v)
		require.NoError(t, err)
		if string(got) != string(want) {
			t.Fatalf("%v (bits %#x): got %s, encoding/json writes %s", v, math.Float64bits(v), got, want)
		}
	}
	for _, v := range []float64{math.NaN(), math.Inf(1), math.Inf(-1)} {
		_, err := appendJSONFloat(nil, v)
		assert.Error(t, err, "%v", v)
	}
}

// TestSolveTableBlocks: a table of one block is text/tabwriter's
// alignment (exact identity); a longer one, written block by block, has
// the same cells, each block aligned, the columns never narrowing.
func TestSolveTableBlocks(t *testing.T) {
	args := []string{"solve", "--model", "rossler", "--t1", "30", "--dt", "0.1", "--quiet"}
	one := plumbRun(t, args...)
	require.Equal(t, exitOK, one.code)
	samples, _, _ := strings.Cut(one.stdout, "\n\n")
	rows := strings.Split(samples, "\n")
	var tw bytes.Buffer
	w := newTable(&tw)
	for _, l := range rows {
		w.Write([]byte(strings.Join(strings.Fields(l), "\t") + "\n"))
	}
	require.NoError(t, w.Flush())
	assert.Equal(t, tw.String(), samples+"\n")

	saved := tableBlockCells
	defer func() { tableBlockCells = saved }()
	const perBlock = 7 // rows, the header's block included
	tableBlockCells = 4 * perBlock
	blocks := plumbRun(t, args...)
	require.Equal(t, exitOK, blocks.code)
	bs, rest, _ := strings.Cut(blocks.stdout, "\n\n")
	_, wantRest, _ := strings.Cut(one.stdout, "\n\n")
	assert.Equal(t, wantRest, rest, "the summary does not depend on the blocks")
	brows := strings.Split(bs, "\n")
	require.Len(t, brows, len(rows))
	starts := func(l string) []int {
		var s []int
		for i := range l {
			if l[i] != ' ' && (i == 0 || l[i-1] == ' ') {
				s = append(s, i)
			}
		}
		return s
	}
	prev := starts(brows[0])
	for i, l := range brows {
		assert.Equal(t, strings.Fields(rows[i]), strings.Fields(l), "row %d", i)
		s := starts(l)
		require.Len(t, s, 4, "row %d: %q", i, l)
		for j := range s {
			if i%perBlock == 0 {
				assert.GreaterOrEqual(t, s[j], prev[j], "row %d column %d narrowed", i, j)
			} else {
				assert.Equal(t, prev[j], s[j], "row %d column %d not aligned within its block", i, j)
			}
		}
		prev = s
	}
	assert.NotEqual(t, one.stdout, blocks.stdout, "the test must see a column widen")
}

// TestSolveBudget: the step budget follows the span unless given; its
// rule (the default run's budget, 1000000 over 20 time units, per unit of
// time) is checked exactly.
func TestSolveBudget(t *testing.T) {
	adaptive, _ := findMethod("dp54")
	rk4, _ := findMethod("rk4")
	cases := []struct {
		name  string
		m     method
		h     float64
		span  float64
		steps int
		given bool
		want  int
		usage bool
	}{
		{"default span", adaptive, 0, 20, 0, false, 1_000_000, false},
		{"short span keeps the floor", adaptive, 0, 1, 0, false, 1_000_000, false},
		{"long span", adaptive, 0, 100000, 0, false, 5_000_000_000, false},
		{"given 0 follows the span", adaptive, 0, 100000, 0, true, 5_000_000_000, false},
		{"given", adaptive, 0, 100000, 100, true, 100, false},
		{"fixed step needs more", rk4, 1e-6, 100, 0, false, 100_000_001, false},
		{"fixed step given enough", rk4, 1e-3, 10, 10000, true, 10000, false},
		{"fixed step given too few", rk4, 1e-3, 10, 9999, true, 0, true},
		{"span beyond any budget", adaptive, 0, 1e300, 0, false, 0, true},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			f := &solveFlags{h: c.h, maxSteps: c.steps, t1: c.span}
			err := f.budget(c.m, c.span, c.given)
			if c.usage {
				var ue *usageError
				require.ErrorAs(t, err, &ue)
				return
			}
			require.NoError(t, err)
			assert.Equal(t, c.want, f.maxSteps)
		})
	}
	// The CLI echoes the budget it used; a canceled run shows it cheaply.
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	r := plumbRunCtx(t, ctx, "solve", "--t1", "100000", "--format", "jsonl", "--quiet")
	head, _, _ := strings.Cut(r.stdout, "\n")
	var h solveHeadJSON
	require.NoError(t, json.Unmarshal([]byte(head), &h))
	assert.Equal(t, 5_000_000_000, h.Settings.MaxSteps)
}

// TestSolveSinksDoNotAllocate: writing a sample allocates nothing in any
// format, so memory stays flat however many there are.
func TestSolveSinksDoNotAllocate(t *testing.T) {
	sys, err := plumb.Model("lorenz")
	require.NoError(t, err)
	m, im, err := pickMethod("dp54", 0, false)
	require.NoError(t, err)
	r := &solveRun{f: &solveFlags{t1: 1, dt: 0.1, rows: "samples", sense: "either"}, sys: sys, m: m, im: im}
	saved := tableBlockCells
	defer func() { tableBlockCells = saved }()
	tableBlockCells = 4 * 64
	y := []float64{1.25, -3.5e-7, 1e22}
	for _, format := range []string{"table", "csv", "json", "jsonl", "npy"} {
		t.Run(format, func(t *testing.T) {
			cl := &call{sh: &shared{format: format}, stdout: bufioDiscard(), rawStdout: io.Discard}
			sink, err := r.newSink(cl, 1<<30)
			require.NoError(t, err)
			tt := 0.0
			step := func() {
				tt += 0.1
				if err := sink.sample(tt, y); err != nil {
					t.Fatal(err)
				}
			}
			for range 1000 { // past the first blocks and buffers
				step()
			}
			assert.Zero(t, testing.AllocsPerRun(1000, step))
		})
	}
}

// bufioDiscard is a buffered stdout that throws its bytes away.
func bufioDiscard() *bufio.Writer { return bufio.NewWriter(io.Discard) }

// TestSolveNPYToDevNull: the null device is a character device but no
// terminal, and seeks there go nowhere: it takes the array as a pipe does.
func TestSolveNPYToDevNull(t *testing.T) {
	null, err := os.OpenFile(os.DevNull, os.O_WRONLY, 0)
	if err != nil {
		t.Skipf("no null device: %v", err)
	}
	defer null.Close()
	var errb bytes.Buffer
	code := run(context.Background(), []string{"solve", "--t1", "1", "--format", "npy"}, strings.NewReader(""), null, &errb)
	assert.Equal(t, exitOK, code, errb.String())
}
