package plumb_test

import (
	"context"
	"math"
	"os"
	"testing"

	"github.com/stretchr/testify/require"

	"github.com/plumbdyn/plumb"
	"github.com/plumbdyn/plumb/lyap"
)

// TestSystemTangent3: a built-in 3-D flow's fused evaluation gives a full
// spectrum with the bits of the run without it (exact identity, the
// contract of lyap.Tangent3), keeps the parameters it was made with, and
// systems without one return nil.
func TestSystemTangent3(t *testing.T) {
	ctx := context.Background()
	for _, name := range []string{"lorenz", "rossler"} {
		sys, err := plumb.Model(name)
		require.NoError(t, err)
		require.NoError(t, sys.Set(sys.Params()[0].Name, sys.Params()[0].Value*1.25))
		tf := sys.Tangent3()
		require.NotNil(t, tf, name)
		p := sys.Problem()
		// Changing the system afterwards changes neither p nor tf.
		require.NoError(t, sys.Set(sys.Params()[0].Name, 1))
		s := &lyap.Settings{Duration: 200, Transient: 20}
		plain, err := lyap.Exponents(ctx, p, 3, s)
		require.NoError(t, err)
		s.Tangent3 = tf
		fused, err := lyap.Exponents(ctx, p, 3, s)
		require.NoError(t, err, "%s: the fused evaluation was refused", name)
		for i := range plain.Exponents {
			require.Equalf(t, math.Float64bits(plain.Exponents[i]), math.Float64bits(fused.Exponents[i]),
				"%s: exponent %d: %v without, %v with the fused evaluation (must be bit-identical)", name, i, plain.Exponents[i], fused.Exponents[i])
		}
		require.Equal(t, plain.Stats, fused.Stats, name)
	}
	for _, name := range []string{"double-pendulum", "henon"} {
		sys, err := plumb.Model(name)
		require.NoError(t, err)
		require.Nil(t, sys.Tangent3(), name)
	}
	f, err := os.Open("examples/systems/lab-loop.json")
	require.NoError(t, err)
	defer f.Close()
	sys, err := plumb.LoadSystem(f)
	require.NoError(t, err)
	require.Nil(t, sys.Tangent3(), "a system from formulas")
}
