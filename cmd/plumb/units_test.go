package main

import (
	"encoding/json"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// unitsFile is a system file of our own (a damped linear oscillator in a
// stirred tank) that gives a time unit and units to a parameter and a
// state, and leaves them out for the others.
const unitsFile = `{
  "name": "tank",
  "description": "stirred tank, two linear modes",
  "kind": "flow",
  "time_unit": "h",
  "parameters": [
    {"name": "k", "value": 0.5, "unit": "1/h", "description": "decay rate"},
    {"name": "c", "value": 2}
  ],
  "variables": [
    {"name": "u", "start": 1, "unit": "mol/L", "rate": "-k*u + c*v"},
    {"name": "v", "start": 0, "rate": "-c*u - k*v"}
  ]
}`

// TestUnitsShown: the time unit and the units of parameters and states that
// a system file gives appear wherever times and parameters are shown: the
// system in every JSON result and in the tables of models, solve, trust
// and spectrum.
func TestUnitsShown(t *testing.T) {
	path := filepath.Join(t.TempDir(), "tank.json")
	if err := os.WriteFile(path, []byte(unitsFile), 0o644); err != nil {
		t.Fatal(err)
	}
	cases := []struct {
		cmd   string
		args  []string
		table []string // in the table output
	}{
		{"models", nil, []string{"time unit: h", "k          0.5    1/h", "u      1      -       mol/L"}},
		{"solve", []string{"--t1", "0.1"}, []string{"t [h]", "u [mol/L]", "k=0.5 [1/h] c=2, t in h"}},
		{"trust", []string{"--horizon", "2", "--tol", "1e-6"}, []string{"k=0.5 [1/h] c=2, t in h", "audit of t = 0 .. 2 h", "verdict for t = 2 h"}},
		{"spectrum", []string{"--t1", "120", "--transient", "20"}, []string{"k=0.5 [1/h]", "(per h, natural log)"}},
	}
	for _, c := range cases {
		t.Run(c.cmd, func(t *testing.T) {
			args := append([]string{c.cmd, "--file", path, "--quiet"}, c.args...)
			r := plumbRun(t, args...)
			if r.code != exitOK {
				t.Fatalf("exit %d, stderr %q", r.code, r.stderr)
			}
			for _, w := range c.table {
				if !strings.Contains(r.stdout, w) {
					t.Errorf("table lacks %q:\n%s", w, r.stdout)
				}
			}
			r = plumbRun(t, append(args, "--format", "json")...)
			var out struct {
				System *systemJSON  `json:"system"`
				Models []systemJSON `json:"models"`
			}
			if err := json.Unmarshal([]byte(r.stdout), &out); err != nil {
				t.Fatal(err)
			}
			sys := out.System
			if sys == nil && len(out.Models) == 1 {
				sys = &out.Models[0]
			}
			if sys == nil {
				t.Fatal("no system in the JSON")
			}
			if sys.TimeUnit != "h" || sys.Parameters[0].Unit != "1/h" || sys.Parameters[1].Unit != "" || sys.States[0].Unit != "mol/L" || sys.States[1].Unit != "" {
				t.Errorf("system in JSON: %+v", *sys)
			}
		})
	}
}
