package plumb

import (
	"context"
	"fmt"
	"strings"
	"testing"

	"github.com/stretchr/testify/require"
	"gonum.org/v1/gonum/mat"

	"github.com/plumbdyn/plumb/integrate"
	"github.com/plumbdyn/plumb/internal/expr"
)

// chainFile returns a flow file whose one rate is "x op x op ... x", with
// n operators, or as many as fit in size bytes when n < 0.
func chainFile(op string, n, size int) string {
	head, tail := `{"kind": "flow", "variables": [{"name": "x", "start": 1, "rate": "x`, `"}]}`
	if n < 0 {
		n = (size - len(head) - len(tail)) / (len(op) + 1)
	}
	var b strings.Builder
	b.Grow(len(head) + n*(len(op)+1) + len(tail))
	b.WriteString(head)
	for range n {
		b.WriteString(op)
		b.WriteString("x")
	}
	b.WriteString(tail)
	return b.String()
}

// l96File returns the Lorenz-96 system with n sites written out, one rate
// per site, x_i' = (x_{i+1} - x_{i-2})·x_{i-1} - x_i + F (E. N. Lorenz,
// Predictability: a problem partly solved, ECMWF seminar 1996), F = 8, all
// sites at F except x0 = F + 0.01.
func l96File(n int) string {
	var b strings.Builder
	b.WriteString(`{"kind": "flow", "parameters": [{"name": "F", "value": 8}], "variables": [`)
	for i := range n {
		if i > 0 {
			b.WriteString(",\n")
		}
		start := 8.0
		if i == 0 {
			start = 8.01
		}
		fmt.Fprintf(&b, `{"name": "x%d", "start": %g, "rate": "(x%d - x%d)*x%d - x%d + F"}`, i, start, (i+1)%n, (i-2+n)%n, (i-1+n)%n, i)
	}
	b.WriteString("]}")
	return b.String()
}

// TestLongFormulas loads rates that are one chain of products or sums. At
// the file size limit they exceed the node limit and are refused with a
// message naming the field and the limit (each takes one to four seconds
// and about 200 MB; skipped with -short). A chain of 300 000 operations is within the
// limits (with its derivative, 600 000 nodes for the product) and compiles;
// its value and derivative at x = 1 are exact identities (every operation
// is exact there).
func TestLongFormulas(t *testing.T) {
	for _, op := range []string{"*", "+"} {
		if !testing.Short() {
			src := chainFile(op, -1, maxFileSize)
			require.LessOrEqual(t, len(src), maxFileSize)
			_, err := LoadSystem(strings.NewReader(src))
			var fe *FileError
			require.ErrorAs(t, err, &fe, "chain of %q at the size limit", op)
			require.ErrorIs(t, err, expr.ErrTooLarge)
			require.Equal(t, "variables[0].rate", fe.Field)
			require.Contains(t, err.Error(), fmt.Sprint(maxNodes))
			require.Less(t, len(err.Error()), 1000, "the message shows a window of the formula, not all of it")
		}
		const n = 300_000
		s, err := LoadSystem(strings.NewReader(chainFile(op, n, 0)))
		require.NoError(t, err, "chain of %q with %d operations", op, n)
		p := s.Problem()
		d := make([]float64, 1)
		p.F(0, []float64{1}, d)
		j := mat.NewDense(1, 1, nil)
		p.Jac(0, []float64{1}, j)
		value, slope := 1.0, float64(n+1) // x^(n+1) at 1 (exact identity)
		if op == "+" {
			value = n + 1 // (n+1)·x at 1 (exact identity)
		}
		require.Equal(t, value, d[0], "chain of %q at x = 1 (exact identity)", op)
		require.Equal(t, slope, j.At(0, 0), "derivative of the chain of %q at x = 1 (exact identity)", op)
	}
}

// TestJacobianTooLarge checks that a rate whose derivatives exceed the
// work limit is refused, naming the rate: the sum of n states is walked
// once per state it uses, about n² steps.
func TestJacobianTooLarge(t *testing.T) {
	const n = 3000 // 3000 walks of about 6000 nodes: 1.8e7 > maxDiffWork
	var b strings.Builder
	b.WriteString(`{"kind": "flow", "variables": [`)
	for i := range n {
		if i > 0 {
			b.WriteString(", ")
		}
		rate := "0"
		if i == n-1 {
			terms := make([]string, n)
			for k := range terms {
				terms[k] = fmt.Sprintf("x%d", k)
			}
			rate = strings.Join(terms, " + ")
		}
		fmt.Fprintf(&b, `{"name": "x%d", "start": 1, "rate": %q}`, i, rate)
	}
	b.WriteString("]}")
	_, err := LoadSystem(strings.NewReader(b.String()))
	var fe *FileError
	require.ErrorAs(t, err, &fe)
	require.ErrorIs(t, err, expr.ErrTooLarge)
	require.Equal(t, fmt.Sprintf("variables[%d].rate", n-1), fe.Field)
	require.Contains(t, err.Error(), fmt.Sprint(maxDiffWork))
}

