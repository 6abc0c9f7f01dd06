package main

// plumb trust --exec: the user's program launched once per rung from an
// argument template (plumb.TrustProgram).

import (
	"context"
	"errors"
	"flag"
	"fmt"
	"os/exec"
	"strings"
	"time"

	"github.com/plumbdyn/plumb"
)

// execFlags are --exec and the flags that shape its runs.
type execFlags struct {
	template string
	tols     string
	perturb  float64
	vary     varyList
	jobs     int
	limit    time.Duration
	outExt   string
	shard    string
}

// execOnly are the flags that apply to --exec only.
var execOnly = []string{"tols", "perturb", "vary", "jobs", "time-limit", "out-ext", "shard"}

// Defaults of --exec.
const (
	execTols    = "1e-10,1e-6,1e-8"
	execPerturb = 1e-9
	execJobs    = 2
	execLimit   = 10 * time.Minute
)

func addExecFlags(fs *flag.FlagSet, e *execFlags) {
	fs.StringVar(&e.template, "exec", "", "audit your own program: run the `COMMAND` template once per rung (split into words like a shell would, but no shell runs) with {rtol}, {atol}, {out} (the file it must write), {perturb} and your --vary placeholders filled in")
	fs.StringVar(&e.tols, "tols", execTols, "comma-separated `LIST` of the values of {rtol} and {atol} in --exec runs: the smallest is the reference's, each other a tolerance rung")
	finiteVar(fs, &e.perturb, "perturb", execPerturb, "the relative nudge `EPS` of the start that {perturb} passes to the nudged-start rung of --exec (the reference gets 0)")
	fs.Var(&e.vary, "vary", "a placeholder of your own for --exec, given as `SPEC` NAME=EFFECT:V1,V2,... (repeatable): {NAME} is V1 in the reference and each other value makes a rung of that effect; an empty value leaves the argument out")
	fs.IntVar(&e.jobs, "jobs", execJobs, "run at most `N` --exec programs at a time")
	fs.DurationVar(&e.limit, "time-limit", execLimit, "stop an --exec run after the duration `D` (e.g. 90s, 10m); it is then a failed rung")
	fs.StringVar(&e.outExt, "out-ext", ".csv", "the extension `EXT` of the {out} file, which chooses how plumb reads it: .csv, .npy or .jsonl")
	addShardFlag(fs, &e.shard)
}

// checkUnused refuses --exec's flags without --exec.
func (e *execFlags) checkUnused(cl *call) error {
	for _, name := range execOnly {
		if cl.sh.given[name] {
			return usagef("--%s: applies to --exec runs only", name)
		}
	}
	return nil
}

// varySpec is one --vary NAME=EFFECT:V1,V2,...
type varySpec = plumb.Vary

// varyList is the repeatable --vary flag.
type varyList []varySpec

func (l *varyList) String() string {
	if l == nil {
		return ""
	}
	parts := make([]string, len(*l))
	for i, v := range *l {
		parts[i] = v.Name + "=" + string(v.Effect) + ":" + strings.Join(v.Values, ",")
	}
	return strings.Join(parts, " ")
}

// Set parses NAME=EFFECT:V1,V2,...
func (l *varyList) Set(s string) error {
	name, rest, ok := strings.Cut(s, "=")
	eff, vals, ok2 := strings.Cut(rest, ":")
	name = strings.TrimSpace(name)
	if !ok || !ok2 || name == "" {
		return fmt.Errorf("want NAME=EFFECT:V1,V2,..., e.g. store=precision:,--float32")
	}
	e, ok := plumb.ParseRunEffect(strings.TrimSpace(eff))
	if !ok {
		return fmt.Errorf("%s: effect %q: want one of %s", name, eff, strings.Join(effectNames(), ", "))
	}
	values := strings.Split(vals, ",")
	if len(values) < 2 {
		return fmt.Errorf("%s: one value; give the reference's and at least one more", name)
	}
	*l = append(*l, varySpec{Name: name, Effect: e, Values: values})
	return nil
}

// execJSON echoes --exec and its flags.
type execJSON struct {
	Command   []string   `json:"command"`
	Tols      []float64  `json:"tols,omitempty"`
	Perturb   float64    `json:"perturb,omitempty"`
	Vary      []varyJSON `json:"vary,omitempty"`
	Jobs      int        `json:"jobs"`
	TimeLimit string     `json:"time_limit"`
	OutExt    string     `json:"out_ext"`
}

func (e *execFlags) echo() *execJSON {
	argv, _ := splitWords(e.template)
	tols, _ := parseTols(e.tols)
	out := &execJSON{Command: argv, Tols: tols, Perturb: e.perturb, Jobs: e.jobs, TimeLimit: e.limit.String(), OutExt: e.outExt}
	for _, v := range e.vary {
		out.Vary = append(out.Vary, varyJSON{Name: v.Name, Effect: string(v.Effect), Values: v.Values})
	}
	return out
}

// varyJSON is one --vary as echoed.
type varyJSON struct {
	Name   string   `json:"name"`
	Effect string   `json:"effect"`
	Values []string `json:"values"`
}

