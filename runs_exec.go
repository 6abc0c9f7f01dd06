package plumb

import (
	"bytes"
	"context"
	"errors"
	"fmt"
	"os"
	"os/exec"
	"path/filepath"
	"regexp"
	"strconv"
	"strings"
	"sync"
	"time"
)

// Program is the caller's own program, launched by RunProgram once per run
// of a ladder built from its placeholders. Nothing goes through a shell:
// Args is the argv (write a shell into it to have one).
type Program struct {
	// Args is the argument template: Args[0] the program (looked up in
	// PATH when it holds no slash), the rest its arguments. Each may hold
	// the placeholders {rtol}, {atol} (both the run's tolerance), {out} (a
	// fresh file the program writes its run to, which plumb reads back),
	// {perturb} (a relative nudge of the start the program applies: 0 for
	// every run but the nudged-start one) and {NAME} for each Vary. An
	// argument that is exactly one placeholder whose value is empty is
	// left out. {out} is required; any other {...} is an error.
	Args []string
	// Tols are the values of {rtol} and {atol}: the smallest is the
	// reference's, each other one a tolerance run. Nil means 1e-10 for the
	// reference and 1e-6, 1e-8 (when Args use {rtol} or {atol}).
	Tols []float64
	// Perturb is {perturb} of the nudged-start run (when Args use
	// {perturb}); 0 means 1e-9.
	Perturb float64
	// Vary are the caller's own placeholders.
	Vary []Vary
	// OutExt is the extension of {out}, which chooses the format plumb
	// reads: ".csv" (the default), ".npy", ".jsonl".
	OutExt string
	// Read chooses the columns of the outputs.
	Read RunReadOptions
	// Jobs is the number of runs at a time (0: 1).
	Jobs int
	// Timeout is the time limit of each run (0: none).
	Timeout time.Duration
	// Dir is the working directory of the runs ("": the caller's).
	Dir string
}

// Vary is a placeholder {Name} of the caller's own: Values[0] is the
// reference's value, each other value makes a run of effect Effect.
type Vary struct {
	Name   string
	Effect RunEffect
	Values []string
}

// PlannedRun is one launch of a Program: its label, effect and values.
type PlannedRun struct {
	Label     string
	Reference bool
	Effect    RunEffect
	// Values maps each placeholder but {out} to its value.
	Values map[string]string
}

// Defaults of Program.
var (
	defaultProgramTols = []float64{1e-10, 1e-6, 1e-8}
)

const (
	defaultProgramPerturb = 1e-9
	// stderrTail is how much of a run's stderr a failure keeps.
	stderrTail = 2048
	// killWait is how long a run's pipes may stay open after the program
	// was stopped (a grandchild holding them).
	killWait = 2 * time.Second
)

var (
	placeholder = regexp.MustCompile(`\{[^{}]*\}`)
	varyName    = regexp.MustCompile(`^[A-Za-z_][A-Za-z0-9_]*$`)
)

