package integrate

import (
	"context"
	"errors"
	"math"
	"testing"
)

// TestSettingsValidate: Validate refuses exactly the fields that are
// invalid whatever the problem, names them in a *SettingError, and gives
// the same error Solve gives for them (one rule, applied in one place).
func TestSettingsValidate(t *testing.T) {
	p := Problem{F: harmonic, Y0: []float64{1, 0}}
	nan := math.NaN()
	for _, c := range []struct {
		name  string
		s     *Settings
		field string // "" means valid
	}{
		{"nil", nil, ""},
		{"zero", &Settings{}, ""},
		// A relative tolerance below 1e-15 is fine beside an absolute one:
		// the error test then asks for atol + rtol·|y| >= atol.
		{"tiny rtol with atol", &Settings{RelTol: 1e-16, AbsTol: 1e-10}, ""},
		{"tiny rtol, default atol", &Settings{RelTol: 1e-16}, ""},
		{"negative rtol", &Settings{RelTol: -1}, "RelTol"},
		{"infinite rtol", &Settings{RelTol: math.Inf(1)}, "RelTol"},
		{"nan atol", &Settings{AbsTol: nan}, "AbsTol"},
		{"tiny rtol, zero atol per component", &Settings{RelTols: []float64{1e-17, 1e-17}, AbsTols: []float64{0, 0}}, "RelTol"},
		{"both zero per component", &Settings{RelTols: []float64{1e-6, 0}, AbsTols: []float64{1e-6, 0}}, "RelTols[1]/AbsTols[1]"},
		{"negative max steps", &Settings{MaxSteps: -1}, "MaxSteps"},
		{"min above max", &Settings{MinStep: 0.5, MaxStep: 0.1}, "MinStep"},
		{"every negative", &Settings{Every: -0.1}, "Every"},
		{"times nan", &Settings{Times: []float64{nan}}, "Times[0]"},
		{"crossing nil", &Settings{Crossings: []Crossing{{}}}, "Crossings[0].G"},
		{"controller negative", &Settings{Controller: &Controller{Alpha: -1}}, "Controller.Alpha"},
	} {
		t.Run(c.name, func(t *testing.T) {
			err := c.s.Validate()
			_, serr := Solve(context.Background(), p, 1, nil, c.s)
			if c.field == "" {
				if err != nil || serr != nil {
					t.Fatalf("Validate: %v; Solve: %v; want both nil", err, serr)
				}
				return
			}
			var se *SettingError
			if !errors.As(err, &se) || se.Field != c.field || se.Pkg != "integrate" || se.Type != "Settings" || !errors.Is(err, ErrSettings) {
				t.Fatalf("Validate: %v (%#v), want a SettingError for integrate Settings.%s wrapping ErrSettings", err, se, c.field)
			}
			if serr == nil || serr.Error() != err.Error() {
				t.Errorf("Solve: %v, want Validate's %v", serr, err)
			}
		})
	}
}

// TestSettingsWithDefaults: zero tolerances become the defaults Solve uses,
// given ones stay, and the caller's Settings is not written to.
func TestSettingsWithDefaults(t *testing.T) {
	if got := (*Settings)(nil).WithDefaults(); got.RelTol != DefaultRelTol || got.AbsTol != DefaultAbsTol {
		t.Errorf("nil: RelTol %g, AbsTol %g; want %g, %g", got.RelTol, got.AbsTol, DefaultRelTol, DefaultAbsTol)
	}
	s := &Settings{RelTol: 1e-10}
	got := s.WithDefaults()
	if got.RelTol != 1e-10 || got.AbsTol != DefaultAbsTol {
		t.Errorf("RelTol 1e-10: got RelTol %g, AbsTol %g; want 1e-10, %g", got.RelTol, got.AbsTol, DefaultAbsTol)
	}
	if s.AbsTol != 0 {
		t.Errorf("WithDefaults wrote AbsTol = %g back into the caller's Settings", s.AbsTol)
	}
}

// FuzzSettingsValidate: Validate never panics, Solve refuses with exactly
// Validate's error when Validate refuses, and when Validate accepts, Solve
// refuses only on the checks that need the problem (Every against the span,
// MinStep against the span).
func FuzzSettingsValidate(f *testing.F) {
	f.Add(1e-6, 1e-9, 0.0, 0.0, 0.0, 0)
	f.Add(1e-16, 1e-10, 0.1, 0.0, 0.0, 100)
	f.Add(-1.0, 0.0, 0.0, 0.0, 0.0, 0)
	f.Add(0.0, math.NaN(), 0.0, 0.0, 0.0, 0)
	f.Add(1e-8, 1e-8, 1e-12, 0.0, 0.0, 10)
	f.Add(1e-8, 1e-8, 0.0, 0.5, 0.1, 10)
	f.Add(1e-8, 1e-8, 0.0, 2.0, 0.0, -5)
	p := Problem{F: harmonic, Y0: []float64{1, 0}}
	f.Fuzz(func(t *testing.T, rtol, atol, every, minStep, maxStep float64, maxSteps int) {
		// A bounded budget keeps every accepted case short.
		if maxSteps > 1000 || maxSteps == 0 {
			maxSteps = 1000
		}
		s := &Settings{RelTol: rtol, AbsTol: atol, Every: every, MinStep: minStep, MaxStep: maxStep, MaxSteps: maxSteps}
		err := s.Validate()
		_, serr := Solve(context.Background(), p, 1, nil, s)
		if err != nil {
			if serr == nil || serr.Error() != err.Error() {
				t.Fatalf("Validate: %v; Solve: %v (want the same refusal)", err, serr)
			}
			return
		}
		var se *SettingError
		if errors.As(serr, &se) && se.Field != "Every" && se.Field != "MinStep" {
			t.Fatalf("Validate accepted %+v but Solve refused %v", *s, serr)
		}
	})
}
