package integrate

import (
	"context"
	"crypto/sha256"
	"encoding/binary"
	"encoding/hex"
	"fmt"
	"hash"
	"math"
	"runtime"
	"testing"
)

// TestEveryGrid: grid times are t0 + i·dt computed by multiplication
// (compared bit for bit with float64(i)*dt + t0), the first sample is the
// initial state exactly, the last is at t1 exactly, and every sample equals
// the dense output At at its time.
func TestEveryGrid(t *testing.T) {
	cases := []struct {
		name       string
		t0, t1, dt float64
		n          int // expected samples (exact count)
	}{
		// 0.1 is not a binary fraction: a running sum would drift.
		{"tenths", 0.3, 10.3, 0.1, 101},
		{"uneven end", 0, 1, 0.3, 5}, // 0, 0.3, 0.6, 0.9, 1
		{"one interval", 2, 2.5, 1, 2},
		{"backward", 1, -2, 0.25, 13},
		{"large t", 1e6, 1e6 + 1, 1.0 / 3, 4},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			p := Problem{F: harmonic, T0: c.t0, Y0: []float64{1, 0}}
			sol, err := Solve(context.Background(), p, c.t1, nil, &Settings{Every: c.dt})
			if err != nil {
				t.Fatal(err)
			}
			if len(sol.Samples) != c.n {
				t.Fatalf("%d samples, want %d", len(sol.Samples), c.n)
			}
			dt := math.Copysign(c.dt, c.t1-c.t0)
			for i, smp := range sol.Samples[:c.n-1] {
				if want := float64(float64(i)*dt) + c.t0; smp.T != want { // unfused, as the grid
					t.Errorf("sample %d at %v, want %v bit for bit", i, smp.T, want)
				}
			}
			first, last := sol.Samples[0], sol.Samples[c.n-1]
			if first.Y[0] != 1 || first.Y[1] != 0 {
				t.Errorf("first sample %v, want the initial state", first.Y)
			}
			if last.T != c.t1 || last.Y[0] != sol.Final[0] || last.Y[1] != sol.Final[1] {
				t.Errorf("last sample (%v, %v), want (t1 %v, Final %v)", last.T, last.Y, c.t1, sol.Final)
			}
			for i, smp := range sol.Samples {
				y := sol.At(smp.T, nil)
				if y[0] != smp.Y[0] || y[1] != smp.Y[1] {
					t.Errorf("sample %d %v differs from At %v", i, smp.Y, y)
				}
			}
		})
	}
}

// TestTimesAndDropSteps: Settings.Times samples exactly at the given times;
// DropSteps keeps the samples, the crossings and the final state only.
func TestTimesAndDropSteps(t *testing.T) {
	p := Problem{F: harmonic, Y0: []float64{1, 0}}
	times := []float64{0, 0.5, 0.5, 1, math.Pi, 7}
	const tol = 1e-10
	// Global error over about one period at tol 1e-10 is near 1e-10
	// (measured); 1e-8 is a safe bound for the samples' accuracy.
	const sampleTol = 1e-8
	cr := Crossing{G: func(_ float64, y []float64) float64 { return y[0] }}
	for _, drop := range []bool{false, true} {
		sol, err := Solve(context.Background(), p, 7, nil, &Settings{RelTol: tol, AbsTol: tol, Times: times, DropSteps: drop, Crossings: []Crossing{cr}})
		if err != nil {
			t.Fatal(err)
		}
		if len(sol.Samples) != len(times) {
			t.Fatalf("drop %v: %d samples, want %d", drop, len(sol.Samples), len(times))
		}
		for i, smp := range sol.Samples {
			if smp.T != times[i] || math.Abs(smp.Y[0]-math.Cos(smp.T)) > sampleTol {
				t.Errorf("drop %v: sample %d (%v, %v), want (%v, cos = %v)", drop, i, smp.T, smp.Y[0], times[i], math.Cos(times[i]))
			}
		}
		if len(sol.Hits) != 2 { // pi/2, 3pi/2 (exact identity)
			t.Errorf("drop %v: %d hits, want 2", drop, len(sol.Hits))
		}
		if sol.End != 7 || len(sol.Final) != 2 {
			t.Errorf("drop %v: end %v final %v", drop, sol.End, sol.Final)
		}
		if drop {
			if len(sol.T) != 0 || len(sol.Y) != 0 || sol.At(1, nil) != nil {
				t.Errorf("DropSteps kept %d steps, At(1) = %v", len(sol.T), sol.At(1, nil))
			}
		}
	}
}