// TestLorenz96Sparse loads Lorenz-96 with 1000 sites (10 000 with the long
// tests) and checks the field and the sparse symbolic Jacobian against the
// formulas written out: J[i][i+1] = x_{i-1}, J[i][i-2] = -x_{i-1},
// J[i][i-1] = x_{i+1} - x_{i-2}, J[i][i] = -1 and zero elsewhere (exact
// identities: one rounding at most, the same in both), then solves one
// time unit.
func TestLorenz96Sparse(t *testing.T) {
	sizes := []int{1000}
	if !testing.Short() {
		sizes = append(sizes, 10_000)
	}
	for _, n := range sizes {
		s, err := LoadSystem(strings.NewReader(l96File(n)))
		require.NoError(t, err)
		p := s.Problem()
		y := make([]float64, n)
		for i := range y {
			y[i] = 8 + float64(i%7)/8
		}
		at := func(i int) float64 { return y[(i+n)%n] }
		d := make([]float64, n)
		p.F(0, y, d)
		for i := range n {
			want := (at(i+1)-at(i-2))*at(i-1) - at(i) + 8
			require.Equal(t, want, d[i], "rate %d of %d (the formula written out)", i, n)
		}
		if n <= 1000 { // a dense n×n matrix: 8 MB here, 800 MB at 10 000
			j := mat.NewDense(n, n, nil)
			j.Set(0, n/2, 99) // the Jacobian must clear what it does not set
			p.Jac(0, y, j)
			for i := range n {
				want := map[int]float64{(i + 1) % n: at(i - 1), (i - 2 + n) % n: -at(i - 1), (i - 1 + n) % n: at(i+1) - at(i-2), i: -1}
				for k := range n {
					if got := j.At(i, k); got != want[k] {
						t.Fatalf("J[%d][%d] of %d = %v, want %v (the derivative written out)", i, k, n, got, want[k])
					}
				}
			}
		}
		sol, err := integrate.Solve(context.Background(), p, 1, nil, &integrate.Settings{DropSteps: true})
		require.NoError(t, err)
		require.Equal(t, 1.0, sol.End)
	}
}

// BenchmarkLoadLorenz96 loads Lorenz-96 with 10 000 sites from its file
// (1 MB) and solves one time unit with the default method and settings.
func BenchmarkLoadLorenz96(b *testing.B) {
	src := l96File(10_000)
	b.ReportAllocs()
	for b.Loop() {
		s, err := LoadSystem(strings.NewReader(src))
		if err != nil {
			b.Fatal(err)
		}
		if _, err := integrate.Solve(context.Background(), s.Problem(), 1, nil, &integrate.Settings{DropSteps: true}); err != nil {
			b.Fatal(err)
		}
	}
}

// TestZeroJacobian checks systems whose Jacobian has no entry that is not
// structurally zero (the fuzzer found a map whose Jacobian method indexed
// an empty list): the matrix is cleared to zeros (exact: the derivative of
// a constant).
func TestZeroJacobian(t *testing.T) {
	for _, src := range []string{
		`{"kind": "map", "parameters": [{"name": "growth", "value": 0}], "variables": [{"name": "a", "start": 0, "next": "growth"}]}`,
		`{"kind": "flow", "variables": [{"name": "a", "start": 0, "rate": "sin(t)"}, {"name": "b", "start": 0, "rate": "2"}]}`,
	} {
		s, err := LoadSystem(strings.NewReader(src))
		require.NoError(t, err)
		n := len(s.States)
		j := mat.NewDense(n, n, nil)
		for i := range n {
			j.Set(i, 0, 7)
		}
		if s.Kind() == KindMap {
			m, err := s.Map()
			require.NoError(t, err)
			m.Jacobian(s.Start(), j)
		} else {
			s.Problem().Jac(0.5, s.Start(), j)
		}
		require.True(t, mat.Equal(j, mat.NewDense(n, n, nil)), "Jacobian of %s:\n%v", src, mat.Formatted(j))
	}
}

// TestFormulasCut checks that the derived formulas of a Hamiltonian whose
// energy is a long product (H = p²/2 + q·q·…·q, 20 000 factors: written out,
// ∂H/∂q would be about 4·10^8 bytes) are cut at maxFormulaText and marked,
// while the short one is whole.
func TestFormulasCut(t *testing.T) {
	const factors = 20_000
	energy := "p^2/2 + q" + strings.Repeat("*q", factors-1)
	src := fmt.Sprintf(`{"kind": "hamiltonian", "coordinates": [{"name": "q", "start": 1}], "momenta": [{"name": "p", "start": 0}], "energy": %q}`, energy)
	s, err := LoadSystem(strings.NewReader(src))
	require.NoError(t, err)
	f := s.Formulas()
	require.Len(t, f, 2)
	require.Equal(t, "p", f[0], "∂H/∂p = p (exact)")
	require.True(t, strings.HasSuffix(f[1], " ..."), "the long formula is marked as cut")
	require.LessOrEqual(t, len(f[1]), maxFormulaText+200, "cut near the limit (one number or name past it at most)")
}
