package integrate

import "runtime"

// handoffSpins is how many times recvSpin polls a channel before it
// blocks, about 100 µs here: longer than the controller's work between two
// jobs of a batch step, shorter than a pause a caller would notice. A
// worker that blocks has its thread woken at the next job, and a step of
// a thousand Lorenz members takes only about 50 µs: with blocking
// hand-offs two workers ran BenchmarkBatchLorenz 0.94-1.0x as fast as
// one, with polling first 1.87x.
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
