package integrate

import (
	"context"
	"errors"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

// A fixed step longer than the span used to be clipped to the span without
// a word, running one step of another size than asked; it is refused now.
// A step equal to the span, or within the last step's rounding slack of it
// (1e-9 of a step, see nextFixed), is one whole step.
func TestFixedStepLongerThanSpan(t *testing.T) {
	p := Problem{F: lorenzField(), Y0: []float64{1, 1, 1}}
	for _, c := range []struct {
		name string
		h    float64
		ok   bool
	}{
		{"far longer", 1e300, false},
		{"twice the span", 4, false},
		{"the span", 2, true},
		{"the span and a rounding", 2 * (1 + 1e-12), true},
		{"half the span", 1, true},
	} {
		t.Run(c.name, func(t *testing.T) {
			sol, err := Solve(context.Background(), p, 2, RK4(c.h), nil)
			if !c.ok {
				require.True(t, errors.Is(err, ErrSettings), "err = %v", err)
				assert.Contains(t, err.Error(), "longer than the span")
				return
			}
			require.NoError(t, err)
			assert.Equal(t, 2.0, sol.End)
		})
	}
}
