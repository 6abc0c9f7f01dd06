package lyap

import (
	"context"
	"errors"
	"math"
	"strings"
	"testing"

	"github.com/plumbdyn/plumb/integrate"
	"gonum.org/v1/gonum/mat"
)

func TestFlowInputErrors(t *testing.T) {
	lorenz := modelProblem(t, "lorenz")
	nanStart := lorenz
	nanStart.Y0 = []float64{1, math.NaN(), 1}
	noF := lorenz
	noF.F = nil
	empty := lorenz
	empty.Y0 = nil
	for _, c := range []struct {
		name string
		p    integrate.Problem
		k    int
		s    *Settings
		want error
		text string
	}{
		{"zero exponents", lorenz, 0, nil, ErrCount, "0 exponents"},
		{"more than dimension", lorenz, 4, nil, ErrCount, "dimension is 3"},
		{"nil field", noF, 3, nil, ErrSystem, "Problem.F"},
		{"empty start", empty, 1, nil, ErrDimension, "Y0 is empty"},
		{"non-finite start", nanStart, 3, nil, ErrNonFinite, "Y0[1]"},
		{"negative duration", lorenz, 3, &Settings{Duration: -1}, ErrSettings, "Settings.Duration"},
		{"NaN target", lorenz, 3, &Settings{Target: math.NaN()}, ErrSettings, "Settings.Target"},
		{"one block", lorenz, 3, &Settings{Blocks: 1}, ErrSettings, "Settings.Blocks"},
		{"growth below 1", lorenz, 3, &Settings{MaxGrowth: 0.5}, ErrSettings, "Settings.MaxGrowth"},
		{"negative tolerance", lorenz, 3, &Settings{RelTol: -1}, ErrSettings, "RelTol"},
	} {
		t.Run(c.name, func(t *testing.T) {
			sp, err := Exponents(context.Background(), c.p, c.k, c.s)
			if !errors.Is(err, c.want) {
				t.Fatalf("error %v, want %v", err, c.want)
			}
			if sp != nil {
				t.Errorf("spectrum returned before any work: %+v", sp)
			}
			if !strings.HasPrefix(err.Error(), "lyap: ") || !strings.Contains(err.Error(), c.text) {
				t.Errorf("message %q, want prefix \"lyap: \" and %q", err, c.text)
			}
		})
	}
}

func TestMapInputErrors(t *testing.T) {
	h := henon{1.4, 0.3}
	noJac := MapFunc{N: 2, F: h.Next}
	for _, c := range []struct {
		name string
		m    Map
		x0   []float64
		k    int
		want error
	}{
		{"no jacobian", noJac, []float64{0, 0}, 2, ErrNoJacobian},
		{"nil map", nil, []float64{0, 0}, 2, ErrSystem},
		{"wrong start length", h, []float64{0}, 1, ErrDimension},
		{"NaN start", h, []float64{math.NaN(), 0}, 1, ErrNonFinite},
		{"zero exponents", h, []float64{0, 0}, 0, ErrCount},
		{"more than dimension", h, []float64{0, 0}, 3, ErrCount},
	} {
		t.Run(c.name, func(t *testing.T) {
			sp, err := MapExponents(context.Background(), c.m, c.x0, c.k, nil)
			if !errors.Is(err, c.want) || sp != nil {
				t.Fatalf("error %v (spectrum %v), want %v", err, sp, c.want)
			}
		})
	}
	// MapFunc with a Jacobian works like the type it wraps.
	full := MapFunc{N: 2, F: h.Next, J: h.Jacobian}
	a, err := MapExponents(context.Background(), full, []float64{0.1, 0.1}, 2, &Settings{Iterations: 1000})
	if err != nil {
		t.Fatal(err)
	}
	b, _ := MapExponents(context.Background(), h, []float64{0.1, 0.1}, 2, &Settings{Iterations: 1000})
	if a.Exponents[0] != b.Exponents[0] || a.Exponents[1] != b.Exponents[1] {
		t.Errorf("MapFunc %v, map %v", a.Exponents, b.Exponents)
	}
}

// brokenJacobian wraps the logistic map at r = 4 and returns a NaN
// derivative after a number of calls.
type brokenJacobian struct {
	logistic
	calls, after int
}

func (m *brokenJacobian) Jacobian(x []float64, dst *mat.Dense) {
	m.calls++
	if m.calls > m.after {
		dst.Set(0, 0, math.NaN())
		return
	}
	m.logistic.Jacobian(x, dst)
}

