//go:build amd64 && !purego

package integrate

import (
	"context"
	"encoding/binary"
	"math"
	"math/rand/v2"
	"os"
	"regexp"
	"slices"
	"strconv"
	"strings"
	"testing"
	"time"

	"github.com/plumbdyn/plumb/internal/simd"
)

// dp54KernCase is one trial step's inputs: y, k1, rtol, atol and the six
// values F returns (k2..k7), each of length n, and h.
type dp54KernCase struct {
	h                 float64
	y, k1, rtol, atol []float64
	ks                [6][]float64
}

// dp54KernRun is what one trial step produced: the err² it returned, y1,
// the six arguments F saw (Y_2..Y_5, the stiffness argument, y1) and the
// error terms it left in the work space.
type dp54KernRun struct {
	sum      float64
	y1       []float64
	args     [6][]float64
	pw, ew   []float64
	ysti, k6 []float64
}

// dp54Path is one way through attemptSq: the Go loops, the SSE2 kernels
// or the AVX2 kernels.
type dp54Path int

const (
	pathGo dp54Path = iota
	pathSSE2
	pathAVX2
)

func (p dp54Path) String() string { return [...]string{"go", "sse2", "avx2"}[p] }

// dp54KernPaths are the kernel paths the tests compare with the Go loops.
var dp54KernPaths = []dp54Path{pathSSE2, pathAVX2}

// useDP54Path makes the schemes set up from now on take path p, from
// dimension 1 on for the kernels, and returns the function that restores
// the previous choice.
func useDP54Path(p dp54Path) (restore func()) {
	oldMin, oldAVX, oldAVXMin := dp54KernMin, simd.AVX2, dp54KernMinAVX2
	dp54KernMin, dp54KernMinAVX2 = 1, 1
	simd.AVX2 = p == pathAVX2
	if p == pathGo {
		dp54KernMin, dp54KernMinAVX2 = math.MaxInt, math.MaxInt
	}
	return func() { dp54KernMin, simd.AVX2, dp54KernMinAVX2 = oldMin, oldAVX, oldAVXMin }
}

// skipWithoutAVX2 skips t, saying so, when path is the AVX2 one and the
// CPU cannot run it.
func skipWithoutAVX2(t testing.TB, p dp54Path) {
	t.Helper()
	if p == pathAVX2 && !simd.HasAVX2() {
		t.Skip("this CPU has no AVX2 (or the OS does not save its registers): the AVX2 kernels are not checked here")
	}
}

// schemePath says which path a DormandPrince54 scheme takes.
func schemePath(sc scheme) dp54Path {
	switch sc.(type) {
	case *dp54AVX:
		return pathAVX2
	case *dp54Vec:
		return pathSSE2
	}
	return pathGo
}

// runDP54 takes one trial step of c through attemptSq along path p and
// reports which path ran. F hands out c.ks in turn and records its
// arguments.
func runDP54(c *dp54KernCase, p dp54Path) (dp54KernRun, dp54Path) {
	n := len(c.y)
	var r dp54KernRun
	call := 0
	f := func(_ float64, x, dx []float64) {
		r.args[call] = append([]float64(nil), x...)
		copy(dx, c.ks[call])
		call++
	}
	defer useDP54Path(p)()
	sc, err := dopri54{}.newScheme(&Problem{F: f, Y0: c.y}, n)
	if err != nil {
		panic(err)
	}
	var w *dp54Work
	switch s := sc.(type) {
	case *dp54Work:
		w = s
	case *dp54Vec:
		w = s.dp54Work
	case *dp54AVX:
		w = s.dp54Work
	}
	r.y1 = make([]float64, n)
	k7 := make([]float64, n)
	r.sum, _ = sc.(sqAttempter).attemptSq(0.5, c.h, c.y, c.k1, r.y1, k7, c.rtol, c.atol)
	r.pw, r.ew = w.pw[:n], w.ew[:n]
	r.ysti, r.k6 = w.ysti[:n], w.k6[:n]
	return r, schemePath(sc)
}

// sameFloat reports whether a and b have the same bits, or are both NaN.
// NaN payloads are not compared: which operand's payload an x86 addition
// of two NaNs keeps depends on the order of its operands, which the Go
// compiler chooses freely for a commutative operation (and arm64 keeps
// other payloads again), so the Go loops themselves do not define them.
func sameFloat(a, b float64) bool {
	return math.Float64bits(a) == math.Float64bits(b) || (math.IsNaN(a) && math.IsNaN(b))
}

