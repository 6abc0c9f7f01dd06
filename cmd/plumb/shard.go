package main

// --shard i/n: one piece of a scan, an ensemble or an --exec ladder, written
// as a shard file (plumb.ShardWriter) that plumb merge joins.

import (
	"crypto/sha256"
	"encoding/hex"
	"flag"
	"fmt"
	"io"
	"os"
	"strings"

	"github.com/plumbdyn/plumb"
)

// lookupEnv reads the environment; tests replace it.
var lookupEnv = os.LookupEnv

// shardAuto is the --shard value that reads the piece from the scheduler's
// environment.
const shardAuto = "auto"

// shardFlagDoc is the help of --shard, shared by the commands that take it.
const shardFlagDoc = "compute only piece `I/N` (1 <= I <= N: contiguous blocks of the work) and write a shard file for 'plumb merge'; " +
	"auto reads the piece of a Slurm array task (SLURM_ARRAY_TASK_ID, _MIN, _COUNT or _MAX) or a Kubernetes indexed Job " +
	"(JOB_COMPLETION_INDEX, with the count in PLUMB_SHARD_COUNT); without --shard the run is never split (inside such a task it says so on stderr)"

// addShardFlag registers --shard on fs.
func addShardFlag(fs *flag.FlagSet, p *string) {
	fs.StringVar(p, "shard", "", shardFlagDoc)
}

// resolveShard turns --shard into a piece and says on stderr which piece
// this run is and where that came from. "" (no --shard) is the whole run.
func (cl *call) resolveShard(text string) (plumb.Shard, error) {
	if !cl.sh.given["shard"] {
		if cl.merge == nil {
			cl.warnUnsplit()
		}
		return plumb.Shard{}, nil
	}
	if cl.merge != nil {
		return plumb.Shard{}, usagef("--shard %s: the shard files hold a --shard already", text)
	}
	var sh plumb.Shard
	var from string
	var err error
	if strings.TrimSpace(text) == shardAuto {
		sh, from, err = plumb.ShardFromEnv(lookupEnv)
		if err != nil {
			return sh, usagef("--shard auto: %s", strings.TrimPrefix(err.Error(), "plumb: "))
		}
	} else {
		sh, err = plumb.ParseShard(text)
		if err != nil {
			return sh, usagef("--shard %s: %s", text, strings.TrimPrefix(err.Error(), "plumb: "))
		}
		from = "--shard " + text
	}
	if cl.sh.file == "-" {
		return sh, usagef("--shard %s: --file -: a piece of a split run must name its system file, which plumb merge reads again", text)
	}
	if !cl.sh.quiet {
		fmt.Fprintf(cl.stderr, "plumb %s: shard %s (from %s)\n", cl.cmd.name, sh, from)
	}
	return sh, nil
}

// warnUnsplit warns when a run without --shard runs inside a Slurm array
// task or a Kubernetes indexed Job. The whole run is computed: the
// environment is read only with --shard auto, so that a program started
// once per task for reasons of its own is never cut silently; but in an
// array job meant to split this run, every task would do all the work.
func (cl *call) warnUnsplit() {
	for _, name := range []string{plumb.SlurmTaskIDEnv, plumb.KubeIndexEnv} {
		if v, ok := lookupEnv(name); ok {
			cl.warnf("%s=%s is set but --shard is not: this task computes the whole run (give --shard auto to compute only its piece)", name, v)
			return
		}
	}
}

// unrecorded are the flags a shard file leaves out of its command line:
// they change where and how a piece runs (its piece, its output file, its
// progress, its goroutines), never the result, so pieces that differ in
// them still join, and merge does not inherit them. The value says
// whether the flag takes a value.
var unrecorded = map[string]bool{"shard": true, "out": true, "progress": true, "workers": true, "quiet": false}

// recordedArgs returns args without the unrecorded flags and their values.
func recordedArgs(args []string) []string {
	var out []string
	for i := 0; i < len(args); i++ {
		a := args[i]
		if a == "--" || a == "-" || !strings.HasPrefix(a, "-") {
			if a == "--" {
				return append(out, args[i:]...)
			}
			out = append(out, a)
			continue
		}
		name, _, hasValue := strings.Cut(strings.TrimLeft(a, "-"), "=")
		takesValue, skip := unrecorded[name]
		if !skip {
			out = append(out, a)
			continue
		}
		if takesValue && !hasValue {
			i++ // the value is the next argument
		}
	}
	return out
}

// shardInputs are the files the run reads (--file and the flags named in
// more), with their SHA-256.
func (cl *call) shardInputs(more map[string]string) ([]plumb.ShardInput, error) {
	files := []struct{ flag, name string }{{"file", cl.sh.file}}
	for _, f := range []string{"members-file"} {
		if more[f] != "" {
			files = append(files, struct{ flag, name string }{f, more[f]})
		}
	}
	var out []plumb.ShardInput
	for _, f := range files {
		if f.name == "" {
			continue
		}
		sum, err := fileSHA256(f.name)
		if err != nil {
			return nil, usagef("--%s %s: %v", f.flag, f.name, err)
		}
		out = append(out, plumb.ShardInput{Flag: f.flag, Name: f.name, SHA256: sum})
	}
	return out, nil
}

// fileSHA256 is the hex SHA-256 of a file's bytes.
func fileSHA256(name string) (string, error) {
	f, err := os.Open(name)
	if err != nil {
		return "", err
	}
	defer f.Close()
	h := sha256.New()
	if _, err := io.Copy(h, f); err != nil {
		return "", err
	}
	return hex.EncodeToString(h.Sum(nil)), nil
}

// shardWriter starts the shard file of piece sh on stdout: units names the
// work split, total their number.
func (cl *call) shardWriter(sh plumb.Shard, units string, total int, more map[string]string) (*plumb.ShardWriter, error) {
	inputs, err := cl.shardInputs(more)
	if err != nil {
		return nil, err
	}
	lo, hi := sh.Range(total)
	if lo == hi {
		cl.warnf("shard %s has no %s: %d %s split %d ways", sh, units, total, units, sh.Count)
	}
	h := plumb.ShardHeader{Version: version, Command: cl.cmd.name, Args: recordedArgs(cl.raw), Inputs: inputs,
		Shard: plumb.ShardJSON{Index: sh.Index, Count: sh.Count}, Units: units, Total: total, First: lo, End: hi}
	return plumb.NewShardWriter(cl.stdout, h)
}
