package plumb

import "github.com/plumbdyn/plumb/integrate"

// Verdict is the answer for the requested horizon.
type Verdict string

// Verdicts, from best to worst.
const (
	// TrustedWithMargin: every rung agrees with the reference up to the
	// requested horizon, and the largest divergence is at most a tenth of
	// the tolerance.
	TrustedWithMargin Verdict = "trusted_with_margin"
	// Trusted: every rung agrees up to the requested horizon, with less
	// than a decade to spare.
	Trusted Verdict = "trusted"
	// NotTrusted: some rung departs from the reference before the requested
	// horizon; the run is believed only up to Report.TrustedUntil.
	NotTrusted Verdict = "not_trusted"
	// Incomplete: the audit was canceled or its reference run failed; the
	// report holds what was done and answers nothing.
	Incomplete Verdict = "incomplete"
)

// marginFactor: a divergence at most tol/marginFactor over the whole horizon
// earns TrustedWithMargin (a decade, common practice).
const marginFactor = 10

// verdictOf is the verdict of an audit of rungs runs, failed of which
// failed: NotTrusted when none ran through or the agreement falls short of
// the horizon, else TrustedWithMargin or Trusted by the fraction tolUsed of
// the tolerance the divergence used.
func verdictOf(rungs, failed int, short bool, tolUsed float64) Verdict {
	switch {
	case rungs == 0 || failed == rungs || short:
		return NotTrusted
	case tolUsed <= 1.0/marginFactor:
		return TrustedWithMargin
	}
	return Trusted
}

// words is the verdict as the summaries write it.
func (v Verdict) words() string {
	switch v {
	case TrustedWithMargin:
		return "trusted with margin"
	case Trusted:
		return "trusted"
	case NotTrusted:
		return "not trusted"
	case Incomplete:
		return "incomplete (the audit did not finish)"
	}
	return ""
}

// growthVote counts the rungs' growth laws (RungReport.Growth). Its law is
// the one most rungs follow, integrate.GrowthUndetermined when no rung
// could be fitted. Ties between exponential and the others go to
// exponential (the cautious reading).
type growthVote struct{ exp, pow, bnd int }

func (v *growthVote) add(law integrate.GrowthKind) {
	switch law {
	case integrate.GrowthExponential:
		v.exp++
	case integrate.GrowthPolynomial:
		v.pow++
	case integrate.GrowthBounded:
		v.bnd++
	}
}

func (v growthVote) law() integrate.GrowthKind {
	switch {
	case v.exp+v.pow+v.bnd == 0:
		return integrate.GrowthUndetermined
	case v.exp >= v.pow && v.exp >= v.bnd:
		return integrate.GrowthExponential
	case v.pow >= v.bnd:
		return integrate.GrowthPolynomial
	}
	return integrate.GrowthBounded
}

// conclude draws the conclusions every audit shares from its rungs and
// TrustedUntil: the growth law of the vote, the earliest predicted horizon
// (only with exponential growth: otherwise a Lyapunov prediction means
// nothing, and the rungs' predictions are cleared) and the verdict.
func (rep *Report) conclude() {
	var vote growthVote
	for _, r := range rep.Rungs {
		vote.add(r.Growth)
	}
	rep.Growth = vote.law()
	rep.PredictedHorizon = 0
	for i := range rep.Rungs {
		r := &rep.Rungs[i]
		switch {
		case rep.Growth != integrate.GrowthExponential:
			r.Predicted = 0
		case r.Predicted > 0 && (rep.PredictedHorizon == 0 || r.Predicted < rep.PredictedHorizon):
			rep.PredictedHorizon = r.Predicted
		}
	}
	rep.Verdict = verdictOf(len(rep.Rungs), rep.Failed, rep.TrustedUntil < rep.T0+rep.Horizon, rep.TolUsed)
}
