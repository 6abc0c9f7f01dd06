package main

import (
	"bytes"
	"context"
	"encoding/json"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// TestTrustKinkSetAside: a convection loop whose middle rate has
// 0.01*sqrt(abs(x)) reaches a branch point of sqrt each time x crosses 0,
// which no Taylor series continues past. The audit says so in JSON
// (exact_reference.set_aside) and on stderr, and compares the runs with the
// float64 reference run instead (exit 0).
func TestTrustKinkSetAside(t *testing.T) {
	const src = `{"name":"loop-root","kind":"flow","variables":[
 {"name":"x","start":1,"rate":"10*(y - x)"},
 {"name":"y","start":1,"rate":"x*(28 - z) - y + 0.01*sqrt(abs(x))"},
 {"name":"z","start":1,"rate":"x*y - 2.6666666666666665*z"}]}`
	path := filepath.Join(t.TempDir(), "loop-root.json")
	if err := os.WriteFile(path, []byte(src), 0o644); err != nil {
		t.Fatal(err)
	}
	var out, errb bytes.Buffer
	code := run(context.Background(), []string{"trust", "--file", path, "--horizon", "10", "--format", "json"}, strings.NewReader(""), &out, &errb)
	if code != exitOK {
		t.Fatalf("exit %d, stderr %q", code, errb.String())
	}
	var res struct {
		Exact *struct {
			SetAside     string `json:"set_aside"`
			KinkRestarts int    `json:"kink_restarts"`
		} `json:"exact_reference"`
		Rungs []struct {
			Rejected *int `json:"rejected_steps"`
		} `json:"rungs"`
	}
	if err := json.Unmarshal(out.Bytes(), &res); err != nil {
		t.Fatal(err)
	}
	if res.Exact == nil || !strings.Contains(res.Exact.SetAside, "sqrt") || !strings.Contains(res.Exact.SetAside, "branch point") {
		t.Errorf("exact_reference = %+v, want set_aside naming sqrt's branch point", res.Exact)
	}
	if !strings.Contains(errb.String(), "warning: the multiprecision reference was set aside") {
		t.Errorf("stderr %q lacks the warning", errb.String())
	}
	if len(res.Rungs) == 0 || res.Rungs[0].Rejected == nil {
		t.Errorf("rungs lack rejected_steps: %s", out.String()[:min(200, out.Len())])
	}
}
