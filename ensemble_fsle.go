package plumb

import (
	"math"

	"github.com/plumbdyn/plumb/internal/detmath"
)

// ScaleExponent is the finite-size Lyapunov exponent at one scale.
type ScaleExponent struct {
	// Delta is the scale: the separation at which the growth by Ratio is
	// timed.
	Delta float64 `json:"delta"`
	// Lambda is ln(Ratio)/⟨τ⟩, ⟨τ⟩ the mean over the pairs of the time
	// to grow from Delta to Ratio·Delta; null when fewer than two pairs
	// did so within the span.
	Lambda *float64 `json:"lambda"`
	// StdErr is Lambda's standard error from the spread of the pairs'
	// times (first-order propagation through 1/⟨τ⟩); null with Lambda.
	StdErr *float64 `json:"std_err"`
	// Pairs is the number of pairs whose growth was timed.
	Pairs int `json:"pairs"`
	// Unfinished counts the pairs that reached Delta but not Ratio·Delta
	// within the span. They are left out of Lambda, which then leans
	// high: near the attractor's size, read it with this count.
	Unfinished int `json:"unfinished"`
	// MeanTime is ⟨τ⟩; 0 when no pair was timed.
	MeanTime float64 `json:"mean_time"`
}

// firstPassage returns the first time the separation series d (at times
// ts) reaches level, interpolated linearly in log d between the samples
// that bracket it, and whether it does. A separation already at the level
// at the first sample passes at ts[0].
func firstPassage(ts, d []float64, level float64, from int) (float64, int, bool) {
	for j := from; j < len(d); j++ {
		if d[j] < level {
			continue
		}
		if j == 0 || d[j-1] <= 0 || j == from {
			return ts[j], j, true
		}
		la, lb := detmath.Log(d[j-1]), detmath.Log(d[j])
		if !(lb > la) {
			return ts[j], j, true
		}
		f := (detmath.Log(level) - la) / (lb - la)
		return ts[j-1] + float64(f*(ts[j]-ts[j-1])), j, true
	}
	return 0, len(d), false
}

// passageTimes returns, for each pair's separation series, the first
// passage times of each level (increasing), NaN where a level is not
// reached. Each level is searched from the sample where the previous one
// was passed.
func passageTimes(ts []float64, seps [][]float64, levels []float64) [][]float64 {
	out := make([][]float64, len(seps))
	for p, d := range seps {
		row := make([]float64, len(levels))
		from := 0
		for l, lv := range levels {
			t, j, ok := firstPassage(ts, d, lv, from)
			if !ok {
				for ; l < len(levels); l++ {
					row[l] = math.NaN()
				}
				break
			}
			row[l], from = t, j
		}
		out[p] = row
	}
	return out
}

// meanSE returns the mean of xs and its standard error (0 for one value).
func meanSE(xs []float64) (float64, float64) {
	var s float64
	for _, x := range xs {
		s += x
	}
	mean := s / float64(len(xs))
	if len(xs) < 2 {
		return mean, 0
	}
	var v float64
	for _, x := range xs {
		d := x - mean
		v += float64(d * d)
	}
	return mean, math.Sqrt(v / float64(len(xs)-1) / float64(len(xs)))
}

// scaleExponents returns λ(δ_n) for levels δ_n = levels[n], n < len-1,
// from the passage times: τ_n = t(δ_{n+1}) - t(δ_n) per pair, λ = ln r/⟨τ⟩
// with r = δ_{n+1}/δ_n (the ensemble average of Aurell et al. 1997).
func scaleExponents(pass [][]float64, levels []float64) []ScaleExponent {
	out := make([]ScaleExponent, 0, len(levels))
	for n := 0; n+1 < len(levels); n++ {
		var taus []float64
		for _, row := range pass {
			a, b := row[n], row[n+1]
			if !math.IsNaN(a) && !math.IsNaN(b) {
				taus = append(taus, b-a)
			}
		}
		unfinished := 0
		for _, row := range pass {
			if !math.IsNaN(row[n]) && math.IsNaN(row[n+1]) {
				unfinished++
			}
		}
		se := ScaleExponent{Delta: levels[n], Pairs: len(taus), Unfinished: unfinished}
		if len(taus) > 0 {
			mean, sem := meanSE(taus)
			se.MeanTime = mean
			if len(taus) >= 2 && mean > 0 {
				lr := detmath.Log(levels[n+1] / levels[n])
				l, e := lr/mean, lr/mean*(sem/mean)
				se.Lambda, se.StdErr = &l, &e
			}
		}
		out = append(out, se)
	}
	return out
}

// growthExponent returns ln(hi/lo)/⟨T⟩ over the pairs that grew from lo
// (level index a) to hi (index b), T the time it took, with its standard
// error, and the number of pairs; ok is false for fewer than two.
func growthExponent(pass [][]float64, levels []float64, a, b int) (lambda, stdErr float64, pairs int, ok bool) {
	var ts []float64
	for _, row := range pass {
		if !math.IsNaN(row[a]) && !math.IsNaN(row[b]) {
			ts = append(ts, row[b]-row[a])
		}
	}
	if len(ts) < 2 {
		return 0, 0, len(ts), false
	}
	mean, sem := meanSE(ts)
	if !(mean > 0) {
		return 0, 0, len(ts), false
	}
	lr := detmath.Log(levels[b] / levels[a])
	return lr / mean, lr / mean * (sem / mean), len(ts), true
}
