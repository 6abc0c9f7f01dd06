package embed

import (
	"context"
	"crypto/sha256"
	"encoding/binary"
	"encoding/hex"
	"math"
	"math/cmplx"
	"math/rand/v2"
	"runtime"
	"testing"

	"github.com/stretchr/testify/require"
	"gonum.org/v1/gonum/dsp/fourier"
)

// fftLengths covers every radix alone and mixed, odd and even lengths, and
// lengths like those of real series.
var fftLengths = []int{1, 2, 3, 4, 5, 6, 8, 9, 10, 12, 15, 16, 25, 27, 30, 45, 60, 64, 75, 81, 100,
	120, 125, 128, 243, 250, 256, 360, 625, 1000, 1024, 1536, 3000, 4096}

// fftTol bounds the difference from gonum's transform relative to the
// norm of the input: both are O(log n) roundings of about 1e-16 each
// (common practice for FFT error bounds), with a wide margin.
const fftTol = 1e-12

// TestRealFFTAgainstGonum compares the transform and its inverse with
// gonum's dsp/fourier.FFT (a general-purpose reference library) on random
// series of every length in fftLengths.
func TestRealFFTAgainstGonum(t *testing.T) {
	rng := rand.New(rand.NewPCG(7, 11))
	for _, n := range fftLengths {
		x := make([]float64, n)
		var norm float64
		for i := range x {
			x[i] = rng.NormFloat64() + 3
			norm += x[i] * x[i]
		}
		norm = math.Sqrt(norm) * math.Sqrt(float64(n))
		f := newRealFFT(n)
		require.NotNilf(t, f, "n = %d", n)
		g := fourier.NewFFT(n)
		want := g.Coefficients(nil, x)
		got := f.Coefficients(nil, x)
		require.Lenf(t, got, len(want), "n = %d", n)
		for k := range want {
			require.InDeltaf(t, 0, cmplx.Abs(got[k]-want[k])/norm, fftTol, "n = %d: X_%d = %v, gonum's dsp/fourier gives %v", n, k, got[k], want[k])
		}
		// The inverse of a spectrum with random phases (what the
		// phase-randomised surrogates take).
		for k := 1; k < len(want); k++ {
			if n%2 == 0 && k == len(want)-1 {
				continue
			}
			sn, cs := math.Sincos(2 * math.Pi * rng.Float64())
			a := cmplx.Abs(want[k])
			want[k] = complex(a*cs, a*sn)
		}
		xs := g.Sequence(nil, want)
		ys := f.Sequence(make([]float64, n), want)
		for i := range xs {
			require.InDeltaf(t, 0, math.Abs(ys[i]-xs[i])/norm, fftTol, "n = %d: x_%d = %v, gonum's dsp/fourier gives %v", n, i, ys[i], xs[i])
		}
		// The round trip gives n times the input (the transform's
		// convention, an identity up to rounding).
		back := f.Sequence(make([]float64, n), f.Coefficients(nil, x))
		for i := range x {
			require.InDeltaf(t, x[i], back[i]/float64(n), fftTol*norm/float64(n)+1e-13, "n = %d: round trip of x_%d", n, i)
		}
	}
}

// TestRealFFTLengths: lengths with another prime factor, or none, have no
// transform.
func TestRealFFTLengths(t *testing.T) {
	for _, n := range []int{0, -4, 7, 14, 49, 1001} {
		require.Nilf(t, newRealFFT(n), "n = %d has a prime factor other than 2, 3 and 5", n)
	}
	for _, n := range fftLengths {
		require.Equalf(t, n, FFTLength(n), "n = %d is a transform length", n)
	}
}

// TestRealFFTRealEnds: the mean and, for even n, the Nyquist coefficient
// of a real sequence are real (exact identity: their imaginary parts are
// sums of products of the series with sin(0) and sin(π j), which the
// exact quarter-turn twiddles make zero for radix-2 lengths).
func TestRealFFTRealEnds(t *testing.T) {
	for _, n := range []int{2, 4, 8, 64, 1024} {
		x := make([]float64, n)
		for i := range x {
			x[i] = float64(i*i%7) - 2.5
		}
		c := newRealFFT(n).Coefficients(nil, x)
		require.Zerof(t, imag(c[0]), "n = %d: imag X_0", n)
		require.Zerof(t, imag(c[n/2]), "n = %d: imag X_{n/2}", n)
	}
}

func BenchmarkRealFFT(b *testing.B) {
	for _, n := range []int{1000, 4096} {
		x := make([]float64, n)
		for i := range x {
			x[i] = math.Sin(float64(i) * 0.1)
		}
		f, g := newRealFFT(n), fourier.NewFFT(n)
		c := make([]complex128, n/2+1)
		out := make([]float64, n)
		b.Run("plumb", func(b *testing.B) {
			for b.Loop() {
				f.Sequence(out, f.Coefficients(c, x))
			}
		})
		b.Run("gonum", func(b *testing.B) {
			for b.Loop() {
				g.Sequence(out, g.Coefficients(c, x))
			}
		})
	}
}

// goldenSurrogateBits is the SHA-256 of surrogateBits's values, recorded on
// linux/amd64; .ci/arm64.sh runs TestSurrogateBits on arm64 to show that
// the transform, and the surrogates made with it, have the same bits there.
const goldenSurrogateBits = "bd2b631810424f81169dac0ec472139ce6e41a88e307fa210ca94e57c921ecde"

// surrogateBits hashes the bits of the transform of a fixed series at
// several lengths (coefficients and inverse) and of phase-randomised and
// IAAFT surrogates of it (the phase-randomised values are the inverse
// transform's own, not remapped to the series' values).
func surrogateBits(t *testing.T) string {
	t.Helper()
	// A Hénon orbit (a = 1.4, b = 0.3), products rounded before they are
	// added, so the series itself has the same bits everywhere.
	x := make([]float64, 1500)
	u, v := 0.1, 0.1
	for i := range x {
		u, v = 1-float64(1.4*float64(u*u))+v, float64(0.3*u)
		x[i] = u
	}
	h := sha256.New()
	put := func(f float64) {
		var b [8]byte
		binary.LittleEndian.PutUint64(b[:], math.Float64bits(f))
		h.Write(b[:])
	}
	for _, n := range []int{15, 64, 360, 1500} {
		f := newRealFFT(n)
		c := f.Coefficients(nil, x[:n])
		for _, z := range c {
			put(real(z))
			put(imag(z))
		}
		for _, y := range f.Sequence(make([]float64, n), c) {
			put(y)
		}
	}
	for _, kind := range []SurrogateKind{PhaseRandomised, IAAFT} {
		s, err := Surrogates(context.Background(), x, kind, 3, 17)
		require.NoError(t, err)
		for _, si := range s {
			for _, y := range si.Values {
				put(y)
			}
			put(si.SpectrumErr)
		}
	}
	return hex.EncodeToString(h.Sum(nil))
}

// TestSurrogateBits compares surrogateBits with the hash recorded on
// amd64 (an exact identity across architectures: the same operations on
// the same bits).
func TestSurrogateBits(t *testing.T) {
	got := surrogateBits(t)
	require.Equalf(t, goldenSurrogateBits, got, "transform and surrogates hash differently on %s/%s", runtime.GOOS, runtime.GOARCH)
}
