package integrate_test

import (
	"testing"

	"github.com/plumbdyn/plumb/integrate"
	"github.com/plumbdyn/plumb/internal/testode"
)

// TestConformance runs the shared conformance suite for every method. The
// claimed orders are those of the published methods (see each method's
// References); the evaluation counts follow from their tableaus.
func TestConformance(t *testing.T) {
	for _, tc := range []struct {
		name string
		m    integrate.Method
		c    testode.Case
	}{
		{"DormandPrince54", integrate.DormandPrince54, testode.Case{
			Order: 5, DenseOrder: 4, StageEvals: 6, StiffTest: true}},
		{"DormandPrince853", integrate.DormandPrince853, testode.Case{
			Order: 8, DenseOrder: 7, StageEvals: 11, AcceptEvals: 1, DenseEvals: 3, StiffTest: true}},
		{"BogackiShampine32", integrate.BogackiShampine32, testode.Case{
			Order: 3, DenseOrder: 3, StageEvals: 3}},
		{"RK4", integrate.RK4(1e-3), testode.Case{
			Order: 4, DenseOrder: 3, WithStep: integrate.RK4, Step: 1e-3, StageEvals: 3, AcceptEvals: 1}},
		{"Euler", integrate.Euler(1e-4), testode.Case{
			Order: 1, DenseOrder: 1, WithStep: integrate.Euler, Step: 1e-4, StageEvals: 0, AcceptEvals: 1}},
	} {
		t.Run(tc.name, func(t *testing.T) { testode.Run(t, tc.m, tc.c) })
	}
}