// TestAtStoredSteps: At at a stored step time returns the stored state bit
// for bit; outside [T0, End] (or NaN) it returns nil; a short dst is grown.
func TestAtStoredSteps(t *testing.T) {
	sol, err := Solve(context.Background(), Problem{F: lorenzField(), Y0: []float64{1, 1, 1}}, 2, nil, nil)
	if err != nil {
		t.Fatal(err)
	}
	dst := make([]float64, 1) // too short: must be grown
	for k, tk := range sol.T {
		got := sol.At(tk, dst)
		want := sol.Y[3*k : 3*k+3]
		if len(got) != 3 || got[0] != want[0] || got[1] != want[1] || got[2] != want[2] {
			t.Fatalf("At(T[%d]) = %v, stored %v", k, got, want)
		}
	}
	for _, tt := range []float64{-1e-9, math.Nextafter(2, 3), 3, math.NaN(), math.Inf(1)} {
		if y := sol.At(tt, nil); y != nil {
			t.Errorf("At(%v) = %v, want nil", tt, y)
		}
	}
	// Inside a step At is continuous: at both ends of each step's
	// interpolant it meets the stored states (Shampine's extension
	// interpolates y_n and y_n+1; exact identity up to rounding).
	const joinTol = 1e-13
	for k := 0; k+1 < len(sol.T); k++ {
		a := sol.At(math.Nextafter(sol.T[k+1], sol.T[k]), nil)
		for i := range a {
			if d := math.Abs(a[i] - sol.Y[3*(k+1)+i]); d > joinTol*math.Max(1, math.Abs(a[i])) {
				t.Fatalf("step %d: interpolant at its end %v, stored %v", k, a, sol.Y[3*(k+1):3*(k+2)])
			}
		}
	}
}

// TestDeterminism: two runs give bit-identical steps, samples, crossings and
// counts.
func TestDeterminism(t *testing.T) {
	run := func() *Solution {
		cr := Crossing{G: func(_ float64, y []float64) float64 { return y[0] }}
		sol, err := Solve(context.Background(), Problem{F: lorenzField(), Y0: []float64{1, 1, 1}}, 30, nil, &Settings{RelTol: 1e-9, AbsTol: 1e-9, Every: 0.01, Crossings: []Crossing{cr}})
		if err != nil {
			t.Fatal(err)
		}
		return sol
	}
	a, b := run(), run()
	same := func(x, y []float64) bool {
		if len(x) != len(y) {
			return false
		}
		for i := range x {
			if math.Float64bits(x[i]) != math.Float64bits(y[i]) {
				return false
			}
		}
		return true
	}
	if a.Stats != b.Stats || !same(a.T, b.T) || !same(a.Y, b.Y) || !same(a.Final, b.Final) {
		t.Fatalf("steps differ between runs: %+v vs %+v", a.Stats, b.Stats)
	}
	if len(a.Samples) != len(b.Samples) || len(a.Hits) != len(b.Hits) || len(a.Hits) == 0 {
		t.Fatalf("%d/%d samples, %d/%d hits", len(a.Samples), len(b.Samples), len(a.Hits), len(b.Hits))
	}
	for i := range a.Samples {
		if a.Samples[i].T != b.Samples[i].T || !same(a.Samples[i].Y, b.Samples[i].Y) {
			t.Fatalf("sample %d differs", i)
		}
	}
	for i := range a.Hits {
		if a.Hits[i].T != b.Hits[i].T || !same(a.Hits[i].Y, b.Hits[i].Y) {
			t.Fatalf("hit %d differs", i)
		}
	}
}

