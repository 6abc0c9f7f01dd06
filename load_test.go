package plumb

import (
	"errors"
	"math"
	"math/big"
	"math/rand/v2"
	"os"
	"regexp"
	"strings"
	"testing"

	"gonum.org/v1/gonum/diff/fd"
	"gonum.org/v1/gonum/mat"

	"github.com/plumbdyn/plumb/integrate"
	"github.com/plumbdyn/plumb/internal/dd"
	"github.com/plumbdyn/plumb/internal/expr"
)

// docExamples returns the JSON examples of docs/system-file.md.
func docExamples(t testing.TB) []string {
	b, err := os.ReadFile("docs/system-file.md")
	if err != nil {
		t.Fatal(err)
	}
	re := regexp.MustCompile("(?s)```json\n(.*?)```")
	var out []string
	for _, m := range re.FindAllStringSubmatch(string(b), -1) {
		out = append(out, m[1])
	}
	if len(out) < 3 {
		t.Fatalf("docs/system-file.md has %d JSON examples, want 3", len(out))
	}
	return out
}

// TestDocExamples loads every example of the format's documentation.
func TestDocExamples(t *testing.T) {
	for i, src := range docExamples(t) {
		if _, err := LoadSystem(strings.NewReader(src)); err != nil {
			t.Errorf("example %d: %v", i, err)
		}
	}
}

// TestLabLoopIsLorenz checks that the documentation's convection loop (the
// Lorenz equations under other names) gives the same field, Jacobian and
// trajectory as the built-in lorenz model (exact identity: same equations,
// same parameters).
func TestLabLoopIsLorenz(t *testing.T) {
	s, err := LoadSystem(strings.NewReader(docExamples(t)[0]))
	if err != nil {
		t.Fatal(err)
	}
	if s.TimeUnit() != "s" {
		t.Errorf("TimeUnit = %q, want s", s.TimeUnit())
	}
	if s.Kind() != KindFlow || s.Name != "lab-loop" || len(s.States) != 3 {
		t.Fatalf("kind %v name %q states %v", s.Kind(), s.Name, s.States)
	}
	m, _ := Model("lorenz")
	ps, pm := s.Problem(), m.Problem()
	rng := rand.New(rand.NewPCG(31, 32))
	a, b := make([]float64, 3), make([]float64, 3)
	ja, jb := mat.NewDense(3, 3, nil), mat.NewDense(3, 3, nil)
	for range 50 {
		y := []float64{20 * rng.NormFloat64(), 20 * rng.NormFloat64(), 25 + 10*rng.NormFloat64()}
		ps.F(0, y, a)
		pm.F(0, y, b)
		for i := range a {
			if a[i] != b[i] {
				t.Errorf("f[%d](%v): file %v, built-in %v", i, y, a[i], b[i])
			}
		}
		ps.Jac(0, y, ja)
		pm.Jac(0, y, jb)
		if !mat.Equal(ja, jb) {
			t.Errorf("Jacobians differ at %v:\n%v\n%v", y, mat.Formatted(ja), mat.Formatted(jb))
		}
	}
	sa, err := integrate.Solve(t.Context(), ps, 5, nil, nil)
	if err != nil {
		t.Fatal(err)
	}
	sb, err := integrate.Solve(t.Context(), pm, 5, nil, nil)
	if err != nil {
		t.Fatal(err)
	}
	ya, yb := sa.At(5, nil), sb.At(5, nil)
	for i := range ya {
		if ya[i] != yb[i] {
			t.Errorf("y(5)[%d]: file %v, built-in %v (the same arithmetic should give the same bits)", i, ya[i], yb[i])
		}
	}
	if err := s.Set("heating", 350); err != nil {
		t.Fatal(err)
	}
	if p := s.Params(); p[1].Value != 350 || p[1].Name != "heating" {
		t.Errorf("Params after Set: %v", p)
	}
	s.Problem().F(0, []float64{1, 0, 0}, a)
	if a[1] != 350 {
		t.Errorf("after Set(heating, 350): rate of across at (1,0,0) = %v, want 350", a[1])
	}
	if err := s.Set("nope", 1); !errors.Is(err, ErrUnknown) {
		t.Errorf("Set(nope): %v", err)
	}
}

