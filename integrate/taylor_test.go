package integrate

import (
	"context"
	"errors"
	"math"
	"math/big"
	"testing"

	"github.com/plumbdyn/plumb/internal/dd"
)

// riccati is y' = -y², whose series through (t, y) has coefficients
// c_k = (-1)^k y^(k+1) (solution y/(1 + y·(s-t)); exact identity), written
// by hand so that integrate's tests need no formula compiler.
type riccati struct{ fail bool }

func (riccati) Dim() int { return 1 }

func (r riccati) DD(order int) (func(t dd.Float, y []dd.Float, c [][]dd.Float) error, error) {
	return func(t dd.Float, y []dd.Float, c [][]dd.Float) error {
		if r.fail {
			return errors.New("field failed")
		}
		p := y[0]
		for k := 0; k <= order; k++ {
			c[0][k] = p
			p = dd.Neg(dd.Mul(p, y[0]))
		}
		return nil
	}, nil
}

func (r riccati) Big(order int, prec uint) (func(t *big.Float, y []*big.Float, c [][]*big.Float) error, error) {
	return func(t *big.Float, y []*big.Float, c [][]*big.Float) error {
		p := new(big.Float).SetPrec(prec).Set(y[0])
		for k := 0; k <= order; k++ {
			c[0][k].Set(p)
			p.Mul(p, y[0])
			p.Neg(p)
		}
		return nil
	}, nil
}

// TestSolveTaylorExact integrates y' = -y², y(0) = 1 (exact solution
// 1/(1+t), a pole at t = -1 so the radius of convergence at t is 1+t) to
// t = 1, 2, 4 in double-double and big.Float, against 1/(1+t) computed in
// math/big. The error is a few local errors (the flow contracts), so the
// tolerance is 100·10^-Digits.
func TestSolveTaylorExact(t *testing.T) {
	times := []float64{0, 1, 2, 4}
	for _, d := range []int{20, 31, 50} {
		r, err := SolveTaylor(context.Background(), riccati{}, 0, []float64{1}, times, &TaylorSettings{Digits: d})
		if err != nil {
			t.Fatal(err)
		}
		tol := 100 * math.Pow(10, -float64(d))
		for k, tk := range times {
			want := new(big.Float).SetPrec(400).Quo(big.NewFloat(1), big.NewFloat(1+tk))
			e, _ := new(big.Float).Sub(r.States[k][0], want).Float64()
			if math.Abs(e) > tol {
				t.Errorf("digits %d (%s): y(%g) off by %.3g, want below %.3g", d, r.Arithmetic, tk, e, tol)
			}
		}
		// The Jorba–Zou step is about ρ/e² (Jorba & Zou 2005, Sect.
		// 3.2); here ρ = 1+t, so the first step is near e^-2 ≈ 0.135 and
		// the steps grow with t.
		if r.Stats.MinStep < 0.05 || r.Stats.MinStep > 0.3 || !(r.Stats.MaxStep > r.Stats.MinStep) {
			t.Errorf("digits %d: steps in [%.3g, %.3g], want the smallest near e^-2 and growing", d, r.Stats.MinStep, r.Stats.MaxStep)
		}
	}
}

