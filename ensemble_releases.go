package plumb

import (
	"context"
	"fmt"
	"math"

	"github.com/plumbdyn/plumb/integrate"
)

// ensembleReleases runs the control's orbit to the release points, then
// the pairs released there, and fills the saturation level and λ(δ).
func ensembleReleases(ctx context.Context, sys *System, t1 float64, es *EnsembleSettings, cfg *ensembleConfig, rep *EnsembleReport) error {
	k := es.Releases
	rep.Releases, rep.ReleaseEvery = k, es.ReleaseEvery
	times := make([]float64, k)
	for i := range times {
		times[i] = float64(float64(i+1) * es.ReleaseEvery)
	}
	p := sys.Problem()
	orbit, err := integrate.Solve(ctx, p, times[k-1], integrate.DormandPrince54,
		&integrate.Settings{RelTol: es.RelTol, AbsTol: es.AbsTol, Times: times, DropSteps: true, MaxSteps: es.MaxSteps})
	if err != nil {
		if orbit != nil {
			rep.Status = orbit.Status.String()
		}
		return fmt.Errorf("plumb: Ensemble: the control's orbit to the release points: %w", err)
	}
	// Saturation: the mean distance between release points.
	var sum float64
	var cnt int
	for a := 0; a < k; a++ {
		for b := a + 1; b < k; b++ {
			d := cfg.m.dist(orbit.Samples[a].Y, orbit.Samples[b].Y)
			sum += d
			rep.Extent = math.Max(rep.Extent, d)
			cnt++
		}
	}
	if cnt > 0 {
		rep.Saturation = sum / float64(cnt)
	}
	// Pairs: the release point and a partner Delta/releaseAlign away.
	d0 := es.Delta / releaseAlign
	if es.Delta == 0 { // members given by the caller: time from their size
		d0 = 0
		for _, y := range cfg.starts[1:] {
			d0 = math.Max(d0, cfg.m.dist(y, cfg.starts[0]))
		}
		es.Delta = d0
		rep.Delta = d0
		d0 /= releaseAlign
	}
	if !(d0 > 0) {
		return fmt.Errorf("plumb: Ensemble: the given members coincide with the start: no scale to begin at: %w", integrate.ErrSettings)
	}
	rep.ReleaseDelta = d0
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
		return err
	}
	sol, err := integrate.SolveBatch(ctx, bp, t1, cfg.batchSettings(es, t1))
	if err != nil {
		if sol != nil {
			rep.Status = sol.Status.String()
		}
		return fmt.Errorf("plumb: Ensemble: the released pairs: %w", err)
	}
	n := sol.Dim
	cfg.ts = make([]float64, len(sol.Samples))
	cfg.seps = make([][]float64, k)
	for i := range cfg.seps {
		cfg.seps[i] = make([]float64, len(sol.Samples))
	}
	for j, smp := range sol.Samples {
		cfg.ts[j] = smp.T
		for i := 0; i < k; i++ {
			cfg.seps[i][j] = cfg.m.dist(smp.Y[2*i*n:(2*i+1)*n], smp.Y[(2*i+1)*n:(2*i+2)*n])
		}
	}
	// Levels Delta·r^n up to the attractor's extent.
	for lv := es.Delta; lv <= rep.Extent && len(cfg.levels) < 10000; lv *= es.Ratio {
		cfg.levels = append(cfg.levels, lv)
	}
	if len(cfg.levels) < 2 {
		return nil
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
	return nil
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