// TestHamiltonian checks Hamilton's equations from H, separability, the
// separable parts, and energy conservation of a symplectic-free run.
func TestHamiltonian(t *testing.T) {
	s, err := LoadSystem(strings.NewReader(docExamples(t)[1]))
	if err != nil {
		t.Fatal(err)
	}
	if s.Kind() != KindHamiltonian || !s.Separable() {
		t.Fatalf("crane load: kind %v separable %v, want a separable hamiltonian", s.Kind(), s.Separable())
	}
	if p := s.Params(); len(p) != 2 || p[0].Unit != "m/s^2" || p[1].Doc != "cable length" {
		t.Errorf("Params = %+v", p)
	}
	if u := s.Units(); len(u) != 2 || u[0] != "rad" || u[1] != "" {
		t.Errorf("Units = %q", u)
	}
	if per := s.Periods(); len(per) != 2 || per[0] != 2*math.Pi || per[1] != 0 {
		t.Errorf("Periods = %v", per)
	}
	p := s.Problem()
	if p.Split == nil {
		t.Fatal("no separable parts")
	}
	const g, L = 9.81, 12.0
	y := []float64{0.4, 0.7}
	d := make([]float64, 2)
	p.F(0, y, d)
	// Hamilton's equations of H = p²/(2L²) - gL cos q (exact identity):
	// q' = p/L², p' = -gL sin q.
	if want := 0.7 / (L * L); math.Abs(d[0]-want) > 1e-16 {
		t.Errorf("q' = %v, want %v", d[0], want)
	}
	if want := -g * L * math.Sin(0.4); math.Abs(d[1]-want) > 1e-13 {
		t.Errorf("p' = %v, want %v", d[1], want)
	}
	dt, dv := make([]float64, 1), make([]float64, 1)
	p.Split.DT(y[1:], dt)
	p.Split.DV(y[:1], dv)
	if dt[0] != d[0] || dv[0] != -d[1] {
		t.Errorf("parts (%v, %v) disagree with the field (%v, %v)", dt[0], dv[0], d[0], -d[1])
	}
	if h, want := p.Split.H(y[:1], y[1:]), 0.49/(2*L*L)-g*L*math.Cos(0.4); math.Abs(h-want) > 1e-13 {
		t.Errorf("H = %v, want %v", h, want)
	}
	// A non-separable H: a charged particle's p·q coupling.
	ns := `{"kind": "hamiltonian", "coordinates": [{"name": "q", "start": 1}], "momenta": [{"name": "p", "start": 0}],
		"energy": "p^2/2 + q^2/2 + 0.1*p*q"}`
	s2, err := LoadSystem(strings.NewReader(ns))
	if err != nil {
		t.Fatal(err)
	}
	if s2.Separable() || s2.Problem().Split != nil {
		t.Error("H with a p·q term reported separable")
	}
	got := s2.Formulas()
	want := []string{"p + 0.1*q", "-(q + 0.1*p)"}
	for i := range want {
		if got[i] != want[i] {
			t.Errorf("Hamilton's equation %d: %q, want %q", i, got[i], want[i])
		}
	}
}

