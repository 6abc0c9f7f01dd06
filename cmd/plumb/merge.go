package main

import (
	"context"
	"errors"
	"flag"
	"fmt"
	"strings"

	"github.com/plumbdyn/plumb"
)

var mergeCmd = &command{
	name:      "merge",
	summary:   "join the shard files of a split scan, ensemble or --exec ladder into one run's output",
	refuses:   []string{"model", "file", "set", "start", "plot", "plot-size"},
	refuseWhy: "the settings of a merge come from the shard files",
	doc: `Join the shard files that the pieces of a split run wrote (plumb scan,
plumb ensemble or plumb trust --exec with --shard I/N) and write exactly the
bytes the same command without --shard writes: its table, CSV, JSON, JSON
Lines or .npy, and its --plot picture. The settings come from the files:
every piece must come from the same plumb version, command line and input
files (--file, --members-file: their SHA-256 is checked against the files
as they are now, by the names the pieces were given, so run merge where
the pieces ran), and each piece 1..N must be given once and have
finished; otherwise merge names the missing, repeated or mismatched files
and writes nothing. --format recorded (the default) writes the format the
pieces' command line asked for; another --format replaces it, and
--quiet silences the merged command's stderr too.

A scan's and a ladder's pieces hold their rows and runs; an ensemble's
pieces hold the members' states at the report times, and merge computes
the spread, the parting times and the finite-size exponents from them;
the --exec audit runs on the joined runs.`,
	formats:    []string{"recorded", "table", "csv", "json", "jsonl", "npy"},
	positional: "FILES...",
	setup:      setupMerge,
}

// mergeInput is the joined shard files a merged command reads.
type mergeInput struct {
	set *plumb.ShardSet
}

func setupMerge(fs *flag.FlagSet, sh *shared) func(context.Context, *call) error {
	return runMerge
}

// runMerge reads the shard files and runs the recorded command on them.
func runMerge(ctx context.Context, cl *call) error {
	if len(cl.args) == 0 {
		return usagef("no shard files: give the files the pieces wrote (plumb merge FILES...)")
	}
	var pieces []*plumb.ShardPiece
	for _, name := range cl.args {
		p, err := plumb.ReadShardFile(name)
		if err != nil {
			return usagef("%s", strings.TrimPrefix(err.Error(), "plumb: "))
		}
		pieces = append(pieces, p)
	}
	set, err := plumb.JoinShards(pieces)
	if err != nil {
		return usagef("%s", strings.TrimPrefix(err.Error(), "plumb: "))
	}
	h := set.Pieces[0].Header
	if h.Version != version {
		return usagef("%s: written by plumb %s; this is plumb %s, which may compute other bits: merge with the version that ran the pieces", set.Pieces[0].Name, h.Version, version)
	}
	cmd := lookup(h.Command)
	if cmd == nil || (cmd != scanCmd && cmd != ensembleCmd && cmd != trustCmd) {
		return usagef("%s: command %q is not one plumb splits (scan, ensemble, trust --exec)", set.Pieces[0].Name, h.Command)
	}
	for _, in := range h.Inputs {
		sum, err := fileSHA256(in.Name)
		if err != nil {
			return usagef("--%s %s (read by the pieces): %v", in.Flag, in.Name, err)
		}
		if sum != in.SHA256 {
			return usagef("--%s %s has changed since the pieces read it (SHA-256 %.12s, now %.12s)", in.Flag, in.Name, in.SHA256, sum)
		}
	}
	args := append([]string(nil), h.Args...)
	if cl.sh.format != "recorded" {
		args = append(args, "--format", cl.sh.format)
	}
	if cl.sh.quiet {
		args = append(args, "--quiet")
	}
	return runRecorded(ctx, cl, cmd, args, &mergeInput{set: set})
}

// runRecorded parses the recorded command line of cmd and runs cmd on the
// joined pieces, as execute runs a command on the user's command line.
func runRecorded(ctx context.Context, outer *call, cmd *command, args []string, in *mergeInput) error {
	fs, sh, work := newFlagSet(cmd)
	if err := fs.Parse(args); err != nil {
		if errors.Is(err, flag.ErrHelp) {
			err = fmt.Errorf("-help")
		}
		return usagef("the recorded command line plumb %s %s: %s", cmd.name, strings.Join(args, " "), flagMessage(err))
	}
	sh.stdin, sh.ctx = outer.stdin, ctx
	sh.given = map[string]bool{}
	fs.Visit(func(f *flag.Flag) { sh.given[f.Name] = true })
	if err := sh.check(cmd); err != nil {
		return err
	}
	cl := &call{cmd: cmd, sh: sh, args: fs.Args(), stdin: outer.stdin, stdout: outer.stdout, rawStdout: outer.rawStdout, stderr: outer.stderr,
		progress: quietOr(sh, outer.progress), out: outer.out, raw: args, merge: in}
	return work(ctx, cl)
}

// quietOr is the progress mode of a recorded command line run by plumb
// merge: none when that line asked for --quiet, else the merge's own.
func quietOr(sh *shared, mode string) string {
	if sh.quiet {
		return progressNone
	}
	return mode
}
