package plumb

import (
	"context"
	"fmt"
	"math"
	"slices"

	"github.com/plumbdyn/plumb/integrate"
	"github.com/plumbdyn/plumb/maps"
)

// Trust audits how far ahead a computed trajectory of the system, from its
// start, can be believed, over horizon time units (for a map, horizon
// iterates: a whole number from 1 to maps.MaxSteps), and says up to which
// time every rung agrees with the reference within settings.Tol, which
// effect limits it, and whether the horizon is trusted. It chooses the
// reference itself:
//
//   - a flow or Hamiltonian with formulas (every built-in and every file):
//     every float64 run of the ladder, the tightest one too, is compared
//     with a Taylor-series reference computed in double-double or
//     big.Float at the precision the horizon needs (Report.Exact); at a
//     kink of the formulas it cannot pass, the reference is set aside and
//     the report says why (ExactReference.SetAside);
//   - with settings.NoExact, or without formulas: the runs are compared
//     with the tightest float64 run (TrustProblem);
//   - a map: its orbit in double-double arithmetic (about 32 digits) is
//     the reference, and float64, reduced-storage and restarted orbits
//     are compared with it iterate by iterate (maps.Audit); the report's
//     times are iterates (Report.TimeUnit "iterate").
//
// The system's state names, periods and time unit go into the audit and
// the report: settings.States and settings.Periods must be nil (or equal
// the system's). The
// flow-only settings (Ladder, Run, Every, MaxSteps) must be zero for a map
// and the map-only MapRungs nil for a flow; NoReversal and NoExact do
// nothing for a map.
//
// Errors before any work (nil report): a nil or zero system (ErrNoSystem),
// a horizon that is not a positive, finite time or, for a map, not a whole
// number of iterates in range (ErrHorizon, and maps.ErrSteps), a nil
// settings or a bad tolerance (ErrTolerance), a misplaced or bad field
// (integrate.ErrSettings, integrate.ErrLadder, *DistanceError). After work
// began, the partial report (Verdict Incomplete) comes with the error.
//
// # Caution
//
// A trust horizon is a numerical statement about a model, not a safety
// certificate for the real system; safety-critical use follows the field's
// own codes and licensed review.
//
// References: see TrustProblem and maps.Audit.
func (s *System) Trust(ctx context.Context, horizon float64, settings *TrustSettings) (*Report, error) {
	if err := s.check("Trust"); err != nil {
		return nil, err
	}
	if ctx == nil {
		ctx = context.Background()
	}
	if settings == nil {
		return nil, fmt.Errorf("plumb: TrustSettings is nil (Tol is required): %w", ErrTolerance)
	}
	set := *settings
	if err := s.checkProve(set.Prove); err != nil {
		return nil, err
	}
	misplaced := func(field, why string) error {
		return fmt.Errorf("plumb: TrustSettings.%s: %s: %w", field, why, integrate.ErrSettings)
	}
	switch {
	case set.States != nil && !slices.Equal(set.States, s.States):
		return nil, misplaced("States", "System.Trust takes the system's own state names")
	case set.Periods != nil && !slices.Equal(set.Periods, s.Periods()):
		return nil, misplaced("Periods", "System.Trust takes the system's own periods")
	}
	if s.kind == KindMap {
		switch {
		case set.Ladder != nil:
			return nil, misplaced("Ladder", s.Name+" is a map, audited with MapRungs")
		case set.Run != nil:
			return nil, misplaced("Run", s.Name+" is a map, iterated exactly: there is no run of a method to audit")
		case set.Every != 0:
			return nil, misplaced("Every", s.Name+" is a map, compared at every iterate")
		case set.MaxSteps != 0:
			return nil, misplaced("MaxSteps", s.Name+" is a map, whose horizon is its number of iterates")
		}
		if horizon != math.Trunc(horizon) || !(horizon >= 1 && horizon <= maps.MaxSteps) {
			return nil, fmt.Errorf("plumb: horizon = %v: %s is a map, so the horizon counts iterates, a whole number from 1 to %d: %w: %w",
				horizon, s.Name, maps.MaxSteps, ErrHorizon, maps.ErrSteps)
		}
		if err := checkTolLambda("TrustSettings", set.Tol, set.Lambda); err != nil {
			return nil, err
		}
		rep, err := s.trustMap(ctx, int(horizon), set)
		s.addShadow(ctx, rep, err, horizon, &set)
		s.addProof(ctx, rep, err, horizon, &set)
		return rep, err
	}
	if set.MapRungs != nil {
		return nil, misplaced("MapRungs", s.Name+" is a "+string(s.kind)+", audited with Ladder")
	}
	set.States, set.Periods = s.States, s.Periods()
	var rep *Report
	var err error
	if !set.NoExact && s.HasFormulas() {
		rep, err = trustSystem(ctx, s, horizon, &set, true)
	} else {
		rep, err = TrustProblem(ctx, s.Problem(), horizon, &set)
	}
	if rep != nil {
		rep.TimeUnit = s.TimeUnit()
	}
	s.addShadow(ctx, rep, err, horizon, &set)
	s.addProof(ctx, rep, err, horizon, &set)
	return rep, err
}
