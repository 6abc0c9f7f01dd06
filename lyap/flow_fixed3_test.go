package lyap

import (
	"context"
	"errors"
	"math"
	"testing"

	"github.com/plumbdyn/plumb/integrate"
	"gonum.org/v1/gonum/mat"
)

// TestFixedSizeBits runs full 3-D spectra with the fixed-size field, with
// the general one and, where the model has one, with its fused evaluation
// (Settings.Tangent3), and requires the same bits everywhere (an exact
// identity: all compute the same sums in the same order, the fused one
// leaving out only terms of zero Jacobian entries, which change no bit):
// exponents,
// standard errors, final state, the history of every
// re-orthonormalisation, and the counts. The runs are long (hundreds of
// thousands of evaluations) so that a difference in a last bit anywhere
// would have grown into the exponents.
func TestFixedSizeBits(t *testing.T) {
	// A Lorenz field whose Jacobian goes through mat.Dense.Set (as a
	// caller's would), at rho = 60, away from the built-in parameters.
	lorenzSet := integrate.Problem{
		F: func(_ float64, y, d []float64) {
			d[0] = 10 * (y[1] - y[0])
			d[1] = float64(y[0]*(60-y[2])) - y[1]
			d[2] = float64(y[0]*y[1]) - float64(8.0/3*y[2])
		},
		Jac: func(_ float64, y []float64, j *mat.Dense) {
			j.Set(0, 0, -10)
			j.Set(0, 1, 10)
			j.Set(0, 2, 0)
			j.Set(1, 0, 60-y[2])
			j.Set(1, 1, -1)
			j.Set(1, 2, -y[0])
			j.Set(2, 0, y[1])
			j.Set(2, 1, y[0])
			j.Set(2, 2, -8.0/3)
		},
		Y0: []float64{-3, 2, 40},
	}
	cases := []struct {
		name  string
		p     integrate.Problem
		s     Settings
		fused Tangent3 // the model's fused evaluation, run as a third variant
	}{
		{"lorenz", modelProblem(t, "lorenz"), Settings{Duration: 300, Transient: 20}, modelTangent3(t, "lorenz", nil)},
		{"lorenz-tight", modelProblem(t, "lorenz"), Settings{Duration: 100, Transient: 10, RelTol: 1e-11, AbsTol: 1e-11}, modelTangent3(t, "lorenz", nil)},
		{"rossler", modelProblem(t, "rossler"), Settings{Duration: 1500, Transient: 50}, modelTangent3(t, "rossler", nil)},
		{"lorenz-set-rho60", lorenzSet, Settings{Duration: 200, Transient: 10, Interval: 0.05}, modelTangent3(t, "lorenz", []float64{10, 60, 8.0 / 3})},
	}
	run := func(p integrate.Problem, s Settings, fixed bool) (*Spectrum, [][]float64) {
		t.Helper()
		old := fixedSize
		fixedSize = fixed
		defer func() { fixedSize = old }()
		if !fixed {
			s.Tangent3 = nil
		}
		r, err := newFlowRun(p, 3, &s)
		if err != nil {
			t.Fatal(err)
		}
		var hist [][]float64
		r.onQR = func(tq float64, q, rr []float64) bool {
			h := append([]float64{tq}, q...)
			hist = append(hist, append(h, rr...))
			return true
		}
		if err := r.run(context.Background()); err != nil {
			t.Fatal(err)
		}
		return r.spectrum(), hist
	}
	same := func(a, b []float64) bool {
		if len(a) != len(b) {
			return false
		}
		for i := range a {
			if math.Float64bits(a[i]) != math.Float64bits(b[i]) {
				return false
			}
		}
		return true
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			b, hb := run(c.p, c.s, false)
			variants := []struct {
				name string
				tf   Tangent3
			}{{"fixed", nil}, {"fused", c.fused}}
			for _, v := range variants {
				if v.name == "fused" && v.tf == nil {
					t.Fatalf("no fused evaluation for %s", c.name)
				}
				s := c.s
				s.Tangent3 = v.tf
				a, ha := run(c.p, s, true)
				if a.Stats != b.Stats {
					t.Errorf("stats: %s %+v, general %+v", v.name, a.Stats, b.Stats)
				}
				if a.Stats.Evaluations < 100000 {
					t.Errorf("only %d evaluations: the run is too short to show a last-bit difference", a.Stats.Evaluations)
				}
				for _, pair := range [][2][]float64{{a.Exponents, b.Exponents}, {a.StdErr, b.StdErr}, {a.Final, b.Final}} {
					if !same(pair[0], pair[1]) {
						t.Errorf("%s %v, general %v", v.name, pair[0], pair[1])
					}
				}
				if len(ha) != len(hb) {
					t.Fatalf("%d re-orthonormalisations %s, %d general", len(ha), v.name, len(hb))
				}
				for i := range ha {
					if !same(ha[i], hb[i]) {
						t.Fatalf("re-orthonormalisation %d: %s %v, general %v", i, v.name, ha[i], hb[i])
					}
				}
			}
		})
	}
}

// TestFixedSizePanics: a panic in the caller's field or Jacobian on the
// fixed-size path ends the run with a CallbackError naming that function
// and a time at or after the panic's, as on the general path.
func TestFixedSizePanics(t *testing.T) {
	const tPanic = 1.5
	for _, which := range []string{integrate.CallbackField, integrate.CallbackJacobian} {
		t.Run(which, func(t *testing.T) {
			p := modelProblem(t, "lorenz")
			f, jac := p.F, p.Jac
			if which == integrate.CallbackField {
				p.F = func(tt float64, y, d []float64) {
					if tt > tPanic {
						panic("field broke")
					}
					f(tt, y, d)
				}
			} else {
				p.Jac = func(tt float64, y []float64, j *mat.Dense) {
					if tt > tPanic {
						panic("Jacobian broke")
					}
					jac(tt, y, j)
				}
			}
			sp, err := Exponents(context.Background(), p, 3, &Settings{Duration: 10, Transient: 1})
			if sp == nil {
				t.Fatal("no partial spectrum")
			}
			var ce *integrate.CallbackError
			if !errors.As(err, &ce) {
				t.Fatalf("err = %v, want a CallbackError", err)
			}
			if ce.Callback != which || ce.T <= tPanic || ce.T > tPanic+1 {
				t.Errorf("CallbackError names %q at t=%v, want %q just after t=%v", ce.Callback, ce.T, which, tPanic)
			}
		})
	}
}
