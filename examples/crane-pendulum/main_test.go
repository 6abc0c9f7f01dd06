package main

import (
	"bytes"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

func TestCraneReplay(t *testing.T) {
	var out bytes.Buffer
	rep, err := run(&out)
	require.NoError(t, err)
	require.Contains(t, out.String(), "the replay can be believed for")
	require.Contains(t, out.String(), "not a safety certificate")
	// Exact identity of the audit: the trusted time is the earliest agreement
	// horizon over the rungs, and lies inside the audited 20 s.
	earliest := 20.0
	for _, r := range rep.Rungs {
		if r.AgreesUntil < earliest {
			earliest = r.AgreesUntil
		}
	}
	assert.Greater(t, rep.TrustedUntil, 0.0)
	assert.LessOrEqual(t, rep.TrustedUntil, 20.0)
	assert.Equal(t, earliest, rep.TrustedUntil, "trusted until is the earliest rung's agreement horizon")
}
