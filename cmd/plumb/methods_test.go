package main

import (
	"encoding/json"
	"math"
	"strings"
	"testing"
)

// keplerPeriod is the period of the Kepler orbit of the catalog (H = -1/2,
// so the semi-major axis is 1 and the period 2π: exact identity, Kepler's
// third law in the units of Hairer, Lubich & Wanner 2006, Ch. I).
const keplerPeriod = 2 * math.Pi

// keplerStart is the catalog's start at e = 0.6: q = (1-e, 0),
// p = (0, sqrt((1+e)/(1-e))) = (0, 2) (Hairer, Lubich & Wanner 2006, Ch. I).
var keplerStart = []float64{0.4, 0, 0, 2}

// orderSlack is how far a measured order may sit from the nominal one: at
// these steps the next term of the error expansion still shifts the ratio
// a little (common practice).
const orderSlack = 0.3

// returnError runs plumb solve over one Kepler period with the given
// method and --step (none for adaptive methods) and returns the distance of
// the final state from the start.
func returnError(t *testing.T, model string, t1 float64, start []float64, args ...string) float64 {
	t.Helper()
	args = append([]string{"solve", "--model", model, "--t1", formatFloat(t1), "--dt", "0", "--format", "json", "--quiet"}, args...)
	r := plumbRun(t, args...)
	if r.code != exitOK {
		t.Fatalf("%v: exit %d, stderr %q", args, r.code, r.stderr)
	}
	var out solveJSON
	if err := json.Unmarshal([]byte(r.stdout), &out); err != nil {
		t.Fatal(err)
	}
	var s float64
	for i, v := range out.Final {
		d := v - start[i]
		s += d * d
	}
	return math.Sqrt(s)
}

// TestMethodsTableOrders: each --method name maps to a method of the order
// it claims. Fixed-step methods run one Kepler period at n and 2n steps;
// the ratio of the return errors gives the measured order
// log2(e(n)/e(2n)). A name bound to the wrong constructor shows up here.
func TestMethodsTableOrders(t *testing.T) {
	tests := []struct {
		name  string
		order float64 // nominal order (the method's published order)
		n     int     // steps per period of the coarser run
	}{
		{"rk4", 4, 500},
		{"gauss1", 2, 500},
		{"gauss2", 4, 500},
		{"gauss3", 6, 250}, // fewer steps: at 1000 the error nears rounding
		{"verlet", 2, 500},
		{"verlet-dkd", 2, 500},
		{"forest-ruth", 4, 500},
		{"yoshida4", 4, 500},
		{"yoshida6", 6, 250},
		{"yoshida8", 8, 250},
		{"pefrl", 4, 500},
		{"blanes-moan4", 4, 500},
	}
	covered := map[string]bool{"dp54": true, "dp853": true, "bs32": true, "euler": true}
	for _, tt := range tests {
		covered[tt.name] = true
		t.Run(tt.name, func(t *testing.T) {
			h := keplerPeriod / float64(tt.n)
			e1 := returnError(t, "kepler", keplerPeriod, keplerStart, "--method", tt.name, "--step", formatFloat(h))
			e2 := returnError(t, "kepler", keplerPeriod, keplerStart, "--method", tt.name, "--step", formatFloat(h/2))
			if got := math.Log2(e1 / e2); math.Abs(got-tt.order) > orderSlack {
				t.Errorf("measured order %.3f (errors %.3g, %.3g), want %v ± %v", got, e1, e2, tt.order, orderSlack)
			}
		})
	}
	for _, m := range methods {
		if !covered[m.name] {
			t.Errorf("method %s has no order check", m.name)
		}
	}
}

// TestEulerOrder: explicit Euler is far from its asymptotic range on the
// eccentric Kepler orbit, so its order is measured on the convection demo
// over t in [0, 0.5] against a Dormand–Prince 8(5,3) run at rtol 1e-13,
// whose own error (below 1e-9) is far under Euler's.
func TestEulerOrder(t *testing.T) {
	ref := solveFinal(t, "--method", "dp853", "--rtol", "1e-13", "--atol", "1e-13")
	dist := func(h float64) float64 {
		y := solveFinal(t, "--method", "euler", "--step", formatFloat(h))
		var s float64
		for i := range y {
			s += (y[i] - ref[i]) * (y[i] - ref[i])
		}
		return math.Sqrt(s)
	}
	e1, e2 := dist(1e-4), dist(5e-5)
	if got := math.Log2(e1 / e2); math.Abs(got-1) > orderSlack {
		t.Errorf("Euler: measured order %.3f (errors %.3g, %.3g), want 1 ± %v", got, e1, e2, orderSlack)
	}
}

func solveFinal(t *testing.T, args ...string) []float64 {
	t.Helper()
	out, r := decodeSolve(t, append([]string{"--t1", "0.5", "--dt", "0.5"}, args...)...)
	if r.code != exitOK {
		t.Fatalf("%v: exit %d, stderr %q", args, r.code, r.stderr)
	}
	return out.Final
}

// adaptiveReturnTol bounds the return error of the adaptive pairs at the
// default tolerances (1e-10) after one period: global error grows with the
// orbit's shear, a few hundred times the local tolerance (measured 3e-8 at
// most; common practice to allow a decade more).
const adaptiveReturnTol = 1e-6

func TestAdaptiveMethodsReturn(t *testing.T) {
	for _, name := range []string{"dp54", "dp853", "bs32"} {
		if e := returnError(t, "kepler", keplerPeriod, keplerStart, "--method", name); e > adaptiveReturnTol {
			t.Errorf("%s: return error %.3g after one period, want <= %g", name, e, adaptiveReturnTol)
		}
	}
}

// TestMethodMisfit: a splitting on a model without a separable Hamiltonian
// is bad input (exit 2) naming --method and the model, both when the CLI
// sees it first and when integrate refuses it (ErrMethod).
func TestMethodMisfit(t *testing.T) {
	for _, m := range methods {
		if !m.separable {
			continue
		}
		r := plumbRun(t, "solve", "--model", "lorenz", "--method", m.name, "--step", "0.01")
		if r.code != exitUsage || r.stdout != "" || !strings.Contains(r.stderr, "--method "+m.name) || !strings.Contains(r.stderr, "model lorenz") {
			t.Errorf("%s on lorenz: exit %d, stderr %q; want 2 naming --method and the model", m.name, r.code, r.stderr)
		}
	}
	// The same refusal coming from integrate: an entry that does not declare
	// its need, so the CLI's own check lets it through.
	saved := methods
	defer func() { methods = saved }()
	probe, _ := findMethod("verlet")
	probe.name, probe.separable = "verlet-probe", false
	methods = append(append([]method(nil), saved...), probe)
	r := plumbRun(t, "solve", "--model", "rossler", "--method", "verlet-probe", "--step", "0.01")
	if r.code != exitUsage || !strings.Contains(r.stderr, "--method verlet-probe") || !strings.Contains(r.stderr, "model rossler") {
		t.Errorf("integrate's ErrMethod: exit %d, stderr %q; want 2 naming --method and the model", r.code, r.stderr)
	}
}

// TestMethodHelpNamesAll: every table entry appears in the --method help.
func TestMethodHelpNamesAll(t *testing.T) {
	h := methodHelp()
	for _, m := range methods {
		if !strings.Contains(h, m.name+" (") {
			t.Errorf("--method help lacks %s", m.name)
		}
	}
}