// TestNonFiniteGrowthKeepsHistory: a tangent growth that stops being finite
// ends the run with ErrNonFinite, and the partial spectrum keeps what was
// done.
func TestNonFiniteGrowthKeepsHistory(t *testing.T) {
	m := &brokenJacobian{logistic: logistic{4}, after: 60_000}
	sp, err := MapExponents(context.Background(), m, []float64{0.3}, 1, &Settings{Iterations: 100_000, Discard: 1000, Blocks: 10})
	if !errors.Is(err, ErrNonFinite) {
		t.Fatalf("error %v, want ErrNonFinite", err)
	}
	var ge *GrowthError
	if !errors.As(err, &ge) || ge.T < 60_000 || ge.T > 60_100 {
		t.Errorf("error %v, want a GrowthError near iteration 60000", err)
	}
	if sp == nil || len(sp.History) < 5 || sp.StdErr == nil {
		t.Fatalf("partial spectrum %+v", sp)
	}
	// What was done is still ln 2 (exact, REFERENCES.md §1b) within its error.
	if d := math.Abs(sp.Exponents[0] - math.Ln2); d > logistic4Tol {
		t.Errorf("partial estimate %g, want ln 2", sp.Exponents[0])
	}
}

// TestFlowNonFiniteJacobian: a Jacobian that turns NaN makes the tangent
// state non-finite; the integrator cannot step on, and the error wraps both
// ErrNonFinite sentinels with the partial result.
func TestFlowNonFiniteJacobian(t *testing.T) {
	p := modelProblem(t, "lorenz")
	jac := p.Jac
	p.Jac = func(t float64, y []float64, dst *mat.Dense) {
		jac(t, y, dst)
		if t > 30 {
			dst.Set(0, 0, math.Inf(1))
		}
	}
	sp, err := Exponents(context.Background(), p, 3, &Settings{Duration: 100, Transient: 5, Blocks: 10})
	if !errors.Is(err, ErrNonFinite) || !errors.Is(err, integrate.ErrNonFinite) {
		t.Fatalf("error %v, want ErrNonFinite (lyap and integrate)", err)
	}
	if sp == nil || len(sp.History) < 2 || sp.Duration < 20 || sp.Duration > 26 {
		t.Fatalf("partial spectrum: duration %g, history %d", sp.Duration, len(sp.History))
	}
}

// TestCancel: cancellation through ctx ends a long run with the context's
// error and the partial spectrum; Progress reports along the way.
func TestCancel(t *testing.T) {
	p := modelProblem(t, "lorenz")
	ctx, cancel := context.WithCancel(context.Background())
	defer cancel()
	var last, total float64
	s := &Settings{Duration: 1e5, Transient: 10, Blocks: 10_000, Progress: func(done, tot float64) {
		last, total = done, tot
		if done > 200 {
			cancel()
		}
	}}
	sp, err := Exponents(ctx, p, 3, s)
	if !errors.Is(err, context.Canceled) {
		t.Fatalf("error %v, want context.Canceled", err)
	}
	if sp == nil || sp.Duration < 180 || len(sp.History) == 0 || sp.StdErr == nil {
		t.Fatalf("partial spectrum %+v", sp)
	}
	if total != 1e5+10 || last < 200 {
		t.Errorf("progress %g of %g", last, total)
	}
	// Maps check ctx too.
	mctx, mcancel := context.WithCancel(context.Background())
	mcancel()
	msp, err := MapExponents(mctx, henon{1.4, 0.3}, []float64{0.1, 0.1}, 2, nil)
	if !errors.Is(err, context.Canceled) || msp == nil {
		t.Fatalf("map: error %v, spectrum %v", err, msp)
	}
}

func TestFiniteTimeErrors(t *testing.T) {
	p := modelProblem(t, "lorenz")
	for _, tau := range []float64{0, -1, math.NaN(), math.Inf(1), 2000} {
		if _, err := FiniteTime(context.Background(), p, 3, tau, &Settings{Duration: 100}); !errors.Is(err, ErrSettings) {
			t.Errorf("tau = %v: error %v, want ErrSettings", tau, err)
		}
	}
}

// TestTooShort: a completed run with fewer than two blocks has no standard
// error; it says so with ErrTooShort and still returns the estimate.
func TestTooShort(t *testing.T) {
	sp, err := MapExponents(context.Background(), henon{1.4, 0.3}, []float64{0.1, 0.1}, 2, &Settings{Iterations: 1, Discard: 10})
	if !errors.Is(err, ErrTooShort) || sp == nil || sp.StdErr != nil || sp.Duration != 1 {
		t.Fatalf("error %v, spectrum %+v", err, sp)
	}
	p := modelProblem(t, "lorenz")
	sp, err = Largest(context.Background(), p, &Settings{Duration: 1e-4, Transient: 1})
	if !errors.Is(err, ErrTooShort) || sp == nil {
		t.Fatalf("flow: error %v, spectrum %+v", err, sp)
	}
}
