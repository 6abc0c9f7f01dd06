package integrate

import (
	"context"
	"math"
	"math/big"

	"github.com/plumbdyn/plumb/internal/detmath"
)

// stepSafety shrinks the step of the Jorba–Zou rule (common practice: it
// keeps the first neglected term below eps when the last two coefficients
// underestimate the tail).
const stepSafety = 0.9

type taylorRun struct {
	ctx      context.Context
	n        int
	eps      float64
	logEps   float64 // ln eps, -Digits·ln 10 (eps itself underflows past ~300 digits)
	order    int
	times    []float64
	maxSteps int
	t0       float64
	start    []*big.Float
	outTimes []*big.Float
	res      *TaylorResult
}

// stepSize is the Jorba–Zou step from the inf-norm logarithms of the last
// two coefficients (lc[0] for order p-1, lc[1] for p; -Inf for a zero
// coefficient) and the state scale; +Inf when both vanish (a polynomial
// solution).
func (r *taylorRun) stepSize(lc [2]float64, scale float64) float64 {
	var le float64
	if es := float64(r.eps * scale); es > 0x1p-1000 {
		le = detmath.Log(es)
	} else {
		// eps·scale is subnormal or zero: sum the logarithms instead.
		le = r.logEps + detmath.Log(scale)
	}
	h := math.Inf(1)
	for i, j := range []int{r.order - 1, r.order} {
		if j < 1 || math.IsInf(lc[i], -1) {
			continue
		}
		h = math.Min(h, detmath.Exp((le-lc[i])/float64(j)))
	}
	return stepSafety * h
}

func (r *taylorRun) record(tout float64, y []*big.Float) {
	res := r.res
	res.Times = append(res.Times, tout)
	st := make([]*big.Float, r.n)
	f64 := make([]float64, r.n)
	for i, v := range y {
		st[i] = new(big.Float).Copy(v)
		f64[i], _ = v.Float64()
	}
	res.States = append(res.States, st)
	res.Float64 = append(res.Float64, f64)
}

func (r *taylorRun) stats(h float64) {
	st := &r.res.Stats
	if st.MinStep == 0 || h < st.MinStep {
		st.MinStep = h
	}
	if h > st.MaxStep {
		st.MaxStep = h
	}
}

func (r *taylorRun) fail(t, h float64, err error) error {
	return &StepError{T: t, H: h, Err: err}
}
