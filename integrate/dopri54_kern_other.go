//go:build !amd64 || purego

package integrate

// On every architecture but amd64 (and with the purego tag) DormandPrince54
// runs the Go loops of dp54Work.attemptSq only; dopri54_kern_amd64.go says
// what the amd64 kernels are.

// dp54Scheme returns w: there are no vector kernels here.
func dp54Scheme(w *dp54Work, _ int) scheme { return w }
