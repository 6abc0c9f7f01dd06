package integrate

import "runtime"

// handoffSpins is how many times recvSpin polls a channel before it
// blocks, about 100 µs here: longer than the controller's work between two
// jobs of a batch step, shorter than a pause a caller would notice. A
// worker that blocks (the caller stopped stepping) costs a wake-up of its
// thread at the next job, tens of µs, as much as a step of a thousand
// members takes: polling first is what lets two workers run a batch
// faster than one (BenchmarkBatchLorenz).
const (
	handoffSpins = 2048
	handoffYield = 64 // runtime.Gosched every handoffYield polls
)

// recvSpin receives from c like <-c, polling it for a while before it
// blocks.
func recvSpin[T any](c <-chan T) (v T, ok bool) {
	for i := range handoffSpins {
		select {
		case v, ok = <-c:
			return v, ok
		default:
		}
		if i%handoffYield == handoffYield-1 {
			runtime.Gosched()
		}
	}
	v, ok = <-c
	return v, ok
}
