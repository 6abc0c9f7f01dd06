package lyap

import (
	"context"
	"math"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

func TestDescending(t *testing.T) {
	nan := math.NaN()
	cases := []struct {
		name string
		e    []float64
		want []int // exact: the order is defined by comparisons alone
	}{
		{"empty", nil, []int{}},
		{"sorted", []float64{0.9, 0, -14.5}, []int{0, 1, 2}},
		{"near-zero swap", []float64{0.002, -9e-5, 2e-4, -0.002}, []int{0, 2, 1, 3}},
		{"ties keep their order", []float64{0, 1, 0}, []int{1, 0, 2}},
		{"NaN last", []float64{nan, -1, 2}, []int{2, 1, 0}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			assert.Equal(t, c.want, descending(c.e))
		})
	}
}

func TestSortSpectrumPermutesAlike(t *testing.T) {
	sp := &Spectrum{
		Exponents: []float64{-1, 3, 2},
		StdErr:    []float64{0.1, 0.3, 0.2},
		History: []Point{
			{T: 1, Blocks: 1, Exponents: []float64{-1.5, 3.5, 2.5}},
			{T: 2, Blocks: 2, Exponents: []float64{-1, 3, 2}, StdErr: []float64{0.1, 0.3, 0.2}},
		},
	}
	sortSpectrum(sp)
	// Each exponent keeps its own standard error and history column.
	assert.Equal(t, []float64{3, 2, -1}, sp.Exponents)
	assert.Equal(t, []float64{0.3, 0.2, 0.1}, sp.StdErr)
	assert.Equal(t, []float64{3.5, 2.5, -1.5}, sp.History[0].Exponents)
	assert.Nil(t, sp.History[0].StdErr)
	assert.Equal(t, []float64{0.3, 0.2, 0.1}, sp.History[1].StdErr)
}

// TestExponentsSortedHamiltonian: the Hénon–Heiles orbit at the catalogue's
// start is regular, so all four exponents are near zero and the QR order
// alone leaves them unsorted (it did: lambda_1 = -8.9e-5 < lambda_2 =
// 2.2e-3 over this run). The result must be in decreasing order, and the
// last history point, which is the final estimate, must match it entry by
// entry (exact identity: both come from the same batch means).
func TestExponentsSortedHamiltonian(t *testing.T) {
	p := modelProblem(t, "henon-heiles")
	sp, err := Exponents(context.Background(), p, 4, &Settings{Duration: 1000, Transient: 100})
	require.NoError(t, err)
	for i := 1; i < len(sp.Exponents); i++ {
		assert.GreaterOrEqualf(t, sp.Exponents[i-1], sp.Exponents[i], "exponents %v not in decreasing order", sp.Exponents)
	}
	require.NotEmpty(t, sp.History)
	last := sp.History[len(sp.History)-1]
	assert.Equal(t, sp.Exponents, last.Exponents, "the last running estimate is the final one")
	assert.Equal(t, sp.StdErr, last.StdErr, "standard errors permuted with their exponents")
}

func TestPermuteColumns(t *testing.T) {
	// 2×3 row-major; columns (1,4), (2,5), (3,6) reordered 2, 0, 1.
	v := []float64{1, 2, 3, 4, 5, 6}
	permuteColumns(v, 2, 3, []int{2, 0, 1}, nil)
	assert.Equal(t, []float64{3, 1, 2, 6, 4, 5}, v)
}

// TestCovariantSortedHamiltonian: the covariant vectors' growth rates of the
// regular Hénon–Heiles orbit are near zero and came out unsorted
// (-2.7e-4 before 7.1e-4 over this run); they are sorted, and the angles
// still belong to the vectors as stored (exact identity: both from the same
// permuted columns).
func TestCovariantSortedHamiltonian(t *testing.T) {
	p := modelProblem(t, "henon-heiles")
	c, err := Covariant(context.Background(), p, 4, &Settings{Duration: 300, Transient: 50})
	require.NoError(t, err)
	for i := 1; i < len(c.Exponents); i++ {
		assert.GreaterOrEqualf(t, c.Exponents[i-1], c.Exponents[i], "rates %v not in decreasing order", c.Exponents)
	}
	require.NotEmpty(t, c.Vectors)
	s := len(c.Vectors) / 2
	u, w := c.Vector(s, 0, nil), c.Vector(s, 1, nil)
	assert.Equal(t, LineAngle(u, w), c.Angle(s, 0, 1))
}
