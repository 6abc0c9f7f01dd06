package integrate

import (
	"fmt"
	"math"
)

// BatchFunc is a vector field evaluated for m members of a batch at once.
// y and dydt hold the members' states component-major: component i of
// member k is y[i*m+k], so len(y) == len(dydt) == n*m for a state of
// dimension n. All members share the time t. Each member's rates must
// depend on that member's state alone.
//
// Why component-major: a field written for a batch then reads and writes
// each component of all members as one contiguous run, x := y[:m],
// yy := y[m:2*m], ..., so its loops have unit stride and no per-member
// call, and a compiled formula runs each instruction over a whole run of
// members (the interpreter's dispatch is paid once per instruction, not
// once per member). The Runge–Kutta stages are element-wise over the whole
// slice and do not care about the layout.
type BatchFunc func(t float64, m int, y, dydt []float64)

// BatchProblem is M copies of one initial value problem y' = F(t, y),
// differing in their starts, integrated in lockstep with one step size.
type BatchProblem struct {
	// F is the batch field. Required unless Fork is set. When the batch is
	// split across goroutines and Fork is nil, F is called concurrently on
	// disjoint slices and must be safe for that.
	F BatchFunc
	// Fork, when not nil, makes a field for each goroutine of the run (and
	// F is ignored), for fields that keep scratch space between calls, as
	// Loop's adapter and compiled formulas do.
	Fork func() BatchFunc
	// Dim is the state dimension of one member.
	Dim int
	// T0 is the initial time, shared by every member.
	T0 float64
	// Starts holds one initial state per member (each of length Dim); they
	// are copied, never written.
	Starts [][]float64
}

// Loop returns a Fork maker for a plain Func of dimension n: each field it
// makes gathers one member's state at a time into its own scratch vector,
// calls f, and scatters the rates back. It gives the same bits as calling
// f on each member alone. The returned makers' fields keep scratch space,
// so each goroutine needs its own (BatchProblem.Fork does that). When f
// itself keeps scratch space (a compiled formula), pass a maker of fresh
// Funcs through LoopFork instead.
func Loop(f Func, n int) func() BatchFunc {
	return LoopFork(func() Func { return f }, n)
}

// LoopFork is Loop for a Func that keeps scratch space: newF is called once
// per field made, so every goroutine gets its own Func.
func LoopFork(newF func() Func, n int) func() BatchFunc {
	return func() BatchFunc {
		f := newF()
		buf := make([]float64, 2*n)
		ys, fs := buf[:n:n], buf[n:]
		return func(t float64, m int, y, dydt []float64) {
			for k := 0; k < m; k++ {
				for i := range ys {
					ys[i] = y[i*m+k]
				}
				f(t, ys, fs)
				for i, v := range fs {
					dydt[i*m+k] = v
				}
			}
		}
	}
}

// ProblemBatch returns the batch of p's field with the given starts (nil:
// one member, p.Y0), for runs whose results must equal Solve's member by
// member: each goroutine's field comes from its own p.Own(), through
// LoopFork.
func ProblemBatch(p Problem, starts [][]float64) BatchProblem {
	if starts == nil {
		starts = [][]float64{p.Y0}
	}
	n := len(p.Y0)
	return BatchProblem{
		Fork: LoopFork(func() Func { return p.Own().F }, n),
		Dim:  n, T0: p.T0, Starts: starts,
	}
}

// BatchSettings are the settings of a batch run: those of Solve (see
// below for what applies) and how many goroutines share the work.
//
// Of Settings, RelTol, AbsTol, RelTols, AbsTols (per component, the same
// for every member), InitialStep, MinStep, MaxStep, MaxSteps, Every, Times,
// Controller and Progress apply as in Solve. Crossings are not supported
// (ErrSettings); the stiffness test does not run; a batch keeps no steps
// (DropSteps is implied): samples come from Every or Times, and
// BatchStepper.Dense gives the continuous extension of the last step.
type BatchSettings struct {
	Settings
	// Workers is the number of goroutines that share the members. Zero
	// means GOMAXPROCS; it is never more than the number of blocks of
	// members (see BatchBlock). Results are bit-identical whatever it is.
	Workers int
}

// BatchBlock is the most members a block holds. The members are cut into
// blocks of near-equal size, each with its own contiguous component-major
// storage and one field call per stage; a goroutine advances whole blocks.
// The cut depends only on the number of members, never on the number of
// goroutines.
const BatchBlock = 128

// validateBatch checks p for a run to t1.
func (p BatchProblem) validate(t1 float64) error {
	if p.F == nil && p.Fork == nil {
		return fmt.Errorf("integrate: BatchProblem has neither F nor Fork: %w", ErrSettings)
	}
	if p.Dim <= 0 {
		return fmt.Errorf("integrate: BatchProblem.Dim = %d, want > 0: %w", p.Dim, ErrDimension)
	}
	if len(p.Starts) == 0 {
		return fmt.Errorf("integrate: BatchProblem.Starts is empty: %w", ErrDimension)
	}
	for k, y := range p.Starts {
		if len(y) != p.Dim {
			return fmt.Errorf("integrate: BatchProblem.Starts[%d] has %d components, Dim is %d: %w", k, len(y), p.Dim, ErrDimension)
		}
		for i, v := range y {
			if math.IsNaN(v) || math.IsInf(v, 0) {
				return fmt.Errorf("integrate: member %d: %w", k, &FieldError{T: p.T0, Index: i, Value: v, What: "initial state"})
			}
		}
	}
	if math.IsNaN(p.T0) || math.IsInf(p.T0, 0) {
		return fmt.Errorf("integrate: BatchProblem.T0 = %v: %w", p.T0, ErrSpan)
	}
	if math.IsNaN(t1) || math.IsInf(t1, 0) {
		return fmt.Errorf("integrate: t1 = %v: %w", t1, ErrSpan)
	}
	if t1 == p.T0 {
		return fmt.Errorf("integrate: t1 = t0 = %v: %w", t1, ErrSpan)
	}
	return nil
}

// blockSizes cuts m members into blocks of at most BatchBlock, of sizes
// differing by at most one.
func blockSizes(m int) []int {
	nb := (m + BatchBlock - 1) / BatchBlock
	out := make([]int, nb)
	for b := range out {
		out[b] = m / nb
		if b < m%nb {
			out[b]++
		}
	}
	return out
}
