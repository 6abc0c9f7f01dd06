package enclose

import (
	"errors"
	"fmt"

	"github.com/plumbdyn/plumb/internal/ival"
)

// errPicard: the Picard test found no a-priori enclosure at this step.
var errPicard = errors.New("enclose: Picard test failed")

// apriori finds a box fr.b that holds every solution from the box fr.x
// over [t, tn] (hI = tn - t), by the Picard test (Moore 1966; Lohner 1987):
// when N = X + [0,h]·f([t,tn], B) lies in the interior of B, the Picard
// operator maps the continuous functions with values in B into themselves,
// so the solution exists on [t, tn] and stays in N. B starts as
// X + [0,h]·f(X), widened; a failed B is replaced by N widened. It returns
// errPicard, or the *BoxError of a formula not analytic over a trial box.
func (fr *flowRun) apriori(t, tn float64, hI ival.Interval) error {
	n := fr.n
	tI := ival.Hull(ival.Point(t), ival.Point(tn))
	h0 := ival.New(0, hI.Hi)
	if err := fr.field(tI, fr.x, fr.fb); err != nil {
		return err
	}
	// slack: room for every component on the scale of the step's motion
	// (a component whose rate is near 0 over X still moves over B).
	slack := 0.0
	for i := range n {
		fr.b[i] = ival.Add(fr.x[i], ival.Mul(h0, fr.fb[i]))
		slack = max(slack, fr.b[i].Width())
	}
	slack *= picardInflate
	for i := range n {
		fr.b[i] = widen(fr.b[i], slack)
	}
	for range picardTries {
		if err := fr.field(tI, fr.b, fr.fb); err != nil {
			return err
		}
		inside := true
		for i := range n {
			fr.nb[i] = ival.Add(fr.x[i], ival.Mul(h0, fr.fb[i]))
			if !fr.nb[i].Interior(fr.b[i]) {
				inside = false
			}
		}
		if inside {
			copy(fr.b, fr.nb)
			return nil
		}

		for i := range n {
			fr.b[i] = widen(ival.Hull(fr.b[i], fr.nb[i]), slack)
		}
	}
	return errPicard
}

// widen returns x widened on each side by picardInflate of its width, by
// slack, and by a few units of its magnitude's last place, so that a thin
// box has room for the test's strict inclusion.
func widen(x ival.Interval, slack float64) ival.Interval {
	d := float64(picardInflate*x.Width()) + slack + float64(1e-15*max(1, max(-x.Lo, x.Hi)))
	return ival.Add(x, ival.New(-d, d))
}

// field writes f(t, y) over the boxes t and y into dst.
func (fr *flowRun) field(t ival.Interval, y, dst []ival.Interval) error {
	s := fr.ap
	s.c[0][0] = t
	for i, sl := range fr.c.yslots {
		s.c[sl][0] = y[i]
	}
	if err := s.order(0); err != nil {
		return err
	}
	for i := range fr.n {
		dst[i] = s.out(i)[0]
	}
	return nil
}

// boxFailure turns the error of an interval evaluation into a Failure at
// t; nil for errPicard.
func boxFailure(t float64, err error) *Failure {
	var be *BoxError
	switch {
	case errors.As(err, &be) && errors.Is(err, ErrKink):
		return &Failure{T: t, Kind: FailKink, Reason: fmt.Sprintf("%s: %s", be.Func, be.Reason)}
	case errors.As(err, &be):
		return &Failure{T: t, Kind: FailDomain, Reason: fmt.Sprintf("%s: %s", be.Func, be.Reason)}
	case err == errPicard:
		return nil
	}
	return &Failure{T: t, Kind: FailDomain, Reason: err.Error()}
}
