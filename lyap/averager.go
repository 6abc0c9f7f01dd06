package lyap

// averager turns the log-stretch factors of successive renormalisations of a
// flow into the averaged estimate: it skips the transient, cuts the averaging
// run into blocks, records the history and watches the target.
type averager struct {
	cfg          *config
	bm           *batchMeans
	hist         *history
	t0, tAvg, t1 float64

	averaging bool
	avgStart  float64
	blockLen  float64
	blockIx   int
	blockEnd  float64
	count     int // renormalisations while averaging
	converged bool
}

func newAverager(cfg *config, k int, t0 float64) *averager {
	a := &averager{cfg: cfg, bm: newBatchMeans(k), hist: newHistory(k, cfg.Blocks), t0: t0}
	a.tAvg = t0 + cfg.Transient
	a.t1 = a.tAvg + cfg.Duration
	return a
}

// observe takes the log-stretch factors of a renormalisation at t (last: at
// the end of the run). It reports whether averaging began at this call and
// whether the run should stop (target reached).
func (a *averager) observe(t float64, logs []float64, last bool) (started, stop bool) {
	if a.averaging {
		a.bm.add(logs)
		a.count++
		if last || t >= a.blockEnd {
			a.bm.close(t)
			a.hist.record(a.bm, t)
			a.blockIx++
			a.blockEnd = a.avgStart + float64(float64(a.blockIx+1)*a.blockLen)
			if a.cfg.Target > 0 && a.bm.blocks >= MinBlocks && a.bm.within(a.cfg.Target) {
				a.converged = true
				stop = true
			}
		}
		return false, stop
	}
	if t >= a.tAvg {
		a.averaging = true
		a.avgStart = t
		a.bm.start(t)
		a.blockLen = (a.t1 - t) / float64(a.cfg.Blocks)
		a.blockIx = 0
		a.blockEnd = t + a.blockLen
		return true, false
	}
	return false, false
}

// limit caps the time of the next renormalisation at the next boundary
// (start of averaging or end of block).
func (a *averager) limit(next float64) float64 {
	if !a.averaging && next > a.tAvg {
		return a.tAvg
	}
	if a.averaging && next > a.blockEnd {
		return a.blockEnd
	}
	return next
}

// fill writes the estimate, errors, block data and history into sp; tLast is
// the time of the last renormalisation.
func (a *averager) fill(sp *Spectrum, k int, tLast float64) {
	sp.Target = a.cfg.Target
	sp.BlockLength = a.blockLen
	sp.Exponents = make([]float64, k)
	if a.averaging {
		a.bm.estimate(sp.Exponents, tLast, true)
		sp.Start = a.avgStart
		sp.Duration = tLast - a.avgStart
		sp.Transient = a.avgStart - a.t0
	} else {
		sp.Transient = tLast - a.t0
	}
	se := make([]float64, k)
	if a.bm.stderr(se) {
		sp.StdErr = se
	}
	sp.Blocks = a.bm.blocks
	sp.Converged = a.cfg.Target > 0 && a.bm.blocks >= MinBlocks && a.bm.within(a.cfg.Target)
	if a.count > 0 {
		sp.MeanInterval = sp.Duration / float64(a.count)
	}
	sp.History = a.hist.points
}
