package main

import (
	"bytes"
	"context"
	"errors"
	"fmt"
	"io"
	"strings"
	"testing"

	"github.com/plumbdyn/plumb"
	"github.com/plumbdyn/plumb/embed"
	"github.com/plumbdyn/plumb/integrate"
	"github.com/plumbdyn/plumb/lyap"
	"github.com/plumbdyn/plumb/maps"
)

// TestStartFailureExit: a run that computed nothing exits 2 when the SDK
// refused its input and 1 when it failed, the same in every command (a
// dimension error used to exit 2 from solve and 1 from spectrum).
func TestStartFailureExit(t *testing.T) {
	cmd := &command{name: "spectrum"}
	j := job{what: "the spectrum of lorenz", refusal: "the estimator refused the settings"}
	for _, c := range []struct {
		name string
		err  error
		want int
	}{
		{"integrate settings", fmt.Errorf("integrate: Settings.RelTol = -1: %w", integrate.ErrSettings), exitUsage},
		{"integrate dimension", fmt.Errorf("integrate: Y0 has length 2: %w", integrate.ErrDimension), exitUsage},
		{"integrate span", integrate.ErrSpan, exitUsage},
		{"integrate method", integrate.ErrMethod, exitUsage},
		{"integrate ladder", integrate.ErrLadder, exitUsage},
		{"lyap settings", fmt.Errorf("lyap: Settings.Blocks = 1: %w", lyap.ErrSettings), exitUsage},
		{"lyap count", lyap.ErrCount, exitUsage},
		{"lyap dimension", lyap.ErrDimension, exitUsage},
		{"horizon", plumb.ErrHorizon, exitUsage},
		{"steps", maps.ErrSteps, exitUsage},
		{"tolerance", plumb.ErrTolerance, exitUsage},
		{"unusable runs", fmt.Errorf("plumb: run \"loose\": no rows: %w", plumb.ErrRuns), exitUsage},
		{"unknown name", fmt.Errorf("plumb: no state \"w\": %w", plumb.ErrUnknown), exitUsage},
		{"embedding beyond the series", embed.ErrEmbedding, exitUsage},
		{"embed settings", fmt.Errorf("embed: Settings.Lag = -1: %w", embed.ErrSettings), exitUsage},
		{"a usage error of the run's own", usagef("--run tol=x.csv: no such file"), exitUsage},
		{"non-finite start", fmt.Errorf("derivative is NaN at t=0: %w", integrate.ErrNonFinite), exitFailed},
		{"step budget", integrate.ErrStepBudget, exitFailed},
		{"canceled", context.Canceled, exitFailed},
		{"no jacobian", lyap.ErrNoJacobian, exitFailed},
	} {
		t.Run(c.name, func(t *testing.T) {
			var stderr bytes.Buffer
			err := startFailure(j, c.err)
			if got := report(&stderr, cmd, err); got != c.want {
				t.Errorf("exit %d, want %d (%s)", got, c.want, stderr.String())
			}
			if !strings.Contains(stderr.String(), c.err.Error()) {
				t.Errorf("stderr %q does not say why (%q)", stderr.String(), c.err)
			}
		})
	}
}

// TestStartFailureReword: a command's own wording of a refusal (a method
// that does not fit the model) comes before the table.
func TestStartFailureReword(t *testing.T) {
	own := usagef("--method verlet does not fit model lorenz")
	j := job{what: "the integration of lorenz", refusal: "the integrator refused the settings",
		reword: func(err error) error {
			if errors.Is(err, integrate.ErrMethod) {
				return own
			}
			return nil
		}}
	if got := startFailure(j, integrate.ErrMethod); got != own {
		t.Errorf("ErrMethod: got %v, want the command's own %v", got, own)
	}
	var ue *usageError
	if got := startFailure(j, integrate.ErrSpan); !errors.As(got, &ue) || !strings.HasPrefix(ue.msg, "the integrator refused the settings: ") {
		t.Errorf("ErrSpan: got %v, want the refusal", got)
	}
}

// TestRunJobPartial: a run that stopped early writes what it did, draws
// nothing when there is nothing to draw, reports its warnings and wall
// time, and returns the run's error (exit 1).
func TestRunJobPartial(t *testing.T) {
	var stdout, stderr bytes.Buffer
	stop := errors.New("stopped at t=3")
	cl := &call{cmd: &command{name: "solve"}, sh: &shared{format: "table", plot: "never-written.svg"}, stdout: &stdout, stderr: &stderr}
	err := cl.runJob(context.Background(), job{
		what: "the test run", refusal: "refused",
		run: func(context.Context, func(float64)) (*outcome, error) {
			return &outcome{
				table:    func(w io.Writer) error { _, err := io.WriteString(w, "row 1\n"); return err },
				chart:    func() *lineChart { return nil },
				warnings: []string{"looks stiff"},
				done:     "1 sample",
				err:      stop,
			}, nil
		},
	})
	if err != stop {
		t.Errorf("error %v, want the run's %v", err, stop)
	}
	if stdout.String() != "row 1\n" {
		t.Errorf("stdout %q, want the partial table", stdout.String())
	}
	for _, want := range []string{"plumb solve: warning: looks stiff\n", "plumb solve: 1 sample in "} {
		if !strings.Contains(stderr.String(), want) {
			t.Errorf("stderr %q lacks %q", stderr.String(), want)
		}
	}
}

// TestRunJobHooks: --format jsonl writes the outcome's jsonl, --plot goes
// to draw when the picture is not one chart, and a further file is
// written after it; a failure to write that file names its flag.
func TestRunJobHooks(t *testing.T) {
	var stdout, stderr bytes.Buffer
	var drawn, wrote []string
	cl := &call{cmd: &command{name: "ensemble"}, sh: &shared{format: "jsonl", plot: "view.svg"}, stdout: &stdout, stderr: &stderr}
	bad := errors.New("disk full")
	err := cl.runJob(context.Background(), job{
		what: "the test run", refusal: "refused",
		run: func(context.Context, func(float64)) (*outcome, error) {
			return &outcome{
				table: func(w io.Writer) error { _, err := io.WriteString(w, "table\n"); return err },
				jsonl: func(w io.Writer) error { _, err := io.WriteString(w, "{\"member\":0}\n"); return err },
				draw: func(name string, _ plotSize) error {
					drawn = append(drawn, name)
					return nil
				},
				files: []extraFile{{flag: "animate", name: "a.gif", write: func() error {
					wrote = append(wrote, "a.gif")
					return bad
				}}},
			}, nil
		},
	})
	if stdout.String() != "{\"member\":0}\n" {
		t.Errorf("stdout %q, want the jsonl", stdout.String())
	}
	if len(drawn) != 1 || drawn[0] != "view.svg" || len(wrote) != 1 {
		t.Errorf("drawn %v, wrote %v", drawn, wrote)
	}
	if !errors.Is(err, bad) || !strings.Contains(err.Error(), "--animate a.gif") {
		t.Errorf("error %v, want the file's failure naming --animate", err)
	}
}
