package plumb

import (
	"context"
	"math"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"github.com/plumbdyn/plumb/integrate"
)

// loadKinkSystem reads a flow from a system file with the given rates of
// x, y (and z).
func loadKinkSystem(t *testing.T, name string, vars ...string) *System {
	t.Helper()
	var b strings.Builder
	b.WriteString(`{"name": "` + name + `", "kind": "flow", "variables": [`)
	for i, v := range vars {
		if i > 0 {
			b.WriteString(",")
		}
		b.WriteString(v)
	}
	b.WriteString("]}")
	sys, err := LoadSystem(strings.NewReader(b.String()))
	require.NoError(t, err)
	return sys
}

// kinkExactTol is the agreement wanted with a closed-form solution: the
// expected values are evaluated in float64 (a few ulps of values of size
// up to 20), so 1e-13 is the float64 resolution of the identity, not the
// reference's accuracy (the kink-blind series misses by 1e-3 and more).
const kinkExactTol = 1e-13

// TestReferenceKinks runs the multiprecision reference (double-double and
// big.Float) through kinks of abs, min, sign and step, a kink at t0 and
// tangential touches, against closed-form solutions (exact identities).
func TestReferenceKinks(t *testing.T) {
	osc := []string{
		`{"name": "x", "start": 1, "rate": "v"}`,
		`{"name": "v", "start": 0, "rate": "-x"}`,
	}
	// ∫_0^T |cos s| ds: cos keeps its sign between its zeros π/2 + kπ.
	absCosInt := func(T float64) float64 {
		s, a := 0.0, 0.0
		for k := 0; ; k++ {
			b := math.Min(T, math.Pi/2+float64(k)*math.Pi)
			s += math.Abs(math.Sin(b) - math.Sin(a))
			if b == T {
				return s
			}
			a = b
		}
	}
	cases := []struct {
		name     string
		vars     []string
		t1       float64
		comp     int
		want     float64
		restarts int // exact count, or -1 for "at least one"
	}{
		{
			// z = ∫|cos| (exact identity above); kinks at π/2, 3π/2, 5π/2.
			name: "abs crossings", vars: append(osc, `{"name": "z", "start": 0, "rate": "abs(x)"}`),
			t1: 8, comp: 2, want: absCosInt(8), restarts: 3,
		},
		{
			// min(x, 0.5) with x = cos t: ties at t = π/3, 5π/3, 7π/3;
			// z = ∫ min(cos, 1/2), exact by pieces.
			name: "min ties", vars: append(osc, `{"name": "z", "start": 0, "rate": "min(x, 0.5)"}`),
			t1: 7.5, comp: 2,
			want: 0.5*(math.Pi/3) + (math.Sin(5*math.Pi/3) - math.Sin(math.Pi/3)) + 0.5*(7*math.Pi/3-5*math.Pi/3) +
				(math.Sin(7.5) - math.Sin(7*math.Pi/3)),
			restarts: 3,
		},
		{
			// max(x, -0.5): ties at 2π/3, 4π/3; z = ∫ max(cos, -1/2).
			name: "max ties", vars: append(osc, `{"name": "z", "start": 0, "rate": "max(x, -0.5)"}`),
			t1: 5, comp: 2,
			want:     math.Sin(2*math.Pi/3) - 0.5*(4*math.Pi/3-2*math.Pi/3) + (math.Sin(5) - math.Sin(4*math.Pi/3)),
			restarts: 2,
		},
		{
			// A kink at t0: x = -t, so |x| = t from the start and
			// y = 1 + t²/2 (the branch of sign(0) would give y = 1).
			name: "kink at t0",
			vars: []string{`{"name": "x", "start": 0, "rate": "-1"}`, `{"name": "y", "start": 1, "rate": "abs(x)"}`},
			t1:   2, comp: 1, want: 3, restarts: 0,
		},
		{
			// Tangential touches: x - 1 = cos t - 1 <= 0 touches 0 at t = 0
			// (at t0, where its first derivative vanishes too) and 2π;
			// z = ∫ |cos s - 1| ds = t - sin t.
			name: "tangential touch", vars: append(osc, `{"name": "z", "start": 0, "rate": "abs(x - 1)"}`),
			t1: 9, comp: 2, want: 9 - math.Sin(9), restarts: -2,
		},
		{
			// Away from the kink: x + 5 >= 4 throughout; no restart, and
			// z = ∫ (cos + 5) = sin t + 5t.
			name: "away from kink", vars: append(osc, `{"name": "z", "start": 0, "rate": "abs(x + 5)"}`),
			t1: 9, comp: 2, want: math.Sin(9) + 45, restarts: 0,
		},
		{
			// A jump crossed: x = 0.5 - t, y' = sign(x): y = 1 + t until
			// t = 0.5, then 1.5 - (t - 0.5); y(2) = 0.
			name: "sign crossing",
			vars: []string{`{"name": "x", "start": 0.5, "rate": "-1"}`, `{"name": "y", "start": 1, "rate": "sign(x)"}`},
			t1:   2, comp: 1, want: 0, restarts: 1,
		},
		{
			// step(x) with x = 0.5 - t: y = 1 + t until 0.5, then 1.5.
			name: "step crossing",
			vars: []string{`{"name": "x", "start": 0.5, "rate": "-1"}`, `{"name": "y", "start": 1, "rate": "step(x)"}`},
			t1:   2, comp: 1, want: 1.5, restarts: 1,
		},
	}
	for _, tc := range cases {
		for _, digits := range []int{30, 40} { // double-double, big.Float
			t.Run(tc.name+map[int]string{30: " dd", 40: " big"}[digits], func(t *testing.T) {
				sys := loadKinkSystem(t, "kinks", tc.vars...)
				ref, err := Reference(context.Background(), sys, tc.t1, nil, &ReferenceSettings{Digits: digits, NoCheck: true})
				require.NoError(t, err)
				got := ref.Float64[len(ref.Float64)-1][tc.comp]
				assert.InDeltaf(t, tc.want, got, kinkExactTol, "closed-form solution (exact identity), %s", tc.name)
				switch {
				case tc.restarts >= 0:
					assert.Equalf(t, tc.restarts, ref.Stats.KinkRestarts, "restarts: one per crossing of the switching function (exact count)")
				default:
					// A touch may be seen as no crossing or as a close pair.
					assert.LessOrEqualf(t, ref.Stats.KinkRestarts, -tc.restarts*2, "restarts at touches")
				}
			})
		}
	}
}

