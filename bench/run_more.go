package main

import (
	"context"
	"encoding/json"
	"fmt"
	"math"
	"os"
	"time"

	"github.com/plumbdyn/plumb/integrate"
)

// The larger problems of the harness, at one tolerance each:
//
//   - Lorenz-96, dx_i/dt = (x_{i+1} - x_{i-2})·x_{i-1} - x_i + F on a ring
//     of 40 and of 1000 sites, F = 8, x_i = F but x_0 = F + 0.01, on
//     [0, 10] at rtol = atol = 1e-8 (problem "l96-40", "l96-1000");
//   - 1000 Lorenz trajectories from (1 + i·1e-8, 1, 1), i = 0..999, each to
//     t = 20 at rtol = atol = 1e-10 (problem "many"): Solve once per
//     trajectory (DropSteps: only the end states are wanted), and
//     SolveBatch with all of them in lockstep on one worker (one step size
//     for all, so it takes the steps its hardest member needs).
//
// A sample is timed as in runAll (CPU time, mean of K back-to-back runs).

// l96Force is the forcing F of the Lorenz-96 rows.
const l96Force = 8.0

// l96 is the Lorenz-96 field written as the harness's C function is: the
// wrap-around handled at the two ends, no modulo in the loop.
func l96(_ float64, x, d []float64) {
	n := len(x)
	d[0] = float64((x[1]-x[n-2])*x[n-1]) - x[0] + l96Force
	d[1] = float64((x[2]-x[n-1])*x[0]) - x[1] + l96Force
	for i := 2; i < n-1; i++ {
		d[i] = float64((x[i+1]-x[i-2])*x[i-1]) - x[i] + l96Force
	}
	d[n-1] = float64((x[0]-x[n-3])*x[n-2]) - x[n-1] + l96Force
}

// lorenzBatch is the Lorenz field (sigma = 10, rho = 28, beta = 8/3) for m
// members at once, component-major, with the catalog field's arithmetic.
func lorenzBatch(_ float64, m int, y, dydt []float64) {
	const sigma, rho, beta = 10.0, 28.0, 8.0 / 3
	x, yy, z := y[:m:m], y[m:2*m:2*m], y[2*m:3*m:3*m]
	dx, dy, dz := dydt[:m:m], dydt[m:2*m:2*m], dydt[2*m:3*m:3*m]
	for k := range x {
		dx[k] = float64(sigma * (yy[k] - x[k]))
		dy[k] = float64(x[k]*(rho-z[k])) - yy[k]
		dz[k] = float64(x[k]*yy[k]) - float64(beta*z[k])
	}
}

// timed runs one counted call of f, then K more back-to-back (K so that
// they last about target seconds), and returns the mean CPU seconds of
// the K and K. f reports whether its result equals the counted call's.
func timed(target float64, f func(first bool) (same bool, err error)) (float64, int, error) {
	t0 := time.Now()
	if _, err := f(true); err != nil {
		return 0, 0, err
	}
	single := time.Since(t0).Seconds()
	k := max(1, int(math.Ceil(target/math.Max(single, 1e-7))))
	c0 := cpuSeconds()
	for range k {
		same, err := f(false)
		if err != nil {
			return 0, 0, err
		}
		if !same {
			return 0, 0, fmt.Errorf("a repeated run differs")
		}
	}
	return (cpuSeconds() - c0) / float64(k), k, nil
}

func runL96(enc *json.Encoder, target float64) error {
	const tol, tEnd = 1e-8, 10.0
	ctx := context.Background()
	for _, n := range []int{40, 1000} {
		y0 := make([]float64, n)
		for i := range y0 {
			y0[i] = l96Force
		}
		y0[0] = l96Force + 0.01
		pr := integrate.Problem{F: l96, Y0: y0}
		for _, v := range variants {
			s := &integrate.Settings{RelTol: tol, AbsTol: tol, DropSteps: v.drop}
			var first *integrate.Solution
			sec, k, err := timed(target, func(isFirst bool) (bool, error) {
				sol, err := integrate.Solve(ctx, pr, tEnd, v.m, s)
				if err != nil {
					return false, err
				}
				if isFirst {
					first = sol
					return true, nil
				}
				return sol.Final[0] == first.Final[0], nil
			})
			if err != nil {
				return fmt.Errorf("l96-%d %s: %w", n, v.name, err)
			}
			var sum float64
			for _, x := range first.Final {
				sum += x
			}
			if err := enc.Encode(sample{Peer: "plumb", Method: v.name, Problem: fmt.Sprintf("l96-%d", n), Tol: tol,
				Acc: first.Stats.Accepted, Rej: first.Stats.Rejected, Nfev: first.Stats.Evaluations,
				Sec: sec, Inner: k, TEnd: tEnd, YEnd: first.Final[:4],
				Extra: map[string]float64{"n": float64(n), "sum": sum}}); err != nil {
				return err
			}
		}
	}
	return nil
}

