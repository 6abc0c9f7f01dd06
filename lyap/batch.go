package lyap

import "math"

// batchMeans accumulates log-stretch sums in consecutive blocks and gives the
// running estimate (total log-stretch over total length) and its standard
// error from the spread of the block rates (the method of batch means,
// Schmeiser 1982). It does not allocate after newBatchMeans.
//
// References:
//
//	B. Schmeiser, Batch size effects in the analysis of simulation output,
//	  Operations Research 30 (1982) 556–568.
type batchMeans struct {
	k        int
	sum      []float64 // log sums over completed blocks
	length   float64   // length of completed blocks
	cur      []float64 // log sums of the open block
	curStart float64   // start of the open block
	blocks   int
	mean, m2 []float64 // Welford accumulators of the block rates
}

func newBatchMeans(k int) *batchMeans {
	buf := make([]float64, 4*k)
	return &batchMeans{k: k, sum: buf[:k:k], cur: buf[k : 2*k : 2*k], mean: buf[2*k : 3*k : 3*k], m2: buf[3*k:]}
}

// start opens the first block at t.
func (b *batchMeans) start(t float64) { b.curStart = t }

// add adds log-stretch factors to the open block.
func (b *batchMeans) add(logs []float64) {
	for i, v := range logs[:b.k] {
		b.cur[i] += v
	}
}

// close ends the open block at t and opens the next one there. A block of
// zero length is not counted.
func (b *batchMeans) close(t float64) {
	l := t - b.curStart
	if !(l > 0) {
		return
	}
	b.blocks++
	nb := float64(b.blocks)
	for i := range b.cur {
		rate := b.cur[i] / l
		d := rate - b.mean[i]
		b.mean[i] += d / nb
		b.m2[i] += float64(d * (rate - b.mean[i]))
		b.sum[i] += b.cur[i]
		b.cur[i] = 0
	}
	b.length += l
	b.curStart = t
}

// estimate writes the running estimate over completed blocks and, if
// partial, the open block up to t.
func (b *batchMeans) estimate(dst []float64, t float64, partial bool) {
	l := b.length
	if partial && t > b.curStart {
		l += t - b.curStart
	}
	for i := range dst[:b.k] {
		s := b.sum[i]
		if partial {
			s += b.cur[i]
		}
		if l > 0 {
			dst[i] = s / l
		} else {
			dst[i] = 0
		}
	}
}

// stderr writes the batch-means standard errors; it needs two blocks.
func (b *batchMeans) stderr(dst []float64) bool {
	if b.blocks < 2 {
		return false
	}
	nb := float64(b.blocks)
	for i := range dst[:b.k] {
		dst[i] = math.Sqrt(b.m2[i] / (nb - 1) / nb)
	}
	return true
}

// within reports whether every standard error is at most target.
func (b *batchMeans) within(target float64) bool {
	if b.blocks < 2 {
		return false
	}
	nb := float64(b.blocks)
	for i := range b.m2 {
		if math.Sqrt(b.m2[i]/(nb-1)/nb) > target {
			return false
		}
	}
	return true
}

// history is a preallocated store of running estimates, one per block.
type history struct {
	k      int
	points []Point
	buf    []float64
}

func newHistory(k, blocks int) *history {
	return &history{k: k, points: make([]Point, 0, blocks+1), buf: make([]float64, 0, 2*k*(blocks+1))}
}

// record appends the current running estimate of b at t, without allocating
// while the preallocated capacity lasts.
func (h *history) record(b *batchMeans, t float64) {
	k := h.k
	if len(h.points) == cap(h.points) || len(h.buf)+2*k > cap(h.buf) {
		return
	}
	off := len(h.buf)
	h.buf = h.buf[:off+2*k]
	est := h.buf[off : off+k : off+k]
	b.estimate(est, t, false)
	p := Point{T: t, Blocks: b.blocks, Exponents: est}
	if b.blocks >= 2 {
		se := h.buf[off+k : off+2*k : off+2*k]
		b.stderr(se)
		p.StdErr = se
	}
	h.points = append(h.points, p)
}
