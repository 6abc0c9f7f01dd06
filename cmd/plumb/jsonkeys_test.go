package main

import (
	"context"
	"encoding/json"
	"regexp"
	"sort"
	"strings"
	"testing"
)

// helpKeyList is a list of JSON keys in a command's help: "JSON keys: a, b
// (note), c." and, for the result on a map where it differs, "map JSON
// keys: ...". A key whose note starts with "when" may be absent.
var helpKeyList = regexp.MustCompile(`(?s)(map\s+)?JSON\s+keys:\s+(.*?)[.;](\s|$)`)

// helpKeys returns the keys listed in the help of cmd for a flow (or for
// any result) and for a map, each key mapped to whether it is always
// there. A command without a map list uses its one list for maps too.
func helpKeys(t *testing.T, cmd string) (main, onMap map[string]bool) {
	t.Helper()
	doc := lookup(cmd).doc
	for _, m := range helpKeyList.FindAllStringSubmatch(doc, -1) {
		keys := map[string]bool{}
		depth, item := 0, ""
		items := []string{}
		for _, r := range m[2] { // split at the commas outside parentheses
			switch {
			case r == '(':
				depth++
			case r == ')':
				depth--
			case r == ',' && depth == 0:
				items = append(items, item)
				item = ""
				continue
			}
			item += string(r)
		}
		items = append(items, item)
		for _, it := range items {
			f := strings.Fields(it)
			if len(f) == 0 {
				t.Fatalf("plumb help %s: empty item in the key list %q", cmd, m[2])
			}
			note := strings.Join(f[1:], " ")
			keys[f[0]] = !strings.HasPrefix(note, "(when ")
		}
		if m[1] == "" {
			main = keys
		} else {
			onMap = keys
		}
	}
	if main == nil {
		t.Fatalf("plumb help %s lists no JSON keys (want a sentence 'JSON keys: a, b, c.')", cmd)
	}
	if onMap == nil {
		onMap = main
	}
	return main, onMap
}

// TestJSONKeysMatchHelp runs every command that writes JSON, on a flow and
// on a map where it takes both, and checks its top-level keys against the
// list in its help: every key written is listed, every listed key is
// written (unless its note says when it appears), and error is always
// there, null on success.
func TestJSONKeysMatchHelp(t *testing.T) {
	runs := []struct {
		cmd   string
		isMap bool
		ok    bool // the run completes
		args  []string
	}{
		{"trust", false, true, nil}, // the demo: its precision rungs give float64_horizon
		{"trust", false, true, []string{"--horizon", "20", "--exact=false"}},
		{"trust", true, true, []string{"--model", "logistic", "--horizon", "60"}},
		{"trust", false, true, []string{"--horizon", "20", "--exact=false", "--shadow", "--prove", "1e-3"}},
		{"trust", true, true, []string{"--model", "logistic", "--horizon", "60", "--shadow", "--prove", "1e-3"}},
		{"solve", false, true, []string{"--t1", "1"}},
		{"solve", false, false, []string{"--t1", "1", "--max-steps", "5"}},
		{"solve", true, true, []string{"--model", "henon", "--steps", "10"}},
		{"ensemble", false, true, []string{"--t1", "2", "--members", "3", "--releases", "4"}},
		{"spectrum", false, true, []string{"--t1", "200"}},
		{"spectrum", true, true, []string{"--model", "henon"}},
		{"series", false, true, []string{"testdata/series_henon.csv", "--column", "x", "--surrogates", "5"}},
		{"scan", true, true, []string{"--across", "r=3:4:5", "--keep", "50"}},
		{"cycles", true, true, []string{"--period", "2", "--box", "x=0:1"}},
		{"models", false, true, nil},
		{"version", false, true, nil},
	}
	for _, cmd := range commands {
		json := false
		for _, f := range cmd.formats {
			json = json || f == "json"
		}
		seen := false
		for _, r := range runs {
			seen = seen || r.cmd == cmd.name
		}
		// plumb merge writes the JSON of the command its shard files
		// record, whose keys that command's runs check.
		if json && !seen && cmd != mergeCmd {
			t.Errorf("plumb %s writes JSON but this test does not run it", cmd.name)
		}
	}
	seenKeys := map[string]map[string]bool{} // "cmd" or "cmd map" -> keys written
	for _, r := range runs {
		name := strings.Join(append([]string{r.cmd}, r.args...), " ")
		t.Run(name, func(t *testing.T) {
			res := plumbRunCtx(t, context.Background(), append(append([]string{r.cmd}, r.args...), "--format", "json", "--quiet")...)
			if (res.code == exitOK) != r.ok {
				t.Fatalf("exit %d, stderr %q", res.code, res.stderr)
			}
			var got map[string]json.RawMessage
			if err := json.Unmarshal([]byte(res.stdout), &got); err != nil {
				t.Fatalf("stdout is not one JSON object: %v", err)
			}
			main, onMap := helpKeys(t, r.cmd)
			want, kind := main, r.cmd
			if r.isMap {
				want, kind = onMap, r.cmd+" map"
			}
			if seenKeys[kind] == nil {
				seenKeys[kind] = map[string]bool{}
			}
			for k := range got {
				seenKeys[kind][k] = true
				if _, ok := want[k]; !ok {
					t.Errorf("key %q is written but not listed in 'plumb help %s'", k, r.cmd)
				}
			}
			for k, always := range want {
				if _, ok := got[k]; always && !ok {
					t.Errorf("key %q is listed in 'plumb help %s' but not written", k, r.cmd)
				}
			}
			e, ok := got["error"]
			switch {
			case !ok:
				t.Error("no error key")
			case r.ok && string(e) != "null":
				t.Errorf("error is %s on success, want null", e)
			case !r.ok && string(e) == "null":
				t.Error("error is null on a failed run")
			}
		})
	}
	// A key that may be absent must still appear in some run, or the help
	// lists a key that is never written.
	for _, cmd := range []string{"trust", "solve", "spectrum", "models", "version"} {
		main, onMap := helpKeys(t, cmd)
		for kind, want := range map[string]map[string]bool{cmd: main, cmd + " map": onMap} {
			if seenKeys[kind] == nil {
				continue
			}
			var never []string
			for k := range want {
				if !seenKeys[kind][k] {
					never = append(never, k)
				}
			}
			sort.Strings(never)
			// exponent_error appears only when the exponent estimate fails,
			// which no default run does.
			if len(never) > 0 && !(len(never) == 1 && never[0] == "exponent_error") {
				t.Errorf("plumb help %s lists %v, which no %s run wrote", cmd, never, kind)
			}
		}
	}
}