// TestStepperAllocs: after set-up, Stepper.Next, Stepper.Dense and
// Solution.At (with a dst of the right size) do not allocate.
func TestStepperAllocs(t *testing.T) {
	st, err := NewStepper(Problem{F: lorenzField(), Y0: []float64{1, 1, 1}}, 1e6, DormandPrince54, &Settings{RelTol: 1e-8, AbsTol: 1e-8})
	if err != nil {
		t.Fatal(err)
	}
	ctx := context.Background()
	dst := make([]float64, 3)
	if a := testing.AllocsPerRun(100, func() { st.Next(ctx) }); a != 0 {
		t.Errorf("Stepper.Next: %v allocations per step, want 0", a)
	}
	if a := testing.AllocsPerRun(100, func() {
		st.Next(ctx)
		st.Dense(st.T()-0.5*st.H(), dst)
	}); a != 0 {
		t.Errorf("Stepper.Next+Dense: %v allocations per step, want 0", a)
	}
	sol, err := Solve(ctx, Problem{F: lorenzField(), Y0: []float64{1, 1, 1}}, 5, nil, nil)
	if err != nil {
		t.Fatal(err)
	}
	if a := testing.AllocsPerRun(100, func() { sol.At(2.5, dst) }); a != 0 {
		t.Errorf("Solution.At: %v allocations per call, want 0", a)
	}
	if st.Err() != nil || st.Stats().Accepted < 200 {
		t.Fatalf("stepper stopped: %v after %d steps", st.Err(), st.Stats().Accepted)
	}
}

// TestStepperMatchesSolve: the Stepper and Solve take the same steps, the
// Stepper lands on t1 exactly, and Dense agrees with Solution.At.
func TestStepperMatchesSolve(t *testing.T) {
	p := Problem{F: lorenzField(), Y0: []float64{1, 1, 1}}
	sol, err := Solve(context.Background(), p, 5, nil, nil)
	if err != nil {
		t.Fatal(err)
	}
	st, err := NewStepper(p, 5, nil, nil)
	if err != nil {
		t.Fatal(err)
	}
	if st.Dense(0, nil) != nil {
		t.Errorf("Dense before the first step is not nil")
	}
	k := 0
	for st.Next(context.Background()) {
		k++
		if st.T() != sol.T[k] || st.Y()[0] != sol.Y[3*k] {
			t.Fatalf("step %d: stepper at %v, solve at %v", k, st.T(), sol.T[k])
		}
		mid := st.T() - 0.5*st.H()
		a, b := st.Dense(mid, nil), sol.At(mid, nil)
		if a[0] != b[0] || a[1] != b[1] || a[2] != b[2] {
			t.Fatalf("step %d: Dense %v, At %v", k, a, b)
		}
		if st.Dense(st.T()+st.H(), nil) != nil {
			t.Fatalf("Dense outside the last step is not nil")
		}
	}
	if st.Err() != nil || !st.Done() || st.T() != 5 || k != len(sol.T)-1 || st.Stats() != sol.Stats {
		t.Fatalf("stepper ended at %v after %d steps (%v), solve %d", st.T(), k, st.Err(), len(sol.T)-1)
	}
	if st.Next(context.Background()) {
		t.Errorf("Next after t1 returned true")
	}
}

