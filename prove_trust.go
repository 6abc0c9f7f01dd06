package plumb

import (
	"context"
	"fmt"
	"math"
	"strings"

	"github.com/plumbdyn/plumb/enclose"
	"github.com/plumbdyn/plumb/integrate"
)

// ProofReport is a validated enclosure of the audited trajectory
// (TrustSettings.Prove, package enclose): boxes proven to hold the exact
// solution of the model's formulas at every step, and the time up to which
// they stay narrower than the tolerance. Where the agreement horizon is an
// estimate (runs agree), the proven horizon is a proof, about the
// formulas as written with their float64 parameters; it is usually
// shorter.
type ProofReport struct {
	// Method names the wrapping and the Taylor order ("Lohner (QR),
	// interval Taylor order 20"; a map: interval iteration).
	Method string `json:"method"`
	// Tol is the accepted width (TrustSettings.Prove), in state units:
	// the largest width of the box over the components.
	Tol float64 `json:"tol"`
	// ProvenUntil is the last step time (a map: iterate) up to which the
	// width stayed below Tol at every step; Whole says that is the end of
	// the audited span.
	ProvenUntil float64 `json:"proven_until"`
	Whole       bool    `json:"whole"`
	// Steps is the number of steps (iterates) enclosed.
	Steps int `json:"steps"`
	// Times and Widths are the width against time: Widths[i] is the
	// largest width over the steps since the previous point, up to
	// Times[i] (at most proofPoints points; every step when fewer).
	Times  []float64 `json:"times"`
	Widths []float64 `json:"widths"`
	// End is the last box enclosed: Lo and Hi per state at time T.
	End *enclose.Step `json:"end"`
	// Failure says where and why the enclosure stopped before the end of
	// the span (width blow-up, Picard test, step underflow, a kink or
	// jump in the box), null when it reached the end.
	Failure *enclose.Failure `json:"failure"`
	// Caution is the standing caution of a proof (ProofCaution).
	Caution string `json:"caution"`
}

// ProofCaution is the caution every proof carries.
const ProofCaution = "A proven enclosure bounds the exact solution of the model's equations as written, with their float64 parameters: " +
	"not the runs audited beside it, and not the real system they describe. " +
	"Safety-critical use follows the field's own codes and licensed review."

// proofPoints bounds the points of a proof's width curve.
const proofPoints = 256

// checkProve refuses a bad TrustSettings.Prove, or one on a system
// without formulas, before any work.
func (s *System) checkProve(prove float64) error {
	switch {
	case prove == 0:
		return nil
	case !(prove > 0) || math.IsInf(prove, 0):
		return fmt.Errorf("plumb: TrustSettings.Prove = %v: want a positive finite width: %w", prove, integrate.ErrSettings)
	case s.form == nil:
		return fmt.Errorf("plumb: TrustSettings.Prove: %s has no formulas to enclose (built-in models with formulas and system files only): %w", s.Name, integrate.ErrSettings)
	}
	return nil
}

// enclosable returns the system's formulas for package enclose.
func (s *System) enclosable() (*enclose.Formulas, error) {
	rates := s.Formulas()
	for i, r := range rates {
		if strings.HasSuffix(r, " ...") && len(r) > maxFormulaText {
			return nil, fmt.Errorf("the formula of %s is longer than %d bytes", s.States[i], maxFormulaText)
		}
	}
	f := &enclose.Formulas{States: s.States, Rates: rates, Values: append([]float64(nil), s.params...), Map: s.kind == KindMap}
	for _, p := range s.pinfo {
		f.Params = append(f.Params, p.Name)
	}
	return f, nil
}

// addProof fills rep.Proof when s.Prove asks for it and the audit
// finished: the enclosure of the audited start over the horizon (time
// units, or iterates for a map).
func (sys *System) addProof(ctx context.Context, rep *Report, err error, horizon float64, s *TrustSettings) {
	if !(s.Prove > 0) || rep == nil || err != nil {
		return
	}
	// Inputs were checked by System.Trust; a canceled proof keeps its
	// partial report, whose failure says so.
	var progress func(float64)
	if s.Progress != nil {
		progress = func(done float64) { s.Progress(StageProof, int(1000*done), 1000) }
	}
	rep.Proof, _ = sys.prove(ctx, horizon, s.Prove, progress)
}

// Prove encloses the system's trajectory from its start over horizon (time
// units from the start time, or iterates for a map) with package enclose
// (Lohner's method, interval Taylor order enclose.DefaultOrder for a
// flow), and reports the width against time and the proven horizon:
// where the width stays below tol.
//
// Errors before any work (nil report): a nil system (ErrNoSystem), a
// horizon that is not positive and finite or, for a map, not a whole
// number (ErrHorizon), a tol that is not positive and finite or a system
// without formulas (integrate.ErrSettings). A canceled context returns
// the partial report (its Failure says canceled) with an error wrapping
// ctx.Err(). Every other stop (width blow-up, Picard test, a kink in the
// box) is the report's Failure, not an error.
//
// # Caution
//
// A proven enclosure is a statement about the model's equations as written
// and their float64 parameters, not about the real system. Safety-critical
// use follows the field's codes and licensed review.
//
// References: see package enclose.
func (sys *System) Prove(ctx context.Context, horizon, tol float64) (*ProofReport, error) {
	return sys.prove(ctx, horizon, tol, nil)
}