// runExec launches the program and audits its runs (in a merge: audits
// the runs of the joined shard files).
func (f *trustFlags) runExec(ctx context.Context, cl *call, settings *plumb.RecordedSettings) (*plumb.Report, []runJSON, error) {
	e := &f.recorded.exec
	p, plan, specs, err := f.program(cl)
	if err != nil {
		return nil, nil, err
	}
	if cl.merge != nil {
		runs, err := plumb.ProgramRuns(cl.merge.set, plan)
		if err != nil {
			return nil, specs, err
		}
		if !cl.sh.quiet {
			fmt.Fprintf(cl.stderr, "plumb trust: auditing %s from %s\n", count(len(runs), "run"), count(len(cl.merge.set.Pieces), "shard file"))
		}
		rep, err := plumb.TrustProgramRuns(ctx, runs, settings, nil)
		if rep == nil && err != nil && errors.Is(err, plumb.ErrProgram) {
			return nil, specs, fmt.Errorf("--exec: %w", err)
		}
		return rep, specs, err
	}
	if !cl.sh.quiet {
		fmt.Fprintf(cl.stderr, "plumb trust: launching %s, %d at a time\n", count(len(plan), "run"), e.jobs)
	}
	rep, _, err := plumb.TrustProgram(ctx, p, settings)
	if rep == nil && err != nil && errors.Is(err, plumb.ErrProgram) {
		return nil, specs, fmt.Errorf("--exec: %w", err)
	}
	return rep, specs, err
}

// program checks --exec and its flags and returns the program, its plan
// and the runs as echoed. In a merge the program is not looked up: the
// runs come from the shard files.
func (f *trustFlags) program(cl *call) (plumb.Program, []plumb.PlannedRun, []runJSON, error) {
	e := &f.recorded.exec
	argv, err := splitWords(e.template)
	if err != nil {
		return plumb.Program{}, nil, nil, usagef("--exec %q: %v", e.template, err)
	}
	if len(argv) == 0 {
		return plumb.Program{}, nil, nil, usagef("--exec %q: no command", e.template)
	}
	if _, err := exec.LookPath(argv[0]); err != nil && cl.merge == nil {
		return plumb.Program{}, nil, nil, usagef("--exec %q: %v", e.template, err)
	}
	tols, err := parseTols(e.tols)
	if err != nil {
		return plumb.Program{}, nil, nil, usagef("--tols %s: %v", e.tols, err)
	}
	if e.jobs < 1 {
		return plumb.Program{}, nil, nil, usagef("--jobs %d: must be >= 1", e.jobs)
	}
	if e.limit <= 0 {
		return plumb.Program{}, nil, nil, usagef("--time-limit %v: must be > 0", e.limit)
	}
	if e.perturb == 0 {
		return plumb.Program{}, nil, nil, usagef("--perturb 0: the nudged-start rung needs a nudge (or leave {perturb} out of --exec)")
	}
	p := plumb.Program{Args: argv, Tols: tols, Perturb: e.perturb, Vary: e.vary, OutExt: e.outExt,
		Read: f.recorded.readOptions(), Jobs: e.jobs, Timeout: e.limit}
	plan, err := p.Plan()
	if err != nil {
		return plumb.Program{}, nil, nil, usagef("--exec %q: %v", e.template, err)
	}
	specs := make([]runJSON, len(plan))
	for i, r := range plan {
		eff := string(r.Effect)
		if r.Reference {
			eff = "reference"
		}
		specs[i] = runJSON{Label: r.Label, Effect: eff, Args: p.Argv(r, "{out}")}
	}
	return p, plan, specs, nil
}

// parseTols parses the --tols list.
func parseTols(s string) ([]float64, error) {
	var out []float64
	for _, part := range strings.Split(s, ",") {
		v, err := parseFinite(part)
		if err != nil {
			return nil, err
		}
		if !(v > 0) || v > 1 {
			return nil, fmt.Errorf("%s: want a tolerance in (0, 1]", strings.TrimSpace(part))
		}
		out = append(out, v)
	}
	return out, nil
}

// splitWords splits a command template into words as a POSIX shell would
// for plain words and quotes (no expansion, no shell): blanks separate
// words; '...' keeps everything; "..." keeps everything but \" and \\;
// a backslash outside quotes keeps the next character. An unclosed quote
// is an error.
func splitWords(s string) ([]string, error) {
	var words []string
	var cur strings.Builder
	inWord := false
	for i := 0; i < len(s); i++ {
		c := s[i]
		switch {
		case c == ' ' || c == '\t' || c == '\n':
			if inWord {
				words = append(words, cur.String())
				cur.Reset()
				inWord = false
			}
		case c == '\'':
			j := strings.IndexByte(s[i+1:], '\'')
			if j < 0 {
				return nil, fmt.Errorf("unclosed ' at byte %d", i+1)
			}
			cur.WriteString(s[i+1 : i+1+j])
			i += j + 1
			inWord = true
		case c == '"':
			i++
			for ; i < len(s) && s[i] != '"'; i++ {
				if s[i] == '\\' && i+1 < len(s) && (s[i+1] == '"' || s[i+1] == '\\') {
					i++
				}
				cur.WriteByte(s[i])
			}
			if i >= len(s) {
				return nil, fmt.Errorf("unclosed \" in the command")
			}
			inWord = true
		case c == '\\':
			if i+1 < len(s) {
				i++
				cur.WriteByte(s[i])
			}
			inWord = true
		default:
			cur.WriteByte(c)
			inWord = true
		}
	}
	if inWord {
		words = append(words, cur.String())
	}
	return words, nil
}