// TestControllerExponents checks log2Ctl and exp2Ctl against the standard
// library (math.Log2, math.Exp2: reference library) over the ranges the
// controller uses: err² in [1e-20, 1e300] and exponents in [-200, 200].
func TestControllerExponents(t *testing.T) {
	// Truncation bounds from the polynomials (see log2Ctl, exp2Ctl) plus a
	// few ulps of rounding.
	const (
		log2AbsTol = 2e-6   // |ln m| <= 0.347 times 3.7e-6, in log2 units
		exp2RelTol = 3.5e-6 // e^|u|·u⁶/6! for |u| <= ln(2)/2
	)
	var worstL, worstE float64
	for i := 0; i <= 200000; i++ {
		x := math.Pow(10, -20+320*float64(i)/200000)
		if d := math.Abs(log2Ctl(x) - math.Log2(x)); d > worstL {
			worstL = d
		}
		u := -200 + 400*float64(i)/200000
		if d := math.Abs(exp2Ctl(u)-math.Exp2(u)) / math.Exp2(u); d > worstE {
			worstE = d
		}
	}
	// Powers of two and their neighbours hit the range reduction's edges.
	for k := -66; k <= 996; k++ {
		for _, x := range []float64{math.Ldexp(1, k), math.Nextafter(math.Ldexp(1, k), 0), math.Ldexp(math.Sqrt2, k)} {
			if d := math.Abs(log2Ctl(x) - math.Log2(x)); d > worstL {
				worstL = d
			}
		}
		if k >= -200 && k <= 200 {
			for _, u := range []float64{float64(k), float64(k) + 0.5, math.Nextafter(float64(k)+0.5, 0)} {
				if d := math.Abs(exp2Ctl(u)-math.Exp2(u)) / math.Exp2(u); d > worstE {
					worstE = d
				}
			}
		}
	}
	t.Logf("worst log2 abs error %.3g, exp2 rel error %.3g", worstL, worstE)
	if worstL > log2AbsTol {
		t.Errorf("log2Ctl: worst abs error %.3g, want <= %g", worstL, log2AbsTol)
	}
	if worstE > exp2RelTol {
		t.Errorf("exp2Ctl: worst rel error %.3g, want <= %g", worstE, exp2RelTol)
	}
	if log2Ctl(1) != 0 || exp2Ctl(0) != 1 {
		t.Errorf("log2Ctl(1) = %v, exp2Ctl(0) = %v, want 0 and 1", log2Ctl(1), exp2Ctl(0))
	}
	if exp2Ctl(-2000) != 0 || !math.IsInf(exp2Ctl(2000), 1) {
		t.Errorf("exp2Ctl out of range")
	}
}

// TestPowTable checks the controller's table power x^(-a) against
// math.Pow (standard library: reference) on the whole table range, for the
// default exponents of DormandPrince54 (a = Alpha/2 = 0.085 and
// a = -Beta/2 = -0.02) and for others a user may set.
func TestPowTable(t *testing.T) {
	cases := []struct{ a float64 }{{0.085}, {-0.02}, {0}, {0.0625}, {0.25}, {0.5}, {1}, {-0.5}}
	for _, c := range cases {
		tb := newPowTable(c.a)
		var worst float64
		check := func(x float64) {
			got, want := tb.pow(x), math.Pow(x, -c.a)
			if d := math.Abs(got-want) / want; d > worst {
				worst = d
			}
		}
		for i := 0; i <= 100000; i++ {
			check(math.Exp2(ptKMin + float64(ptKMax+1-ptKMin)*float64(i)/100001))
		}
		for k := ptKMin; k <= ptKMax; k++ {
			for j := 0; j <= ptJ; j++ {
				x := math.Ldexp(1+float64(j)/ptJ, k)
				if k == ptKMax && j == ptJ {
					x = math.Nextafter(x, 0)
				}
				check(x)
				if k > ptKMin || j > 0 {
					check(math.Nextafter(x, 0))
				}
			}
		}
		// Truncation bound |a(a+1)(a+2)/6|·|r|³ with |r| <= 1/65 (see
		// powTable), 5% for the rounding of the table entries, plus ulps.
		relTol := 1.05*math.Abs(c.a*(c.a+1)*(c.a+2)/6)/(65*65*65) + 1e-15
		t.Logf("a = %g: worst relative error %.3g (bound %.3g)", c.a, worst, relTol)
		if worst > relTol {
			t.Errorf("a = %g: worst relative error %.3g, want <= %.3g", c.a, worst, relTol)
		}
	}
	// The set-up helpers are accurate to a few ulps (standard library as
	// reference).
	for i := 0; i <= 1000; i++ {
		m := 1 + float64(i)/1000
		if d := math.Abs(log2Prec(m) - math.Log2(m)); d > 4e-16 {
			t.Errorf("log2Prec(%v) off by %.2g", m, d)
		}
		x := -1000 + 2*float64(i)
		if d := math.Abs(exp2Prec(x)-math.Exp2(x)) / math.Exp2(x); d > 1e-15 {
			t.Errorf("exp2Prec(%v) off by %.2g relative", x, d)
		}
	}
}

