package maps

import (
	"slices"

	"fmt"

	"github.com/plumbdyn/plumb/integrate"
)

// Rung is one run of a map audit, compared iterate by iterate with the
// double-double reference orbit.
type Rung struct {
	// Name labels the rung in reports.
	Name string
	// Kind is integrate.KindPrecision (the orbit from the start, every
	// iterate stored with Storage; NoRounding is plain float64) or
	// integrate.KindRestart (a float64 orbit from the reference state at
	// iterate RestartAt, rounded by Restart).
	Kind integrate.RungKind
	// Storage is the emulated storage of a precision rung.
	Storage integrate.Rounding
	// RestartAt, 1 <= RestartAt < steps, and Restart are the restart's
	// iterate and rounding.
	RestartAt int
	Restart   integrate.Rounding
}

// DefaultRungs is the ladder Audit runs over steps iterations when
// AuditSettings.Rungs is nil: float64 itself, storage emulated at 40 and 24
// bits, and a restart at integrate.RestartFraction·steps from the
// reference state rounded to 3 decimal places (a printout), when that
// iterate lies strictly inside.
func DefaultRungs(steps int) []Rung {
	rs := []Rung{
		{Name: "float64", Kind: integrate.KindPrecision},
		{Name: "40 bits", Kind: integrate.KindPrecision, Storage: integrate.Bits(40)},
		{Name: "24 bits", Kind: integrate.KindPrecision, Storage: integrate.Bits(24)},
	}
	if at := int(integrate.RestartFraction * float64(steps)); at >= 1 && at < steps {
		rs = append(rs, Rung{Name: "restart", Kind: integrate.KindRestart, RestartAt: at, Restart: integrate.Places(3)})
	}
	return rs
}

// validate checks the rung for an audit of steps iterations.
func (r Rung) validate(steps int) error {
	switch r.Kind {
	case integrate.KindPrecision:
		if r.Storage.Kind != integrate.NoRounding {
			if err := r.Storage.Validate(); err != nil {
				return err
			}
		}
	case integrate.KindRestart:
		if r.RestartAt < 1 || r.RestartAt >= steps {
			return fmt.Errorf("restart at iterate %d: must be 1 to %d: %w", r.RestartAt, steps-1, integrate.ErrLadder)
		}
		if err := r.Restart.Validate(); err != nil {
			return err
		}
	default:
		return fmt.Errorf("kind %s: a map audit takes precision and restart rungs: %w", r.Kind, integrate.ErrLadder)
	}
	return nil
}

// Select returns the rungs of rs whose kind is one of kinds, in the order
// of rs (the map counterpart of integrate.Ladder.Select).
func Select(rs []Rung, kinds ...integrate.RungKind) []Rung {
	var out []Rung
	for _, r := range rs {
		if slices.Contains(kinds, r.Kind) {
			out = append(out, r)
		}
	}
	return out
}

// WithRestart returns a copy of rs whose restart rungs restart at iterate
// at from the reference state rounded by rounding (validated by Audit).
func WithRestart(rs []Rung, at int, rounding integrate.Rounding) []Rung {
	out := append([]Rung(nil), rs...)
	for i := range out {
		if out[i].Kind == integrate.KindRestart {
			out[i].RestartAt, out[i].Restart = at, rounding
		}
	}
	return out
}
