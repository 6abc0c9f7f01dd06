// Package simd says which vector instructions plumb's assembly kernels may
// use on this machine. It holds the choice in one place so that the tests
// and benchmarks of every package can run the kernels of both widths.
package simd

import "golang.org/x/sys/cpu"

// HasAVX2 reports whether the CPU has AVX2 and the operating system saves
// the 256-bit registers (golang.org/x/sys/cpu checks both). It is false on
// every architecture but amd64.
func HasAVX2() bool { return cpu.X86.HasAVX2 }

// AVX2 is whether the amd64 kernels use AVX2 (256-bit, four float64 per
// instruction; never FMA) rather than SSE2 (two per instruction). It starts
// as HasAVX2(). Both widths give the same bits; tests and benchmarks set it
// to false to check or time the SSE2 kernels, and must set it to true only
// when HasAVX2() is. It is read when a solver is set up, so it is changed
// only while no solve is being set up.
var AVX2 = HasAVX2()