// checkDP54Kern compares the kernels of path p with the Go loops of
// attemptSq, value by value (exact identity: same operations, same order).
func checkDP54Kern(t *testing.T, c *dp54KernCase, p dp54Path) {
	t.Helper()
	n := len(c.y)
	goRun, ran := runDP54(c, pathGo)
	if ran != pathGo {
		t.Fatalf("n=%d: the Go loops were asked for, the %v kernels ran", n, ran)
	}
	asm, ran := runDP54(c, p)
	want := pathGo
	if n > 0 {
		want = p
	}
	if ran != want {
		t.Fatalf("n=%d: the %v path ran, want %v (the %v kernels from n = 1 on)", n, ran, want, p)
	}
	if !sameFloat(goRun.sum, asm.sum) {
		t.Fatalf("n=%d h=%v: err² %v (%#x) from the %v kernels, %v (%#x) from the Go loops",
			n, c.h, asm.sum, math.Float64bits(asm.sum), p, goRun.sum, math.Float64bits(goRun.sum))
	}
	cmp := func(what string, got, want []float64) {
		t.Helper()
		if len(got) != len(want) {
			t.Fatalf("n=%d: %s has %d values from the %v kernels, %d from the Go loops", n, what, len(got), p, len(want))
		}
		for i := range want {
			if !sameFloat(got[i], want[i]) {
				t.Fatalf("n=%d h=%v: %s[%d] = %v (%#x) from the %v kernels, %v (%#x) from the Go loops",
					n, c.h, what, i, got[i], math.Float64bits(got[i]), p, want[i], math.Float64bits(want[i]))
			}
		}
	}
	cmp("y1", asm.y1, goRun.y1)
	for j, name := range []string{"Y2", "Y3", "Y4", "Y5", "Y6", "F's argument y1"} {
		cmp(name, asm.args[j], goRun.args[j])
	}
	cmp("pw", asm.pw, goRun.pw)
	cmp("ew", asm.ew, goRun.ew)
	cmp("ysti", asm.ysti, goRun.ysti)
	cmp("k6", asm.k6, goRun.k6)
}

// kernValue draws a value for the kernel tests: mostly everyday sizes,
// sometimes any bit pattern, and the special values NaN (two payloads),
// ±Inf, ±0, subnormals and the largest finite values.
func kernValue(rng *rand.Rand) float64 {
	switch rng.IntN(16) {
	case 0:
		return math.Float64frombits(rng.Uint64())
	case 1:
		specials := []float64{math.NaN(), math.Float64frombits(0x7ff0000000000001), math.Float64frombits(0xfff8000000000123),
			math.Inf(1), math.Inf(-1), 0, math.Copysign(0, -1), math.MaxFloat64, -math.MaxFloat64}
		return specials[rng.IntN(len(specials))]
	case 2:
		return math.Float64frombits(rng.Uint64()&(1<<52-1) | rng.Uint64()&(1<<63)) // subnormal
	default:
		return (rng.Float64() - 0.5) * float64(uint64(1)<<rng.IntN(20)) / 1024
	}
}

// kernTolerance draws a tolerance: usually positive and small, sometimes
// any value kernValue gives.
func kernTolerance(rng *rand.Rand) float64 {
	if rng.IntN(8) == 0 {
		return kernValue(rng)
	}
	return math.Ldexp(1, -rng.IntN(40))
}

// kernPlain draws an everyday value of moderate size (within ±8), for
// trial steps whose sums stay finite: with one in eight values special, a
// step of 13 or more components almost always has an infinite or NaN
// err², in which the order of its terms no longer shows.
func kernPlain(rng *rand.Rand) float64 {
	return (2*rng.Float64() - 1) * float64(uint64(1)<<rng.IntN(4))
}

// dp54KernLengths are the lengths the bit tests try: every one from 0 to
// 40 (whole pairs and quads and every remainder; from 20 on the AVX2
// kernels read their first quads with plain loads and the last 16 to 19
// components split, SPLITAT in the .s file), and longer ones.
func dp54KernLengths() []int {
	var ns []int
	for n := 0; n <= 40; n++ {
		ns = append(ns, n)
	}
	return append(ns, 64, 67, 68, 69, 70, 71, 72, 73, 131, 134)
}

