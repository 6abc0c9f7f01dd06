package integrate

import (
	"math"
	"math/bits"
	"sort"
	"sync"
)

// Status says why a solve ended.
type Status int

const (
	// Completed: t1 was reached.
	Completed Status = iota
	// Stopped: a Crossing with Stop set was found; End is its time.
	Stopped
	// Canceled: the context was canceled; the solution holds what was done.
	Canceled
	// Failed: stepping failed (see the error); the solution holds what was done.
	Failed
)

// String returns the status in lower case.
func (s Status) String() string {
	switch s {
	case Completed:
		return "completed"
	case Stopped:
		return "stopped"
	case Canceled:
		return "canceled"
	}
	return "failed"
}

// Sample is the state at one time of the sampling grid.
type Sample struct {
	T float64
	Y []float64
}

// Solution is the result of Solve: the accepted steps (unless
// Settings.DropSteps), samples on the requested grid, located crossings,
// the final state, the work counts and why it ended.
type Solution struct {
	Method string // the method's name
	Dim    int    // the state dimension
	T0     float64
	// End is the last time reached (t1, a stopping crossing, or where it failed).
	End float64
	// Final is the state at End.
	Final []float64

	// T holds the times of the initial point and of every accepted step;
	// Y their states, row after row (Y[i*Dim:(i+1)*Dim] is the state at
	// T[i]). Both are empty with Settings.DropSteps. After a stopping
	// crossing the last stored step is the whole step that contains it, so
	// T's last entry may lie beyond End; At answers only up to End.
	T []float64
	Y []float64

	// Samples holds the states on Settings.Every or Settings.Times.
	Samples []Sample
	// Hits holds the located crossings in time order.
	Hits []Hit

	Stats  Stats
	Status Status

	sc   scheme
	cd   compactDense // sc, when it rebuilds part of its dense output from T, Y
	d0   []float64    // with cd: F at T0, the start derivative of the first step
	coef chunks       // dense output per step (full, or compact when cd != nil)
	lazy *lazyDense   // the step sizes, when no dense output was needed during the solve
	// During a solve each kept step goes to two staging stores: its
	// time (and, for a lazy solution, the size of the step that ended
	// there) to tBuf, its state to yBuf; a slot each per step, no copying
	// as the solution grows. seal copies them into T, Y (and lazy's step
	// sizes) once at the end.
	tBuf, yBuf chunks
}

// compactDense is implemented by schemes whose continuous extension
// partly consists of the step's end states: a Solution then keeps only the
// rest per step (for DormandPrince54, the step size, the end derivative
// and one vector; for DormandPrince853, 6 of its 8 vectors), and rebuilds
// the same bits from T and Y.
type compactDense interface {
	compactSize(n int) int
	// compact writes into dst the kept part of the extension of st's last
	// step, from the full dense record of that step.
	compact(st *Stepper, full, dst []float64)
	// denseCompact writes the kept part of the extension of st's last
	// step into dst, the same bits as dense followed by compact, and
	// returns the evaluations of F it made. (It takes the stepper rather
	// than its six vectors: on a small system, passing them cost more
	// than the arithmetic.)
	denseCompact(st *Stepper, dst []float64) int
	// interpCompact evaluates the extension of the step from y0 to y1
	// whose record is c at theta; prev is the previous step's record, or
	// for the first step the derivative at T0 (see Solution.d0).
	interpCompact(y0, y1, prev, c []float64, theta float64, dst []float64)
}

// chunks stores a growing sequence of fixed-size records in blocks that
// never move: block j holds first<<j records until a block reaches full
// size (block records, at most maxBlockFloats floats), and every later
// block holds block records. Short solves stay small, long ones allocate
// about what they store, and nothing is copied while a solve runs.
type chunks struct {
	per   int // floats per record
	first int // records in block 0
	grow  int // blocks that double; block grow and later hold block records
	block int // records in a full block: first<<grow
	// b holds the blocks at their full length; cur is the last of them
	// and used the floats filled in it. Storing a record writes no
	// pointer (a pointer write costs a write barrier while the GC runs).
	b    [][]float64
	cur  []float64
	used int
	full int // records in the blocks before cur
	// pooled: the blocks come from, and go back to, blockPools (for
	// staging storage that is copied out and dropped, see release);
	// boxes[j] points at b[j], the pool's handle, made once per block.
	pooled bool
	boxes  []*[]float64
}