// prove is Prove reporting the fraction enclosed to progress (if not nil).
func (sys *System) prove(ctx context.Context, horizon, tol float64, progress func(float64)) (*ProofReport, error) {
	if err := sys.check("Prove"); err != nil {
		return nil, err
	}
	if ctx == nil {
		ctx = context.Background()
	}
	if tol == 0 {
		return nil, fmt.Errorf("plumb: Prove with tol 0: want a positive finite width: %w", integrate.ErrSettings)
	}
	if err := sys.checkProve(tol); err != nil {
		return nil, err
	}
	if !(horizon > 0) || math.IsInf(horizon, 0) || (sys.kind == KindMap && (horizon != math.Trunc(horizon) || horizon > math.MaxInt32)) {
		return nil, fmt.Errorf("plumb: Prove over horizon %v: want a positive finite time (a whole number of iterates for a map): %w", horizon, ErrHorizon)
	}
	f, err := sys.enclosable()
	if err != nil {
		return nil, fmt.Errorf("plumb: Prove: %v: %w", err, integrate.ErrSettings)
	}
	out := &ProofReport{Tol: tol, Caution: ProofCaution}
	set := &enclose.Settings{Tol: tol, Progress: progress}
	var res *enclose.Result
	if sys.kind == KindMap {
		res, err = enclose.Map(ctx, f, sys.Start(), int(horizon), set)
	} else {
		t0 := sys.Problem().T0
		res, err = enclose.Flow(ctx, f, t0, sys.Start(), t0+horizon, set)
	}
	if res == nil {
		return nil, fmt.Errorf("plumb: Prove: %w", err)
	}
	out.Method = res.Method
	if res.Order > 0 {
		out.Method = fmt.Sprintf("%s, interval Taylor order %d", res.Method, res.Order)
	} else {
		out.Method += ", interval iteration"
	}
	out.ProvenUntil = res.Horizon
	out.Failure = res.Failure
	out.Steps = len(res.Steps) - 1
	last := res.Steps[len(res.Steps)-1]
	out.End = &last
	out.Whole = res.Failure == nil && last.Width < tol
	stride := (len(res.Steps) + proofPoints - 1) / proofPoints
	for i := 0; i < len(res.Steps); {
		j := min(i+stride, len(res.Steps))
		if i == 0 {
			j = 1 // the start on its own
		}
		w := 0.0
		for _, st := range res.Steps[i:j] {
			w = max(w, st.Width)
		}
		out.Times = append(out.Times, res.Steps[j-1].T)
		out.Widths = append(out.Widths, w)
		i = j
	}
	if err != nil {
		return out, fmt.Errorf("plumb: Prove: %w", err)
	}
	return out, nil
}

// writeProof writes the proof's lines of the text report; at is "t = "
// or "iterate ", u the time unit after a time.
func (rep *Report) writeProof(b *strings.Builder, at, u string) {
	p := rep.Proof
	if p == nil {
		return
	}
	fmt.Fprintf(b, "proof: the exact solution of the model's equations lies in boxes narrower than %.3g up to %s%.6g%s", p.Tol, at, p.ProvenUntil, u)
	if p.Whole {
		b.WriteString(", the whole span")
	}
	fmt.Fprintf(b, "; width %.3g at %s%.6g%s (enclosure: %s)\n", p.End.Width, at, p.End.T, u, p.Method)
	if len(p.Times) > 1 {
		b.WriteString("proof: width against time:")
		for i, k := range proofRows(len(p.Times)) {
			if i > 0 {
				b.WriteString(",")
			}
			fmt.Fprintf(b, " %s%.4g%s: %.2g", at, p.Times[k], u, p.Widths[k])
		}
		b.WriteString("\n")
	}
	if f := p.Failure; f != nil {
		fmt.Fprintf(b, "proof: stopped at %s%.6g%s: %s (%s)\n", at, f.T, u, f.Reason, f.Kind)
	}
	fmt.Fprintf(b, "proof caution: %s\n", p.Caution)
}

// proofRows picks at most proofTableRows indices of a width curve of n
// points for the text report, evenly spread, the last included.
func proofRows(n int) []int {
	const proofTableRows = 8
	var out []int
	for r := 1; r <= proofTableRows; r++ {
		k := r * (n - 1) / proofTableRows
		if len(out) == 0 || out[len(out)-1] != k {
			out = append(out, k)
		}
	}
	return out
}
