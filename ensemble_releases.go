package plumb

import (
	"context"
	"fmt"
	"math"

	"github.com/plumbdyn/plumb/integrate"
)

// EnsembleReleases is what the pairs released along the control's orbit
// measured, before any exponent is fitted: the piece of a split ensemble
// that holds them hands it to the join.
type EnsembleReleases struct {
	// Saturation and Extent are the mean and the largest distance between
	// the release points.
	Saturation float64 `json:"saturation"`
	Extent     float64 `json:"extent"`
	// Delta is the ensemble's Delta (measured from the given starts when
	// the settings left it 0); ReleaseDelta the pairs' first separation.
	Delta        float64 `json:"delta"`
	ReleaseDelta float64 `json:"release_delta"`
	// Times are the sample times; Separations[i][j] pair i's separation at
	// Times[j].
	Times       []float64   `json:"times"`
	Separations [][]float64 `json:"separations"`
}

// ensembleReleases runs the control's orbit to the release points, then
// the pairs released there, and returns what they measured; on failure,
// the status of the run that failed with its error.
func ensembleReleases(ctx context.Context, sys *System, t1 float64, es *EnsembleSettings, cfg *ensembleConfig) (*EnsembleReleases, string, error) {
	k := es.Releases
	rel := &EnsembleReleases{Delta: es.Delta}
	times := make([]float64, k)
	for i := range times {
		times[i] = float64(float64(i+1) * es.ReleaseEvery)
	}
	p := sys.Problem()
	orbit, err := integrate.Solve(ctx, p, times[k-1], integrate.DormandPrince54,
		&integrate.Settings{RelTol: es.RelTol, AbsTol: es.AbsTol, Times: times, DropSteps: true, MaxSteps: es.MaxSteps})
	if err != nil {
		status := integrate.Failed.String()
		if orbit != nil {
			status = orbit.Status.String()
		}
		return nil, status, fmt.Errorf("plumb: Ensemble: the control's orbit to the release points: %w", err)
	}
	// Saturation: the mean distance between release points.
	var sum float64
	var cnt int
	for a := 0; a < k; a++ {
		for b := a + 1; b < k; b++ {
			d := cfg.m.dist(orbit.Samples[a].Y, orbit.Samples[b].Y)
			sum += d
			rel.Extent = math.Max(rel.Extent, d)
			cnt++
		}
	}
	if cnt > 0 {
		rel.Saturation = sum / float64(cnt)
	}
	// Pairs: the release point and a partner Delta/releaseAlign away.
	d0 := es.Delta / releaseAlign
	if es.Delta == 0 { // members given by the caller: time from their size
		d0 = 0
		for _, y := range cfg.starts[1:] {
			d0 = math.Max(d0, cfg.m.dist(y, cfg.starts[0]))
		}
		rel.Delta = d0
		d0 /= releaseAlign
	}
	if !(d0 > 0) {
		return nil, integrate.Failed.String(), fmt.Errorf("plumb: Ensemble: the given members coincide with the start: no scale to begin at: %w", integrate.ErrSettings)
	}
	rel.ReleaseDelta = d0
	dirs := unitDirections(es.Seed^0x72656c65617365, k, len(sys.States), cfg.along) // "release"
	starts := make([][]float64, 0, 2*k)
	for i := 0; i < k; i++ {
		base := orbit.Samples[i].Y
		y := append([]float64(nil), base...)
		for _, c := range cfg.along {
			y[c] += float64(float64(d0*dirs[i][c]) * cfg.m.scale(c))
		}
		starts = append(starts, append([]float64(nil), base...), y)
	}
	bp, err := sys.BatchProblem(starts)
	if err != nil {
		return nil, integrate.Failed.String(), err
	}
	sol, err := integrate.SolveBatch(ctx, bp, t1, cfg.batchSettings(es, t1))
	if err != nil {
		status := integrate.Failed.String()
		if sol != nil {
			status = sol.Status.String()
		}
		return nil, status, fmt.Errorf("plumb: Ensemble: the released pairs: %w", err)
	}
	n := sol.Dim
	rel.Times = make([]float64, len(sol.Samples))
	rel.Separations = make([][]float64, k)
	for i := range rel.Separations {
		rel.Separations[i] = make([]float64, len(sol.Samples))
	}
	for j, smp := range sol.Samples {
		rel.Times[j] = smp.T
		for i := 0; i < k; i++ {
			rel.Separations[i][j] = cfg.m.dist(smp.Y[2*i*n:(2*i+1)*n], smp.Y[(2*i+1)*n:(2*i+2)*n])
		}
	}
	return rel, "", nil
}

// applyReleases fills the report's saturation level and λ(δ) from what
// the releases measured (and es.Delta, when it was measured from given
// starts).
func applyReleases(es *EnsembleSettings, cfg *ensembleConfig, rep *EnsembleReport, rel *EnsembleReleases) {
	rep.Releases, rep.ReleaseEvery = es.Releases, es.ReleaseEvery
	rep.Saturation, rep.Extent, rep.ReleaseDelta = rel.Saturation, rel.Extent, rel.ReleaseDelta
	if es.Delta == 0 {
		es.Delta, rep.Delta = rel.Delta, rel.Delta
	}
	cfg.ts, cfg.seps = rel.Times, rel.Separations
	// Levels Delta·r^n up to the attractor's extent.
	for lv := es.Delta; lv <= rep.Extent && len(cfg.levels) < 10000; lv *= es.Ratio {
		cfg.levels = append(cfg.levels, lv)
	}
	if len(cfg.levels) < 2 {
		return
	}
	cfg.pass = passageTimes(cfg.ts, cfg.seps, cfg.levels)
	rep.Scales = scaleExponents(cfg.pass, cfg.levels)
	b := 0
	for i, lv := range cfg.levels {
		if lv <= rep.Saturation/100 {
			b = i
		}
	}
	if b >= 2 {
		if l, e, _, ok := growthExponent(cfg.pass, cfg.levels, 0, b); ok {
			rep.SmallScale, rep.SmallScaleStdErr = &l, &e
		}
		rep.SmallScaleTo = cfg.levels[b]
	}
}

// fillPredictability sets the mean time for the pairs to grow from Delta
// to Tol.
func fillPredictability(rep *EnsembleReport, cfg *ensembleConfig) {
	if len(cfg.seps) == 0 || !(rep.Tol > rep.Delta) {
		return
	}
	pass := passageTimes(cfg.ts, cfg.seps, []float64{rep.Delta, rep.Tol})
	var ts []float64
	for _, row := range pass {
		if !math.IsNaN(row[0]) && !math.IsNaN(row[1]) {
			ts = append(ts, row[1]-row[0])
		}
	}
	rep.PredictabilityPairs = len(ts)
	if len(ts) >= 2 {
		m, e := meanSE(ts)
		rep.Predictability, rep.PredictabilityStdErr = &m, &e
	}
}