// Plan lists the runs of the program: the reference first, then a
// tolerance run per other tolerance, the nudged-start run, then each Vary
// value after the first. Errors (ErrRuns) name the field: no Args, no
// {out}, an unknown placeholder, a bad tolerance, a Vary without values.
func (p Program) Plan() ([]PlannedRun, error) {
	bad := func(format string, a ...any) error {
		return fmt.Errorf("plumb: Program.%s: %w", fmt.Sprintf(format, a...), ErrRuns)
	}
	if len(p.Args) == 0 || strings.TrimSpace(p.Args[0]) == "" {
		return nil, bad("Args: no program to run")
	}
	known := map[string]bool{"rtol": true, "atol": true, "out": true, "perturb": true}
	for i, v := range p.Vary {
		switch {
		case !varyName.MatchString(v.Name):
			return nil, bad("Vary[%d]: name %q: want letters, digits and underscores", i, v.Name)
		case known[v.Name]:
			return nil, bad("Vary[%d]: name %q is taken (by plumb's placeholders or an earlier Vary)", i, v.Name)
		case len(v.Values) < 2:
			return nil, bad("Vary[%d] (%s): %d values; the reference's and at least one more are needed", i, v.Name, len(v.Values))
		}
		if _, ok := ParseRunEffect(string(v.Effect)); !ok {
			return nil, bad("Vary[%d] (%s): effect %q is none of %s", i, v.Name, v.Effect, joinEffects())
		}
		known[v.Name] = true
	}
	used := map[string]bool{}
	for i, a := range p.Args {
		for _, m := range placeholder.FindAllString(a, -1) {
			name := m[1 : len(m)-1]
			if !known[name] {
				return nil, bad("Args[%d] %q: unknown placeholder %s (known: {rtol}, {atol}, {out}, {perturb} and those of Vary)", i, a, m)
			}
			used[name] = true
		}
	}
	if !used["out"] {
		return nil, bad("Args: no {out}: the program must write its run to the file plumb names")
	}
	var plan []PlannedRun
	ref := PlannedRun{Label: "reference", Reference: true, Values: map[string]string{}}
	tols := p.Tols
	if tols == nil {
		tols = defaultProgramTols
	}
	usesTol := used["rtol"] || used["atol"]
	refTol := 0.0
	if usesTol {
		for i, t := range tols {
			if !(t > 0) || t > 1 {
				return nil, bad("Tols[%d] = %v: want a tolerance in (0, 1]", i, t)
			}
			if i == 0 || t < refTol {
				refTol = t
			}
		}
		if len(tols) == 0 {
			return nil, bad("Tols: empty, and Args use {rtol} or {atol}")
		}
		ref.Values["rtol"] = formatTol(refTol)
		ref.Values["atol"] = formatTol(refTol)
	}
	if used["perturb"] {
		ref.Values["perturb"] = "0"
	}
	for _, v := range p.Vary {
		ref.Values[v.Name] = v.Values[0]
	}
	plan = append(plan, ref)
	with := func(label string, effect RunEffect, k, v string) {
		r := PlannedRun{Label: label, Effect: effect, Values: map[string]string{}}
		for name, val := range ref.Values {
			r.Values[name] = val
		}
		r.Values[k] = v
		if k == "rtol" {
			r.Values["atol"] = v
		}
		plan = append(plan, r)
	}
	if usesTol {
		seen := map[float64]bool{refTol: true}
		for _, t := range tols {
			if !seen[t] {
				seen[t] = true
				with("rtol="+formatTol(t), VariesTolerance, "rtol", formatTol(t))
			}
		}
	}
	if used["perturb"] {
		eps := p.Perturb
		if eps == 0 {
			eps = defaultProgramPerturb
		}
		if !finite(eps) {
			return nil, bad("Perturb = %v: must be finite", eps)
		}
		with("perturb="+formatTol(eps), VariesStart, "perturb", formatTol(eps))
	}
	for _, v := range p.Vary {
		for _, val := range v.Values[1:] {
			shown := val
			if shown == "" {
				shown = "(none)"
			}
			with(v.Name+"="+shown, v.Effect, v.Name, val)
		}
	}
	if len(plan) < 2 {
		return nil, bad("Args: no placeholder varies anything ({rtol}, {atol}, {perturb} or a Vary): the reference would be the only run")
	}
	labels := map[string]bool{}
	for _, r := range plan {
		if labels[r.Label] {
			return nil, bad("Vary: the run %q comes twice (a value repeated?)", r.Label)
		}
		labels[r.Label] = true
	}
	return plan, nil
}

func formatTol(v float64) string { return strconv.FormatFloat(v, 'g', -1, 64) }

// argv is the command line of run r writing to out.
func (p Program) argv(r PlannedRun, out string) []string {
	var args []string
	for _, a := range p.Args {
		if m := placeholder.FindString(a); m == a && m != "" && m != "{out}" && r.Values[m[1:len(m)-1]] == "" {
			continue
		}
		args = append(args, placeholder.ReplaceAllStringFunc(a, func(m string) string {
			name := m[1 : len(m)-1]
			if name == "out" {
				return out
			}
			return r.Values[name]
		}))
	}
	return args
}

// Argv is the command line of run r, with {out} shown as given.
func (p Program) Argv(r PlannedRun, out string) []string { return p.argv(r, out) }

