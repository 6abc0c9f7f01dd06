package enclose

import (
	"context"
	"math"
	"testing"
)

// FuzzEnclose feeds formulas, starts and radii to Flow and Map: whatever
// they are, the call must not panic, and every box it returns must be
// ordered (Lo <= Hi), with the start inside the first box.
func FuzzEnclose(f *testing.F) {
	for _, seed := range []struct {
		a, b   string
		y, rad float64
		isMap  bool
	}{
		{"10*(z-y)", "y*(28-z)", 1, 0, false},
		{"-abs(y) - 1", "z", 0.5, 0, false},
		{"sqrt(y)", "log(z)", 0.01, 0.1, false},
		{"1/(y-1)", "tan(t)", 1, 0, false},
		{"sin(y)*exp(z)", "atan2(y, z)", 2, 1e-3, false},
		{"pow(y, 1.5)", "tanh(z) + cosh(y) - sinh(t)", 0.3, 0, false},
		{"sign(y) + step(z)", "min(y, z) + max(y, 2)", -1, 0.5, false},
		{"1 + z - 1.4*y^2", "0.3*y", 0.1, 0, true},
		{"y^-3", "z^40", 1e-100, 0, true},
		{"exp(exp(y))", "1e308*z", 700, 0, false},
		{"y*", "z", 1, 0, false},
	} {
		f.Add(seed.a, seed.b, seed.y, seed.rad, seed.isMap)
	}
	f.Fuzz(func(t *testing.T, a, b string, y, rad float64, isMap bool) {
		fs := &Formulas{States: []string{"y", "z"}, Rates: []string{a, b}, Params: []string{"k"}, Values: []float64{2}, Map: isMap}
		set := &Settings{Order: 6, MaxSteps: 40, Radius: math.Abs(rad)}
		start := []float64{y, 0.5}
		var res *Result
		var err error
		if isMap {
			res, err = Map(context.Background(), fs, start, 20, set)
		} else {
			res, err = Flow(context.Background(), fs, 0, start, 0.5, set)
		}
		if err != nil {
			return
		}
		if len(res.Steps) == 0 {
			t.Fatal("a result with no steps")
		}
		for _, st := range res.Steps {
			for i := range st.Lo {
				if st.Lo[i] > st.Hi[i] {
					t.Fatalf("step t=%g component %d: Lo %g > Hi %g", st.T, i, st.Lo[i], st.Hi[i])
				}
			}
		}
		first := res.Steps[0]
		for i, v := range start {
			if !(first.Lo[i] <= v && v <= first.Hi[i]) {
				t.Fatalf("start %g outside the first box [%g, %g]", v, first.Lo[i], first.Hi[i])
			}
		}
	})
}
