package plumb

import (
	"context"
	"errors"
	"github.com/plumbdyn/plumb/internal/dd"
	"math/big"
	"testing"

	"github.com/stretchr/testify/require"
	"gonum.org/v1/gonum/mat"

	"github.com/plumbdyn/plumb/integrate"
	"github.com/plumbdyn/plumb/lyap"
	"github.com/plumbdyn/plumb/maps"
)

// lorenzField is the Lorenz (1963) field at the published parameters
// (sigma 10, rho 28, beta 8/3), for the callback cases below.
func lorenzField(_ float64, y, dy []float64) {
	dy[0] = 10 * (y[1] - y[0])
	dy[1] = y[0]*(28-y[2]) - y[1]
	dy[2] = y[0]*y[1] - 8.0/3*y[2]
}

// TestMisuse checks that mistakes a caller can make return errors usable
// with errors.Is, never panics: nil and zero values, wrong dimensions, nil
// entries, and callbacks that panic (recovered with the callback's name and
// the time).
func TestMisuse(t *testing.T) {
	ctx := context.Background()
	lor, err := Model("lorenz")
	require.NoError(t, err)
	big3 := func() []*big.Float { return []*big.Float{new(big.Float), new(big.Float), new(big.Float)} }
	y0 := []float64{1, 1, 1}
	cases := []struct {
		name string
		call func() error
		want error
		// callback and maxT: for a recovered panic, the name it must give
		// and an upper bound of its time.
		callback string
		maxT     float64
	}{
		{name: "LoadSystem(nil)", call: func() error { _, err := LoadSystem(nil); return err }, want: ErrNoSystem},
		{name: "nil System Set", call: func() error { var s *System; return s.Set("a", 1) }, want: ErrNoSystem},
		{name: "nil System SetStart", call: func() error { var s *System; return s.SetStart(y0) }, want: ErrNoSystem},
		{name: "nil System Map", call: func() error { var s *System; _, err := s.Map(); return err }, want: ErrNoSystem},
		{name: "nil System Evaluator", call: func() error { var s *System; _, err := s.bigEval(64); return err }, want: ErrNoSystem},
		{name: "nil System DoubleDoubleEvaluator", call: func() error { var s *System; _, err := s.ddEval(); return err }, want: ErrNoSystem},
		{name: "nil System Taylor", call: func() error { var s *System; _, err := s.taylor(10); return err }, want: ErrNoSystem},
		{name: "nil System TaylorDD", call: func() error { var s *System; _, err := s.taylorDD(10); return err }, want: ErrNoSystem},
		{name: "nil System Problem", call: func() error {
			var s *System
			_ = s.Kind() + Kind(s.TimeUnit())
			_, _, _, _, _ = s.Units(), s.Params(), s.Start(), s.Periods(), s.Formulas()
			_, _ = s.known("period")
			_ = s.Separable() || s.HasFormulas()
			_, err := integrate.Solve(ctx, s.Problem(), 1, nil, nil)
			return err
		}, want: integrate.ErrSettings},
		{name: "zero System Set", call: func() error { return new(System).Set("a", 1) }, want: ErrNoSystem},
		{name: "zero System Map", call: func() error { _, err := new(System).Map(); return err }, want: ErrKind},
		{name: "zero System of kind map", call: func() error { _, err := (&System{kind: KindMap}).Map(); return err }, want: ErrNoSystem},
		{name: "zero System Problem", call: func() error {
			s := new(System)
			_ = s.Separable()
			_, err := integrate.Solve(ctx, s.Problem(), 1, nil, nil)
			return err
		}, want: integrate.ErrSettings},
		{name: "zero System TrustSystem", call: func() error { _, err := new(System).Trust(ctx, 1, nil); return err }, want: ErrNoSystem},
		{name: "zero maps.Map", call: func() error {
			var m maps.Map
			m.Next(y0, y0)
			m.Jacobian(y0, mat.NewDense(3, 3, nil))
			_, err := lyap.MapExponents(ctx, &m, nil, 1, nil)
			return err
		}, want: lyap.ErrDimension},
		{name: "zero Stepper Next", call: func() error {
			var st integrate.Stepper
			if st.Next(ctx) {
				return errors.New("Next of a zero Stepper returned true")
			}
			return st.Err()
		}, want: integrate.ErrSettings},
		{name: "zero Stepper SetState", call: func() error { var st integrate.Stepper; return st.SetState(y0) }, want: integrate.ErrSettings},
		{name: "nil Stepper", call: func() error {
			var st *integrate.Stepper
			st.Next(ctx)
			return st.Err()
		}, want: integrate.ErrSettings},
		{name: "bigEvaluator nil y entry", call: func() error {
			ev, err := lor.bigEval(64)
			require.NoError(t, err)
			return ev.Eval(nil, []*big.Float{new(big.Float), nil, new(big.Float)}, big3())
		}, want: integrate.ErrNonFinite},
		{name: "bigEvaluator nil dydt entries are allocated", call: func() error {
			ev, err := lor.bigEval(64)
			require.NoError(t, err)
			return ev.Eval(nil, big3(), make([]*big.Float, 3))
		}},
		{name: "bigEvaluator wrong length", call: func() error {
			ev, err := lor.bigEval(64)
			require.NoError(t, err)
			return ev.Eval(nil, big3()[:2], big3())
		}, want: integrate.ErrDimension},
		{name: "zero bigEvaluator", call: func() error { return new(bigEvaluator).Eval(nil, big3(), big3()) }, want: ErrNoSystem},
		{name: "zero ddEvaluator", call: func() error { return new(ddEvaluator).Eval(dd.Float{}, nil, nil) }, want: ErrNoSystem},
		{name: "zero taylorStepper", call: func() error { return new(taylorStepper).Step(0, y0, 0.1, y0) }, want: ErrNoSystem},
		{name: "zero taylorDDStepper", call: func() error { return new(taylorDDStepper).Step(dd.Float{}, nil, dd.Float{}, nil) }, want: ErrNoSystem},
		{name: "vector field panics at t0", call: func() error {
			_, err := integrate.NewStepper(integrate.Problem{F: func(float64, []float64, []float64) { panic("no field here") }, Y0: y0}, 1, nil, nil)
			return err
		}, want: integrate.ErrCallback, callback: integrate.CallbackField, maxT: 0},
		{name: "vector field panics after t = 0.5", call: func() error {
			f := func(t float64, y, dy []float64) {
				if t > 0.5 {
					_ = y[len(y)+int(t)] // index out of range
				}
				lorenzField(t, y, dy)
			}
			sol, err := integrate.Solve(ctx, integrate.Problem{F: f, Y0: y0}, 1, nil, nil)
			require.NotNil(t, sol, "the partial solution comes with the error")
			require.Equal(t, integrate.Failed, sol.Status)
			require.Positive(t, sol.End)
			require.LessOrEqual(t, sol.End, 0.5)
			require.Len(t, sol.Final, 3)
			return err
		}, want: integrate.ErrCallback, callback: integrate.CallbackField, maxT: 0.5},
		{name: "crossing function panics", call: func() error {
			g := func(t float64, y []float64) float64 {
				if t > 0.25 {
					panic("crossing function broke")
				}
				return y[0]
			}
			sol, err := integrate.Solve(ctx, integrate.Problem{F: lorenzField, Y0: y0}, 1, nil,
				&integrate.Settings{Crossings: []integrate.Crossing{{G: g}}})
			require.NotNil(t, sol)
			require.LessOrEqual(t, sol.End, 0.25)
			var ce *integrate.CallbackError
			require.ErrorAs(t, err, &ce)
			require.Greater(t, ce.T, 0.25, "the time of the call that panicked")
			return err
		}, want: integrate.ErrCallback, callback: integrate.CallbackCrossing, maxT: 1},
		{name: "progress function panics", call: func() error {
			_, err := integrate.Solve(ctx, integrate.Problem{F: lorenzField, Y0: y0}, 1, nil,
				&integrate.Settings{Progress: func(float64) { panic("progress bar broke") }})
			return err
		}, want: integrate.ErrCallback, callback: integrate.CallbackProgress, maxT: 1},
		{name: "Jacobian writes outside its matrix in lyap", call: func() error {
			p := lor.Problem()
			jac := p.Jac
			p.Jac = func(t float64, y []float64, dst *mat.Dense) {
				jac(t, y, dst)
				if t > 2 {
					dst.Set(3, 0, 1) // row 3 of a 3×3 matrix: mat panics
				}
			}
			sp, err := lyap.Exponents(ctx, p, 3, &lyap.Settings{Duration: 10})
			require.NotNil(t, sp, "the partial spectrum comes with the error")
			require.ErrorIs(t, err, mat.ErrRowAccess, "the panic value is in the chain")
			var ce *integrate.CallbackError
			require.ErrorAs(t, err, &ce)
			require.Greater(t, ce.T, 2.0, "the time of the call that panicked")
			return err
		}, want: integrate.ErrCallback, callback: integrate.CallbackJacobian, maxT: 3},
		{name: "Jacobian panics at the start in lyap", call: func() error {
			p := lor.Problem()
			p.Jac = func(float64, []float64, *mat.Dense) { panic("no Jacobian here") }
			_, err := lyap.Exponents(ctx, p, 3, &lyap.Settings{Duration: 10})
			return err
		}, want: integrate.ErrCallback, callback: integrate.CallbackJacobian, maxT: 0},
		{name: "vector field panics in lyap.Largest", call: func() error {
			f := func(t float64, y, dy []float64) {
				if t > 1 {
					panic("field broke")
				}
				lorenzField(t, y, dy)
			}
			sp, err := lyap.Largest(ctx, integrate.Problem{F: f, Y0: y0}, &lyap.Settings{Duration: 10})
			require.NotNil(t, sp, "the partial estimate comes with the error")
			return err
		}, want: integrate.ErrCallback, callback: integrate.CallbackField, maxT: 1},
		{name: "map panics in lyap.MapLargest", call: func() error {
			m := lyap.MapFunc{N: 1, F: func(x, dst []float64) { dst[1] = x[0] }}
			_, err := lyap.MapLargest(ctx, m, []float64{0.3}, nil)
			return err
		}, want: integrate.ErrCallback, callback: integrate.CallbackMap, maxT: 0},
		{name: "map Jacobian panics in lyap", call: func() error {
			m := lyap.MapFunc{
				N: 1,
				F: func(x, dst []float64) { dst[0] = 3.7 * x[0] * (1 - x[0]) },
				J: func(x []float64, dst *mat.Dense) { dst.Set(0, 1, 1) },
			}
			_, err := lyap.MapExponents(ctx, m, []float64{0.3}, 1, nil)
			return err
		}, want: integrate.ErrCallback, callback: integrate.CallbackMapJacobian, maxT: 0},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			var err error
			require.NotPanics(t, func() { err = c.call() })
			if c.want == nil {
				require.NoError(t, err)
				return
			}
			require.ErrorIs(t, err, c.want)
			if c.callback == "" {
				return
			}
			var ce *integrate.CallbackError
			require.ErrorAs(t, err, &ce)
			require.Equal(t, c.callback, ce.Callback)
			require.LessOrEqual(t, ce.T, c.maxT)
			require.Contains(t, err.Error(), c.callback)
			require.Contains(t, err.Error(), "t=")
		})
	}
}