// RunProgram launches the program once per planned run (Plan), up to Jobs
// at a time, each within Timeout, and reads back each output. A run that
// exits non-zero, runs past its limit, or writes no readable run is
// returned with its Failure (exit status and the tail of its stderr); the
// others stand. When ctx ends, the running programs are stopped (their
// process group, where the system has one), runs not finished are marked
// failed, and the runs so far come back with ctx's error. Outputs go to a
// fresh temporary directory, removed before RunProgram returns.
func RunProgram(ctx context.Context, p Program) ([]RecordedRun, []PlannedRun, error) {
	return runProgramRange(ctx, p, Shard{})
}

// runProgramRange is RunProgram of the runs sh takes of the plan; the
// runs returned are those, in plan order.
func runProgramRange(ctx context.Context, p Program, sh Shard) ([]RecordedRun, []PlannedRun, error) {
	if ctx == nil {
		ctx = context.Background()
	}
	plan, err := p.Plan()
	if err != nil {
		return nil, nil, err
	}
	if err := sh.Validate(); err != nil {
		return nil, plan, err
	}
	lo, hi := sh.Range(len(plan))
	if p.Jobs < 0 || p.Timeout < 0 {
		return nil, plan, fmt.Errorf("plumb: Program.Jobs = %d, Timeout = %v: must be >= 0: %w", p.Jobs, p.Timeout, ErrRuns)
	}
	ext := p.OutExt
	if ext == "" {
		ext = ".csv"
	}
	if _, err := extFormat(ext); err != nil {
		return nil, plan, err
	}
	dir, err := os.MkdirTemp("", "plumb-runs-")
	if err != nil {
		return nil, plan, fmt.Errorf("plumb: a directory for the outputs: %w", err)
	}
	defer os.RemoveAll(dir)
	jobs := max(p.Jobs, 1)
	runs := make([]RecordedRun, hi-lo)
	sem := make(chan struct{}, jobs)
	var wg sync.WaitGroup
	for k, pr := range plan[lo:hi] {
		i := lo + k
		runs := runs[k : k+1]
		runs[0] = RecordedRun{Label: pr.Label, Reference: pr.Reference, Effect: pr.Effect, Source: strings.Join(p.argv(pr, "{out}"), " ")}
		wg.Add(1)
		go func() {
			defer wg.Done()
			select {
			case sem <- struct{}{}:
			case <-ctx.Done():
				runs[0].Failure = &RunFailure{Why: "not started: " + ctx.Err().Error(), ExitStatus: -1}
				return
			}
			defer func() { <-sem }()
			out := filepath.Join(dir, fmt.Sprintf("run-%d%s", i+1, ext))
			p.launch(ctx, &runs[0], p.argv(pr, out), out)
		}()
	}
	wg.Wait()
	return runs, plan, ctx.Err()
}

// launch runs one program and reads its output into r (or sets r.Failure).
func (p Program) launch(ctx context.Context, r *RecordedRun, args []string, out string) {
	if err := ctx.Err(); err != nil {
		r.Failure = &RunFailure{Why: "not started: " + err.Error(), ExitStatus: -1}
		return
	}
	rctx := ctx
	if p.Timeout > 0 {
		var cancel context.CancelFunc
		rctx, cancel = context.WithTimeout(ctx, p.Timeout)
		defer cancel()
	}
	cmd := exec.CommandContext(rctx, args[0], args[1:]...)
	cmd.Dir = p.Dir
	cmd.WaitDelay = killWait
	stopGroup(cmd)
	var stderr tailBuffer
	cmd.Stderr = &stderr
	err := cmd.Run()
	fail := func(why string, status int) {
		r.Failure = &RunFailure{Why: why, ExitStatus: status, StderrTail: stderr.String()}
	}
	var ee *exec.ExitError
	switch {
	case p.Timeout > 0 && errors.Is(rctx.Err(), context.DeadlineExceeded) && ctx.Err() == nil:
		fail(fmt.Sprintf("ran past its time limit of %v and was stopped", p.Timeout), -1)
		r.Failure.TimedOut = true
		return
	case ctx.Err() != nil:
		fail("stopped: "+ctx.Err().Error(), -1)
		return
	case errors.As(err, &ee):
		fail(fmt.Sprintf("exited with status %d", ee.ExitCode()), ee.ExitCode())
		return
	case err != nil:
		fail("could not be run: "+err.Error(), -1)
		return
	}
	info, err := os.Stat(out)
	switch {
	case err != nil:
		fail("wrote nothing to {out} (no file)", 0)
		return
	case info.Size() == 0:
		fail("wrote nothing to {out} (an empty file)", 0)
		return
	}
	run, err := OpenRun(out, p.Read)
	if err != nil {
		fail("its output could not be read: "+err.Error(), 0)
		return
	}
	r.Names, r.T, r.Y = run.Names, run.T, run.Y
}

