package main

import (
	"bufio"
	"context"
	"encoding/json"
	"os"
	"path/filepath"
	"regexp"
	"sort"
	"strings"
	"testing"

	"github.com/stretchr/testify/require"
)

// jsonDocPage is the page that documents every JSON field.
const jsonDocPage = "../../docs/json.md"

// docField is one row of a field table on the page.
type docField struct {
	// optional: the meaning starts "(when ...)" or "(omitted when ...)",
	// so no run need write it.
	optional bool
}

// docRow is a table row "| `path` | meaning |".
var docRow = regexp.MustCompile("^\\| `([^`]+)` \\| (.*) \\|$")

// readJSONDoc reads the field tables of the page, by section: "plumb NAME"
// for a command's result, "errors", "progress".
func readJSONDoc(t *testing.T) map[string]map[string]docField {
	t.Helper()
	f, err := os.Open(jsonDocPage)
	require.NoError(t, err)
	defer f.Close()
	doc := map[string]map[string]docField{}
	section := ""
	sc := bufio.NewScanner(f)
	for sc.Scan() {
		line := sc.Text()
		if h, ok := strings.CutPrefix(line, "## "); ok {
			switch {
			case strings.HasPrefix(h, "plumb "):
				section = strings.TrimPrefix(h, "plumb ")
			case h == "Errors":
				section = "errors"
			case h == "Progress lines":
				section = "progress"
			default:
				section = ""
			}
			continue
		}
		m := docRow.FindStringSubmatch(line)
		if m == nil || section == "" {
			continue
		}
		if doc[section] == nil {
			doc[section] = map[string]docField{}
		}
		_, dup := doc[section][m[1]]
		require.False(t, dup, "%s: %s: field listed twice", section, m[1])
		doc[section][m[1]] = docField{optional: strings.HasPrefix(m[2], "(when ") || strings.HasPrefix(m[2], "(omitted when ")}
	}
	require.NoError(t, sc.Err())
	return doc
}

// jsonPaths adds the path of every field in v to paths: "a.b" for a field
// of an object, "a[].b" for a field of an array's objects.
func jsonPaths(v any, prefix string, paths map[string]bool) {
	switch x := v.(type) {
	case map[string]any:
		for k, e := range x {
			p := k
			if prefix != "" {
				p = prefix + "." + k
			}
			paths[p] = true
			jsonPaths(e, p, paths)
		}
	case []any:
		for _, e := range x {
			jsonPaths(e, prefix+"[]", paths)
		}
	}
}

// checkDocumented compares the fields runs wrote (written) with the page's
// section: each written field is listed, each listed field is written by
// some run unless it is optional.
func checkDocumented(t *testing.T, section string, doc map[string]docField, written map[string]bool) {
	t.Helper()
	var undocumented, unwritten []string
	for p := range written {
		if _, ok := doc[p]; !ok {
			undocumented = append(undocumented, p)
		}
	}
	for p, f := range doc {
		if !written[p] && !f.optional {
			unwritten = append(unwritten, p)
		}
	}
	sort.Strings(undocumented)
	sort.Strings(unwritten)
	if len(undocumented) > 0 {
		t.Errorf("%s writes fields that docs/json.md does not list under its section: %v", section, undocumented)
	}
	if len(unwritten) > 0 {
		t.Errorf("docs/json.md lists fields under %s that no run wrote (mark them \"(when ...)\" if they appear only sometimes): %v", section, unwritten)
	}
}

