package plumb

import (
	"testing"

	"github.com/stretchr/testify/assert"

	"github.com/plumbdyn/plumb/integrate"
)

// TestRungID: the machine names of rungs, our own design (documented in
// 'plumb help trust'), built from the kind and the settings only.
func TestRungID(t *testing.T) {
	cases := []struct {
		name    string
		kind    integrate.RungKind
		method  string
		relTol  float64
		storage integrate.Rounding
		want    string
	}{
		{"reference", integrate.KindReference, integrate.DormandPrince853.Name(), 1e-12, integrate.Rounding{}, "tightest"},
		{"tolerance", integrate.KindTolerance, integrate.DormandPrince54.Name(), 1e-6, integrate.Rounding{}, "tol_1e-06"},
		{"tolerance 3e-7", integrate.KindTolerance, integrate.DormandPrince54.Name(), 3e-7, integrate.Rounding{}, "tol_3e-07"},
		{"method dp853", integrate.KindMethod, integrate.DormandPrince853.Name(), 1e-8, integrate.Rounding{}, "method_dp853"},
		{"method rk4", integrate.KindMethod, "RK4", 0, integrate.Rounding{}, "method_rk4"},
		{"method other", integrate.KindMethod, "Gauss–Legendre 2-stage", 0, integrate.Rounding{}, "method_gauss_legendre_2_stage"},
		{"bits", integrate.KindPrecision, "", 0, integrate.Bits(24), "precision_24bit"},
		{"digits", integrate.KindPrecision, "", 0, integrate.Digits(7), "precision_7digit"},
		{"bits with stages", integrate.KindPrecision, "", 0, integrate.Rounding{Kind: integrate.BinaryBits, N: 40, Stages: true}, "precision_40bit_stages"},
		{"float64", integrate.KindPrecision, "", 0, integrate.Rounding{}, "precision_float64"},
		{"restart", integrate.KindRestart, "", 0, integrate.Places(3), "restart"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			assert.Equal(t, c.want, rungID(c.kind, c.method, c.relTol, c.storage))
		})
	}
}

func TestUniqueIDs(t *testing.T) {
	ids := []string{"restart", "method_rk4", "restart", "tightest", "restart"}
	ptrs := make([]*string, len(ids))
	for i := range ids {
		ptrs[i] = &ids[i]
	}
	uniqueIDs(ptrs, "tightest")
	assert.Equal(t, []string{"restart", "method_rk4", "restart_2", "tightest_2", "restart_3"}, ids)
}
