package main

import (
	"encoding/json"
	"strings"
	"testing"

	"github.com/plumbdyn/plumb"
)

func TestModelsGolden(t *testing.T) {
	for _, tt := range []struct{ format, file string }{{"table", "models.txt"}, {"json", "models.json"}} {
		r := plumbRun(t, "models", "--format", tt.format)
		if r.code != exitOK || r.stderr != "" {
			t.Fatalf("%s: exit %d, stderr %q", tt.format, r.code, r.stderr)
		}
		golden(t, tt.file, r.stdout)
	}
}

// TestModelsListsCatalog: every built-in system is listed with its states,
// parameters and source, as the SDK reports them.
func TestModelsListsCatalog(t *testing.T) {
	r := plumbRun(t, "models", "--format", "json")
	var out modelsJSON
	if err := json.Unmarshal([]byte(r.stdout), &out); err != nil {
		t.Fatal(err)
	}
	names := plumb.Models()
	if len(out.Models) != len(names) {
		t.Fatalf("%d models listed, catalog has %d", len(out.Models), len(names))
	}
	for i, n := range names {
		m := out.Models[i]
		sys, err := plumb.Model(n)
		if err != nil {
			t.Fatal(err)
		}
		if m.Name != n || m.Source == "" || m.Source != sys.Source || len(m.States) != len(sys.States) || len(m.Parameters) != len(sys.Params()) {
			t.Errorf("model %s listed as %+v", n, m)
			continue
		}
		start := sys.Start()
		for k, st := range m.States {
			if st.Name != sys.States[k] || st.Start != start[k] {
				t.Errorf("%s state %d: %+v, want %s=%v", n, k, st, sys.States[k], start[k])
			}
		}
		for k, p := range sys.Params() {
			if m.Parameters[k].Name != p.Name || m.Parameters[k].Value != p.Value {
				t.Errorf("%s parameter %d: %+v, want %+v", n, k, m.Parameters[k], p)
			}
		}
	}
	table := plumbRun(t, "models").stdout
	for _, n := range names {
		if !strings.Contains(table, n+": ") {
			t.Errorf("table lacks %s", n)
		}
	}
}

func TestModelsOneWithSet(t *testing.T) {
	r := plumbRun(t, "models", "--model", "lorenz", "--set", "rho=99.5", "--format", "json")
	var out modelsJSON
	if err := json.Unmarshal([]byte(r.stdout), &out); err != nil {
		t.Fatal(err)
	}
	if len(out.Models) != 1 || out.Models[0].Name != "lorenz" || out.Models[0].Parameters[1].Value != 99.5 {
		t.Errorf("got %+v, want lorenz alone with rho=99.5", out.Models)
	}
	if out.PlumbVersion != version || out.Command != "models" || out.Arch == "" {
		t.Errorf("header %+v", out.header)
	}
}

// TestModelsKind: the built-ins written as separable Hamiltonians are listed
// as such, not as plain flows (their catalog entries carry H = T(p) + V(q)).
func TestModelsKind(t *testing.T) {
	want := map[string]string{"lorenz": "flow", "henon": "map", "henon-heiles": "hamiltonian", "kepler": "hamiltonian"}
	r := plumbRun(t, "models", "--format", "json")
	var out modelsJSON
	if err := json.Unmarshal([]byte(r.stdout), &out); err != nil {
		t.Fatal(err)
	}
	for _, m := range out.Models {
		if w, ok := want[m.Name]; ok && m.Kind != w {
			t.Errorf("%s: kind %q, want %q", m.Name, m.Kind, w)
		}
	}
	table := plumbRun(t, "models", "--model", "henon-heiles").stdout
	if !strings.HasPrefix(table, "henon-heiles: Hénon–Heiles system (hamiltonian flow)\n") {
		t.Errorf("table starts %q, want the kind hamiltonian flow", strings.SplitN(table, "\n", 2)[0])
	}
}
