package enclose

import (
	"math/big"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"github.com/plumbdyn/plumb/internal/ival"
)

// exactSeries returns the first n+1 Taylor coefficients at t = 0 of a
// function of t as exact rationals, by its series (exp, sin, cos, sinh,
// cosh, log(1+t), atan, sqrt(1+t)) or, for tan and tanh, by the exact
// identities tan' = 1 + tan², tanh' = 1 - tanh² solved in big.Rat.
func exactSeries(name string, n int) []*big.Rat {
	out := make([]*big.Rat, n+1)
	fact := big.NewInt(1)
	for k := range n + 1 {
		if k > 0 {
			fact.Mul(fact, big.NewInt(int64(k)))
		}
		inv := new(big.Rat).SetFrac(big.NewInt(1), fact)
		z := new(big.Rat)
		switch name {
		case "exp":
			z.Set(inv)
		case "sin", "sinh":
			if k%2 == 1 {
				z.Set(inv)
				if name == "sin" && k%4 == 3 {
					z.Neg(z)
				}
			}
		case "cos", "cosh":
			if k%2 == 0 {
				z.Set(inv)
				if name == "cos" && k%4 == 2 {
					z.Neg(z)
				}
			}
		case "log1p":
			if k > 0 {
				z.SetFrac64(1, int64(k))
				if k%2 == 0 {
					z.Neg(z)
				}
			}
		case "atan":
			if k%2 == 1 {
				z.SetFrac64(1, int64(k))
				if k%4 == 3 {
					z.Neg(z)
				}
			}
		case "sqrt1p":
			// binomial(1/2, k)
			z.SetInt64(1)
			for j := range k {
				z.Mul(z, big.NewRat(int64(1-2*j), int64(2*(j+1))))
			}
		case "tan", "tanh":
			// (k) a_k = [k == 1] ± Σ_{j=0..k-1} a_j a_{k-1-j}
			if k > 0 {
				s := new(big.Rat)
				for j := 0; j <= k-1; j++ {
					s.Add(s, new(big.Rat).Mul(out[j], out[k-1-j]))
				}
				if name == "tanh" {
					s.Neg(s)
				}
				if k == 1 {
					s.Add(s, big.NewRat(1, 1))
				}
				z.Quo(s, big.NewRat(int64(k), 1))
			}
		}
		out[k] = z
	}
	return out
}

// TestSeriesElementary: the interval Taylor coefficients of each elementary
// function of t at 0 hold the exact ones (exactSeries: math/big rationals
// from the functions' series or exact identities).
func TestSeriesElementary(t *testing.T) {
	const n = 14
	for _, tc := range []struct{ formula, exact string }{
		{"exp(t)", "exp"},
		{"sin(t)", "sin"},
		{"cos(t)", "cos"},
		{"sinh(t)", "sinh"},
		{"cosh(t)", "cosh"},
		{"tan(t)", "tan"},
		{"tanh(t)", "tanh"},
		{"log(1 + t)", "log1p"},
		{"atan(t)", "atan"},
		{"atan2(t, 1)", "atan"},
		{"sqrt(1 + t)", "sqrt1p"},
		{"(1 + t)^0.5", "sqrt1p"},
		{"pow(1 + t, 0.5)", "sqrt1p"},
	} {
		t.Run(tc.formula, func(t *testing.T) {
			_, s := flowSeries(t, tc.formula, n)
			clear(s.c[0])
			s.c[0][1] = ival.Point(1)
			require.NoError(t, s.run())
			want := exactSeries(tc.exact, n)
			for k, v := range s.out(0) {
				w := new(big.Float).SetPrec(300).SetRat(want[k])
				assert.Truef(t, contains(v.Lo, v.Hi, w), "coefficient %d of %s: exact %s outside [%.17g, %.17g]", k, tc.formula, want[k].RatString(), v.Lo, v.Hi)
				assert.Lessf(t, v.Hi-v.Lo, 1e-13, "coefficient %d of %s is tight", k, tc.formula)
			}
		})
	}
}

// TestSeriesElementaryDomains: the elementary functions refuse boxes where
// they are undefined or not analytic.
func TestSeriesElementaryDomains(t *testing.T) {
	for _, tc := range []struct {
		rate string
		box  ival.Interval
		err  error
	}{
		{"log(y)", ival.New(-1, 1), ErrDomain},
		{"y^0.5", ival.New(0, 1), ErrKink},
		{"atan2(y, -1)", ival.New(-0.1, 0.1), ErrKink},
		{"tan(y)", ival.New(1, 2), ErrDomain},
		{"atan2(y, -1)", ival.New(0.1, 0.2), nil},
		{"tan(y)", ival.New(0.1, 0.2), nil},
	} {
		c, s := flowSeries(t, tc.rate, 4)
		err := s.ode(true, ival.Point(0), c.yslots, []ival.Interval{tc.box})
		if tc.err == nil {
			assert.NoErrorf(t, err, "%s over %v", tc.rate, tc.box)
			continue
		}
		assert.ErrorIsf(t, err, tc.err, "%s over %v", tc.rate, tc.box)
	}
}
