package main

import (
	"strings"
	"testing"
)

// goldenFormats are the (command, format) pairs whose output is a golden
// file here, beside the ones the commands' own tests keep (table output
// of every command; solve in every format). Each uses the small fixed run
// of that command's golden test, so one file per format shows exactly
// what a notebook or script reads. The JSON's arch field is the test's
// placeholder (see run_test.go), so the files are the same on every
// architecture; the arm64 check under qemu-user compares them too.
var goldenFormats = []struct {
	file string
	args []string
}{
	{"trust_lorenz.json", []string{"trust", "--horizon", "5"}},
	{"trust_lorenz.csv", []string{"trust", "--horizon", "5"}},
	{"trust_logistic.json", []string{"trust", "--model", "logistic", "--horizon", "60"}},
	{"spectrum_lorenz.json", []string{"spectrum", "--t1", "200", "--transient", "20"}},
	{"spectrum_lorenz.csv", []string{"spectrum", "--t1", "200", "--transient", "20"}},
	{"spectrum_henon.json", []string{"spectrum", "--model", "henon", "--iterations", "20000"}},
	{"scan_logistic.csv", scanArgs},
	{"scan_logistic.json", scanArgs},
	{"scan_logistic.jsonl", scanArgs},
	{"scan_logistic.npy", scanArgs},
	{"ensemble_lorenz.json", goldenEnsemble},
	{"ensemble_lorenz.jsonl", goldenEnsemble},
	{"ensemble_lorenz.npy", goldenEnsemble},
	{"cycles_logistic.csv", cyclesArgs},
	{"cycles_logistic.json", cyclesArgs},
	// With a few surrogates: their Fourier transform is embed's own, with
	// the same bits on amd64 and arm64, and this file is compared on both.
	{"series_henon.json", []string{"series", seriesFile, "--column", "x", "--surrogates", "5"}},
}

func TestGoldenFormats(t *testing.T) {
	for _, g := range goldenFormats {
		format := g.file[strings.LastIndexByte(g.file, '.')+1:]
		t.Run(g.file, func(t *testing.T) {
			args := append(append([]string{}, g.args...), "--format", format, "--quiet")
			r := plumbRun(t, args...)
			if r.code != exitOK {
				t.Fatalf("plumb %s: exit %d, stderr %q", strings.Join(args, " "), r.code, r.stderr)
			}
			golden(t, g.file, r.stdout)
		})
	}
}
