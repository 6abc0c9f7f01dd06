package integrate

import (
	"math"
	"testing"
)

// TestDP853ErrorEstimate checks the hot loop of DormandPrince853 against a
// plain, term-by-term copy of its tableau and of dop853.f's error estimate
// (Hairer & Wanner, dop853.f, subroutine DP86CO: err5, err3, deno and
// err = |h|·err5·sqrt(1/(n·deno))): the arranged sums of attemptSq must give
// the same y1 and the same err² up to rounding, on Lorenz steps whose error
// lies where the controller decides (err from 1e-3, a step to grow, to
// beyond 1, a step to reject). Below that the estimate is a cancelling sum
// near its own rounding (err ~ 1e-13 at h = 0.003, tol 1e-6, where the two
// orders of summation differ by 0.3%), and either order is as good.
func TestDP853ErrorEstimate(t *testing.T) {
	// y1 is a sum of 8 terms of size |h·b_j·k_j| <= 0.1·6·300: a few ulps of
	// |y| ~ 30 after reordering (common practice: a bound of the form
	// c·eps·Σ|terms|).
	const y1Tol = 1e-13
	// err² is a ratio of sums of squares of e5 and e3, each a cancelling sum
	// Σ e_j·k_j with |e_j·k_j| up to 1e3 (rounding ~ 1e3·eps ~ 1e-13
	// absolute), so the relative difference falls as err grows: measured
	// 1e-7 at err 5e-2 and 1e-10 at err 1.5 on these steps; 1e-6 leaves room
	// for err down to 1e-3.
	const e2Tol = 1e-6
	const errMin = 1e-3 // the steps below are chosen with err >= errMin
	tab := dp853Tableau()
	b := []float64{d8B1, 0, 0, 0, 0, d8B6, d8B7, d8B8, d8B9, d8B10, d8B11, d8B12}
	e5w := []float64{d8ER1, 0, 0, 0, 0, d8ER6, d8ER7, d8ER8, d8ER9, d8ER10, d8ER11, d8ER12}
	bhh := []float64{d8BHH1, 0, 0, 0, 0, 0, 0, 0, d8BHH2, 0, 0, d8BHH3}
	f := func(_ float64, y, d []float64) {
		d[0] = float64(10 * (y[1] - y[0]))
		d[1] = float64(y[0]*(28-y[2])) - y[1]
		d[2] = float64(y[0]*y[1]) - float64(8.0/3*y[2])
	}
	p := Problem{F: f, Y0: []float64{1, 1, 1}}
	const n = 3
	y := []float64{-5.9, -5.6, 24.6} // near the attractor (Lorenz 1963)
	k1 := make([]float64, n)
	f(0, y, k1)
	for _, c := range []struct{ tol, h float64 }{
		{1e-6, 0.06}, {1e-6, 0.1}, {1e-6, 0.2}, {1e-9, 0.02}, {1e-9, 0.03}, {1e-9, 0.1},
	} {
		tol, h := c.tol, c.h
		rtol := []float64{tol, tol, tol}
		atol := rtol
		// Reference: stage by stage, sums in tableau order.
		k := make([][]float64, 12)
		k[0] = k1
		ys := make([]float64, n)
		for s := 1; s < 12; s++ {
			for i := range ys {
				var sum float64
				for j, a := range tab.a[s] {
					sum += float64(a * k[j][i])
				}
				ys[i] = y[i] + float64(h*sum)
			}
			k[s] = make([]float64, n)
			f(float64(tab.c[s]*h), ys, k[s])
		}
		y1ref := make([]float64, n)
		var err5, err3 float64
		for i := range y1ref {
			var bk, e5, e3 float64
			for j := range b {
				bk += float64(b[j] * k[j][i])
				e5 += float64(e5w[j] * k[j][i])
				e3 += float64((b[j] - bhh[j]) * k[j][i])
			}
			y1ref[i] = y[i] + float64(h*bk)
			sk := atol[i] + float64(rtol[i]*math.Max(math.Abs(y[i]), math.Abs(y1ref[i])))
			err5 += float64((e5 / sk) * (e5 / sk))
			err3 += float64((e3 / sk) * (e3 / sk))
		}
		deno := err5 + float64(0.01*err3)
		errRef := float64(math.Abs(h)*err5) * math.Sqrt(1/float64(n*deno))
		if !(errRef >= errMin) {
			t.Fatalf("tol %g h %g: err %g, below the range this test covers", tol, h, errRef)
		}

		sc, err := dop853{}.newScheme(&p, n)
		if err != nil {
			t.Fatal(err)
		}
		y1, f1 := make([]float64, n), make([]float64, n)
		e2, ev := sc.(*dp853Work).attemptSq(0, h, y, k1, y1, f1, rtol, atol)
		if ev != 11 {
			t.Errorf("tol %g h %g: %d evaluations, want 11", tol, h, ev)
		}
		for i := range y1 {
			if d := math.Abs(y1[i] - y1ref[i]); d > y1Tol*math.Abs(y1ref[i]) {
				t.Errorf("tol %g h %g: y1[%d] = %v, term-by-term form %v", tol, h, i, y1[i], y1ref[i])
			}
		}
		want := float64(errRef * errRef)
		if d := math.Abs(e2-want) / want; !(d <= e2Tol) {
			t.Errorf("tol %g h %g: err² = %v, dop853.f's formula %v (relative %.2g)", tol, h, e2, want, d)
		}
		t.Logf("tol %g h %g: err %.4g, relative difference of err² %.2g", tol, h, errRef, math.Abs(e2-want)/want)
		if got, _ := sc.attempt(0, h, y, k1, y1, f1, rtol, atol); got != math.Sqrt(e2) {
			t.Errorf("tol %g h %g: attempt %v, want √attemptSq = %v", tol, h, got, math.Sqrt(e2))
		}
	}
}
