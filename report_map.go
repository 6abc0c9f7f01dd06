package plumb

import (
	"fmt"
	"strings"

	"github.com/plumbdyn/plumb/integrate"
	"github.com/plumbdyn/plumb/maps"
)

// iterateUnit is the TimeUnit of a map's report: its times count iterates.
const iterateUnit = "iterate"

// ddDigits is the precision of a double-double number in decimal digits
// (about 32: two float64 significands, 106 bits).
const ddDigits = 32

// fillMap copies a map audit into the report and draws the conclusions.
func (rep *Report) fillMap(res *maps.AuditResult) {
	rep.TolAbs, rep.Spread, rep.Magnitude, rep.Stride = res.Tol, res.Spread, res.Magnitude, res.Stride
	stride := max(res.Stride, 1)
	rep.Times = make([]float64, (rep.Steps+stride)/stride)
	for i := range rep.Times {
		rep.Times[i] = float64(i * stride)
	}
	rep.Rungs = make([]RungReport, len(res.Rungs))
	ids := make([]*string, len(res.Rungs))
	for i, r := range res.Rungs {
		g := r.Growth
		out := RungReport{
			Name: r.Rung.Name, Effect: r.Rung.Kind, ID: rungID(r.Rung.Kind, "", 0, r.Rung.Storage),
			AgreesUntil: float64(r.AgreesUntil), Departed: r.Departed, DepartsAt: r.DepartsAt,
			Delta0: clean(r.Delta0), Predicted: clean(r.Predicted),
			Growth: integrate.GrowthKind(g.Kind.String()), Rate: clean(g.Rate), RateErr: clean(g.RateErr), Power: clean(g.Power), PowerErr: clean(g.PowerErr),
			Start: r.Start / stride, Divergence: make([]float64, len(r.Divergence)),
			Evaluations: r.Iterates, Steps: r.Iterates,
		}
		for k, d := range r.Divergence {
			out.Divergence[k] = clean(d)
		}
		switch {
		case r.Rung.Kind == integrate.KindRestart:
			out.Rounding, out.RestartAt = r.Rung.Restart.String(), float64(r.Rung.RestartAt)
		case r.Rung.Storage.Kind != integrate.NoRounding:
			out.Rounding = r.Rung.Storage.String()
		default:
			out.Rounding = "float64"
		}
		if r.Err != nil {
			out.Error = r.Err.Error()
		}
		rep.Rungs[i] = out
		ids[i] = &rep.Rungs[i].ID
	}
	uniqueIDs(ids, "")
	rep.TrustedUntil, rep.Failed = float64(res.Trusted), res.Failed
	rep.TolUsed = clean(res.MaxDivergence / rep.TolAbs)
	rep.LimitedBy, rep.LimitingRung = "", ""
	if res.Limit >= 0 {
		rep.LimitedBy, rep.LimitingRung = rep.Rungs[res.Limit].Effect, rep.Rungs[res.Limit].Name
	}
	rep.conclude()
}

// writeMap is Write for a map's report: times are iterates.
func (rep *Report) writeMap(b *strings.Builder) error {
	fmt.Fprintf(b, "audit of iterates 0 .. %d at tolerance %s\n", rep.Steps, tolPhrase(rep.Tol, rep.TolAbs, rep.Relative))
	fmt.Fprintf(b, "distance: %s\n", rep.Distance)
	if ex := rep.Exact; ex != nil {
		fmt.Fprintf(b, "reference: %s (about %d digits)\n\n", ex.Arithmetic, ex.Digits)
	}
	table := make([]rungRow, len(rep.Rungs))
	for i, r := range rep.Rungs {
		table[i] = rungRow{
			name: r.Name, effect: r.Effect.String(), until: fmt.Sprintf("%d", int(r.AgreesUntil)),
			departed: r.Departed, failed: r.Error != "", predicted: r.Predicted,
			growth: growthCell(r.Growth, r.Rate, r.Power, " per iterate", "n"),
		}
	}
	if err := writeRungTable(b, table); err != nil {
		return err
	}
	b.WriteByte('\n')
	switch {
	case rep.Exponent != nil && rep.Exponent.Source == "given":
		fmt.Fprintf(b, "largest Lyapunov exponent (given): %.4g per iterate\n", rep.Exponent.Value)
	case rep.Exponent != nil:
		fmt.Fprintf(b, "largest Lyapunov exponent: %.4g ± %.2g per iterate", rep.Exponent.Value, rep.Exponent.StdErr)
		if rep.Exponent.LyapunovTime > 0 && rep.Growth == integrate.GrowthExponential {
			fmt.Fprintf(b, " (Lyapunov time %.3g iterates)", rep.Exponent.LyapunovTime)
		}
		b.WriteByte('\n')
	case rep.ExponentError != "":
		fmt.Fprintf(b, "largest Lyapunov exponent: not estimated (%s)\n", rep.ExponentError)
	}
	switch rep.Growth {
	case integrate.GrowthExponential:
		b.WriteString("divergence grows exponentially (the orbit is chaotic)\n")
	case integrate.GrowthPolynomial:
		b.WriteString("divergence grows polynomially (a power law fits better than an exponential)\n")
	case integrate.GrowthBounded:
		b.WriteString("divergence stays bounded\n")
	default:
		b.WriteString("divergence growth undetermined (too few points, or no divergence at all)\n")
	}
	if rep.PredictedHorizon > 0 {
		fmt.Fprintf(b, "predicted horizon ln(tol/delta0)/lambda%s: iterate %.4g\n", rep.Distance.deltaNote(), rep.PredictedHorizon)
	}
	if rep.Failed > 0 {
		fmt.Fprintf(b, "%d rung(s) failed; their curves end where they stopped\n", rep.Failed)
	}
	trusted := int(rep.TrustedUntil)
	switch {
	case rep.Verdict == Incomplete:
		b.WriteString("the audit did not finish: no trusted horizon is read off it\n")
	case rep.LimitedBy != "":
		fmt.Fprintf(b, "trusted until iterate %d, limited by %s (%s)\n", trusted, rep.LimitedBy, rep.LimitingRung)
	default:
		fmt.Fprintf(b, "trusted until iterate %d: every rung agrees over the whole horizon\n", trusted)
	}
	verdict := rep.Verdict.words()
	switch rep.Verdict {
	case NotTrusted:
		fmt.Fprintf(b, "verdict for iterate %d: %s (the runs part by more than the tolerance at iterate %d)\n", rep.Steps, verdict, trusted+1)
	case Incomplete:
		fmt.Fprintf(b, "verdict for iterate %d: %s\n", rep.Steps, verdict)
	default:
		fmt.Fprintf(b, "verdict for iterate %d: %s (largest divergence %.2g of the tolerance)\n", rep.Steps, verdict, rep.TolUsed)
	}
	rep.writeShadow(b, "iterate ", "")
	rep.writeProof(b, "iterate ", "")
	fmt.Fprintf(b, "caution: %s\n", rep.Caution)
	return nil
}