// TestMap checks a map system against the logistic map written in Go
// (exact identity) and its Jacobian against finite differences.
func TestMap(t *testing.T) {
	s, err := LoadSystem(strings.NewReader(docExamples(t)[2]))
	if err != nil {
		t.Fatal(err)
	}
	m, err := s.Map()
	if err != nil {
		t.Fatal(err)
	}
	x, dst := []float64{0.2}, []float64{0}
	for range 100 {
		want := float64(3.7*x[0]) * (1 - x[0])
		m.Next(x, dst)
		if dst[0] != want {
			t.Fatalf("next(%v) = %v, want %v", x[0], dst[0], want)
		}
		j := mat.NewDense(1, 1, nil)
		m.Jacobian(x, j)
		if w := 3.7 * (1 - 2*x[0]); math.Abs(j.At(0, 0)-w) > 1e-14 {
			t.Fatalf("jacobian at %v = %v, want %v", x[0], j.At(0, 0), w)
		}
		x[0] = dst[0]
	}
	if s.Problem().F != nil {
		t.Error("a map's Problem has a vector field")
	}
	if _, err := (&System{kind: KindFlow}).Map(); !errors.Is(err, ErrKind) {
		t.Errorf("Map of a flow: %v", err)
	}
}

// TestBuiltinSymbolicJacobian checks that built-ins without a hand-written
// Jacobian get the symbolic one, compared with gonum's central differences
// (reference library: gonum diff/fd).
func TestBuiltinSymbolicJacobian(t *testing.T) {
	const tol = 1e-7 // central differences: error near 1e-8·|f'''|
	rng := rand.New(rand.NewPCG(33, 34))
	for _, name := range []string{"double-pendulum", "arenstorf", "kepler"} {
		s, err := Model(name)
		if err != nil {
			t.Fatal(err)
		}
		p := s.Problem()
		if p.Jac == nil {
			t.Fatalf("%s: no Jacobian", name)
		}
		n := len(p.Y0)
		for range 5 {
			y := make([]float64, n)
			for i := range y {
				y[i] = p.Y0[i] + 0.2*rng.NormFloat64()
			}
			got, want := mat.NewDense(n, n, nil), mat.NewDense(n, n, nil)
			p.Jac(0, y, got)
			fd.Jacobian(want, func(dst, x []float64) { p.F(0, x, dst) }, y, &fd.JacobianSettings{Formula: fd.Central})
			for i := 0; i < n; i++ {
				for j := 0; j < n; j++ {
					if g, w := got.At(i, j), want.At(i, j); math.Abs(g-w) > tol*math.Max(1, math.Abs(w)) {
						t.Errorf("%s: J[%d][%d] = %v, finite differences %v", name, i, j, g, w)
					}
				}
			}
		}
	}
}

// TestEvaluators checks the big.Float and double-double fields of every
// built-in against the float64 field: they compute the same model, so they
// agree to float64 rounding (1e-13 relative to max(1, |f|), a few ulps
// amplified by cancellation), and double-double agrees with 256-bit
// big.Float to 1e-27 (the double-double function accuracy of 1e-31
// amplified by the fields' cancellations).
func TestEvaluators(t *testing.T) {
	const tol64, tolDD = 1e-13, 1e-27
	for _, name := range Models() {
		s, _ := Model(name)
		if err := s.Set(firstParam(s), firstValue(s)*1.01); err != nil && len(s.Params()) > 0 {
			t.Fatal(err)
		}
		be, err := s.bigEval(256)
		if err != nil {
			t.Fatalf("%s: %v", name, err)
		}
		de, err := s.ddEval()
		if err != nil {
			t.Fatal(err)
		}
		y0 := s.Start()
		n := len(y0)
		f64 := make([]float64, n)
		if s.Kind() == KindMap {
			m, err := s.Map()
			if err != nil {
				t.Fatal(err)
			}
			m.Next(y0, f64) // the starts of the built-in maps need no wrapping
		} else {
			s.Problem().F(0.5, y0, f64)
		}
		by, bd := make([]*big.Float, n), make([]*big.Float, n)
		dy, ddv := make([]dd.Float, n), make([]dd.Float, n)
		for i, v := range y0 {
			by[i] = new(big.Float).SetPrec(256).SetFloat64(v)
			dy[i] = dd.Float{Hi: v}
		}
		if err := be.Eval(big.NewFloat(0.5), by, bd); err != nil {
			t.Fatal(err)
		}
		if err := de.Eval(dd.Float{Hi: 0.5}, dy, ddv); err != nil {
			t.Fatal(err)
		}
		for i := range f64 {
			w, _ := bd[i].Float64()
			if math.Abs(f64[i]-w) > tol64*math.Max(1, math.Abs(w)) {
				t.Errorf("%s: f[%d] float64 %v, big %v", name, i, f64[i], w)
			}
			diff := new(big.Float).Sub(ddv[i].Big(), bd[i])
			dv, _ := diff.Float64()
			if math.Abs(dv) > tolDD*math.Max(1, math.Abs(w)) {
				t.Errorf("%s: f[%d] double-double differs from big by %g", name, i, dv)
			}
		}
		if err := be.Eval(nil, by[:n-1], bd); !errors.Is(err, integrate.ErrDimension) {
			t.Errorf("%s: short state: %v", name, err)
		}
	}
}