// extFormat checks an {out} extension.
func extFormat(ext string) (string, error) {
	switch ext {
	case ".csv", ".npy", ".jsonl", ".ndjson":
		return ext, nil
	}
	return "", fmt.Errorf("plumb: Program.OutExt = %q: want .csv, .npy or .jsonl: %w", ext, ErrRuns)
}

// tailBuffer keeps the last stderrTail bytes written to it.
type tailBuffer struct {
	mu  sync.Mutex
	buf []byte
}

func (t *tailBuffer) Write(p []byte) (int, error) {
	t.mu.Lock()
	defer t.mu.Unlock()
	t.buf = append(t.buf, p...)
	if len(t.buf) > 2*stderrTail {
		t.buf = append(t.buf[:0], t.buf[len(t.buf)-stderrTail:]...)
	}
	return len(p), nil
}

// String returns the kept tail, from a line start where one is near.
func (t *tailBuffer) String() string {
	t.mu.Lock()
	defer t.mu.Unlock()
	b := t.buf
	if len(b) > stderrTail {
		b = b[len(b)-stderrTail:]
		if i := bytes.IndexByte(b, '\n'); i >= 0 && i < len(b)-1 {
			b = b[i+1:]
		}
	}
	return strings.TrimRight(string(b), "\n")
}

// TrustProgram launches the program (RunProgram) and audits its runs
// (TrustRuns) in one call. A run that failed is a failed rung of the
// report; a failed reference fails the audit with its failure. When ctx
// ends, the runs completed are audited, and the report (verdict
// Incomplete) comes with ctx's error.
func TrustProgram(ctx context.Context, p Program, s *RecordedSettings) (*Report, []PlannedRun, error) {
	if ctx == nil {
		ctx = context.Background()
	}
	runs, plan, err := RunProgram(ctx, p)
	if runs == nil {
		return nil, plan, err
	}
	rep, err := TrustProgramRuns(ctx, runs, s, err)
	return rep, plan, err
}

// TrustProgramRuns is TrustProgram's audit of the runs a Program made
// (RunProgram, or the joined pieces of RunProgramShard), runErr being the
// error that ended the launching: a failed reference fails the audit
// (ErrProgram); with runErr, the report's verdict is Incomplete.
func TrustProgramRuns(ctx context.Context, runs []RecordedRun, s *RecordedSettings, runErr error) (*Report, error) {
	if ctx == nil {
		ctx = context.Background()
	}
	if len(runs) == 0 {
		return nil, fmt.Errorf("plumb: no runs to audit: %w", ErrRuns)
	}
	err := runErr
	if ref := runs[0].Failure; ref != nil {
		why := fmt.Sprintf("the reference run (%s) failed: %s", runs[0].Source, ref.Why)
		if ref.StderrTail != "" {
			why += "; its stderr ends: " + ref.StderrTail
		}
		if err != nil {
			return nil, fmt.Errorf("plumb: %s: %w", why, err)
		}
		return nil, fmt.Errorf("plumb: %s: %w", why, ErrProgram)
	}
	rep, terr := TrustRuns(context.WithoutCancel(ctx), runs, s)
	if terr != nil {
		return rep, terr
	}
	if err != nil {
		rep.Verdict = Incomplete
		return rep, fmt.Errorf("plumb: the program's runs: %w", err)
	}
	return rep, nil
}
