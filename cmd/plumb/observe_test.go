package main

import (
	"bytes"
	"context"
	"encoding/json"
	"errors"
	"math"
	"os"
	"slices"
	"strings"
	"testing"

	"github.com/stretchr/testify/require"

	"github.com/plumbdyn/plumb"
)

// plumbRunStdin is plumbRun with stdin.
func plumbRunStdin(t *testing.T, stdin string, args ...string) result {
	t.Helper()
	var out, errb bytes.Buffer
	code := run(context.Background(), args, strings.NewReader(stdin), &out, &errb)
	return result{code: code, stdout: out.String(), stderr: errb.String()}
}

// withStart returns the system file at path with the start of the state
// name replaced by value (the file's own text, one edit).
func withStart(t *testing.T, path, name, old, value string) string {
	t.Helper()
	b, err := os.ReadFile(path)
	require.NoError(t, err)
	from := `{"name": "` + name + `", "start": ` + old
	require.Equalf(t, 1, strings.Count(string(b), from), "%s must hold %s once", path, from)
	return strings.Replace(string(b), from, `{"name": "`+name+`", "start": `+value, 1)
}

// TestStartMatchesFile: --start gives the output of a system file whose
// start holds that value, byte for byte, for flows and maps, from files
// and built-ins (exact identity: the same start, the same arithmetic).
func TestStartMatchesFile(t *testing.T) {
	const fishStock = "../../examples/systems/fish-stock.json"
	loop08 := withStart(t, labLoop, "speed", "1", "0.8")
	fish03 := withStart(t, fishStock, "stock", "0.2", "0.3")
	for _, c := range []struct {
		name      string
		flag      []string // the run with --start
		file      string   // the system file with the start in it (stdin)
		args      []string // shared by both
		skipFirst bool     // compare from the second line (the header names differ)
	}{
		{"flow file json", []string{"--file", labLoop, "--start", "speed=0.8"}, loop08, []string{"solve", "--t1", "3", "--dt", "0.5", "--format", "json"}, false},
		{"flow file table", []string{"--file", labLoop, "--start", "speed=0.8"}, loop08, []string{"solve", "--t1", "3", "--dt", "0.5"}, false},
		{"flow built-in csv", []string{"--model", "lorenz", "--start", "x=0.8"}, loop08, []string{"solve", "--t1", "3", "--dt", "0.5", "--format", "csv"}, true},
		{"map file json", []string{"--file", fishStock, "--start", "stock=0.3"}, fish03, []string{"solve", "--steps", "40", "--format", "json"}, false},
		{"map built-in csv", []string{"--model", "logistic", "--set", "r=3.7", "--start", "x=0.3"}, fish03, []string{"solve", "--steps", "40", "--format", "csv"}, true},
		{"map file spectrum", []string{"--file", fishStock, "--start", "stock=0.3"}, fish03, []string{"spectrum", "--format", "json"}, false},
	} {
		t.Run(c.name, func(t *testing.T) {
			a := plumbRun(t, append(append(c.args, "--quiet"), c.flag...)...)
			b := plumbRunStdin(t, c.file, append(c.args, "--quiet", "--file", "-")...)
			require.Equalf(t, exitOK, a.code, "stderr %s", a.stderr)
			require.Equalf(t, exitOK, b.code, "stderr %s", b.stderr)
			ga, gb := a.stdout, b.stdout
			if c.skipFirst {
				_, ga, _ = strings.Cut(ga, "\n")
				_, gb, _ = strings.Cut(gb, "\n")
			}
			require.NotEmpty(t, ga)
			require.Equal(t, gb, ga, "--start against the file's start (exact identity)")
		})
	}
	// The start is echoed, and moves the run.
	r := plumbRun(t, "solve", "--model", "lorenz", "--start", "x=0.8", "--start", "z=2", "--t1", "1", "--format", "json", "--quiet")
	require.Equal(t, exitOK, r.code, r.stderr)
	var out struct {
		System systemJSON `json:"system"`
	}
	require.NoError(t, json.Unmarshal([]byte(r.stdout), &out))
	require.Equal(t, []stateJSON{{Name: "x", Start: 0.8}, {Name: "y", Start: 1}, {Name: "z", Start: 2}}, out.System.States)
	plain := plumbRun(t, "solve", "--model", "lorenz", "--t1", "1", "--format", "json", "--quiet")
	require.NotEqual(t, plain.stdout, r.stdout)
	// plumb models shows it as --set shows parameters.
	m := plumbRun(t, "models", "--model", "henon", "--start", "y=0.25")
	require.Equal(t, exitOK, m.code, m.stderr)
	require.Regexp(t, `\n  y\s+0\.25\s`, m.stdout)
}