// blockPools holds released blocks by length (a *sync.Pool per length):
// the times and states a Solve stages before copying them into T and Y,
// so that repeated solves reuse that memory instead of asking the heap
// (and the operating system, page by page) for fresh memory each time.
var blockPools sync.Map

func blockPool(n int) *sync.Pool {
	if p, ok := blockPools.Load(n); ok {
		return p.(*sync.Pool)
	}
	p, _ := blockPools.LoadOrStore(n, &sync.Pool{})
	return p.(*sync.Pool)
}

// pool makes c take its blocks from blockPools and give them back in
// release. The handles' slice starts with room for 32 blocks (for T,
// about 110 000 steps), so that it rarely grows.
func (c *chunks) pool() {
	c.pooled = true
	c.boxes = make([]*[]float64, 0, 32)
}

// newBlock returns a block of n floats, from the pool when c is pooled.
// Its contents are arbitrary: next hands out each slot to be filled whole.
func (c *chunks) newBlock(n int) []float64 {
	if !c.pooled {
		return make([]float64, n)
	}
	box, ok := blockPool(n).Get().(*[]float64)
	if !ok || len(*box) != n {
		b := make([]float64, n)
		box = &b
	}
	c.boxes = append(c.boxes, box)
	return *box
}

// release gives a pooled chunks' blocks back to the pool and empties it.
func (c *chunks) release() {
	for _, box := range c.boxes {
		blockPool(len(*box)).Put(box)
	}
	*c = chunks{}
}

// maxBlockFloats bounds a block to 512 KiB.
const maxBlockFloats = 1 << 16

// firstRecords is the first block's capacity, in records.
const firstRecords = 64

func newChunks(per int) chunks {
	per = max(1, per)
	full := max(1, min(4096, maxBlockFloats/per))
	c := chunks{per: per, first: min(firstRecords, full)}
	for c.first<<(c.grow+1) <= full {
		c.grow++
	}
	c.block = c.first << c.grow
	return c
}

// next returns the slot of one more record (len per), to be filled by
// the caller.
func (c *chunks) next() []float64 {
	if c.used+c.per > len(c.cur) {
		c.grow1()
	}
	return c.take()
}

// take is next when the current block has room (c.room()): short
// enough to be inlined, for the callers that store a record at every
// step.
func (c *chunks) take() []float64 {
	l := c.used
	c.used += c.per
	return c.cur[l:c.used:c.used]
}

// room reports whether the current block has room for one more record.
func (c *chunks) room() bool { return c.used+c.per <= len(c.cur) }

// grow1 starts the next block (the rare case, out of next's way).
func (c *chunks) grow1() {
	c.full += c.used / c.per
	c.cur = c.newBlock((c.first << min(len(c.b), c.grow)) * c.per)
	c.b = append(c.b, c.cur)
	c.used = 0
}

// add appends one record (len(v) == per).
func (c *chunks) add(v []float64) {
	dst := c.next()
	// A loop, not copy: records are short, and the runtime's memmove
	// costs more than the copy itself.
	for i, x := range v[:len(dst)] {
		dst[i] = x
	}
}

// at returns record k.
func (c *chunks) at(k int) []float64 {
	var j, o int
	if g := c.first * (1<<c.grow - 1); k >= g {
		// Past the doubling blocks: full blocks.
		j, o = c.grow+(k-g)/c.block, (k-g)%c.block
	} else {
		// Block j starts at record first·(2^j - 1).
		j = bits.Len(uint(k/c.first+1)) - 1
		o = k - c.first*(1<<j-1)
	}
	o *= c.per
	b := c.b[j]
	return b[o : o+c.per : o+c.per]
}

// len is the number of records stored.
func (c *chunks) len() int {
	if c.per == 0 {
		return 0
	}
	return c.full + c.used/c.per
}