// goldenLorenzBits is the SHA-256 of every bit of two Lorenz runs (steps,
// samples, crossings, At, counts; see lorenzBits). It is the same on amd64
// and arm64, checked with
//
//	GOARCH=arm64 go test -c -o /tmp/i.test ./integrate
//	qemu-aarch64 /tmp/i.test -test.run GoldenBits
//
// (removing one float64() from the first stage of DormandPrince54 makes the
// arm64 hash differ and leaves amd64's unchanged). A change means the
// arithmetic changed: on purpose (update the constant, and say why in the
// commit) or by accident (a fused multiply-add, a new summation order).
const goldenLorenzBits = "42cd85b728edc7fd77bd08d2a278aec4f6af2c0f44fbdea094e76f9c3e5d7ed1"

// lorenzBits hashes Lorenz solves on [0, 30] at tol 1e-9 with samples
// every 0.01 and the crossings of x = 0, by DormandPrince54 and by
// DormandPrince853 (whose first step once differed across architectures,
// through math.Pow).
func lorenzBits(t *testing.T) string {
	h := sha256.New()
	for _, m := range []Method{DormandPrince54, DormandPrince853} {
		hashLorenz(t, h, m)
	}
	return hex.EncodeToString(h.Sum(nil))
}

// hashLorenz writes the bits of one Lorenz solve by m into h.
func hashLorenz(t *testing.T, h hash.Hash, m Method) {
	cr := Crossing{G: func(_ float64, y []float64) float64 { return y[0] }}
	sol, err := Solve(context.Background(), Problem{F: lorenzField(), Y0: []float64{1, 1, 1}}, 30, m, &Settings{RelTol: 1e-9, AbsTol: 1e-9, Every: 0.01, Crossings: []Crossing{cr}})
	if err != nil {
		t.Fatal(err)
	}
	put := func(v ...float64) {
		for _, x := range v {
			_ = binary.Write(h, binary.LittleEndian, math.Float64bits(x))
		}
	}
	put(sol.T...)
	put(sol.Y...)
	for _, s := range sol.Samples {
		put(s.T)
		put(s.Y...)
	}
	for _, c := range sol.Hits {
		put(c.T)
		put(c.Y...)
	}
	for _, tt := range []float64{0.123, 7.77, 29.9} {
		put(sol.At(tt, nil)...)
	}
	fmt.Fprintf(h, "%d %d %d", sol.Stats.Evaluations, sol.Stats.Accepted, sol.Stats.Rejected)
}

// TestGoldenBits: same input, same bits, on every architecture (DESIGN.md
// determinism policy; the golden value was computed on amd64).
func TestGoldenBits(t *testing.T) {
	if got := lorenzBits(t); got != goldenLorenzBits {
		t.Errorf("Lorenz run hashes to %s, golden %s (%s/%s)", got, goldenLorenzBits, runtime.GOOS, runtime.GOARCH)
	}
}

// TestSharedPowTable: a shared table is the table newPowTable builds (the
// same bits, an exact identity: both run the same code on the same a), the
// same pointer on the second call, and exponents past the kept ones still
// get correct tables, also when asked for from several goroutines.
func TestSharedPowTable(t *testing.T) {
	same := func(a float64, got *powTable) {
		t.Helper()
		if want := newPowTable(a); *got != *want {
			t.Errorf("sharedPowTable(%g) differs from newPowTable", a)
		}
	}
	for _, a := range []float64{0.085, -0.02, 0, 1.0 / 16} {
		t1, t2 := sharedPowTable(a), sharedPowTable(a)
		same(a, t1)
		if t1 != t2 {
			t.Errorf("sharedPowTable(%g): a second table was built", a)
		}
	}
	done := make(chan struct{})
	for g := 0; g < 4; g++ {
		go func() {
			defer func() { done <- struct{}{} }()
			for i := 0; i < 3*powTableKeep; i++ {
				a := 0.001 * float64(i+1)
				if *sharedPowTable(a) != *newPowTable(a) {
					t.Errorf("sharedPowTable(%g) differs from newPowTable", a)
				}
			}
		}()
	}
	for g := 0; g < 4; g++ {
		<-done
	}
	var kept int
	powTables.Range(func(_, _ any) bool { kept++; return true }) // a count only
	if k := powTablesKept.Load(); kept > powTableKeep || int(k) != kept {
		t.Errorf("%d tables kept (counted %d), want at most %d", kept, k, powTableKeep)
	}
}
