//go:build !amd64 || purego

package integrate

// On every architecture but amd64 (and with the purego tag) attemptSq runs
// its Go loops only; dopri54_kern_amd64.go says what the amd64 kernels are.

// dp54KernAsm reports that there are no assembly kernels here.
const dp54KernAsm = false

// dp54KernMin is unused without the kernels.
const dp54KernMin = 0

// dp54Kern holds nothing without the kernels.
type dp54Kern struct{}

// attemptKern is never called: attemptSq calls it only when dp54KernAsm.
func (w *dp54Work) attemptKern(_, _ float64, _, _, _, _, _, _ []float64) (float64, int) {
	panic("integrate: no vector kernels on this architecture")
}
