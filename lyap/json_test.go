package lyap

import (
	"context"
	"encoding/json"
	"regexp"
	"testing"
)

// TestJSON: results marshal to JSON with snake_case keys, also when partial.
func TestJSON(t *testing.T) {
	p := modelProblem(t, "lorenz")
	sp, err := Exponents(context.Background(), p, 3, &Settings{Duration: 20})
	if err != nil {
		t.Fatal(err)
	}
	partial, _ := MapExponents(context.Background(), &brokenJacobian{logistic: logistic{4}, after: 5}, []float64{0.3}, 1, &Settings{Iterations: 100, Discard: 1})
	w, err := FiniteTime(context.Background(), p, 3, 1, &Settings{Duration: 5})
	if err != nil {
		t.Fatal(err)
	}
	c, err := MapCovariant(context.Background(), henon{1.4, 0.3}, []float64{0.1, 0.1}, 2, &Settings{Iterations: 10, Discard: 20})
	if err != nil {
		t.Fatal(err)
	}
	snake := regexp.MustCompile(`^[a-z][a-z0-9_]*$`)
	for name, v := range map[string]any{"spectrum": sp, "partial": partial, "windows": w, "covariant": c} {
		b, err := json.Marshal(v)
		if err != nil {
			t.Fatalf("%s: %v", name, err)
		}
		var m map[string]any
		if err := json.Unmarshal(b, &m); err != nil {
			t.Fatalf("%s: %v", name, err)
		}
		for k := range m {
			if !snake.MatchString(k) {
				t.Errorf("%s: key %q is not snake_case", name, k)
			}
		}
	}
	b, _ := json.Marshal(sp)
	var back Spectrum
	if err := json.Unmarshal(b, &back); err != nil {
		t.Fatal(err)
	}
	if back.Exponents[0] != sp.Exponents[0] || back.Units != UnitsFlow || len(back.Checks) != len(sp.Checks) {
		t.Errorf("round trip: %+v", back)
	}
}