func firstParam(s *System) string {
	if p := s.Params(); len(p) > 0 {
		return p[0].Name
	}
	return ""
}

func firstValue(s *System) float64 {
	if p := s.Params(); len(p) > 0 {
		return p[0].Value
	}
	return 0
}

// TestLoadErrors checks that bad files give a *FileError naming the field
// or the place, wrapping ErrSystemFile.
func TestLoadErrors(t *testing.T) {
	base := `{"kind": "flow", "parameters": [{"name": "k", "value": 2}], "variables": [{"name": "x", "start": 1, "rate": "-k*x"}]}`
	if _, err := LoadSystem(strings.NewReader(base)); err != nil {
		t.Fatalf("base file: %v", err)
	}
	cases := []struct {
		name, src, field, text string
		line                   int
	}{
		{"unknown field", `{"kind": "flow", "colour": 3}`, "", `unknown field "colour"`, 1},
		{"unknown var field", `{"kind": "flow", "variables": [{"name": "x", "start": 1, "rate": "x", "speed": 2}]}`, "", `unknown field "speed"`, 1},
		{"syntax", "{\"kind\": \"flow\",\n \"variables\": [}", "", "invalid character", 2},
		{"type", `{"kind": "flow", "variables": [{"name": "x", "start": "one", "rate": "x"}]}`, "variables.start", "cannot be a number", 1},
		{"empty", ``, "", "empty file", 1},
		// 1e999 exceeds the largest float64, about 1.8e308 (IEEE 754).
		{"out of range", "{\"kind\": \"flow\",\n \"variables\": [{\"name\": \"x\", \"start\": 1e999, \"rate\": \"x\"}]}", "variables.start", "1e999 is out of range", 2},
		{"csv", "t,x,y\n0,1,2\n", "", `not a system file: expected a JSON object`, 1},
		{"csv after blank lines", "\n\n t,x\n", "", `starts with "t,x", which looks like CSV`, 3},
		{"yaml", "kind: flow\n", "", `not a system file`, 1},
		{"json array", `[{"kind": "flow"}]`, "", "holds a JSON array", 1},
		{"json number", ` 42`, "", "holds a JSON number", 1},
		{"truncated", `{"kind": "flow"`, "", "ends inside", 1},
		{"trailing", base + ` {}`, "", "after the system object", 1},
		{"no kind", `{"variables": [{"name": "x", "start": 1, "rate": "x"}]}`, "kind", "missing", 0},
		{"bad kind", `{"kind": "ode"}`, "kind", `"ode" is not`, 0},
		{"no variables", `{"kind": "flow"}`, "variables", "at least one", 0},
		{"no start", `{"kind": "flow", "variables": [{"name": "x", "rate": "x"}]}`, "variables[0].start", "missing", 0},
		{"no rate", `{"kind": "flow", "variables": [{"name": "x", "start": 1}]}`, "variables[0].rate", "missing", 0},
		{"next in flow", `{"kind": "flow", "variables": [{"name": "x", "start": 1, "next": "x"}]}`, "variables[0].next", "not \"next\"", 0},
		{"rate in map", `{"kind": "map", "variables": [{"name": "x", "start": 1, "rate": "x"}]}`, "variables[0].rate", "not \"rate\"", 0},
		{"t in map", `{"kind": "map", "variables": [{"name": "x", "start": 1, "next": "x*t"}]}`, "variables[0].next", `unknown name "t"`, 0},
		{"bad name", `{"kind": "flow", "variables": [{"name": "2x", "start": 1, "rate": "x"}]}`, "variables[0].name", "not a name", 0},
		{"reserved", `{"kind": "flow", "variables": [{"name": "exp", "start": 1, "rate": "1"}]}`, "variables[0].name", "function", 0},
		{"time", `{"kind": "flow", "variables": [{"name": "t", "start": 1, "rate": "1"}]}`, "variables[0].name", "time", 0},
		{"duplicate", `{"kind": "flow", "parameters": [{"name": "x", "value": 1}], "variables": [{"name": "x", "start": 1, "rate": "1"}]}`, "parameters[0].name", "already used", 0},
		{"no value", `{"kind": "flow", "parameters": [{"name": "k"}], "variables": [{"name": "x", "start": 1, "rate": "1"}]}`, "parameters[0].value", "missing", 0},
		{"bad period", `{"kind": "flow", "variables": [{"name": "x", "start": 1, "rate": "1", "period": -1}]}`, "variables[0].period", "positive", 0},
		{"unknown name", `{"kind": "flow", "variables": [{"name": "x", "start": 1, "rate": "-kk*x"}]}`, "variables[0].rate", `unknown name "kk"`, 0},
		{"formula syntax", `{"kind": "flow", "variables": [{"name": "x", "start": 1, "rate": "x +"}]}`, "variables[0].rate", "column 4", 0},
		{"ham momenta", `{"kind": "hamiltonian", "coordinates": [{"name": "q", "start": 1}], "energy": "q^2"}`, "momenta", "0 momenta for 1", 0},
		{"ham energy", `{"kind": "hamiltonian", "coordinates": [{"name": "q", "start": 1}], "momenta": [{"name": "p", "start": 1}]}`, "energy", "missing", 0},
		{"ham rate", `{"kind": "hamiltonian", "coordinates": [{"name": "q", "start": 1, "rate": "q"}], "momenta": [{"name": "p", "start": 1}], "energy": "q"}`, "coordinates[0]", "remove rate", 0},
		{"ham energy syntax", `{"kind": "hamiltonian", "coordinates": [{"name": "q", "start": 1}], "momenta": [{"name": "p", "start": 1}], "energy": "p^2/2 + cos(q"}`, "energy", "expected , or )", 0},
		{"duplicate kind", `{"kind":"map","kind":"flow", "variables": [{"name": "x", "start": 1, "rate": "1"}]}`, "kind", `duplicate key "kind" (first at line 1, column 2)`, 1},
		{"duplicate rate", "{\"kind\": \"flow\", \"variables\": [{\"name\": \"x\", \"start\": 1, \"rate\": \"1\"},\n {\"name\": \"y\", \"start\": 1, \"rate\": \"1\", \"rate\": \"x\"}]}", "variables[1].rate", "line 2, column 41: duplicate key \"rate\" (first at line 2, column 28)", 2},
		{"upper-case key", `{"kind": "flow", "Kind": "map"}`, "Kind", `write "kind", not "Kind"`, 1},
		{"kelvin-sign key", "{\"\u212aind\": \"flow\"}", "\u212aind", `write "kind"`, 1},
		{"duplicate escaped key", `{"kind": "flow", "k\"q": 1, "k\"q": 2}`, "k\"q", "column 29", 1},
		{"flow with energy", `{"kind": "flow", "energy": "x", "variables": [{"name": "x", "start": 1, "rate": "1"}]}`, "kind", "belong to a hamiltonian", 0},
	}
	for _, c := range cases {
		_, err := LoadSystem(strings.NewReader(c.src))
		var fe *FileError
		if !errors.As(err, &fe) || !errors.Is(err, ErrSystemFile) {
			t.Errorf("%s: error %v, want a *FileError", c.name, err)
			continue
		}
		if fe.Field != c.field || fe.Line != c.line || !strings.Contains(err.Error(), c.text) {
			t.Errorf("%s: %q (field %q line %d), want field %q line %d containing %q", c.name, err, fe.Field, fe.Line, c.field, c.line, c.text)
		}
		if fe.Field == "" && fe.Line == 0 {
			t.Errorf("%s: error %q has no position", c.name, err)
		}
	}
	// The column of an out-of-range number is where the number starts.
	_, err := LoadSystem(strings.NewReader(`{"kind": "flow", "variables": [{"name": "x", "start": -1e400, "rate": "x"}]}`))
	if fe := (*FileError)(nil); !errors.As(err, &fe) || fe.Col != 55 { // 54 bytes precede "-1e400" (counted)
		t.Errorf("out of range: %v, want column 55, where -1e400 starts", err)
	}
	// Formula errors keep the formula position for errors.As.
	_, err = LoadSystem(strings.NewReader(`{"kind": "flow", "variables": [{"name": "x", "start": 1, "rate": "x*(1 - y)"}]}`))
	var pe *expr.ParseError
	if !errors.As(err, &pe) || pe.Col != 8 || !errors.Is(err, expr.ErrUnknown) {
		t.Errorf("unknown y: %v (as ParseError: %+v)", err, pe)
	}
}

