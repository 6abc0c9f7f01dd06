package embed_test

import (
	"context"
	"math"
	"math/rand/v2"
	"sync"
	"testing"

	"github.com/plumbdyn/plumb/integrate"
)

// henonX returns n iterates of the Hénon map's x (a = 1.4, b = 0.3, from
// (0.1, 0.1), the first 1000 dropped as transient; Hénon 1976).
func henonX(n int) []float64 {
	x, y := 0.1, 0.1
	out := make([]float64, 0, n)
	for i := 0; i < n+1000; i++ {
		x, y = float64(1+y)-float64(1.4*x*x), 0.3*x
		if i >= 1000 {
			out = append(out, x)
		}
	}
	return out
}

var lorenzCache struct {
	sync.Mutex
	m map[[2]float64][]float64
}

// lorenzX returns n samples of the Lorenz system's x (sigma = 10, rho = 28,
// beta = 8/3; Lorenz 1963) every dt, from (1, 1, 1) after a transient of
// 50 time units, integrated by Dormand–Prince 5(4) at rtol = atol = 1e-10.
func lorenzX(tb testing.TB, n int, dt float64) []float64 {
	tb.Helper()
	lorenzCache.Lock()
	defer lorenzCache.Unlock()
	key := [2]float64{float64(n), dt}
	if v, ok := lorenzCache.m[key]; ok {
		return v
	}
	const transient = 50.0
	p := integrate.Problem{
		F: func(_ float64, y, dy []float64) {
			dy[0] = 10 * (y[1] - y[0])
			dy[1] = float64(y[0]*(28-y[2])) - y[1]
			dy[2] = float64(y[0]*y[1]) - float64(8.0/3.0*y[2])
		},
		Y0: []float64{1, 1, 1},
	}
	t1 := transient + float64(n-1)*dt
	sol, err := integrate.Solve(context.Background(), p, t1, integrate.DormandPrince54,
		&integrate.Settings{RelTol: 1e-10, AbsTol: 1e-10, Every: dt, DropSteps: true})
	if err != nil {
		tb.Fatalf("lorenz: %v", err)
	}
	skip := int(transient/dt + 0.5)
	out := make([]float64, 0, n)
	for _, s := range sol.Samples[skip:] {
		out = append(out, s.Y[0])
	}
	if len(out) < n {
		tb.Fatalf("lorenz: %d samples, want %d", len(out), n)
	}
	out = out[:n]
	if lorenzCache.m == nil {
		lorenzCache.m = map[[2]float64][]float64{}
	}
	lorenzCache.m[key] = out
	return out
}

// whiteNoise returns n independent standard normal values (seeded).
func whiteNoise(n int, seed uint64) []float64 {
	r := rand.New(rand.NewPCG(seed, 1))
	out := make([]float64, n)
	for i := range out {
		out[i] = r.NormFloat64()
	}
	return out
}

// sine returns n samples of sin(2 pi i / period).
func sine(n int, period float64) []float64 {
	out := make([]float64, n)
	for i := range out {
		out[i] = math.Sin(2 * 3.141592653589793 * float64(i) / period)
	}
	return out
}
