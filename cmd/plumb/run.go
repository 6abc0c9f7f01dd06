package main

import (
	"bufio"
	"context"
	"errors"
	"flag"
	"fmt"
	"io"
	"os"
	"strings"
	"time"

	"github.com/plumbdyn/plumb/integrate"
)

// Exit codes, as DESIGN.md fixes them.
const (
	exitOK     = 0 // done
	exitFailed = 1 // the computation failed; the message says which step and why
	exitUsage  = 2 // bad usage or bad input; the message names the flag or field
)

// call is what a command's work function receives once its flags are parsed.
type call struct {
	cmd    *command
	sh     *shared
	args   []string  // positional arguments (only for commands that take them)
	stdin  io.Reader // for commands that read data
	stdout io.Writer // buffered; results only
	stderr io.Writer // progress, warnings, wall time; never results
	// progress is how progress shows on stderr: progressBarOn,
	// progressLines or progressNone (--progress and --quiet resolved).
	progress string
	// out is what the runner learnt while writing the result (never nil
	// in a call execute makes).
	out *outState
	// raw is the command line after the command's name (a --shard run
	// records it in its shard file); merge, when not nil, holds the shard
	// files plumb merge joins, which the command reads instead of computing.
	raw   []string
	merge *mergeInput

	// rawStdout is the destination under the buffer (stdout, or the
	// --out file's temporary), for a result that seeks back into a file
	// (the row count of a .npy header).
	rawStdout io.Writer
}

// usageError is bad usage or bad input: exit status 2.
type usageError struct {
	msg string
	err error // the error the message wraps, if any
}

func (e *usageError) Error() string { return e.msg }

// Unwrap returns the wrapped error (nil for none).
func (e *usageError) Unwrap() error { return e.err }

// usagef returns a usageError; the message must name the flag or field.
// A %w verb keeps the error it wraps reachable (errors.As finds a
// plumb.FileError through it, for the place in a JSON error).
func usagef(format string, a ...any) error {
	e := fmt.Errorf(format, a...)
	return &usageError{msg: e.Error(), err: errors.Unwrap(e)}
}

// Hooks replaced by tests: the clock for wall times, and terminal detection.
var (
	now        = time.Now
	isTerminal = fileIsTerminal
)

// fileIsTerminal reports whether w is an *os.File on a character device.
func fileIsTerminal(w io.Writer) bool {
	f, ok := w.(*os.File)
	if !ok {
		return false
	}
	st, err := f.Stat()
	if err != nil {
		return false
	}
	return st.Mode()&os.ModeCharDevice != 0
}

// run is plumb without the process around it: it parses args, runs the
// command and returns the exit status. Results go to stdout; help goes to
// stdout when asked for; diagnostics go to stderr.
func run(ctx context.Context, args []string, stdin io.Reader, stdout, stderr io.Writer) int {
	if len(args) == 0 {
		fmt.Fprint(stderr, "usage: plumb COMMAND [flags]\nrun 'plumb help' for the commands\n")
		return exitUsage
	}
	switch args[0] {
	case "-h", "-help", "--help":
		if err := writeMainHelp(stdout); err != nil {
			return exitFailed
		}
		return exitOK
	case "-version", "--version":
		if err := writeVersion(stdout); err != nil {
			return exitFailed
		}
		return exitOK
	}
	cmd := lookup(args[0])
	if cmd == nil {
		fmt.Fprintf(stderr, "plumb: unknown command %q\nrun 'plumb help' for the commands\n", args[0])
		if asksJSON(nil, args[1:]) {
			writeErrorJSON(stdout, args[0], nil, nil, nil, usagef("unknown command %q", args[0]), exitUsage)
		}
		return exitUsage
	}
	return execute(ctx, cmd, args[1:], stdin, stdout, stderr)
}

// execute parses the flags of cmd, runs it and maps its error to an exit
// status. With --format json an error that leaves no result on stdout is
// written there as a JSON document too (errorJSON); with --out the result
// goes to that file, whole or not at all (outFile).
func execute(ctx context.Context, cmd *command, args []string, stdin io.Reader, stdout, stderr io.Writer) int {
	fs, sh, work := newFlagSet(cmd)
	// fail reports err, which ended the command before any result was
	// written.
	fail := func(err error, jsonAsked bool) int {
		code := report(stderr, cmd, err)
		if code != exitOK && jsonAsked {
			writeErrorJSON(stdout, cmd.name, cmd, fs, sh, err, code)
		}
		return code
	}
	positional, err := parseArgs(fs, args, cmd.positional != "")
	if errors.Is(err, flag.ErrHelp) {
		if err := writeCommandHelp(stdout, cmd); err != nil {
			return exitFailed
		}
		return exitOK
	}
	if err != nil {
		return fail(&usageError{msg: flagMessage(err)}, asksJSON(fs, args))
	}
	sh.stdin = stdin
	sh.ctx = ctx
	sh.given = map[string]bool{}
	fs.Visit(func(f *flag.Flag) { sh.given[f.Name] = true })
	jsonAsked := sh.format == "json"
	if err := sh.check(cmd); err != nil {
		return fail(err, jsonAsked)
	}
	if len(positional) > 0 && cmd.positional == "" {
		return fail(usagef("unexpected argument %q (flags start with --; see 'plumb help %s')", positional[0], cmd.name), jsonAsked)
	}
	mode, err := progressMode(sh, stderr)
	if err != nil {
		return fail(err, jsonAsked)
	}
	var out *outFile
	dst := stdout
	if sh.out != "" {
		if out, err = createOut(sh.out); err != nil {
			return fail(usagef("--out %s: %v", sh.out, err), jsonAsked)
		}
		dst = out
	}
	bw := bufio.NewWriter(dst)
	cl := &call{
		cmd: cmd, sh: sh, args: positional, stdin: stdin, stdout: bw, rawStdout: dst, stderr: stderr,
		progress: mode, out: &outState{toFile: out != nil}, raw: args,
	}
	err = work(ctx, cl)
	if ferr := bw.Flush(); ferr != nil && err == nil {
		err = fmt.Errorf("writing the results to %s: %w", resultsPlace(sh), ferr)
	}
	if out != nil {
		err = cl.finishOut(out, err)
	}
	return fail(err, jsonAsked && !cl.out.written)
}

