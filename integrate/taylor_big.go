package integrate

import (
	"fmt"
	"math"
	"math/big"

	"github.com/plumbdyn/plumb/internal/bigadd"
	"github.com/plumbdyn/plumb/internal/detmath"
)

// runBig integrates in big.Float at prec bits.
func (r *taylorRun) runBig(f Series, y0 []float64, prec uint) (err error) {
	var tf, h float64
	defer func() {
		// Inf - Inf in the Horner sums (big.Float has no NaN).
		if v := recover(); v != nil {
			if _, ok := v.(big.ErrNaN); !ok {
				panic(v)
			}
			err = r.fail(tf, h, ErrNonFinite)
		}
	}()
	var coef func(t *big.Float, y []*big.Float, c [][]*big.Float) error
	var jet KinkJetBig
	ks, kinked := f.(KinkSeries)
	kinked = kinked && len(ks.Kinks()) > 0
	if kinked {
		jet, err = ks.KinkBig(r.order, prec)
		if jet != nil {
			coef = jet.Coef
		}
	} else {
		coef, err = f.Big(r.order, prec)
	}
	if err != nil {
		return fmt.Errorf("integrate: Taylor series of order %d at %d bits: %w", r.order, prec, err)
	}
	n, p := r.n, r.order
	nf := func() *big.Float { return new(big.Float).SetPrec(prec) }
	c := make([][]*big.Float, n)
	for i := range c {
		c[i] = make([]*big.Float, p+1)
		for j := range c[i] {
			c[i][j] = nf()
		}
	}
	y := make([]*big.Float, n)
	for i, v := range y0 {
		y[i] = nf().SetFloat64(v)
		if r.start != nil {
			y[i].Set(r.start[i])
		}
	}
	t := nf().SetFloat64(r.t0)
	hb, s, sm, tout, tn, dt := nf(), nf(), nf(), nf(), nf(), nf()
	yn := make([]*big.Float, n)
	for i := range yn {
		yn[i] = nf()
	}
	horner := func(at *big.Float) error {
		bigadd.Sub(dt, at, t)
		for i := range n {
			// Horner with two values in turn: big.Float's Mul allocates
			// when the result aliases an operand.
			s.SetInt64(0)
			for j := p; j >= 0; j-- {
				sm.Mul(s, dt)
				bigadd.Add(s, sm, c[i][j])
			}
			if s.IsInf() {
				return r.fail(tf, h, fmt.Errorf("component %d: %w", i, ErrNonFinite))
			}
			yn[i].Set(s)
		}
		return nil
	}
	stepOf := func() (float64, float64) {
		scale := 1.0
		lc := [2]float64{math.Inf(-1), math.Inf(-1)}
		for i := range n {
			yf, _ := y[i].Float64()
			scale = math.Max(scale, math.Abs(yf))
			for q, j := range []int{p - 1, p} {
				lc[q] = math.Max(lc[q], logAbs(c[i][j]))
			}
		}
		return r.stepSize(lc, scale), scale
	}
	var kt *kinkTrack
	if kinked {
		kt = newKinkTrack(ks.Kinks(), kinkJetOfBig(jet, p, prec, func() error { return coef(t, y, c) }, stepOf), p, r.eps, prec)
	}
	k := 0
	for k < len(r.times) && r.times[k] == r.t0 {
		r.record(r.t0, y)
		k++
	}
	for k < len(r.times) {
		tf, _ = t.Float64()
		if err := r.ctx.Err(); err != nil {
			return fmt.Errorf("integrate: canceled at t=%g: %w", tf, err)
		}
		if r.res.Stats.Steps >= r.maxSteps {
			return r.fail(tf, 0, fmt.Errorf("%d steps: %w", r.maxSteps, ErrStepBudget))
		}
		var land *big.Float
		if kt == nil {
			if err := coef(t, y, c); err != nil {
				return r.fail(tf, 0, err)
			}
			h, _ = stepOf()
		} else {
			if land, h, err = r.kinkStep(kt, tf); err != nil {
				return err
			}
		}
		for k < len(r.times) && r.times[k]-tf <= h {
			tout.SetFloat64(r.times[k])
			if r.outTimes != nil {
				tout.Set(r.outTimes[k])
			}
			if err := horner(tout); err != nil {
				return err
			}
			r.record(r.times[k], yn)
			k++
		}
		r.res.Stats.Steps++
		if k == len(r.times) {
			break
		}
		hb.SetFloat64(h)
		if land != nil {
			hb.Set(land)
			if !(h > 0) || bigadd.Add(s, t, hb).Cmp(t) == 0 {
				continue // a kink at the point itself: restart here
			}
		}
		if !(h > 0) || math.IsInf(h, 0) || bigadd.Add(s, t, hb).Cmp(t) == 0 {
			return r.fail(tf, h, ErrStepUnderflow)
		}
		r.stats(h)
		bigadd.Add(tn, t, hb)
		if err := horner(tn); err != nil {
			return err
		}
		t.Set(tn)
		for i := range y {
			y[i].Set(yn[i])
		}
	}
	return nil
}

// logAbs returns ln|x| for a big.Float of any exponent (-Inf for 0).
func logAbs(x *big.Float) float64 {
	if x.Sign() == 0 {
		return math.Inf(-1)
	}
	if x.IsInf() {
		return math.Inf(1)
	}
	var m big.Float
	e := x.MantExp(&m)
	mf, _ := m.Float64()
	return detmath.Log(math.Abs(mf)) + float64(float64(e)*math.Ln2)
}
