package plumb

import (
	"context"
	"fmt"
	"math"
	"strings"

	"github.com/plumbdyn/plumb/integrate"
	"github.com/plumbdyn/plumb/lyap"
	"github.com/plumbdyn/plumb/maps"
)

// ShadowReport says whether a true orbit of the model stays near the
// audited run, and for how long (TrustSettings.Shadow): where the
// agreement horizon says when runs part, the shadow says how long the run,
// though wrong pointwise, is still an orbit of the model to within
// Distance. Like the horizon it is a statement about the numerical model,
// not the real system.
type ShadowReport struct {
	// Of names the run shadowed: a map's float64 orbit, or a flow's run
	// (your run — TrustSettings.Run, or the rung of kind
	// integrate.KindRun in TrustSettings.Ladder — or else
	// Dormand–Prince 5(4) at Solve's default tolerances).
	Of string `json:"of"`
	// Method is how the shadow was found: the refinement of Hammel, Yorke
	// & Grebogi (a map, lyap.ShadowMap) or multiple shooting with time
	// rescaling in least squares (a flow, lyap.ShadowFlow).
	Method string `json:"method"`
	// Distance is the largest distance between the run and the shadow
	// (Euclidean over every component, in state units, angles wrapped) up
	// to Until.
	Distance float64 `json:"distance"`
	// Until is where the shadow ends (a time, an iterate for a map); Whole
	// whether that is the end of the audited span.
	Until float64 `json:"until"`
	Whole bool    `json:"whole"`
	// StepErrorBefore is the run's largest one-step error (a flow: the gap
	// at a joint between the run and an accurate segment from the joint
	// before), StepErrorAfter the shadow's.
	StepErrorBefore float64 `json:"step_error_before"`
	StepErrorAfter  float64 `json:"step_error_after"`
	// Joints is the number of segments a flow's run was cut into;
	// TimeShift the largest drift of the shadow's clock from the run's
	// (flow only).
	Joints    int     `json:"joints,omitempty"`
	TimeShift float64 `json:"time_shift,omitempty"`
	// MinAngle is the smallest angle (radians) between stable and
	// unstable directions met (a flow: between the expanding directions
	// and the others, at the joints).
	MinAngle float64 `json:"min_angle,omitempty"`
	// Glitch says where and why the shadow stops before the end.
	Glitch *lyap.Glitch `json:"glitch,omitempty"`
	// Error says why no shadow was computed.
	Error string `json:"error,omitempty"`
}

// shadowSegmentGrowth is the growth, in e-folds of the largest exponent,
// over one segment of a flow's shadow: short enough that a segment's
// tangent map stays well conditioned, long enough to keep the joints few.
const shadowSegmentGrowth = 0.5

// addShadow fills rep.Shadow when s.Shadow asks for it and the audit
// finished.
func (sys *System) addShadow(ctx context.Context, rep *Report, err error, horizon float64, s *TrustSettings) {
	if !s.Shadow || rep == nil || err != nil {
		return
	}
	if sys.kind == KindMap {
		rep.Shadow = sys.shadowMap(ctx, int(horizon))
		return
	}
	rep.Shadow = sys.shadowFlow(ctx, rep, horizon, s)
}

func (sys *System) shadowMap(ctx context.Context, steps int) *ShadowReport {
	out := &ShadowReport{Of: "the float64 orbit", Method: "refinement in double-double (Hammel, Yorke & Grebogi)"}
	m, err := sys.Map()
	if err != nil {
		out.Error = err.Error()
		return out
	}
	orbit, err := maps.Orbit(ctx, m, sys.Start(), steps)
	if err != nil {
		out.Error = err.Error()
		return out
	}
	sh, err := lyap.ShadowMap(ctx, m, orbit, nil)
	out.fill(sh, err, float64(steps))
	if sh != nil && err == nil {
		out.MinAngle = sh.MinAngle
	}
	return out
}

