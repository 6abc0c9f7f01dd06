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

// labLoop is the convection loop of docs/system-file.md: the Lorenz
// equations under names of the lab's own.
const labLoop = "../../examples/systems/lab-loop.json"

// TestFileMatchesModel: the lab loop written as formulas gives the same
// samples, to the bit, as the built-in Lorenz model with the same
// parameters (the formulas compile to the same arithmetic; exact identity).
func TestFileMatchesModel(t *testing.T) {
	args := []string{"solve", "--t1", "5", "--dt", "0.5", "--format", "csv", "--quiet"}
	file := plumbRun(t, append(args, "--file", labLoop)...)
	model := plumbRun(t, append(args, "--model", "lorenz")...)
	if file.code != exitOK || model.code != exitOK {
		t.Fatalf("exit %d (%s), %d (%s)", file.code, file.stderr, model.code, model.stderr)
	}
	fl := strings.Split(file.stdout, "\n")
	ml := strings.Split(model.stdout, "\n")
	if fl[0] != "t,speed,across,profile" {
		t.Errorf("header %q, want the file's names", fl[0])
	}
	if strings.Join(fl[1:], "\n") != strings.Join(ml[1:], "\n") {
		t.Errorf("samples differ:\nfile:\n%s\nmodel:\n%s", file.stdout, model.stdout)
	}
	// --set works on file parameters, by their names in the file.
	r := plumbRun(t, "solve", "--file", labLoop, "--set", "heating=20", "--t1", "1", "--format", "csv", "--quiet")
	if r.code != exitOK || r.stdout == file.stdout {
		t.Errorf("--set heating=20: exit %d, %s", r.code, r.stderr)
	}
	r = plumbRun(t, "solve", "--file", labLoop, "--set", "rho=20", "--quiet")
	if r.code != exitUsage || !strings.Contains(r.stderr, "rho") {
		t.Errorf("--set of a parameter the file lacks: exit %d, stderr %q", r.code, r.stderr)
	}
}

// TestFileErrors: a bad system file is a usage error (exit 2) that names
// the file and the place; a map takes no flow flags.
func TestFileErrors(t *testing.T) {
	for _, c := range []struct {
		name, stdin string
		args        []string
		want        []string
	}{
		{"missing file", "", []string{"trust", "--file", "no/such.json"}, []string{"no/such.json"}},
		{"unknown name", `{"name":"x","kind":"flow","variables":[{"name":"a","start":1,"rate":"a*b"}]}`,
			[]string{"solve", "--file", "-"}, []string{"--file -", "variables[0].rate", `unknown name "b"`, "^"}},
		{"unknown field", `{"name":"x","kind":"flow","colour":1,"variables":[{"name":"a","start":1,"rate":"-a"}]}`,
			[]string{"solve", "--file", "-"}, []string{"colour"}},
		{"not JSON", `{"name":`, []string{"spectrum", "--file", "-"}, []string{"--file -"}},
		{"a map with a flow flag", "", []string{"solve", "--file", "../../examples/systems/fish-stock.json", "--t1", "5"}, []string{"map", "--t1"}},
	} {
		t.Run(c.name, func(t *testing.T) {
			var out, errb bytes.Buffer
			code := run(context.Background(), append(c.args, "--quiet"), strings.NewReader(c.stdin), &out, &errb)
			if code != exitUsage || out.Len() != 0 {
				t.Fatalf("exit %d, stdout %q, stderr %q; want 2 and nothing on stdout", code, out.String(), errb.String())
			}
			for _, w := range c.want {
				if !strings.Contains(errb.String(), w) {
					t.Errorf("stderr %q does not mention %q", errb.String(), w)
				}
			}
		})
	}
}

// TestFileHamiltonian: the crane's swinging load, a Hamiltonian in the
// file, runs with a symplectic method (its H = T(p) + V(q) is separable, so
// the file's system carries the split parts).
func TestFileHamiltonian(t *testing.T) {
	r := plumbRun(t, "solve", "--file", "../../examples/systems/crane-load.json", "--method", "verlet", "--step", "0.01", "--t1", "2", "--format", "csv", "--quiet")
	if r.code != exitOK {
		t.Fatalf("exit %d: %s", r.code, r.stderr)
	}
	if !strings.HasPrefix(r.stdout, "t,angle,swing\n") {
		t.Errorf("header: %q", strings.SplitN(r.stdout, "\n", 2)[0])
	}
}

// TestFileWithoutName: a system file without "name" is called by its file
// name (or "stdin"), so messages and JSON results still say which system.
func TestFileWithoutName(t *testing.T) {
	const src = `{"kind":"flow","variables":[{"name":"u","start":1,"rate":"-u"}]}`
	path := filepath.Join(t.TempDir(), "decay.json")
	if err := os.WriteFile(path, []byte(src), 0o644); err != nil {
		t.Fatal(err)
	}
	for _, c := range []struct {
		file, stdin, want string
	}{{path, "", "decay"}, {"-", src, "stdin"}} {
		var out, errb bytes.Buffer
		code := run(context.Background(), []string{"solve", "--file", c.file, "--t1", "1", "--format", "json", "--quiet"}, strings.NewReader(c.stdin), &out, &errb)
		if code != exitOK {
			t.Fatalf("--file %s: exit %d, stderr %q", c.file, code, errb.String())
		}
		var res struct {
			System struct {
				Name string `json:"name"`
			} `json:"system"`
		}
		if err := json.Unmarshal(out.Bytes(), &res); err != nil {
			t.Fatalf("--file %s: %v", c.file, err)
		}
		if res.System.Name != c.want {
			t.Errorf("--file %s: system name %q, want %q", c.file, res.System.Name, c.want)
		}
	}
	for _, c := range [][2]string{{"a/b/loop.json", "loop"}, {"loop", "loop"}, {"x/.json", ".json"}} {
		if got := fileSystemName(c[0]); got != c[1] {
			t.Errorf("fileSystemName(%q) = %q, want %q", c[0], got, c[1])
		}
	}
}

// TestBlowUpHint: du/dt = u², u(0) = 1 has the solution 1/(1 - t), which
// leaves every bound at t = 1 (exact solution); the step size collapses
// there, the run fails (exit 1) with the time, and a hint says what a
// collapsing step usually means.
func TestBlowUpHint(t *testing.T) {
	const src = `{"name":"blow","kind":"flow","variables":[{"name":"u","start":1,"rate":"u^2"}]}`
	for _, c := range []struct {
		args []string
		want []string
	}{
		{[]string{"solve", "--t1", "2"}, []string{"step size underflow", "at t=0.99999", "hint: the step size collapsed"}},
		{[]string{"trust", "--horizon", "2"}, []string{"step size underflow", "hint: the step size collapsed", "--horizon"}},
	} {
		var out, errb bytes.Buffer
		args := append(append([]string{}, c.args...), "--file", "-", "--quiet")
		code := run(context.Background(), args, strings.NewReader(src), &out, &errb)
		if code != exitFailed {
			t.Fatalf("%v: exit %d, want %d; stderr %q", c.args, code, exitFailed, errb.String())
		}
		for _, w := range c.want {
			if !strings.Contains(errb.String(), w) {
				t.Errorf("%v: stderr %q does not mention %q", c.args, errb.String(), w)
			}
		}
	}
}