func runMany(enc *json.Encoder, target float64) error {
	const m, tol, tEnd = 1000, 1e-10, 20.0
	ctx := context.Background()
	ps, err := problems()
	if err != nil {
		return err
	}
	f := ps[0].f // the catalog's Lorenz field
	starts := make([][]float64, m)
	for i := range starts {
		starts[i] = []float64{1 + float64(i)*1e-8, 1, 1}
	}
	emit := func(method string, acc, rej, nfev int, sec float64, k int, last []float64, lo, hi float64) error {
		return enc.Encode(sample{Peer: "plumb", Method: method, Problem: "many", Tol: tol, Acc: acc, Rej: rej,
			Nfev: nfev, Sec: sec, Inner: k, TEnd: tEnd, YEnd: last,
			Extra: map[string]float64{"ntraj": m, "spread_x": hi - lo}})
	}

	// One Solve per trajectory; the counts are summed over the 1000.
	s := &integrate.Settings{RelTol: tol, AbsTol: tol, DropSteps: true}
	var acc, rej, nfev int
	var last []float64
	lo, hi := math.Inf(1), math.Inf(-1)
	sec, k, err := timed(target, func(first bool) (bool, error) {
		for i, y0 := range starts {
			sol, err := integrate.Solve(ctx, integrate.Problem{F: f, Y0: y0}, tEnd, integrate.DormandPrince54, s)
			if err != nil {
				return false, err
			}
			if !first {
				if i == m-1 {
					return sol.Final[0] == last[0], nil
				}
				continue
			}
			acc += sol.Stats.Accepted
			rej += sol.Stats.Rejected
			nfev += sol.Stats.Evaluations
			lo, hi = math.Min(lo, sol.Final[0]), math.Max(hi, sol.Final[0])
			last = sol.Final
		}
		return true, nil
	})
	if err != nil {
		return fmt.Errorf("many dp54-drop-loop: %w", err)
	}
	if err := emit("dp54-drop-loop", acc, rej, nfev, sec, k, last, lo, hi); err != nil {
		return err
	}

	// All 1000 in lockstep, one worker (CPU time then compares the work).
	bp := integrate.BatchProblem{F: lorenzBatch, Dim: 3, Starts: starts}
	bs := &integrate.BatchSettings{Settings: integrate.Settings{RelTol: tol, AbsTol: tol}, Workers: 1}
	var bsol *integrate.BatchSolution
	sec, k, err = timed(target, func(first bool) (bool, error) {
		sol, err := integrate.SolveBatch(ctx, bp, tEnd, bs)
		if err != nil {
			return false, err
		}
		if first {
			bsol = sol
			return true, nil
		}
		return sol.Final[3*(m-1)] == bsol.Final[3*(m-1)], nil
	})
	if err != nil {
		return fmt.Errorf("many dp54-batch: %w", err)
	}
	lo, hi = math.Inf(1), math.Inf(-1)
	for i := range m {
		lo, hi = math.Min(lo, bsol.Final[3*i]), math.Max(hi, bsol.Final[3*i])
	}
	// The batch's counts are per lockstep step and field call, the same
	// for every member: times m, they count what the loop counts.
	st := bsol.Stats
	return emit("dp54-batch", m*st.Accepted, m*st.Rejected, m*st.Evaluations, sec, k, bsol.Final[3*(m-1):], lo, hi)
}

// runMore writes the samples of the larger problems.
func runMore(w *os.File, target float64) error {
	enc := json.NewEncoder(w)
	if err := runL96(enc, target); err != nil {
		return err
	}
	return runMany(enc, target)
}
