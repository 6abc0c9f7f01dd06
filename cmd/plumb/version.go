package main

import (
	"context"
	"flag"
	"fmt"
	"io"
	"runtime"
)

// version is plumb's version, written into every JSON result as
// "plumb_version". Bump it here, and only here, on a release.
const version = "0.1.0-dev"

var versionCmd = &command{
	name:    "version",
	summary: "print plumb's version and the architecture it runs on",
	doc: `Print plumb's version, the operating system and architecture it was built
for (results are bit-identical across architectures; every JSON result
records both) and the Go release that built it. 'plumb --version' prints
the same line.

--format json writes one object; JSON keys: plumb_version, arch, command,
status, error, os, go_version.`,
	formats: []string{"table", "json"},
	refuses: []string{"model", "file", "set", "start", "plot", "plot-size"},
	setup: func(fs *flag.FlagSet, sh *shared) func(context.Context, *call) error {
		return runVersion
	},
}

// versionJSON is the --format json result of plumb version.
type versionJSON struct {
	header
	// Status is always completed and Error null: nothing can fail.
	Status string  `json:"status"`
	Error  errText `json:"error"`
	// OS is the GOOS of the build, GoVersion the Go release that built it.
	OS        string `json:"os"`
	GoVersion string `json:"go_version"`
}

func runVersion(ctx context.Context, cl *call) error {
	return cl.runJob(ctx, job{
		what:    "the version report",
		refusal: "the version report refused the input",
		run: func(context.Context, func(float64)) (*outcome, error) {
			return &outcome{
				json: func() any {
					return versionJSON{header: newHeader("version"), Status: "completed", OS: runtime.GOOS, GoVersion: runtime.Version()}
				},
				table: writeVersion,
			}, nil
		},
	})
}

// writeVersion writes the line of 'plumb --version': "plumb VERSION
// OS/ARCH (GO)".
func writeVersion(w io.Writer) error {
	_, err := fmt.Fprintf(w, "plumb %s %s/%s (%s)\n", version, runtime.GOOS, goarch, runtime.Version())
	return err
}