// trustDoc is the part of a trust JSON result these tests read.
type trustDoc struct {
	Settings struct {
		Observe []string    `json:"observe"`
		Scales  []scaleJSON `json:"scales"`
	} `json:"settings"`
	TrustedUntil float64 `json:"trusted_until"`
	Distance     struct {
		FullState  bool `json:"full_state"`
		Components []struct {
			Name  string  `json:"name"`
			Scale float64 `json:"scale"`
		} `json:"components"`
		Omitted []string `json:"omitted"`
	} `json:"distance"`
	Rungs []struct {
		Name        string    `json:"name"`
		AgreesUntil float64   `json:"agrees_until"`
		Departed    bool      `json:"departed"`
		Divergence  []float64 `json:"divergence"`
	} `json:"rungs"`
}

func trustRun(t *testing.T, args ...string) trustDoc {
	t.Helper()
	r := plumbRun(t, append([]string{"trust", "--format", "json", "--quiet"}, args...)...)
	require.Equalf(t, exitOK, r.code, "stderr %s", r.stderr)
	var d trustDoc
	require.NoError(t, json.Unmarshal([]byte(r.stdout), &d))
	return d
}

// TestTrustScaleFlags: --scale 2 on every component at --tol 1 gives the
// horizons of --tol 2 unscaled, for a flow (with the multiprecision
// reference) and a map: ||d/2|| > 1 exactly when ||d|| > 2, and ||d/2|| =
// ||d||/2 exactly in binary floating point (exact identity). The settings
// and the distance are echoed.
func TestTrustScaleFlags(t *testing.T) {
	for _, c := range []struct {
		name   string
		args   []string
		scales []string
	}{
		{"flow", []string{"--horizon", "25"}, []string{"--scale", "x=2", "--scale", "y=2", "--scale", "z=2"}},
		{"map", []string{"--model", "henon", "--horizon", "150"}, []string{"--scale", "x=2", "--scale", "y=2"}},
	} {
		t.Run(c.name, func(t *testing.T) {
			plain := trustRun(t, append(c.args, "--tol", "2")...)
			scaled := trustRun(t, append(append(c.args, "--tol", "1"), c.scales...)...)
			require.True(t, plain.Distance.FullState)
			require.False(t, scaled.Distance.FullState)
			require.Equal(t, plain.TrustedUntil, scaled.TrustedUntil, "trusted until (exact identity)")
			departed := false
			for i, pr := range plain.Rungs {
				sr := scaled.Rungs[i]
				require.Equalf(t, pr.AgreesUntil, sr.AgreesUntil, "rung %s (exact identity)", pr.Name)
				require.Equal(t, pr.Departed, sr.Departed)
				for k := range pr.Divergence {
					require.Equalf(t, pr.Divergence[k]/2, sr.Divergence[k], "rung %s point %d (exact identity)", pr.Name, k)
				}
				departed = departed || pr.Departed
			}
			require.True(t, departed, "some rung must depart for the check to bite")
			require.Len(t, scaled.Settings.Scales, len(c.scales)/2)
			require.Equal(t, 2.0, scaled.Settings.Scales[0].Value)
		})
	}
	obs := trustRun(t, "--model", "henon", "--observe", "y", "--scale", "y=0.5")
	require.Equal(t, []string{"y"}, obs.Settings.Observe)
	require.Equal(t, []string{"x"}, obs.Distance.Omitted)
	require.Len(t, obs.Distance.Components, 1)
	require.Equal(t, 0.5, obs.Distance.Components[0].Scale)
	all := trustRun(t, "--model", "henon")
	require.Equal(t, []string{"x", "y"}, all.Settings.Observe, "the default observes every component")
	require.Empty(t, all.Settings.Scales)
	table := plumbRun(t, "trust", "--horizon", "10", "--observe", "x,z", "--scale", "x=2", "--scale", "z=10", "--quiet")
	require.Equal(t, exitOK, table.code, table.stderr)
	require.Contains(t, table.stdout, "\ndistance: Euclidean over x, z with scales x/2, z/10 (y not compared)\n")
}

