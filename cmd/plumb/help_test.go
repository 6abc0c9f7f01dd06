package main

import (
	"flag"
	"os"
	"path/filepath"
	"slices"
	"strings"
	"testing"
)

func TestHelpOnStdout(t *testing.T) {
	main := plumbRun(t, "help")
	if main.code != exitOK || main.stderr != "" || !strings.Contains(main.stdout, "usage: plumb COMMAND") {
		t.Fatalf("plumb help: exit %d, stderr %q", main.code, main.stderr)
	}
	for _, args := range [][]string{{"-h"}, {"--help"}, {"-help"}} {
		if r := plumbRun(t, args...); r.code != exitOK || r.stdout != main.stdout || r.stderr != "" {
			t.Errorf("plumb %v: exit %d, stderr %q, stdout differs from plumb help", args, r.code, r.stderr)
		}
	}
	for _, c := range commands {
		if !strings.Contains(main.stdout, "  "+c.name+" ") || !strings.Contains(main.stdout, c.summary) {
			t.Errorf("plumb help does not list %s", c.name)
		}
		h := plumbRun(t, "help", c.name)
		if h.code != exitOK || h.stderr != "" || !strings.HasPrefix(h.stdout, "usage: plumb "+c.name) {
			t.Errorf("plumb help %s: exit %d, stderr %q, stdout %.40q", c.name, h.code, h.stderr, h.stdout)
		}
		for _, flagArg := range []string{"-h", "--help"} {
			r := plumbRun(t, c.name, flagArg)
			if r.code != exitOK || r.stdout != h.stdout || r.stderr != "" {
				t.Errorf("plumb %s %s: exit %d, stderr %q, stdout differs from plumb help %s", c.name, flagArg, r.code, r.stderr, c.name)
			}
		}
		if c.name == "help" {
			continue
		}
		// Every flag the command accepts is documented, and none it refuses.
		fs, _, _ := newFlagSet(c)
		fs.VisitAll(func(f *flag.Flag) {
			listed := strings.Contains(h.stdout, "  --"+f.Name+" ") || strings.Contains(h.stdout, "  --"+f.Name+"\n")
			refused := slices.Contains(c.refuses, f.Name)
			if listed == refused {
				t.Errorf("plumb help %s: --%s listed %v, refused %v", c.name, f.Name, listed, refused)
			}
			if refused {
				arg := "--" + f.Name + "=x"
				if f.Name == "quiet" {
					arg = "--quiet"
				}
				if r := plumbRun(t, c.name, arg); r.code != exitUsage || !strings.Contains(r.stderr, "--"+f.Name) {
					t.Errorf("plumb %s %s: exit %d, stderr %q; want a usage error naming the flag", c.name, arg, r.code, r.stderr)
				}
			}
		})
	}
}

// helpSections are the help texts the README's usage section embeds, by
// marker name: 'plumb help', then 'plumb help CMD' for every command.
func helpSections(t *testing.T) (keys []string, texts map[string]string) {
	texts = map[string]string{}
	r := plumbRun(t, "help")
	keys = append(keys, "plumb help")
	texts["plumb help"] = r.stdout
	for _, c := range commands {
		if c.name == "help" {
			continue
		}
		k := "plumb help " + c.name
		keys = append(keys, k)
		texts[k] = plumbRun(t, "help", c.name).stdout
	}
	return keys, texts
}

func markers(key string) (begin, end string) {
	return "<!-- " + key + " -->\n```text\n", "```\n<!-- end " + key + " -->"
}

// TestREADMEUsage fails when the README's usage section drifts from the
// help the binary prints; 'go test ./cmd/plumb -update' rewrites it.
func TestREADMEUsage(t *testing.T) {
	path := filepath.Join("..", "..", "README.md")
	b, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	readme := string(b)
	keys, texts := helpSections(t)
	for _, k := range keys {
		begin, end := markers(k)
		i := strings.Index(readme, begin)
		j := strings.Index(readme, end)
		if i < 0 || j < i {
			if *update {
				t.Errorf("README.md has no %q section to refresh; add the markers %q and %q", k, strings.TrimSpace(begin), end)
			} else {
				t.Errorf("README.md lacks the section for %q between %q and %q", k, strings.TrimSpace(begin), end)
			}
			continue
		}
		got := readme[i+len(begin) : j]
		if got == texts[k] {
			continue
		}
		if *update {
			readme = readme[:i+len(begin)] + texts[k] + readme[j:]
			continue
		}
		t.Errorf("README.md's %q section differs from the binary's help (run 'go test ./cmd/plumb -update'):\n%s", k, firstDiff(got, texts[k]))
	}
	if *update && readme != string(b) {
		if err := os.WriteFile(path, []byte(readme), 0o644); err != nil {
			t.Fatal(err)
		}
	}
}

// TestREADMEExamples runs every example command line of the README ("    plumb
// ..." lines) in process: each must succeed. Output redirections are dropped
// and --plot files go to a temporary directory.
func TestREADMEExamples(t *testing.T) {
	b, err := os.ReadFile(filepath.Join("..", "..", "README.md"))
	if err != nil {
		t.Fatal(err)
	}
	dir := t.TempDir()
	n := 0
	for _, line := range strings.Split(string(b), "\n") {
		if !strings.HasPrefix(line, "    plumb ") {
			continue
		}
		cmdline, _, _ := strings.Cut(line, "#")
		cmdline, _, _ = strings.Cut(cmdline, ">")
		args := strings.Fields(cmdline)[1:]
		for i := range args {
			if i > 0 && args[i-1] == "--plot" {
				args[i] = filepath.Join(dir, filepath.Base(args[i]))
			}
		}
		n++
		if r := plumbRun(t, append(args, "--quiet")...); r.code != exitOK || r.stdout == "" {
			t.Errorf("README example %q: exit %d, stderr %q", strings.TrimSpace(line), r.code, r.stderr)
		}
	}
	if n == 0 {
		t.Error("README.md shows no '    plumb ...' example lines")
	}
}