// TestReferenceKinksRefused checks the kinks the reference does not pass:
// it stops with integrate.ErrKink instead of stepping over them.
func TestReferenceKinksRefused(t *testing.T) {
	cases := []struct {
		name string
		vars []string
		want string
	}{
		{
			// x' = -sign(x) slides along x = 0 from t = 0.5 on: the field
			// points back from both sides.
			name: "sliding", want: "neither side",
			vars: []string{`{"name": "x", "start": 0.5, "rate": "-sign(x)"}`, `{"name": "y", "start": 1, "rate": "-y"}`},
		},
		{
			// sqrt's argument reaches 0 at t = 1 (a branch point).
			name: "sqrt branch", want: "branch point",
			vars: []string{`{"name": "x", "start": 1, "rate": "-1"}`, `{"name": "y", "start": 1, "rate": "sqrt(abs(x))"}`},
		},
		{
			// atan2(x, -1) with x = 1 - t jumps from π to -π at t = 1.
			name: "atan2 cut", want: "cut",
			vars: []string{`{"name": "x", "start": 1, "rate": "-1"}`, `{"name": "y", "start": 1, "rate": "atan2(x, -1)"}`},
		},
	}
	for _, tc := range cases {
		for _, digits := range []int{30, 40} {
			t.Run(tc.name, func(t *testing.T) {
				sys := loadKinkSystem(t, "refused", tc.vars...)
				_, err := Reference(context.Background(), sys, 2, nil, &ReferenceSettings{Digits: digits, NoCheck: true})
				require.ErrorIs(t, err, integrate.ErrKink)
				assert.Contains(t, err.Error(), tc.want)
			})
		}
	}
}
