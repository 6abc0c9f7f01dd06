package lyap

import (
	"context"
	"errors"
	"testing"

	"github.com/plumbdyn/plumb/integrate"
)

// TestTangent3Refused: a fused evaluation that does not give the bits of
// the Problem's F and Jac at the start (another system, other parameters,
// a sum in another order) is refused with ErrSettings before any work,
// whatever the kind of the mismatch.
func TestTangent3Refused(t *testing.T) {
	lorenz := modelTangent3(t, "lorenz", nil)
	cases := []struct {
		name string
		tf   Tangent3
	}{
		{"other parameters", modelTangent3(t, "lorenz", []float64{10, 29, 8.0 / 3})},
		{"other system", modelTangent3(t, "rossler", nil)},
		{"wrong field", func(tt float64, x, dx *[3]float64, v, dv *[9]float64) float64 {
			tr := lorenz(tt, x, dx, v, dv)
			dx[2] = -dx[2]
			return tr
		}},
		{"wrong trace", func(tt float64, x, dx *[3]float64, v, dv *[9]float64) float64 {
			return lorenz(tt, x, dx, v, dv) + 1
		}},
		{"sum in another order", func(tt float64, x, dx *[3]float64, v, dv *[9]float64) float64 {
			tr := lorenz(tt, x, dx, v, dv)
			// Row 2 of J = [y, x, -b] summed last term first.
			y, xx, b := x[1], x[0], 8.0/3
			for c := 0; c < 3; c++ {
				var s float64
				s += float64(-b * v[6+c])
				s += float64(y * v[c])
				s += float64(xx * v[3+c])
				dv[6+c] = s
			}
			return tr
		}},
	}
	p := modelProblem(t, "lorenz")
	p.Y0 = []float64{-3.1, 2.7, 21.3} // on no axis: every entry of J nonzero but one
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			sp, err := Exponents(context.Background(), p, 3, &Settings{Duration: 10, Transient: 1, Tangent3: c.tf})
			if sp != nil || !errors.Is(err, ErrSettings) {
				t.Fatalf("got spectrum %v, error %v; want none and ErrSettings", sp != nil, err)
			}
		})
	}
	// The model's own evaluation passes the same check.
	if _, err := Exponents(context.Background(), p, 3, &Settings{Duration: 10, Transient: 1, Tangent3: lorenz}); err != nil {
		t.Fatalf("the model's Tangent3 refused: %v", err)
	}
}

// TestTangent3Panics: a panic in the fused evaluation, at the set-up check
// or during the run, ends with a CallbackError naming the vector field (the
// function the integrator calls) and a time at or after the panic's; the
// run keeps its partial spectrum.
func TestTangent3Panics(t *testing.T) {
	const tPanic = 1.5
	lorenz := modelTangent3(t, "lorenz", nil)
	for _, c := range []struct {
		name    string
		from    float64 // the evaluation panics at t >= from
		partial bool
	}{
		{"at the start", 0, false},
		{"during the run", tPanic, true},
	} {
		t.Run(c.name, func(t *testing.T) {
			tf := func(tt float64, x, dx *[3]float64, v, dv *[9]float64) float64 {
				if tt >= c.from {
					panic("fused evaluation broke")
				}
				return lorenz(tt, x, dx, v, dv)
			}
			sp, err := Exponents(context.Background(), modelProblem(t, "lorenz"), 3, &Settings{Duration: 10, Transient: 1, Tangent3: tf})
			if (sp != nil) != c.partial {
				t.Errorf("partial spectrum %v, want %v", sp != nil, c.partial)
			}
			var ce *integrate.CallbackError
			if !errors.As(err, &ce) {
				t.Fatalf("err = %v, want a CallbackError", err)
			}
			if ce.Callback != integrate.CallbackField || ce.T < c.from || ce.T > c.from+1 {
				t.Errorf("CallbackError names %q at t=%v, want %q at or just after t=%v", ce.Callback, ce.T, integrate.CallbackField, c.from)
			}
		})
	}
}

// TestTangent3Ignored: runs that are not full spectra of a 3-D flow with
// an exact Jacobian ignore Settings.Tangent3 and give the bits they give
// without it (an exact identity: the same computation).
func TestTangent3Ignored(t *testing.T) {
	lorenz := modelProblem(t, "lorenz")
	noJac := lorenz
	noJac.Jac = nil
	s := Settings{Duration: 20, Transient: 2}
	for _, c := range []struct {
		name string
		p    integrate.Problem
		k    int
	}{
		{"k=2", lorenz, 2},
		{"no Jacobian", noJac, 3},
	} {
		t.Run(c.name, func(t *testing.T) {
			a, err := Exponents(context.Background(), c.p, c.k, &s)
			if err != nil {
				t.Fatal(err)
			}
			sf := s
			sf.Tangent3 = func(float64, *[3]float64, *[3]float64, *[9]float64, *[9]float64) float64 {
				panic("Tangent3 called")
			}
			b, err := Exponents(context.Background(), c.p, c.k, &sf)
			if err != nil {
				t.Fatal(err)
			}
			for i := range a.Exponents {
				if a.Exponents[i] != b.Exponents[i] || a.Stats != b.Stats {
					t.Fatalf("with Tangent3 %v %+v, without %v %+v", b.Exponents, b.Stats, a.Exponents, a.Stats)
				}
			}
		})
	}
}