func (sys *System) shadowFlow(ctx context.Context, rep *Report, horizon float64, s *TrustSettings) *ShadowReport {
	out := &ShadowReport{Method: "multiple shooting with time rescaling, least squares (Coomes, Koçak & Palmer; Wang)"}
	method := integrate.DormandPrince54
	set := integrate.Settings{RelTol: integrate.DefaultRelTol, AbsTol: integrate.DefaultAbsTol, MaxSteps: s.MaxSteps, DropSteps: true}
	r := s.Run
	if r == nil && s.Ladder != nil { // your run inside a ladder built around it
		for i := range s.Ladder.Rungs {
			if s.Ladder.Rungs[i].Kind == integrate.KindRun {
				r = &s.Ladder.Rungs[i]
			}
		}
	}
	switch {
	case r != nil && r.Fixed != nil && !(r.Step > 0):
		out.Error = "your fixed-step run has no step size"
		return out
	case r != nil && r.Fixed != nil:
		method = r.Fixed(r.Step)
		out.Of = fmt.Sprintf("your run (%s h=%g)", method.Name(), r.Step)
	case r != nil:
		if r.Method != nil {
			method = r.Method
		}
		if r.RelTol > 0 {
			set.RelTol = r.RelTol
		}
		if r.AbsTol > 0 {
			set.AbsTol = r.AbsTol
		}
		out.Of = fmt.Sprintf("your run (%s rtol %g atol %g)", method.Name(), set.RelTol, set.AbsTol)
	default:
		out.Of = fmt.Sprintf("the %s run at rtol %g atol %g", method.Name(), set.RelTol, set.AbsTol)
	}
	joints := 100
	if e := rep.Exponent; e != nil && e.Value > 0 {
		joints = int(math.Ceil(float64(horizon*e.Value) / shadowSegmentGrowth))
	}
	joints = min(max(joints, 10), 5000)
	out.Joints = joints
	p := sys.Problem()
	set.Every = horizon / float64(joints)
	sol, err := integrate.Solve(ctx, p, p.T0+horizon, method, &set)
	if err != nil {
		out.Error = "the run failed: " + err.Error()
		return out
	}
	times := make([]float64, 0, len(sol.Samples))
	states := make([]float64, 0, len(sol.Samples)*len(p.Y0))
	for _, smp := range sol.Samples {
		times = append(times, smp.T)
		states = append(states, smp.Y...)
	}
	sh, err := lyap.ShadowFlow(ctx, p, times, states, nil)
	out.fill(sh, err, p.T0+horizon)
	if sh != nil && err == nil {
		out.TimeShift, out.MinAngle = sh.TimeShift, sh.MinAngle
	}
	return out
}

func (out *ShadowReport) fill(sh *lyap.Shadow, err error, end float64) {
	if err != nil {
		out.Error = err.Error()
		return
	}
	out.Distance, out.Until = sh.Distance, sh.Until
	out.Whole = sh.Shadowed == sh.Iterates
	out.StepErrorBefore, out.StepErrorAfter = sh.StepErrorBefore, sh.StepErrorAfter
	out.Glitch = sh.Glitch
	if out.Whole {
		out.Until = end
	}
}

// writeShadow writes the shadow's line of the text report; at is "t = " or
// "iterate ", u the time unit after a time.
func (rep *Report) writeShadow(b *strings.Builder, at, u string) {
	sh := rep.Shadow
	if sh == nil {
		return
	}
	if sh.Error != "" {
		fmt.Fprintf(b, "shadow: not found (%s)\n", sh.Error)
		return
	}
	fmt.Fprintf(b, "shadow (of the model, not the real system): a true orbit stays within %.2g of %s up to %s%.6g%s", sh.Distance, sh.Of, at, sh.Until, u)
	if sh.TimeShift > 0 {
		fmt.Fprintf(b, " (its clock shifted by at most %.2g)", sh.TimeShift)
	}
	if sh.Whole {
		b.WriteString(", the whole span")
	}
	fmt.Fprintf(b, "; one-step errors %.2g refined to %.2g\n", sh.StepErrorBefore, sh.StepErrorAfter)
	if g := sh.Glitch; g != nil {
		fmt.Fprintf(b, "shadow: none certified beyond: %s\n", g.Reason)
	}
}