// TestObserveStartErrors: each bad --observe, --scale or --start is a
// usage error (exit 2) naming the flag and what was wrong, before any work.
func TestObserveStartErrors(t *testing.T) {
	for _, c := range []struct {
		name string
		args []string
		want []string
	}{
		{"unknown observed", []string{"trust", "--observe", "x,w"}, []string{"--observe x,w", "w:", "states: x, y, z"}},
		{"observed twice", []string{"trust", "--observe", "x,x"}, []string{"--observe x,x", "named twice"}},
		{"empty observed name", []string{"trust", "--observe", "x,,z"}, []string{"--observe", "empty name", "states: x, y, z"}},
		{"empty observe", []string{"trust", "--observe", ""}, []string{"--observe", "empty name"}},
		{"zero scale", []string{"trust", "--scale", "x=0"}, []string{"--scale x=0", "positive"}},
		{"negative scale", []string{"trust", "--scale", "y=-3"}, []string{"--scale y=-3", "positive"}},
		{"infinite scale", []string{"trust", "--scale", "y=inf"}, []string{"--scale", "not a finite number"}},
		{"scale without value", []string{"trust", "--scale", "y"}, []string{"--scale", "name=value"}},
		{"unknown scaled", []string{"trust", "--scale", "w=2"}, []string{"--scale w=2", "states: x, y, z"}},
		{"scaled twice", []string{"trust", "--scale", "x=2", "--scale", "x=3"}, []string{"--scale x=3", "scaled twice"}},
		{"scale of an unobserved", []string{"trust", "--observe", "x", "--scale", "z=2"}, []string{"--scale z=2", "not an observed component"}},
		{"map unknown observed", []string{"trust", "--model", "henon", "--observe", "z"}, []string{"--observe z", "states: x, y"}},
		{"file unknown observed", []string{"trust", "--file", labLoop, "--observe", "x"}, []string{"--observe x", "states: speed, across, profile"}},
		{"solve unknown start", []string{"solve", "--start", "w=1"}, []string{"--start w=1", "states: x, y, z"}},
		{"spectrum unknown start", []string{"spectrum", "--start", "w=1"}, []string{"--start w=1", "states: x, y, z"}},
		{"trust unknown start", []string{"trust", "--start", "w=1"}, []string{"--start w=1", "states: x, y, z"}},
		{"map unknown start", []string{"solve", "--model", "henon", "--start", "z=1"}, []string{"--start z=1", "states: x, y"}},
		{"file unknown start", []string{"solve", "--file", labLoop, "--start", "x=1"}, []string{"--start x=1", "states: speed, across, profile"}},
		{"models unknown start", []string{"models", "--model", "lorenz", "--start", "w=1"}, []string{"--start w=1", "states: x, y, z"}},
		{"models start without model", []string{"models", "--start", "x=1"}, []string{"--start x=1", "--model"}},
		{"start not a number", []string{"solve", "--start", "x=abc"}, []string{"--start", "not a number"}},
		{"start NaN", []string{"solve", "--start", "x=NaN"}, []string{"--start", "not a finite number"}},
		{"start without value", []string{"solve", "--start", "x"}, []string{"--start", "name=value"}},
		{"observe on solve", []string{"solve", "--observe", "x"}, []string{"--observe"}},
		{"a state given to --set", []string{"solve", "--set", "x=0.8"}, []string{"--set x=0.8", "state component", "--start x=0.8"}},
		{"a file's state given to --set", []string{"trust", "--file", labLoop, "--set", "speed=2"}, []string{"--set speed=2", "--start speed=2"}},
	} {
		t.Run(c.name, func(t *testing.T) {
			r := plumbRun(t, c.args...)
			require.Equalf(t, exitUsage, r.code, "stderr %s", r.stderr)
			require.Empty(t, r.stdout)
			for _, w := range c.want {
				require.Contains(t, r.stderr, w)
			}
		})
	}
}