// seal moves the staged steps into T and Y, and for a lazy solution the
// step sizes into lazy.h (time record k+1 holds the size of step k;
// record 0's slot is unused), then gives the staging blocks back.
func (s *Solution) seal() {
	m := s.tBuf.len()
	if m == 0 {
		return
	}
	T, Y := make([]float64, m), make([]float64, 0, m*s.Dim)
	for j, b := range s.yBuf.b {
		if j == len(s.yBuf.b)-1 {
			b = b[:s.yBuf.used]
		}
		Y = append(Y, b...)
	}
	var H []float64
	if s.lazy != nil {
		H = make([]float64, m) // H[0], record 0's unused slot, is dropped below
	}
	k := 0
	for j, b := range s.tBuf.b {
		if j == len(s.tBuf.b)-1 {
			b = b[:s.tBuf.used]
		}
		if H == nil {
			k += copy(T[k:], b)
			continue
		}
		t, h := T[k:k+len(b)/2], H[k:k+len(b)/2]
		for i := range t {
			t[i], h[i] = b[2*i], b[2*i+1]
		}
		k += len(t)
	}
	s.T, s.Y = T, Y
	if s.lazy != nil {
		s.lazy.h = H[1:]
	}
	s.tBuf.release()
	s.yBuf.release()
}

// State returns the state at T[i] in dst (grown if short).
func (s *Solution) State(i int, dst []float64) []float64 {
	if i < 0 || i >= len(s.T) {
		return nil
	}
	if cap(dst) < s.Dim {
		dst = make([]float64, s.Dim)
	}
	dst = dst[:s.Dim]
	copy(dst, s.Y[i*s.Dim:(i+1)*s.Dim])
	return dst
}

// At writes the solution at time t into dst (grown if short) and returns it,
// using the method's continuous extension on the step that contains t; at a
// step's own time it returns the stored state exactly.
//
// At is safe for concurrent use by several goroutines.
//
// For DormandPrince54 and DormandPrince853, when the solve kept its steps
// and needed no dense output while it ran (no Settings.Every, Times or
// Crossings), the solve keeps only each step's size, and At rebuilds a step
// when first asked: it takes the step again from its start and builds the
// continuous extension, 7 (DormandPrince54) or 16 evaluations of the
// problem's field after Solve has returned, with the same bits as a solve
// that built it while it ran; the two steps used last are kept. The field
// must stay valid and compute what it computed during the solve (it must not
// depend on state changed since): At checks that the step taken again ends
// on the stored state, bit for bit, and otherwise returns nil (AtErr:
// ErrFieldChanged); a caller who changes the field after the solve (one
// closure whose parameters the next solve reuses) samples with
// Settings.Every or Times instead, which builds the extension while the
// solve runs. At calls the field under a lock, never concurrently for one
// Solution; a field the caller supplied (not made by Forkable) that other
// running code also calls must be safe for concurrent use. AtEvaluations
// counts these calls. A panic of the field there is recovered: At returns
// nil, and AtErr returns it as a *CallbackError.
//
// Special cases:
//
//	t outside [T0, End] (or NaN):             returns nil
//	Settings.DropSteps was set:               returns nil
//	a step could not be rebuilt
//	(the field panicked or changed):          returns nil
func (s *Solution) At(t float64, dst []float64) []float64 {
	if len(s.T) == 0 || s.sc == nil || math.IsNaN(t) {
		return nil
	}
	dir := 1.0
	if s.End < s.T0 {
		dir = -1
	}
	if (t-s.T0)*dir < 0 || (t-s.End)*dir > 0 {
		return nil
	}
	// Find the step k with T[k] <= t <= T[k+1] (in the direction of time).
	k := sort.Search(len(s.T), func(i int) bool { return (s.T[i]-t)*dir >= 0 })
	if k < len(s.T) && s.T[k] == t {
		return s.State(k, dst)
	}
	if k == 0 || k >= len(s.T) {
		if t == s.End && s.Final != nil {
			if cap(dst) < s.Dim {
				dst = make([]float64, s.Dim)
			}
			dst = dst[:s.Dim]
			copy(dst, s.Final)
			return dst
		}
		return nil
	}
	k--
	if cap(dst) < s.Dim {
		dst = make([]float64, s.Dim)
	}
	dst = dst[:s.Dim]
	theta := (t - s.T[k]) / (s.T[k+1] - s.T[k])
	if s.lazy != nil {
		d := s.Dim
		return s.lazy.interp(k, s.T[k], s.Y[k*d:(k+1)*d], s.Y[(k+1)*d:(k+2)*d], theta, dst)
	}
	if s.cd != nil {
		d := s.Dim
		prev := s.d0
		if k > 0 {
			prev = s.coef.at(k - 1)
		}
		s.cd.interpCompact(s.Y[k*d:(k+1)*d], s.Y[(k+1)*d:(k+2)*d], prev, s.coef.at(k), theta, dst)
		return dst
	}
	s.sc.interp(s.coef.at(k), theta, dst)
	return dst
}
