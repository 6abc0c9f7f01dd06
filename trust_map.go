package plumb

import (
	"context"
	"fmt"
	"runtime"

	"github.com/plumbdyn/plumb/lyap"
	"github.com/plumbdyn/plumb/maps"
)

// trustMap is System.Trust for a map: it iterates sys from its start for
// steps iterations in double-double arithmetic (the reference, about 32
// digits) and on every rung (float64, storage emulated at fewer bits, a
// restart from a rounded state) with maps.Audit, estimates the largest
// Lyapunov exponent per iterate (lyap.MapExponents) unless it is given,
// predicts each rung's departure as start + ln(tol/delta0)/lambda_1, and
// fills the report in iterates. The settings are validated by
// System.Trust (tolerance, exponent, the flow-only fields).
//
// References:
//
//	S. M. Hammel, J. A. Yorke, C. Grebogi, Numerical orbits of chaotic
//	  processes represent true orbits, Bull. AMS 19 (1988) 465–469 (with
//	  about 14 digits and doubling per iterate, prediction is lost after
//	  about 50 iterates).
//	G. Boffetta, M. Cencini, M. Falcioni, A. Vulpiani, Predictability: a way
//	  to characterize complexity, Phys. Rep. 356 (2002) 367–474, Sect. 2.1
//	  (the predicted horizon).
func (sys *System) trustMap(ctx context.Context, steps int, s TrustSettings) (*Report, error) {
	scales, err := s.Distance.PerComponent(sys.States)
	if err != nil {
		return nil, err
	}
	m, err := sys.Map()
	if err != nil {
		return nil, fmt.Errorf("plumb: trust: %w", err)
	}
	x0 := sys.Start()
	rep := &Report{
		Horizon: float64(steps), Steps: steps, Tol: s.Tol, Relative: s.Relative, TolAbs: s.Tol,
		Rungs: []RungReport{}, Caution: Caution, Arch: runtime.GOARCH, Version: buildVersion(),
		Distance: newDistanceReport(sys.States, scales, sys.Periods()), TimeUnit: iterateUnit,
		Exact: &ExactReference{Method: "the map iterated", Arithmetic: "double-double", Digits: ddDigits, Steps: steps, AccurateUntil: float64(steps)},
	}
	progress := func(stage Stage, done, total int) {
		if s.Progress != nil {
			s.Progress(stage, done, total)
		}
	}
	progress(StageAudit, 0, 1)
	res, runErr := maps.Audit(ctx, m, x0, steps, &maps.AuditSettings{Tol: s.Tol, Relative: s.Relative, Rungs: s.MapRungs, Scales: scales})
	if res == nil {
		return nil, fmt.Errorf("plumb: trust: %w", runErr)
	}
	progress(StageAudit, 1, 1)
	if runErr == nil {
		lambda := s.Lambda
		if lambda > 0 {
			rep.Exponent = givenExponent(lambda)
		} else {
			progress(StageExponent, 0, 1)
			sp, err := lyap.MapExponents(ctx, m, x0, 1, s.Exponent)
			progress(StageExponent, 1, 1)
			if err != nil && ctx.Err() != nil {
				runErr = fmt.Errorf("plumb: trust canceled during the exponent estimate: %w", err)
			}
			rep.Exponent, rep.ExponentError, lambda = estimatedExponent(sp, err)
		}
		res.Predict(lambda)
	}
	rep.fillMap(res)
	if runErr != nil {
		rep.Verdict = Incomplete
		return rep, runErr
	}
	return rep, nil
}