// TestProblemAllocs checks that the formula field and Jacobian do not
// allocate per call.
func TestProblemAllocs(t *testing.T) {
	s, err := LoadSystem(strings.NewReader(docExamples(t)[0]))
	if err != nil {
		t.Fatal(err)
	}
	p := s.Problem()
	y, d := []float64{1, 2, 3}, make([]float64, 3)
	j := mat.NewDense(3, 3, nil)
	if n := testing.AllocsPerRun(100, func() { p.F(0, y, d) }); n != 0 {
		t.Errorf("F allocates %v times per call", n)
	}
	if n := testing.AllocsPerRun(100, func() { p.Jac(0, y, j) }); n != 0 {
		t.Errorf("Jac allocates %v times per call", n)
	}
}

// FuzzLoadSystem checks that no input panics LoadSystem or the systems it
// returns, and that every error has a place (a field or a line).
func FuzzLoadSystem(f *testing.F) {
	for _, s := range docExamples(f) {
		f.Add(s)
	}
	f.Add(`{"kind": "flow", "variables": [{"name": "x", "start": 1, "rate": "-x^2 + sin(t)"}]}`)
	f.Add(`{"kind": "hamiltonian", "coordinates": [{"name": "q", "start": 1}], "momenta": [{"name": "p", "start": 0}], "energy": "p^2/2 + q^4"}`)
	f.Add(`{"kind": "map", "variables": [{"name": "x", "start": 0.1, "next": "1 - 1.4*x^2 + y"}, {"name": "y", "start": 0, "next": "0.3*x"}]}`)
	f.Add(`{"kind": "flow", "variables": [{"name": "x", "start": 1e999, "rate": "x"}]}`)
	f.Add("\ufeff t,x,y\n0,1,2\n")
	f.Add(`[1, 2]`)
	f.Add(`{"kind":"map","kind":"flow","variables": [{"name": "x", "start": 1, "rate": "x"}]}`)
	f.Add(`{"kind":"map","parameters":[{"name":"growth","value":0}],"variables":[{"name":"a","start":0,"next":"growth"}]}`)
	f.Fuzz(func(t *testing.T, src string) {
		s, err := LoadSystem(strings.NewReader(src))
		if err != nil {
			var fe *FileError
			if !errors.As(err, &fe) {
				t.Fatalf("error %v is not a *FileError", err)
			}
			if fe.Field == "" && fe.Line == 0 {
				t.Fatalf("error %q has no place", err)
			}
			return
		}
		n := len(s.States)
		y := s.Start()
		switch s.Kind() {
		case KindMap:
			m, err := s.Map()
			if err != nil {
				t.Fatal(err)
			}
			m.Next(y, make([]float64, n))
			m.Jacobian(y, mat.NewDense(n, n, nil))
		default:
			p := s.Problem()
			p.F(0, y, make([]float64, n))
			p.Jac(0, y, mat.NewDense(n, n, nil))
			if p.Split != nil {
				p.Split.DT(y[n/2:], make([]float64, n/2))
				p.Split.DV(y[:n/2], make([]float64, n/2))
				p.Split.H(y[:n/2], y[n/2:])
			}
		}
		de, err := s.ddEval()
		if err != nil {
			t.Fatal(err)
		}
		dy := make([]dd.Float, n)
		for i, v := range y {
			dy[i] = dd.Float{Hi: v}
		}
		de.Eval(dd.Float{}, dy, make([]dd.Float, n))
		for _, fm := range s.Formulas() {
			if fm == "" {
				t.Fatal("empty formula")
			}
		}
		if n > 8 {
			return
		}
		be, err := s.bigEval(64)
		if err != nil {
			t.Fatal(err)
		}
		by := make([]*big.Float, n)
		for i, v := range y {
			by[i] = new(big.Float).SetFloat64(v)
		}
		be.Eval(new(big.Float), by, make([]*big.Float, n)) // errors (NaN) are fine, panics are not
		if s.Kind() != KindMap {
			ts, err := s.taylor(4)
			if err != nil {
				t.Fatal(err)
			}
			ts.Step(0, y, 0.01, make([]float64, n))
			td, err := s.taylorDD(4)
			if err != nil {
				t.Fatal(err)
			}
			td.Step(dd.Float{}, dy, dd.Float{Hi: 0.01}, make([]dd.Float, n))
		}
	})
}

