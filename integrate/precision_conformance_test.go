package integrate_test

import (
	"testing"

	"github.com/plumbdyn/plumb/integrate"
	"github.com/plumbdyn/plumb/internal/testode"
)

// TestRoundedConformance runs the shared conformance suite on methods wrapped
// by Rounded at 53 bits, where rounding is the identity (exact identity): the
// wrapper must keep each method's orders, dense output, crossings, bad-input
// and non-finite behaviour, and add exactly one evaluation per accepted step
// to FSAL pairs (the derivative at the stored state).
func TestRoundedConformance(t *testing.T) {
	id := integrate.Bits(53)
	for _, tc := range []struct {
		name string
		m    integrate.Method
		c    testode.Case
	}{
		{"DormandPrince54", integrate.Rounded(integrate.DormandPrince54, id), testode.Case{
			Order: 5, DenseOrder: 4, StageEvals: 6, AcceptEvals: 1, StiffTest: true}},
		{"DormandPrince853", integrate.Rounded(integrate.DormandPrince853, id), testode.Case{
			Order: 8, DenseOrder: 7, StageEvals: 11, AcceptEvals: 1, DenseEvals: 3, StiffTest: true}},
		{"RK4", integrate.Rounded(integrate.RK4(1e-3), id), testode.Case{
			Order: 4, DenseOrder: 3, WithStep: func(h float64) integrate.Method { return integrate.Rounded(integrate.RK4(h), id) },
			Step: 1e-3, StageEvals: 3, AcceptEvals: 1}},
	} {
		t.Run(tc.name, func(t *testing.T) { testode.Run(t, tc.m, tc.c) })
	}
}