// resultsPlace names where the results go: stdout or the --out file.
func resultsPlace(sh *shared) string {
	if sh.out != "" {
		return "--out " + sh.out
	}
	return "stdout"
}

// report writes err (if any) on stderr as "plumb CMD: message" and returns
// the exit status it calls for.
func report(stderr io.Writer, cmd *command, err error) int {
	if err == nil {
		return exitOK
	}
	var ue *usageError
	if errors.As(err, &ue) {
		fmt.Fprintf(stderr, "plumb %s: %s\nrun 'plumb help %s' for usage\n", cmd.name, ue.msg, cmd.name)
		return exitUsage
	}
	fmt.Fprintf(stderr, "plumb %s: %v\n", cmd.name, err)
	if h := failureHint(cmd, err); h != "" {
		fmt.Fprintf(stderr, "hint: %s\n", h)
	}
	return exitFailed
}

// failureHint says what a failure usually means, for the failures whose
// message alone does not tell a user what to do next.
func failureHint(cmd *command, err error) string {
	var he *hintError
	if errors.As(err, &he) {
		return he.hint
	}
	switch {
	case errors.Is(err, integrate.ErrStepUnderflow):
		s := "the step size collapsed, as it does where the solution grows without bound in finite time or the rates are singular; check the model near that time"
		if cmd.name == "trust" {
			s += ", or audit the span before it with --horizon"
		}
		return s
	case errors.Is(err, integrate.ErrStepBudget) && cmd.name == "solve":
		return "the run needed more steps than --max-steps allows: raise it, or loosen --rtol/--atol if the problem is stiff"
	}
	return ""
}

// hintError is a failure that carries its own hint, for the cases where
// only the command knows what to suggest (a fixed-step run has no
// tolerance to loosen).
type hintError struct {
	err  error
	hint string
}

func (e *hintError) Error() string { return e.err.Error() }
func (e *hintError) Unwrap() error { return e.err }

// flagMessage rewrites the flag package's messages so that flags are named
// as users type them (--name).
func flagMessage(err error) string {
	msg := err.Error()
	for _, p := range []string{"defined: -", "for flag -", "for -", "argument: -"} {
		if i := strings.Index(msg, p); i >= 0 && !strings.HasPrefix(msg[i+len(p):], "-") {
			msg = msg[:i+len(p)] + "-" + msg[i+len(p):]
			break
		}
	}
	return msg
}

// wallTime writes "plumb CMD: <what> in <duration>" on stderr unless --quiet.
// Wall time never goes into results: they must be bit-identical run to run.
func (cl *call) wallTime(start time.Time, what string) {
	if cl.sh.quiet {
		return
	}
	fmt.Fprintf(cl.stderr, "plumb %s: %s in %v\n", cl.cmd.name, what, now().Sub(start).Round(time.Microsecond))
}

// warnf writes a warning on stderr unless --quiet.
func (cl *call) warnf(format string, a ...any) {
	if cl.sh.quiet {
		return
	}
	fmt.Fprintf(cl.stderr, "plumb %s: warning: %s\n", cl.cmd.name, fmt.Sprintf(format, a...))
}

// parseArgs parses args with fs and returns the arguments that are not
// flags. Go's flag package stops at the first of those; for a command that
// takes positional arguments (interspersed), parsing goes on after each,
// so that "plumb merge a.shard b.shard --quiet" and "plumb series data.csv
// --out report.json" set their flags before the run starts. "--" ends the
// flags: everything after it is positional.
func parseArgs(fs *flag.FlagSet, args []string, interspersed bool) ([]string, error) {
	var positional []string
	for {
		if err := fs.Parse(args); err != nil {
			return nil, err
		}
		rest := fs.Args()
		if !interspersed || len(rest) == 0 {
			return append(positional, rest...), nil
		}
		if n := len(args) - len(rest); n > 0 && args[n-1] == "--" {
			return append(positional, rest...), nil
		}
		positional = append(positional, rest[0])
		args = rest[1:]
	}
}