// TestDP54KernBits runs the assembly kernels of both widths (SSE2 and,
// where the CPU has it, AVX2) and the Go loops of attemptSq on the same
// random inputs of the lengths dp54KernLengths, and requires the same bits
// in every output (exact identity).
// Of every ten trials three draw everyday values only (so that err² is
// finite and a term added out of order changes its last bits) and seven
// mix in NaN, ±Inf, -0, subnormals and arbitrary bit patterns.
func TestDP54KernBits(t *testing.T) {
	for _, p := range dp54KernPaths {
		t.Run(p.String(), func(t *testing.T) {
			skipWithoutAVX2(t, p)
			rng := rand.New(rand.NewPCG(54, 2))
			for _, n := range dp54KernLengths() {
				for trial := range 40 {
					c := &dp54KernCase{h: math.Ldexp(rng.Float64()-0.5, -rng.IntN(12))}
					if trial%10 == 9 {
						c.h = kernValue(rng)
					}
					plain := trial%10 < 3
					draw := func(tol bool) []float64 {
						v := make([]float64, n)
						for i := range v {
							if plain && tol {
								v[i] = math.Ldexp(1, -rng.IntN(40))
							} else if plain {
								v[i] = kernPlain(rng)
							} else if tol {
								v[i] = kernTolerance(rng)
							} else {
								v[i] = kernValue(rng)
							}
						}
						return v
					}
					c.y, c.k1, c.rtol, c.atol = draw(false), draw(false), draw(true), draw(true)
					for j := range c.ks {
						c.ks[j] = draw(false)
					}
					checkDP54Kern(t, c, p)
				}
			}
		})
	}
}

// TestDP54KernSolve solves Lorenz-96 (Lorenz 1996, forcing F = 8) in 13,
// 16 and 83 dimensions (an odd last component and none; for AVX2 one
// component after the quads, none, and three after quads read both ways) to t = 20 at rtol = atol = 1e-9,
// through the Go loops and through each width of kernels, keeping every
// step, and requires the same steps and the same bits in every stored
// state (exact identity: the kernels repeat the Go loops' operations).
func TestDP54KernSolve(t *testing.T) {
	const forcing = 8.0 // Lorenz (1996)
	solve := func(t *testing.T, p dp54Path, y0 []float64) *Solution {
		defer useDP54Path(p)()
		sol, err := Solve(context.Background(), Problem{F: lorenz96(forcing), Y0: y0}, 20, DormandPrince54, &Settings{RelTol: 1e-9, AbsTol: 1e-9})
		if err != nil {
			t.Fatal(err)
		}
		return sol
	}
	for _, p := range dp54KernPaths {
		t.Run(p.String(), func(t *testing.T) {
			skipWithoutAVX2(t, p)
			for _, n := range []int{13, 16, 83} {
				y0 := make([]float64, n)
				for i := range y0 {
					y0[i] = forcing
				}
				y0[0] += 0.01
				goSol, kern := solve(t, pathGo, y0), solve(t, p, y0)
				if goSol.Stats != kern.Stats {
					t.Fatalf("n=%d: %+v through the %v kernels, %+v through the Go loops", n, kern.Stats, p, goSol.Stats)
				}
				if len(kern.Y) != len(goSol.Y) || len(goSol.Y) != n*len(goSol.T) {
					t.Fatalf("n=%d: %d stored values through the %v kernels, %d through the Go loops", n, len(kern.Y), p, len(goSol.Y))
				}
				for i := range goSol.Y {
					if math.Float64bits(kern.Y[i]) != math.Float64bits(goSol.Y[i]) {
						t.Fatalf("n=%d: step %d (t=%v) component %d: %v through the %v kernels, %v through the Go loops",
							n, i/n, goSol.T[i/n], i%n, kern.Y[i], p, goSol.Y[i])
					}
				}
			}
		})
	}
}

// TestDP54KernNoAlloc checks that a trial step through the kernels of
// either width does not allocate (the kernel arguments stay on the stack),
// and that a 13-component system (a Lorenz spectrum: 3 + 9 + 1) takes the
// kernels by default.
func TestDP54KernNoAlloc(t *testing.T) {
	const n = 13 // a Lorenz spectrum's size: 3 + 9 + 1
	f := func(_ float64, x, dx []float64) {
		for i := range dx {
			dx[i] = float64(0.5 * x[i])
		}
	}
	y := make([]float64, n)
	for i := range y {
		y[i] = float64(i + 1)
	}
	for _, p := range dp54KernPaths {
		t.Run(p.String(), func(t *testing.T) {
			skipWithoutAVX2(t, p)
			old := simd.AVX2
			simd.AVX2 = p == pathAVX2
			defer func() { simd.AVX2 = old }()
			sc, err := dopri54{}.newScheme(&Problem{F: f, Y0: y}, n)
			if err != nil {
				t.Fatal(err)
			}
			if got := schemePath(sc); got != p {
				t.Fatalf("n=%d: DormandPrince54's scheme is %T (%v), want the %v kernels (dp54KernMin = %d, dp54KernMinAVX2 = %d)",
					n, sc, got, p, dp54KernMin, dp54KernMinAVX2)
			}
			w := sc.(sqAttempter)
			k1, y1, k7 := make([]float64, n), make([]float64, n), make([]float64, n)
			tol := make([]float64, n)
			for i := range tol {
				tol[i] = 1e-9
			}
			f(0, y, k1)
			if a := testing.AllocsPerRun(100, func() { w.attemptSq(0, 0.01, y, k1, y1, k7, tol, tol) }); a != 0 {
				t.Fatalf("attemptSq through the %v kernels allocates %v times per step, want 0", p, a)
			}
		})
	}
}