// FuzzStartScaleFlags: --start and --scale NAME=VALUE never panic, refuse
// with a message, accept only a name and a finite number, and read back
// what they print (parse(format(x)) == x).
func FuzzStartScaleFlags(f *testing.F) {
	for _, s := range []string{"x=0.8", "z=10", " y = -0 ", "x=0x1p-3", "=", "x=", "x=NaN", "x=Inf", "a=b=c", "θ=1.5", "x=1e400", "x=1e-320"} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, s string) {
		for _, l := range []interface {
			Set(string) error
			String() string
			list() paramList
		}{&startList{}, &scaleList{}} {
			if err := l.Set(s); err != nil {
				if err.Error() == "" {
					t.Errorf("Set(%q): empty error", s)
				}
				continue
			}
			got := l.list()
			if len(got) != 1 || got[0].name == "" || strings.Contains(got[0].name, "=") || math.IsNaN(got[0].value) || math.IsInf(got[0].value, 0) {
				t.Fatalf("Set(%q) accepted %+v", s, got)
			}
			var again paramList
			if err := again.Set(l.String()); err != nil {
				t.Fatalf("Set(%q) (formatted from %q): %v", l.String(), s, err)
			}
			if again[0].name != got[0].name || math.Float64bits(again[0].value) != math.Float64bits(got[0].value) {
				t.Errorf("round trip %q -> %+v -> %q -> %+v", s, got[0], l.String(), again[0])
			}
		}
	})
}

func (l *startList) list() paramList { return l.paramList }
func (l *scaleList) list() paramList { return l.paramList }

// FuzzObserveFlag: any --observe list with any one --scale either gives a
// Distance the SDK accepts, over names of the system's states, or a usage
// error that names --observe or --scale; it never panics.
func FuzzObserveFlag(f *testing.F) {
	for _, c := range [][2]string{{"x", ""}, {"x,z", "z=10"}, {"x,,z", ""}, {"", "x=2"}, {" y ", "y=0"}, {"x,x", "x=1"}, {"w", "x=-1"}, {"y", "x=2"}, {",", "=1"}} {
		f.Add(c[0], c[1])
	}
	sys, err := plumb.Model("lorenz")
	if err != nil {
		f.Fatal(err)
	}
	f.Fuzz(func(t *testing.T, observe, scale string) {
		d := &distanceFlags{observe: observe}
		if scale != "" && d.scales.Set(scale) != nil {
			return // refused by the flag parser (FuzzStartScaleFlags)
		}
		cl := &call{sh: &shared{given: map[string]bool{"observe": observe != ""}}}
		dist, err := d.distance(cl, sys)
		if err != nil {
			var ue *usageError
			if !errors.As(err, &ue) || !(strings.HasPrefix(ue.msg, "--observe") || strings.HasPrefix(ue.msg, "--scale")) {
				t.Fatalf("--observe %q --scale %q: %v is no usage error naming the flag", observe, scale, err)
			}
			return
		}
		if _, err := dist.PerComponent(sys.States); err != nil {
			t.Fatalf("--observe %q --scale %q accepted %+v, which the SDK refuses: %v", observe, scale, dist, err)
		}
		for _, n := range dist.Observe {
			if !slices.Contains(sys.States, n) {
				t.Fatalf("--observe %q accepted %q", observe, n)
			}
		}
	})
}
