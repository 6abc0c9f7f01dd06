package plumb

import (
	"fmt"
	"io"
	"strings"
	"text/tabwriter"

	"github.com/plumbdyn/plumb/integrate"
)

// Write writes the short human summary: a table of the rungs with their
// agreement horizons and predictions, the exponent, the trusted horizon and
// what limits it, the verdict and the caution.
func (rep *Report) Write(w io.Writer) error {
	var b strings.Builder
	if rep.Steps > 0 {
		if err := rep.writeMap(&b); err != nil {
			return err
		}
		_, err := io.WriteString(w, b.String())
		return err
	}
	u := "" // the time unit after a time, " s"
	if rep.TimeUnit != "" {
		u = " " + rep.TimeUnit
	}
	fmt.Fprintf(&b, "audit of t = %.4g .. %.4g%s at tolerance %s\n", rep.T0, rep.T0+rep.Horizon, u, tolPhrase(rep.Tol, rep.TolAbs, rep.Relative))
	fmt.Fprintf(&b, "distance: %s\n", rep.Distance)
	rows := rep.Rungs
	if rc := rep.Recorded; rc != nil {
		rc.writeHead(&b)
	} else if ex := rep.Exact; ex != nil && ex.SetAside != "" {
		fmt.Fprintf(&b, "reference: %s (the multiprecision reference was set aside: %s)\n\n", rep.Reference.Name, ex.SetAside)
	} else if ex != nil {
		kinks := ""
		if ex.KinkRestarts > 0 {
			kinks = fmt.Sprintf(", restarted at %d kinks", ex.KinkRestarts)
		}
		if ex.Continued != "" {
			fmt.Fprintf(&b, "reference: %s in %s, %d digits (order %d) to t = %.4g, where every run from the start had departed from it, then in %s at %d digits, from which later restarts start (%d steps in all%s); every float64 run is compared with it\n\n",
				ex.Method, ex.Arithmetic, ex.Digits, ex.Order, ex.AccurateUntil, ex.Continued, ex.ContinuedDigits, ex.Steps, kinks)
		} else {
			fmt.Fprintf(&b, "reference: %s in %s, %d digits (order %d, %d steps%s); every float64 run is compared with it\n\n",
				ex.Method, ex.Arithmetic, ex.Digits, ex.Order, ex.Steps, kinks)
		}
		rows = append([]RungReport{rep.Reference}, rep.Rungs...)
	} else {
		fmt.Fprintf(&b, "reference: the tightest float64 run, %s\n\n", rep.Reference.Name)
	}
	table := make([]rungRow, len(rows))
	for i, r := range rows {
		table[i] = rungRow{
			name: r.Name, effect: r.Effect.String(), until: fmt.Sprintf("%.4g", r.AgreesUntil),
			departed: r.Departed, failed: r.Error != "", predicted: r.Predicted,
			growth: growthCell(r.Growth, r.Rate, r.Power, "", "t"),
		}
	}
	if err := writeRungTable(&b, table); err != nil {
		return err
	}
	b.WriteByte('\n')
	switch {
	case rep.Exponent != nil && rep.Exponent.Source == "given":
		fmt.Fprintf(&b, "largest Lyapunov exponent (given): %.4g\n", rep.Exponent.Value)
	case rep.Exponent != nil:
		fmt.Fprintf(&b, "largest Lyapunov exponent: %.4g ± %.2g", rep.Exponent.Value, rep.Exponent.StdErr)
		switch {
		case rep.Growth == integrate.GrowthUndetermined:
			// Too few comparison points to fit any law: nothing is said
			// either way about chaos.
		case rep.Growth != integrate.GrowthExponential:
			// A small positive finite-time estimate of a regular flow
			// (it decays like ln(T)/T) is no sign of chaos.
			b.WriteString(" (the ladder sees no exponential growth)")
		case rep.Exponent.LyapunovTime > 0:
			fmt.Fprintf(&b, " (Lyapunov time %.3g%s)", rep.Exponent.LyapunovTime, u)
		}
		b.WriteByte('\n')
	case rep.ExponentError != "":
		fmt.Fprintf(&b, "largest Lyapunov exponent: not estimated (%s)\n", rep.ExponentError)
	}
	switch rep.Growth {
	case integrate.GrowthExponential:
		b.WriteString("divergence grows exponentially (the runs are chaotic)\n")
	case integrate.GrowthPolynomial:
		b.WriteString("divergence grows polynomially (a power law fits better than an exponential)\n")
	case integrate.GrowthBounded:
		b.WriteString("divergence stays bounded\n")
	default:
		if len(rep.Times) > 1 && rep.Recorded == nil {
			// On a long horizon the grid (horizon/1000) can be coarser
			// than the growth: the runs part between a few points.
			fmt.Fprintf(&b, "divergence growth undetermined (too few comparison points before the runs part: the grid is every %.3g%s; a shorter --horizon resolves it)\n", rep.Times[1]-rep.Times[0], u)
		} else {
			b.WriteString("divergence growth undetermined (too few points)\n")
		}
	}
	if rep.PredictedHorizon > 0 {
		fmt.Fprintf(&b, "predicted horizon ln(tol/delta0)/lambda%s: %.4g%s\n", rep.Distance.deltaNote(), rep.PredictedHorizon, u)
	}
	if rep.Float64Horizon > 0 {
		fmt.Fprintf(&b, "float64 storage itself (extrapolated from the precision rungs): agrees until about %.4g\n", rep.Float64Horizon)
	}
	if rv := rep.Reversal; rv != nil {
		if rv.Returned {
			fmt.Fprintf(&b, "reversibility: integrated to t = %.4g and back, the start is missed by %.3g\n", rv.T, rv.Miss)
		} else {
			fmt.Fprintf(&b, "reversibility: integrated to t = %.4g and back, the backward run stopped at t = %.4g (expected for a dissipative flow, which expands volumes backwards; no round-off estimate from it)\n", rv.T, rv.Reached)
		}
	}
	if rep.Failed > 0 {
		fmt.Fprintf(&b, "%d rung(s) failed; their curves end where they stopped\n", rep.Failed)
	}
	rep.writeYourRun(&b)
	if rc := rep.Recorded; rc != nil {
		rc.writeNotes(&b, rep.Growth)
	}
	switch {
	case rep.Verdict == Incomplete:
		b.WriteString("the audit did not finish: the table holds the rungs completed, and no trusted horizon is read off them\n")
	case rep.YourRun != nil:
	case rep.LimitedBy != "":
		fmt.Fprintf(&b, "trusted until t = %.4g%s, limited by %s (%s)\n", rep.TrustedUntil, u, rep.LimitedBy, rep.LimitingRung)
	default:
		fmt.Fprintf(&b, "trusted until t = %.4g%s: every rung agrees over the whole horizon\n", rep.TrustedUntil, u)
	}
	verdict := rep.Verdict.words()
	switch rep.Verdict {
	case NotTrusted:
		if rep.YourRun != nil {
			fmt.Fprintf(&b, "verdict for your run to t = %.4g%s: %s (it parts from the reference by more than the tolerance at t = %.4g%s)\n", rep.T0+rep.Horizon, u, verdict, rep.TrustedUntil, u)
			break
		}
		fmt.Fprintf(&b, "verdict for t = %.4g%s: %s (the runs part by more than the tolerance at t = %.4g%s)\n", rep.T0+rep.Horizon, u, verdict, rep.TrustedUntil, u)
	case Incomplete:
		fmt.Fprintf(&b, "verdict for t = %.4g%s: %s\n", rep.T0+rep.Horizon, u, verdict)
	default:
		fmt.Fprintf(&b, "verdict for t = %.4g%s: %s (largest divergence %.2g of the tolerance)\n", rep.T0+rep.Horizon, u, verdict, rep.TolUsed)
	}
	rep.writeShadow(&b, "t = ", u)
	rep.writeProof(&b, "t = ", u)
	fmt.Fprintf(&b, "caution: %s\n", rep.Caution)
	_, err := io.WriteString(w, b.String())
	return err
}