// TestSolveTaylorBadInput checks errors (not panics) and partial results.
func TestSolveTaylorBadInput(t *testing.T) {
	ctx := context.Background()
	cases := []struct {
		name  string
		f     Series
		y0    []float64
		times []float64
		s     *TaylorSettings
		want  error
	}{
		{"nil series", nil, []float64{1}, []float64{1}, nil, ErrSettings},
		{"wrong dimension", riccati{}, []float64{1, 2}, []float64{1}, nil, ErrDimension},
		{"NaN start", riccati{}, []float64{math.NaN()}, []float64{1}, nil, ErrNonFinite},
		{"no times", riccati{}, []float64{1}, nil, nil, ErrSpan},
		{"time before t0", riccati{}, []float64{1}, []float64{-1}, nil, ErrSpan},
		{"times repeated", riccati{}, []float64{1}, []float64{1, 1}, nil, ErrSpan},
		{"time Inf", riccati{}, []float64{1}, []float64{math.Inf(1)}, nil, ErrSpan},
		{"digits negative", riccati{}, []float64{1}, []float64{1}, &TaylorSettings{Digits: -1}, ErrSettings},
		{"start length", riccati{}, []float64{1}, []float64{1}, &TaylorSettings{Start: []*big.Float{nil, nil}}, ErrDimension},
		{"start nil entry", riccati{}, []float64{1}, []float64{1}, &TaylorSettings{Start: []*big.Float{nil}}, ErrNonFinite},
		{"budget", riccati{}, []float64{1}, []float64{0, 100}, &TaylorSettings{MaxSteps: 2}, ErrStepBudget},
		{"blow-up", riccati{}, []float64{-1}, []float64{2}, &TaylorSettings{Digits: 16}, ErrStepUnderflow},
	}
	for _, c := range cases {
		r, err := SolveTaylor(ctx, c.f, 0, c.y0, c.times, c.s)
		if !errors.Is(err, c.want) {
			t.Errorf("%s: err = %v, want %v", c.name, err, c.want)
		}
		if c.name == "budget" && (r == nil || len(r.Times) != 1) {
			t.Errorf("budget: partial result %+v, want the output at t0 kept", r)
		}
	}
	if _, err := SolveTaylor(ctx, riccati{fail: true}, 0, []float64{1}, []float64{1}, nil); err == nil {
		t.Error("failing series: no error")
	}
}

// TestAuditExact audits y' = -y against the exact trajectory e^-t (exact
// identity): with Ladder.Exact the reference run gets a divergence curve,
// at its tolerance level; a trajectory of the wrong shape is an error.
func TestAuditExact(t *testing.T) {
	p := Problem{F: func(_ float64, y, dy []float64) { dy[0] = -y[0] }, Y0: []float64{1}}
	l := DefaultLadder(0, 5)
	l.Exact = func(_ context.Context, ts []float64) ([][]float64, error) {
		out := make([][]float64, len(ts))
		for i, t := range ts {
			out[i] = []float64{math.Exp(-t)}
		}
		return out, nil
	}
	res, err := Audit(context.Background(), p, 5, l, &AuditSettings{Tol: 1e-6})
	if err != nil {
		t.Fatal(err)
	}
	ref := res.Reference
	if len(ref.Divergence) != len(res.Times) {
		t.Fatalf("reference divergence has %d points for %d times", len(ref.Divergence), len(res.Times))
	}
	// DormandPrince853 at 1e-12 on a contracting flow: the error stays
	// near the tolerance (common practice: within a factor 100).
	for k, d := range ref.Divergence {
		if d > 1e-10 {
			t.Fatalf("reference divergence %.3g at t=%g, want below 1e-10", d, res.Times[k])
		}
	}
	if ref.Departed {
		t.Error("reference run departed from the exact solution")
	}
	l.Exact = func(_ context.Context, ts []float64) ([][]float64, error) { return make([][]float64, 1), nil }
	if _, err := Audit(context.Background(), p, 5, l, &AuditSettings{Tol: 1e-6}); !errors.Is(err, ErrDimension) {
		t.Errorf("short trajectory: err = %v, want ErrDimension", err)
	}
}

// TestSolveTaylorDDAllocs checks that the double-double stepping loop does
// not allocate: a run with one output allocates the same whether it takes
// a few steps or many (allocations are set-up and outputs only).
func TestSolveTaylorDDAllocs(t *testing.T) {
	run := func(t1 float64) func() {
		return func() {
			if _, err := SolveTaylor(context.Background(), riccati{}, 0, []float64{1}, []float64{t1}, nil); err != nil {
				panic(err)
			}
		}
	}
	short, long := testing.AllocsPerRun(5, run(0.5)), testing.AllocsPerRun(5, run(1000))
	if long != short {
		t.Errorf("allocations: %v for t1 = 0.5, %v for t1 = 1000 (more steps must not allocate)", short, long)
	}
}
