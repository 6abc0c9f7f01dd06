package plumb

import (
	"fmt"
	"strings"

	"github.com/plumbdyn/plumb/integrate"
)

// writeHead writes the summary's reference line for an audit of recorded
// runs: which run is the reference and on what span and grid the runs
// are compared.
func (rc *RecordedReport) writeHead(b *strings.Builder) {
	if len(rc.Runs) > 0 {
		r := rc.Runs[0]
		src := ""
		if r.Source != "" && r.Source != r.Label {
			src = " (" + r.Source + ")"
		}
		fmt.Fprintf(b, "reference: the run %s%s; every other run is compared with it\n", r.Label, src)
	}
	grid := "the reference's own times"
	if rc.Grid == "every" {
		grid = fmt.Sprintf("a grid every %.4g", rc.Every)
	}
	fmt.Fprintf(b, "compared on %s: %s\n\n", grid, rc.SpanNote)
}

// writeNotes writes what the summary must say about the recorded runs:
// the exponent's origin, interpolated runs, runs equal to the reference to
// the last bit, and failed runs with their exit status and stderr.
func (rc *RecordedReport) writeNotes(b *strings.Builder, growth integrate.GrowthKind) {
	undetermined := growth == integrate.GrowthUndetermined
	if rc.ToleranceNote != "" {
		fmt.Fprintf(b, "warning: %s\n", rc.ToleranceNote)
	}
	if undetermined {
		b.WriteString("(the runs part within a few output times: write them at shorter intervals to see how their difference grows)\n")
	}
	if rc.ExponentNote != "" {
		fmt.Fprintf(b, "the exponent is %s\n", rc.ExponentNote)
	}
	var interp []string
	for _, r := range rc.Runs {
		if r.Interpolated {
			interp = append(interp, r.Label)
		}
	}
	if len(interp) > 0 {
		fmt.Fprintf(b, "interpolated onto the grid (the interpolation error adds to their divergence): %s\n", joinNames(interp))
	}
	for _, r := range rc.Runs {
		if r.SameAsReference {
			fmt.Fprintf(b, "warning: run %s equals the reference to the last bit: what it varies (%s) probably did nothing (was the setting passed to the program, and used?)\n", r.Label, r.Effect)
		}
	}
	for _, r := range rc.Runs {
		f := r.Failure
		if f == nil {
			continue
		}
		fmt.Fprintf(b, "run %s failed: %s", r.Label, f.Why)
		if f.ExitStatus >= 0 && !strings.Contains(f.Why, "status") {
			fmt.Fprintf(b, " (exit status %d)", f.ExitStatus)
		}
		b.WriteByte('\n')
		if tail := strings.TrimSpace(f.StderrTail); tail != "" {
			for _, line := range strings.Split(tail, "\n") {
				fmt.Fprintf(b, "  | %s\n", line)
			}
		}
	}
}
