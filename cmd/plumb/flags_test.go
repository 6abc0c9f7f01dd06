package main

import (
	"math"
	"strings"
	"testing"
)

func TestParamListSet(t *testing.T) {
	tests := []struct {
		name, in string
		want     paramSetting
		ok       bool
	}{
		{"plain", "rho=28", paramSetting{"rho", 28}, true},
		{"spaces", " rho = 28.5 ", paramSetting{"rho", 28.5}, true},
		{"exponent", "sigma=1e1", paramSetting{"sigma", 10}, true},
		{"negative", "a=-0.25", paramSetting{"a", -0.25}, true},
		{"second equals is the value's", "a==1", paramSetting{}, false},
		{"no equals", "rho", paramSetting{}, false},
		{"no name", "=1", paramSetting{}, false},
		{"no value", "rho=", paramSetting{}, false},
		{"NaN", "rho=NaN", paramSetting{}, false},
		{"Inf", "rho=+Inf", paramSetting{}, false},
		{"overflow", "rho=1e400", paramSetting{}, false},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			var l paramList
			err := l.Set(tt.in)
			if (err == nil) != tt.ok {
				t.Fatalf("Set(%q) error %v, want ok=%v", tt.in, err, tt.ok)
			}
			if tt.ok && (len(l) != 1 || l[0] != tt.want) {
				t.Errorf("Set(%q) = %+v, want %+v", tt.in, l, tt.want)
			}
		})
	}
}

func TestFlagMessage(t *testing.T) {
	// The flag package names flags with one dash; plumb's messages use two.
	for _, args := range [][]string{{"solve", "-t1", "x"}, {"solve", "--t1", "x"}, {"solve", "-zz"}, {"solve", "--zz"}} {
		r := plumbRun(t, args...)
		if strings.Contains(r.stderr, " -t1") || strings.Contains(r.stderr, " -zz") || strings.Contains(r.stderr, "---") {
			t.Errorf("%v: %q", args, r.stderr)
		}
	}
}

// FuzzSetFlag: --set never panics, accepts only name=finite, and what it
// accepts reads back from its own formatting to the same bits.
func FuzzSetFlag(f *testing.F) {
	for _, s := range []string{"rho=28", "sigma=1e1", " a = -0 ", "x=0x1p-3", "=", "a=", "a=NaN", "a=b=c", "β=2.5", "a=1_000"} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, s string) {
		var l paramList
		if err := l.Set(s); err != nil {
			if err.Error() == "" {
				t.Errorf("Set(%q): empty error", s)
			}
			return
		}
		if len(l) != 1 || l[0].name == "" || strings.Contains(l[0].name, "=") || math.IsNaN(l[0].value) || math.IsInf(l[0].value, 0) {
			t.Fatalf("Set(%q) accepted %+v", s, l)
		}
		var again paramList
		if err := again.Set(l.String()); err != nil {
			t.Fatalf("Set(%q) (formatted from %q): %v", l.String(), s, err)
		}
		if again[0].name != l[0].name || math.Float64bits(again[0].value) != math.Float64bits(l[0].value) {
			t.Errorf("round trip %q -> %+v -> %q -> %+v", s, l[0], l.String(), again[0])
		}
	})
}

// FuzzCrossFlag: the same for --cross-state NAME=VALUE.
func FuzzCrossFlag(f *testing.F) {
	for _, s := range []string{"x=0", "theta1=3.14", "z=-25", "x", "=0", "x=Inf", "x=1e-320"} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, s string) {
		var l crossList
		if err := l.Set(s); err != nil {
			return
		}
		if len(l) != 1 || l[0].state == "" || math.IsNaN(l[0].value) || math.IsInf(l[0].value, 0) {
			t.Fatalf("Set(%q) accepted %+v", s, l)
		}
		var again crossList
		if err := again.Set(l[0].label()); err != nil {
			t.Fatalf("label %q of %q does not parse: %v", l[0].label(), s, err)
		}
		if again[0].state != l[0].state || math.Float64bits(again[0].value) != math.Float64bits(l[0].value) {
			t.Errorf("round trip %q -> %+v -> %+v", s, l[0], again[0])
		}
	})
}
