package main

import (
	"bytes"
	"context"
	"encoding/json"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

// TestTrustProveFlag: --prove adds the proof lines and the JSON proof;
// Lorenz from the demo's start stays below 1e-3 over 20 time units (the
// enclose package measures 6.3e-7 at t = 20 from (1, 1, 1)), Hénon over 30
// iterates.
func TestTrustProveFlag(t *testing.T) {
	for _, c := range []struct {
		name  string
		args  []string
		want  string // a line of the table
		until float64
	}{
		{"flow", []string{"trust", "--horizon", "20", "--exact=false", "--rungs", "tol", "--prove", "1e-3"}, "lies in boxes narrower than 0.001 up to t = 20, the whole span", 20},
		{"map", []string{"trust", "--model", "henon", "--horizon", "30", "--prove", "1e-3"}, "lies in boxes narrower than 0.001 up to iterate 30, the whole span", 30},
	} {
		var out, errb bytes.Buffer
		code := run(context.Background(), append(c.args, "--quiet"), strings.NewReader(""), &out, &errb)
		require.Equalf(t, 0, code, "%s: %s", c.name, errb.String())
		assert.Containsf(t, out.String(), c.want, "%s table", c.name)
		assert.Containsf(t, out.String(), "proof caution: A proven enclosure bounds the exact solution of the model's equations as written", "%s table", c.name)
		out.Reset()
		code = run(context.Background(), append(c.args, "--quiet", "--format", "json"), strings.NewReader(""), &out, &errb)
		require.Equalf(t, 0, code, "%s json: %s", c.name, errb.String())
		var doc struct {
			Settings struct {
				Prove float64 `json:"prove"`
			} `json:"settings"`
			Proof *struct {
				ProvenUntil float64          `json:"proven_until"`
				Whole       bool             `json:"whole"`
				Times       []float64        `json:"times"`
				Widths      []float64        `json:"widths"`
				Failure     *json.RawMessage `json:"failure"`
			} `json:"proof"`
		}
		require.NoError(t, json.Unmarshal(out.Bytes(), &doc))
		require.NotNil(t, doc.Proof, c.name)
		assert.Equal(t, 1e-3, doc.Settings.Prove)
		assert.Equal(t, c.until, doc.Proof.ProvenUntil, c.name)
		assert.True(t, doc.Proof.Whole, c.name)
		assert.Nil(t, doc.Proof.Failure, c.name)
		assert.Equal(t, len(doc.Proof.Times), len(doc.Proof.Widths))
	}
	for _, args := range [][]string{
		{"trust", "--prove", "0"},
		{"trust", "--prove", "-1"},
		{"trust", "--prove", "1e-3", "--run", "ref=x.csv", "--run", "tolerance=y.csv"},
	} {
		var out, errb bytes.Buffer
		code := run(context.Background(), append(args, "--quiet"), strings.NewReader(""), &out, &errb)
		assert.Equalf(t, 2, code, "%v: stderr %q", args, errb.String())
		assert.Containsf(t, errb.String(), "--prove", "%v", args)
	}
}
