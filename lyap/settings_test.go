package lyap

import (
	"context"
	"errors"
	"math"
	"strings"
	"testing"

	"github.com/plumbdyn/plumb/integrate"
)

// TestSettingsValidate: an invalid field is reported as lyap's Settings,
// tolerances included (they follow integrate's rule but are the caller's
// lyap.Settings fields), and every estimator refuses with that error.
func TestSettingsValidate(t *testing.T) {
	p := modelProblem(t, "lorenz")
	for _, c := range []struct {
		name  string
		s     *Settings
		field string // "" means valid
	}{
		{"nil", nil, ""},
		{"zero", &Settings{}, ""},
		{"tiny rtol beside an atol", &Settings{RelTol: 1e-16, AbsTol: 1e-10}, ""},
		{"negative rtol", &Settings{RelTol: -1}, "RelTol"},
		{"nan atol", &Settings{AbsTol: math.NaN()}, "AbsTol"},
		{"negative duration", &Settings{Duration: -1}, "Duration"},
		{"max growth 1", &Settings{MaxGrowth: 1}, "MaxGrowth"},
		{"one block", &Settings{Blocks: 1}, "Blocks"},
		{"negative discard", &Settings{Discard: -1}, "Discard"},
	} {
		t.Run(c.name, func(t *testing.T) {
			err := c.s.Validate()
			if c.field == "" {
				if err != nil {
					t.Fatalf("Validate: %v, want nil", err)
				}
				return
			}
			var se *integrate.SettingError
			if !errors.As(err, &se) || se.Pkg != "lyap" || se.Type != "Settings" || se.Field != c.field || !errors.Is(err, ErrSettings) {
				t.Fatalf("Validate: %v, want a SettingError for lyap Settings.%s wrapping ErrSettings", err, c.field)
			}
			if want := "lyap: Settings." + c.field + " = "; !strings.HasPrefix(err.Error(), want) {
				t.Errorf("message %q, want the prefix %q", err, want)
			}
			sp, xerr := Exponents(context.Background(), p, 3, c.s)
			if sp != nil || xerr == nil || xerr.Error() != err.Error() {
				t.Errorf("Exponents: %v, want Validate's %v and no spectrum", xerr, err)
			}
		})
	}
}

// TestSettingsWithDefaults: zero fields take the documented defaults, the
// dependent ones from the defaulted field, and the caller's Settings is
// not written to.
func TestSettingsWithDefaults(t *testing.T) {
	s := &Settings{Duration: 50}
	got := s.WithDefaults()
	if got.Duration != 50 || got.Transient != 5 || got.Iterations != DefaultIterations || got.Discard != DefaultIterations/10 ||
		got.RelTol != DefaultRelTol || got.AbsTol != DefaultAbsTol || got.Blocks != DefaultBlocks || got.MaxGrowth != DefaultMaxGrowth || got.Method == nil {
		t.Errorf("WithDefaults() = %+v", got)
	}
	if s.Transient != 0 || s.RelTol != 0 {
		t.Errorf("WithDefaults wrote into the caller's Settings: %+v", *s)
	}
}
