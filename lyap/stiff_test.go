package lyap

import (
	"context"
	"testing"

	"github.com/plumbdyn/plumb/integrate"
	"github.com/plumbdyn/plumb/internal/models"
)

// TestStatsStiff: the spectrum's Stats carry the stiffness test of the
// explicit pair. Van der Pol with mu = 1000 from (2, 0) is problem VDPOL of
// the Mazzia & Magherini IVP Test Set (2008), stiff on its slow branches;
// with one tangent vector (which follows the slow dynamics) Hairer's test
// (Hairer & Wanner 1996, Sect. IV.2) must fire early. Lorenz at its
// published parameters is not stiff and must not.
func TestStatsStiff(t *testing.T) {
	m, err := models.Lookup("vanderpol")
	if err != nil {
		t.Fatal(err)
	}
	vdp := integrate.Problem{F: m.Field([]float64{1000}), Jac: m.Jac([]float64{1000}), Y0: []float64{2, 0}}
	sp, err := Exponents(context.Background(), vdp, 1, &Settings{Duration: 20})
	if err != nil {
		t.Fatal(err)
	}
	if !sp.Stats.Stiff || sp.Stats.StiffAt <= 0 || sp.Stats.StiffAt > 20 {
		t.Errorf("Van der Pol mu=1000: Stiff %v at t=%g, want true within the run", sp.Stats.Stiff, sp.Stats.StiffAt)
	}
	sp, err = Exponents(context.Background(), modelProblem(t, "lorenz"), 3, &Settings{Duration: 50})
	if err != nil {
		t.Fatal(err)
	}
	if sp.Stats.Stiff {
		t.Errorf("Lorenz: Stiff set at t=%g", sp.Stats.StiffAt)
	}
}
