package plumb

import (
	"context"
	"testing"

	"github.com/plumbdyn/plumb/integrate"
	"github.com/stretchr/testify/require"
)

// TestTrustToleranceBeyondReach: Lorenz at its published parameters
// stays within about 32 of its mean (the attractor's size, from memory:
// |x|, |y| < 25, 0 < z < 50), so a tolerance of 1000 can never be exceeded
// by two states of the attractor. The full-span reference to t = 900 would
// need more than 350 digits in big.Float (minutes); the audit must instead
// say that it was not made and why, and trust the whole span.
func TestTrustToleranceBeyondReach(t *testing.T) {
	sys, err := Model("lorenz")
	require.NoError(t, err)
	const horizon = 900
	rep, err := sys.Trust(context.Background(), horizon, &TrustSettings{Tol: 1000, Lambda: lorenzLambda, NoReversal: true})
	require.NoError(t, err)
	require.NotNil(t, rep.Exact)
	require.Contains(t, rep.Exact.SetAside, "was not made")
	require.Greater(t, rep.Exact.Digits, integrate.MaxDDDigits, "the shortcut must be the one that saves a big.Float reference")
	require.Greater(t, rep.TolAbs, 2*rep.reach)
	require.Equal(t, float64(horizon), rep.TrustedUntil, "no rung departs (exact identity: the tolerance exceeds every distance seen)")
	for _, r := range rep.Rungs {
		require.Falsef(t, r.Departed, "rung %s", r.Name)
	}
}

// TestBeyondReach: the shortcut is taken only when no run departed or
// failed and the tolerance exceeds twice the reach.
func TestBeyondReach(t *testing.T) {
	base := func() *Report {
		return &Report{TolAbs: 10, reach: 4, Rungs: []RungReport{{Name: "a"}, {Name: "b"}}}
	}
	require.True(t, beyondReach(base()))
	r := base()
	r.reach = 5 // 2·reach = tol: two states may be a tolerance apart
	require.False(t, beyondReach(r))
	r = base()
	r.Rungs[1].Departed = true
	require.False(t, beyondReach(r))
	r = base()
	r.Failed, r.Rungs[0].Error = 1, "step budget spent"
	require.False(t, beyondReach(r))
	r = base()
	r.Reference.Error = "step budget spent"
	require.False(t, beyondReach(r))
	require.False(t, beyondReach(nil))
}