// tolPhrase is the tolerance as the summaries write it: tol, or the
// fraction tol of the spread with the absolute tolerance tolAbs.
func tolPhrase(tol, tolAbs float64, relative bool) string {
	if relative {
		return fmt.Sprintf("%.3g of the spread (%.3g)", tol, tolAbs)
	}
	return fmt.Sprintf("%.3g", tol)
}

// rungRow is one row of a summary's table of rungs; until is the
// formatted agreement horizon.
type rungRow struct {
	name, effect, until string
	departed, failed    bool
	predicted           float64
	growth              string
}

// writeRungTable writes the table of rungs: "> " marks an agreement over
// the whole run, " (failed)" a run that stopped, "-" no prediction.
func writeRungTable(b *strings.Builder, rows []rungRow) error {
	tw := tabwriter.NewWriter(b, 0, 4, 2, ' ', 0)
	fmt.Fprintln(tw, "rung\teffect\tagrees until\tpredicted\tgrowth\t")
	for _, r := range rows {
		until := r.until
		if !r.departed {
			until = "> " + until
		}
		if r.failed {
			until += " (failed)"
		}
		pred := "-"
		if r.predicted > 0 {
			pred = fmt.Sprintf("%.4g", r.predicted)
		}
		fmt.Fprintf(tw, "%s\t%s\t%s\t%s\t%s\t\n", r.name, r.effect, until, pred, r.growth)
	}
	return tw.Flush()
}

// growthCell is a rung's growth law as its table cell: with the rate (in
// units of per, e.g. " per iterate") or with the power of the variable v.
func growthCell(law integrate.GrowthKind, rate, power float64, per, v string) string {
	switch law {
	case integrate.GrowthExponential:
		return fmt.Sprintf("exponential, rate %.3g%s", rate, per)
	case integrate.GrowthPolynomial:
		return fmt.Sprintf("power law, %s^%.2g", v, power)
	}
	return law.String()
}
