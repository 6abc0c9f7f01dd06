package plumb

import (
	"context"
	"errors"
	"fmt"
	"math/big"
	"strings"

	"github.com/plumbdyn/plumb/integrate"
	"github.com/plumbdyn/plumb/internal/dd"
	"github.com/plumbdyn/plumb/internal/expr"
)

// kinkKinds maps the formula compiler's kinds to the integrator's.
var kinkKinds = map[expr.KinkKind]integrate.KinkKind{
	expr.KinkCorner: integrate.KinkCorner,
	expr.KinkJump:   integrate.KinkJump,
	expr.KinkCut:    integrate.KinkCut,
	expr.KinkBranch: integrate.KinkBranch,
}

// Kinks lists the non-analytic functions of the field's formulas (abs,
// min, max, sign, step, atan2, sqrt, non-integer powers), in the order
// the Taylor jets number them; systemSeries is an integrate.KinkSeries.
func (f *systemSeries) Kinks() []integrate.Kink {
	ks := f.prog.Kinks()
	out := make([]integrate.Kink, len(ks))
	for i, k := range ks {
		name := k.Op.String()
		if k.Op == expr.OpPow {
			name = "a power that is not a constant integer"
		}
		out[i] = integrate.Kink{Name: name, Kind: kinkKinds[k.Kind]}
	}
	return out
}

// ddJet is a double-double Taylor evaluator with kink control.
type ddJet struct{ ty *expr.TaylorDD }

func (j ddJet) Coef(t dd.Float, y []dd.Float, c [][]dd.Float) error {
	if err := j.ty.ODE(t, y, c); err != nil {
		return fmt.Errorf("plumb: %w", err)
	}
	return nil
}
func (j ddJet) SetSide(k int, s int8)         { j.ty.SetSide(k, s) }
func (j ddJet) Switch(k int, g []dd.Float)    { j.ty.Switch(k, g) }
func (j ddJet) Cut(k int) bool                { return j.ty.Cut(k) }
func (j bigJet) SetSide(k int, s int8)        { j.ty.SetSide(k, s) }
func (j bigJet) Switch(k int, g []*big.Float) { j.ty.Switch(k, g) }
func (j bigJet) Cut(k int) bool               { return j.ty.Cut(k) }

// bigJet is a big.Float Taylor evaluator with kink control.
type bigJet struct{ ty *expr.TaylorBig }

func (j bigJet) Coef(t *big.Float, y []*big.Float, c [][]*big.Float) error {
	if err := j.ty.ODE(t, y, c); err != nil {
		return fmt.Errorf("plumb: %w", err)
	}
	return nil
}

// KinkDD returns the double-double jets with kink control.
func (f *systemSeries) KinkDD(order int) (integrate.KinkJetDD, error) {
	ty, err := f.prog.NewTaylorDD(order)
	if err != nil {
		return nil, fmt.Errorf("plumb: %w", err)
	}
	for i, p := range f.params {
		ty.SetParam(1+f.n+i, dd.From(p))
		if f.bigParams != nil {
			ty.SetParam(1+f.n+i, dd.FromBig(f.bigParams[i]))
		}
	}
	return ddJet{ty}, nil
}

// KinkBig returns the big.Float jets with kink control.
func (f *systemSeries) KinkBig(order int, prec uint) (integrate.KinkJetBig, error) {
	ty, err := f.prog.NewTaylorBig(order, prec)
	if err != nil {
		return nil, fmt.Errorf("plumb: %w", err)
	}
	for i, p := range f.params {
		v := new(big.Float).SetPrec(prec).SetFloat64(p)
		if f.bigParams != nil {
			v.Set(f.bigParams[i])
		}
		ty.SetParam(1+f.n+i, v)
	}
	return bigJet{ty}, nil
}

// setAside is System.Trust's audit when its multiprecision reference
// stopped at a kink it cannot pass (integrate.ErrKink): the audit against
// the float64 reference run, with Report.Exact saying why (SetAside) and
// how far the Taylor run came.
func setAside(ctx context.Context, problem integrate.Problem, horizon float64, s TrustSettings, ex *ExactReference, cause error) (*Report, error) {
	lad := *s.Ladder
	lad.Exact = nil
	s.Ladder = &lad
	rep, err := TrustProblem(ctx, problem, horizon, &s)
	if rep != nil {
		if ex == nil {
			ex = &ExactReference{Method: "Taylor (Jorba–Zou order and step)"}
		}
		ex.SetAside = kinkReason(cause)
		rep.Exact = ex
	}
	return rep, err
}

// kinkReason is the part of a kink error that says what happened and
// where, without the wrapping of the packages it went through.
func kinkReason(err error) string {
	msg := err.Error()
	var se *integrate.StepError
	if errors.As(err, &se) {
		msg = se.Err.Error()
	}
	return strings.TrimSuffix(msg, ": "+integrate.ErrKink.Error())
}
