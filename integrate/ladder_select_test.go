package integrate

import (
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

// TestLadderSelect: selecting kinds of DefaultLadder keeps its reference
// and exactly the rungs of those kinds in order (the ladder as
// DefaultLadder documents it: three tolerance, two method, two precision
// and one restart rung), and a ladder around a run keeps the run.
func TestLadderSelect(t *testing.T) {
	def := DefaultLadder(0, 10)
	assert.Equal(t, []RungKind{KindTolerance, KindMethod, KindPrecision, KindRestart}, def.Kinds())
	for _, c := range []struct {
		name  string
		kinds []RungKind
		want  []RungKind
	}{
		{"none", nil, nil},
		{"precision", []RungKind{KindPrecision}, []RungKind{KindPrecision, KindPrecision}},
		{"restart and tol, in the ladder's order", []RungKind{KindRestart, KindTolerance}, []RungKind{KindTolerance, KindTolerance, KindTolerance, KindRestart}},
		{"unknown kind", []RungKind{KindRun}, nil},
	} {
		t.Run(c.name, func(t *testing.T) {
			got := def.Select(c.kinds...)
			assert.Equal(t, def.Reference.Kind, got.Reference.Kind)
			var kinds []RungKind
			for _, r := range got.Rungs {
				kinds = append(kinds, r.Kind)
			}
			assert.Equal(t, c.want, kinds)
		})
	}
	run, err := RunLadder(0, 10, Rung{Method: DormandPrince54, RelTol: 1e-6, AbsTol: 1e-6})
	require.NoError(t, err)
	got := run.Select(KindPrecision)
	require.NotEmpty(t, got.Rungs)
	assert.Equal(t, KindRun, got.Rungs[0].Kind, "the caller's run is always kept")
}

// TestLadderWithRestart: the restart rungs move, the others and the
// original ladder stay as they were.
func TestLadderWithRestart(t *testing.T) {
	def := DefaultLadder(0, 10)
	moved := def.WithRestart(3, Places(2))
	for i, r := range moved.Rungs {
		if r.Kind == KindRestart {
			assert.Equal(t, 3.0, r.RestartAt)
			assert.Equal(t, Places(2), r.Restart)
			assert.Equal(t, RestartFraction*10, def.Rungs[i].RestartAt, "the original keeps t0 + RestartFraction·(t1 - t0) (definition)")
		} else {
			assert.Equal(t, def.Rungs[i].Kind, r.Kind)
		}
	}
}