// fmaMnemonic matches the start of any x86 fused multiply-add mnemonic.
var fmaMnemonic = regexp.MustCompile(`(?i)\bVF(N)?M(ADD|SUB)`)

// TestDP54KernNoFMA reads the kernels' assembly and fails on any fused
// multiply-add mnemonic (VFMADD..., VFMSUB..., VFNMADD..., VFNMSUB...): a
// fused product is rounded once with its sum, not as the Go loops round
// it (float64(x*y) + z), and the bits would change with the CPU's width.
func TestDP54KernNoFMA(t *testing.T) {
	if fmaMnemonic.FindString("\tVSTAGE3(VFMADD231PD, VADDPD") == "" || fmaMnemonic.FindString("\tVMULPD Y1, Y2, Y3") != "" {
		t.Fatal("the FMA pattern does not tell a fused mnemonic inside a macro call from a product")
	}
	for _, file := range []string{"dopri54_kern_amd64.s", "dopri54_kern_avx_amd64.s"} {
		src, err := os.ReadFile(file)
		if err != nil {
			t.Fatal(err)
		}
		for i, line := range strings.Split(string(src), "\n") {
			code, _, _ := strings.Cut(line, "//")
			if m := fmaMnemonic.FindString(code); m != "" {
				t.Errorf("%s:%d: %s...: the kernels must not fuse (the Go loops round every product)", file, i+1, m)
			}
		}
	}
}

// FuzzDP54KernBits is TestDP54KernBits on inputs the fuzzer builds: the
// bytes are read as float64 bit patterns (h first, then 10n values, n up
// to 160), so every NaN, infinity and subnormal can turn up. Each input goes through
// the SSE2 kernels, then the AVX2 ones (skipped, saying so, on a CPU
// without AVX2).
func FuzzDP54KernBits(f *testing.F) {
	seed := func(vals ...float64) []byte {
		b := make([]byte, 8*len(vals))
		for i, v := range vals {
			binary.LittleEndian.PutUint64(b[8*i:], math.Float64bits(v))
		}
		return b
	}
	nan, inf, sub, negz := math.NaN(), math.Inf(1), math.SmallestNonzeroFloat64, math.Copysign(0, -1)
	f.Add(seed(0.01, 1, 2, 3, 1e-9, 1e-9, 1e-9, 1e-9, 1e-9, 1e-9, 4, 5, 6, 7, 8, 9, 1, 2, 3, 4, 5, 6, 7, 8, 9, 1, 2, 3, 4, 5, 6))
	f.Add(seed(0.1, nan, 1, -inf, 2, 1e-6, 1e-6, 1e-6, 1e-6, 1, 2, inf, 3, 4, nan, 5, 6, 7, 8, 9, negz, 1, 2))
	f.Add(seed(-0.25, sub, negz, 0, sub, -sub, 1e-300, 1, 1, 1, 1, 1, 1, sub, sub, 0, 0, negz, negz, 1e308, -1e308, 3, 3))
	f.Add(seed(1e-3, 1, 2, 3, 4, 5, 1, 2, 3, 4, 5, 1e-9, 0, -1e-9, nan, inf, 0, 0, 0, 0, 0,
		1, 2, 3, 4, 5, 6, 7, 8, 9, 10, 11, 12, 13, 14, 15, 16, 17, 18, 19, 20, 21, 22, 23, 24, 25, 26, 27, 28, 29, 30))
	// 71 components: quads read with plain loads, then split ones, then
	// three left over (the AVX2 kernels' every loop), one of them NaN.
	const long = 71
	vals := make([]float64, 1+10*long)
	vals[0] = 0.02
	for i := 1; i < len(vals); i++ {
		vals[i] = float64((i*37)%101)/16 - 3
		if i > 2*long && i <= 4*long {
			vals[i] = 1e-8 // rtol and atol
		}
	}
	vals[1+long-2] = nan
	f.Add(seed(vals...))
	f.Fuzz(func(t *testing.T, data []byte) {
		vals := make([]float64, len(data)/8)
		for i := range vals {
			vals[i] = math.Float64frombits(binary.LittleEndian.Uint64(data[8*i:]))
		}
		if len(vals) == 0 {
			return
		}
		n := (len(vals) - 1) / 10
		if n > 160 {
			n = 160
		}
		c := &dp54KernCase{h: vals[0]}
		next := vals[1:]
		take := func() []float64 {
			v := next[:n:n]
			next = next[n:]
			return v
		}
		c.y, c.k1, c.rtol, c.atol = take(), take(), take(), take()
		for j := range c.ks {
			c.ks[j] = take()
		}
		checkDP54Kern(t, c, pathSSE2)
		skipWithoutAVX2(t, pathAVX2)
		checkDP54Kern(t, c, pathAVX2)
	})
}