// TestJSONDocumented runs every command that writes JSON, on flows and maps
// and with the flags that add fields, and checks its fields against
// docs/json.md; likewise the error document and the progress records.
func TestJSONDocumented(t *testing.T) {
	doc := readJSONDoc(t)
	dir := t.TempDir()
	ref := solveTo(t, dir, "ref.csv", "--method", "dp853", "--rtol", "1e-12", "--atol", "1e-12")
	loose := solveTo(t, dir, "loose.csv", "--rtol", "1e-6", "--atol", "1e-6")
	runs := map[string][][]string{
		"trust": {
			nil,
			{"--horizon", "20", "--exact=false"},
			{"--horizon", "20", "--exact=false", "--shadow", "--prove", "1e-3"},
			{"--horizon", "20", "--exact=false", "--observe", "x,z", "--scale", "x=2"},
			{"--horizon", "20", "--exact=false", "--method", "dp853", "--rtol", "1e-9", "--rungs", "tol"},
			{"--model", "logistic", "--horizon", "60"},
			{"--model", "logistic", "--horizon", "60", "--shadow", "--prove", "1e-3"},
			{"--run", "ref=" + ref, "--run", "tol:loose=" + loose},
		},
		"solve": {
			{"--t1", "1"},
			{"--t1", "1", "--max-steps", "5"},
			{"--t1", "1", "--dt", "0.1", "--cross-state", "x=5", "--cross-state", "z=25"},
			{"--model", "henon", "--steps", "10"},
		},
		"spectrum": {{"--t1", "200"}, {"--model", "henon"}},
		"series":   {{"testdata/series_henon.csv", "--column", "x", "--surrogates", "5"}},
		"ensemble": {
			{"--t1", "2", "--members", "3", "--releases", "4"},
			{"--t1", "2", "--members", "3", "--releases", "4", "--observe", "x,y", "--scale", "x=2"},
		},
		"scan":    {{"--across", "r=3:4:5", "--keep", "50"}},
		"cycles":  {{"--period", "2", "--box", "x=0:1"}, {"--set", "r=3.83", "--period", "3", "--box", "x=0:1", "--forced-up-to", "6"}},
		"models":  {nil},
		"version": {nil},
	}
	for _, cmd := range commands {
		for _, f := range cmd.formats {
			// plumb merge writes the JSON of the command it joins,
			// checked under that command's name.
			if f == "json" && runs[cmd.name] == nil && cmd != mergeCmd {
				t.Errorf("plumb %s writes JSON but this test does not run it", cmd.name)
			}
		}
	}
	for name, argLists := range runs {
		t.Run(name, func(t *testing.T) {
			written := map[string]bool{}
			for _, args := range argLists {
				r := plumbRun(t, append(append([]string{name}, args...), "--format", "json", "--quiet")...)
				var v any
				require.NoError(t, json.Unmarshal([]byte(r.stdout), &v), "%v: exit %d, stderr %s", args, r.code, r.stderr)
				jsonPaths(v, "", written)
			}
			require.NotNil(t, doc[name], "docs/json.md has no section '## plumb %s'", name)
			checkDocumented(t, "plumb "+name, doc[name], written)
		})
	}
	t.Run("errors", func(t *testing.T) {
		bad := filepath.Join(dir, "bad.json")
		require.NoError(t, os.WriteFile(bad, []byte("{\n  \"states\": [\n"), 0o644))
		canceled, cancel := context.WithCancel(context.Background())
		cancel()
		written := map[string]bool{}
		for _, c := range []struct {
			ctx  context.Context
			args []string
		}{
			{context.Background(), []string{"solve", "--bogus"}},
			{context.Background(), []string{"trust", "--file", bad}},
			{canceled, []string{"solve", "--file", bad}},
		} {
			r := plumbRunCtx(t, c.ctx, append(c.args, "--format", "json")...)
			var v any
			require.NoError(t, json.Unmarshal([]byte(r.stdout), &v), "%v: %s", c.args, r.stderr)
			jsonPaths(v, "", written)
		}
		checkDocumented(t, "the error document", doc["errors"], written)
	})
	t.Run("progress", func(t *testing.T) {
		written := map[string]bool{}
		for _, args := range [][]string{{"solve", "--t1", "1"}, {"models"}} {
			r := plumbRun(t, append(args, "--progress", "lines")...)
			for _, line := range strings.Split(r.stderr, "\n") {
				if strings.HasPrefix(line, "{") {
					var v any
					require.NoError(t, json.Unmarshal([]byte(line), &v), line)
					jsonPaths(v, "", written)
				}
			}
		}
		checkDocumented(t, "the progress records", doc["progress"], written)
	})
}