// BenchmarkSolveLorenz integrates the convection loop to t = 20 with the
// built-in Go field and with the same equations read from a file; the
// ratio of the two ns/op is the end-to-end cost of the formula field.
func BenchmarkSolveLorenz(b *testing.B) {
	s, err := LoadSystem(strings.NewReader(docExamples(b)[0]))
	if err != nil {
		b.Fatal(err)
	}
	m, _ := Model("lorenz")
	set := &integrate.Settings{RelTol: 1e-9, AbsTol: 1e-9}
	for _, c := range []struct {
		name string
		p    integrate.Problem
	}{{"go", m.Problem()}, {"formula", s.Problem()}} {
		b.Run(c.name, func(b *testing.B) {
			b.ReportAllocs()
			for b.Loop() {
				if _, err := integrate.Solve(b.Context(), c.p, 20, nil, set); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}

// TestConcurrentModels builds and evaluates built-ins from several
// goroutines (they share the compiled catalog formulas); run with -race.
func TestConcurrentModels(t *testing.T) {
	done := make(chan error, 4)
	for g := range 4 {
		go func() {
			s, err := Model([]string{"lorenz", "kepler", "double-pendulum", "lorenz"}[g])
			if err != nil {
				done <- err
				return
			}
			p := s.Problem()
			n := len(p.Y0)
			d := make([]float64, n)
			j := mat.NewDense(n, n, nil)
			p.F(0, p.Y0, d)
			p.Jac(0, p.Y0, j)
			_ = s.Formulas()
			be, err := s.bigEval(128)
			if err == nil {
				y := make([]*big.Float, n)
				for i, v := range p.Y0 {
					y[i] = big.NewFloat(v)
				}
				err = be.Eval(new(big.Float), y, make([]*big.Float, n))
			}
			done <- err
		}()
	}
	for range 4 {
		if err := <-done; err != nil {
			t.Error(err)
		}
	}
}
