package integrate

import (
	"fmt"
	"math"
	"math/big"

	"github.com/plumbdyn/plumb/internal/dd"
	"github.com/plumbdyn/plumb/internal/detmath"
)

// runDD integrates in double-double.
func (r *taylorRun) runDD(f Series, y0 []float64) error {
	var coef func(t dd.Float, y []dd.Float, c [][]dd.Float) error
	var jet KinkJetDD
	var err error
	ks, kinked := f.(KinkSeries)
	kinked = kinked && len(ks.Kinks()) > 0
	if kinked {
		jet, err = ks.KinkDD(r.order)
		if jet != nil {
			coef = jet.Coef
		}
	} else {
		coef, err = f.DD(r.order)
	}
	if err != nil {
		return fmt.Errorf("integrate: Taylor series of order %d: %w", r.order, err)
	}
	n, p := r.n, r.order
	c := make([][]dd.Float, n)
	for i := range c {
		c[i] = make([]dd.Float, p+1)
	}
	y := make([]dd.Float, n)
	for i, v := range y0 {
		y[i] = dd.From(v)
		if r.start != nil {
			y[i] = dd.FromBig(r.start[i])
		}
	}
	yn := make([]dd.Float, n)
	bigY := make([]*big.Float, n)
	emit := func(tout float64) {
		for i, v := range yn {
			bigY[i] = v.Big().SetPrec(106)
		}
		r.record(tout, bigY)
	}
	t := dd.From(r.t0)
	k := 0
	// horner sets yn to the step's polynomial at the time at.
	horner := func(at dd.Float) error {
		hd := dd.Sub(at, t)
		for i := range n {
			var s dd.Float
			for j := p; j >= 0; j-- {
				s = dd.Add(dd.Mul(s, hd), c[i][j])
			}
			if !s.IsFinite() {
				return r.fail(t.Float64(), hd.Float64(), fmt.Errorf("component %d: %w", i, ErrNonFinite))
			}
			yn[i] = s
		}
		return nil
	}
	stepOf := func() (float64, float64) {
		scale := 1.0
		lc := [2]float64{math.Inf(-1), math.Inf(-1)}
		for i := range n {
			scale = math.Max(scale, math.Abs(y[i].Hi))
			for q, j := range []int{p - 1, p} {
				if a := math.Abs(c[i][j].Hi); a > 0 {
					lc[q] = math.Max(lc[q], detmath.Log(a))
				}
			}
		}
		return r.stepSize(lc, scale), scale
	}
	var kt *kinkTrack
	if kinked {
		kt = newKinkTrack(ks.Kinks(), kinkJetOfDD(jet, p, func() error { return coef(t, y, c) }, stepOf), p, r.eps, kinkPrecDD)
	}
	for k < len(r.times) && r.times[k] == r.t0 {
		copy(yn, y)
		emit(r.t0)
		k++
	}
	for k < len(r.times) {
		if err := r.ctx.Err(); err != nil {
			return fmt.Errorf("integrate: canceled at t=%g: %w", t.Float64(), err)
		}
		if r.res.Stats.Steps >= r.maxSteps {
			return r.fail(t.Float64(), 0, fmt.Errorf("%d steps: %w", r.maxSteps, ErrStepBudget))
		}
		var h float64
		var land *big.Float
		if kt == nil {
			if err := coef(t, y, c); err != nil {
				return r.fail(t.Float64(), 0, err)
			}
			h, _ = stepOf()
		} else {
			if land, h, err = r.kinkStep(kt, t.Float64()); err != nil {
				return err
			}
		}
		// Outputs inside the step are the Taylor polynomial's values there
		// (the series is as accurate inside the step as at its end).
		for k < len(r.times) && r.times[k]-t.Float64() <= h {
			toutDD := dd.From(r.times[k])
			if r.outTimes != nil {
				toutDD = dd.FromBig(r.outTimes[k])
			}
			if err := horner(toutDD); err != nil {
				return err
			}
			emit(r.times[k])
			k++
		}
		r.res.Stats.Steps++
		if k == len(r.times) {
			break
		}
		hd := dd.From(h)
		if land != nil {
			hd = dd.FromBig(land)
			if !(h > 0) || dd.Add(t, hd) == t {
				continue // a kink at the point itself: restart here
			}
		}
		if !(h > 0) || dd.Add(t, hd) == t {
			return r.fail(t.Float64(), h, ErrStepUnderflow)
		}
		r.stats(h)
		tn := dd.Add(t, hd)
		if err := horner(tn); err != nil {
			return err
		}
		t = tn
		copy(y, yn)
	}
	return nil
}
