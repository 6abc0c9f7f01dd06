package main

import (
	"bytes"
	"context"
	"encoding/json"
	"strings"
	"testing"
)

func TestTrustShadowFlag(t *testing.T) {
	for _, c := range []struct {
		name string
		args []string
		want string // a line of the table
	}{
		{"flow", []string{"trust", "--horizon", "20", "--exact=false", "--shadow"}, "of the Dormand–Prince 5(4) run at rtol 1e-06 atol 1e-09 up to t = 20"},
		{"map", []string{"trust", "--model", "henon", "--horizon", "500", "--shadow"}, "of the float64 orbit up to iterate 500, the whole span"},
	} {
		var out, errb bytes.Buffer
		if code := run(context.Background(), append(c.args, "--quiet"), strings.NewReader(""), &out, &errb); code != 0 {
			t.Fatalf("%s: exit %d: %s", c.name, code, errb.String())
		}
		if !strings.Contains(out.String(), "shadow (of the model, not the real system): a true orbit stays within") || !strings.Contains(out.String(), c.want) {
			t.Errorf("%s: no shadow line with %q in\n%s", c.name, c.want, out.String())
		}
		out.Reset()
		if code := run(context.Background(), append(c.args, "--quiet", "--format", "json"), strings.NewReader(""), &out, &errb); code != 0 {
			t.Fatalf("%s json: exit %d: %s", c.name, code, errb.String())
		}
		var doc struct {
			Shadow *struct {
				Distance float64 `json:"distance"`
				Whole    bool    `json:"whole"`
			} `json:"shadow"`
		}
		if err := json.Unmarshal(out.Bytes(), &doc); err != nil || doc.Shadow == nil || !doc.Shadow.Whole || !(doc.Shadow.Distance > 0) {
			t.Errorf("%s json: shadow %+v, err %v", c.name, doc.Shadow, err)
		}
	}
	var out, errb bytes.Buffer
	code := run(context.Background(), []string{"trust", "--shadow", "--run", "ref=x.csv", "--run", "tolerance=y.csv", "--quiet"}, strings.NewReader(""), &out, &errb)
	if code != 2 || !strings.Contains(errb.String(), "--shadow") {
		t.Errorf("--shadow with --run: exit %d, stderr %q (want 2 naming --shadow)", code, errb.String())
	}
}