// BenchmarkDP54Kern times one trial step of attemptSq (six evaluations of a
// cheap linear field, dx_i = -x_i/(i+1)) through the Go loops, the SSE2
// kernels and (where the CPU has it) the AVX2 kernels, interleaved within
// every iteration (1000 steps of each, the order rotated from one
// iteration to the next), for several dimensions. Metrics: go-ns/step,
// sse2-ns/step and avx2-ns/step (fastest round), sse2/go, avx2/go and
// avx2/sse2 (medians of the per-round ratios); the dimension from which a
// width's ratio to go stays below 1 sets dp54KernMin (SSE2) or
// dp54KernMinAVX2.
func BenchmarkDP54Kern(b *testing.B) {
	paths := []dp54Path{pathGo, pathSSE2}
	if simd.HasAVX2() {
		paths = append(paths, pathAVX2)
	} else {
		b.Log("this CPU has no AVX2: only the Go loops and the SSE2 kernels are timed")
	}
	for _, n := range []int{2, 3, 4, 5, 6, 8, 10, 11, 12, 13, 16, 20, 40} {
		b.Run("n="+strconv.Itoa(n), func(b *testing.B) {
			f := func(_ float64, x, dx []float64) {
				for i := range dx {
					dx[i] = -x[i] / float64(i+1)
				}
			}
			y := make([]float64, n)
			for i := range y {
				y[i] = 1 + float64(i)/8
			}
			var sq [3]sqAttempter
			for _, p := range paths {
				restore := useDP54Path(p)
				sc, err := dopri54{}.newScheme(&Problem{F: f, Y0: y}, n)
				restore()
				if err != nil {
					b.Fatal(err)
				}
				if schemePath(sc) != p {
					b.Fatalf("n=%d: %T set up, want the %v path", n, sc, p)
				}
				sq[p] = sc.(sqAttempter)
			}
			k1, y1, k7 := make([]float64, n), make([]float64, n), make([]float64, n)
			tol := make([]float64, n)
			for i := range tol {
				tol[i] = 1e-9
			}
			f(0, y, k1)
			const steps = 1000
			round := func(p dp54Path) float64 {
				t0 := time.Now()
				for range steps {
					sq[p].attemptSq(0, 0.01, y, k1, y1, k7, tol, tol)
				}
				return float64(time.Since(t0).Nanoseconds()) / steps
			}
			var times [3][]float64
			var ratios [3][]float64 // sse2/go, avx2/go, avx2/sse2
			i := 0
			for b.Loop() {
				var tr [3]float64
				for j := range paths {
					p := paths[(i+j)%len(paths)]
					tr[p] = round(p)
				}
				i++
				for _, p := range paths {
					times[p] = append(times[p], tr[p])
				}
				ratios[0] = append(ratios[0], tr[pathSSE2]/tr[pathGo])
				if len(paths) == 3 {
					ratios[1] = append(ratios[1], tr[pathAVX2]/tr[pathGo])
					ratios[2] = append(ratios[2], tr[pathAVX2]/tr[pathSSE2])
				}
			}
			median := func(v []float64) float64 {
				slices.Sort(v)
				return v[len(v)/2]
			}
			for _, p := range paths {
				b.ReportMetric(slices.Min(times[p]), p.String()+"-ns/step")
			}
			b.ReportMetric(median(ratios[0]), "sse2/go")
			if len(paths) == 3 {
				b.ReportMetric(median(ratios[1]), "avx2/go")
				b.ReportMetric(median(ratios[2]), "avx2/sse2")
			}
		})
	}
}
