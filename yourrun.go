package plumb

import (
	"fmt"
	"strings"

	"github.com/plumbdyn/plumb/integrate"
)

// YourRunReport is the audit of the caller's own run (TrustSettings.Run, or
// a ladder with a rung of kind integrate.KindRun): how far it agrees with
// the reference, and what tightening it buys.
type YourRunReport struct {
	// Rung is the index in Report.Rungs of the run; Name its name.
	Rung int    `json:"rung"`
	Name string `json:"name"`
	// AgreesUntil is its agreement horizon, Departed whether it departed
	// (see RungReport).
	AgreesUntil float64 `json:"agrees_until"`
	Departed    bool    `json:"departed"`
	// Tighter names the rung with the run's method at the tightest
	// tolerances (or the smallest step) below the run's, TighterUntil its
	// horizon, and Gain = TighterUntil - AgreesUntil what tightening buys;
	// empty and zero without such a rung.
	Tighter      string  `json:"tighter,omitempty"`
	TighterUntil float64 `json:"tighter_until,omitempty"`
	Gain         float64 `json:"gain,omitempty"`
}

// trustLadder is the ladder of the settings on [t0, t1]: Ladder, or
// integrate.RunLadder around Run, or integrate.DefaultLadder.
func trustLadder(s *TrustSettings, t0, t1 float64) (integrate.Ladder, error) {
	switch {
	case s.Run != nil && s.Ladder != nil:
		return integrate.Ladder{}, fmt.Errorf("plumb: TrustSettings sets both Run and Ladder: give the run (its ladder is built around it) or the whole ladder: %w", integrate.ErrSettings)
	case s.Run != nil:
		l, err := integrate.RunLadder(t0, t1, *s.Run)
		if err != nil {
			return l, fmt.Errorf("plumb: TrustSettings.Run: %w", err)
		}
		return l, nil
	case s.Ladder != nil:
		return *s.Ladder, nil
	}
	return integrate.DefaultLadder(t0, t1), nil
}

// yourRun finds the caller's run among the audit's rungs and the tighter
// rung beside it; nil when the ladder has no rung of kind run.
func yourRun(res *integrate.AuditResult, rungs []RungReport) *YourRunReport {
	own := -1
	for i, r := range res.Rungs {
		if r.Rung.Kind == integrate.KindRun {
			own = i
		}
	}
	if own < 0 {
		return nil
	}
	me := res.Rungs[own]
	y := &YourRunReport{Rung: own, Name: rungs[own].Name, AgreesUntil: me.Horizon, Departed: me.Departed}
	best := -1
	for i, r := range res.Rungs {
		if r.Rung.Kind != integrate.KindTolerance || r.Method != me.Method || r.Err != nil {
			continue
		}
		tighter := r.Rung.RelTol < me.Rung.RelTol
		if me.Rung.Fixed != nil {
			tighter = r.Rung.Fixed != nil && r.Rung.Step < me.Rung.Step
		}
		if !tighter {
			continue
		}
		if b := best; b < 0 || r.Rung.RelTol < res.Rungs[b].Rung.RelTol || (me.Rung.Fixed != nil && r.Rung.Step < res.Rungs[b].Rung.Step) {
			best = i
		}
	}
	if best >= 0 {
		y.Tighter, y.TighterUntil = rungs[best].Name, res.Rungs[best].Horizon
		y.Gain = y.TighterUntil - y.AgreesUntil
	}
	return y
}

// writeYourRun writes the summary's lines on the caller's run.
func (rep *Report) writeYourRun(b *strings.Builder) {
	y := rep.YourRun
	if y == nil {
		return
	}
	name := y.Name
	if !strings.HasPrefix(name, "your run") {
		name = "your run (" + name + ")"
	}
	if y.Departed {
		fmt.Fprintf(b, "%s agrees with the reference until t = %.6g\n", name, y.AgreesUntil)
	} else {
		fmt.Fprintf(b, "%s agrees with the reference over the whole span compared (to t = %.6g)\n", name, y.AgreesUntil)
	}
	if y.Tighter != "" {
		fmt.Fprintf(b, "tightening to %s buys %+.4g time units (agrees until t = %.6g)\n", y.Tighter, y.Gain, y.TighterUntil)
	}
}
