package integrate

import (
	"context"
	"errors"
	"math"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

// streamed collects what Stream hands out, copying each sample.
type streamed struct {
	t []float64
	y []float64
}

func (s *streamed) each(t float64, y []float64) error {
	s.t = append(s.t, t)
	s.y = append(s.y, y...)
	return nil
}

// sameBits reports whether a and b hold the same float64 bits.
func sameBits(a, b []float64) bool {
	if len(a) != len(b) {
		return false
	}
	for i := range a {
		if math.Float64bits(a[i]) != math.Float64bits(b[i]) {
			return false
		}
	}
	return true
}

func TestStreamMatchesSolve(t *testing.T) {
	// Exact identity: Stream and Solve run one loop; the samples, the
	// crossings, the end and the work must be the same bits.
	lorenz := Problem{F: lorenzField(), Y0: []float64{1, 1, 1}}
	cross := []Crossing{{Name: "x=0", G: func(_ float64, y []float64) float64 { return y[0] }}}
	cases := []struct {
		name string
		t0   float64
		t1   float64
		s    Settings
	}{
		{"grid", 0, 10, Settings{RelTol: 1e-9, AbsTol: 1e-9, Every: 0.01, DropSteps: true, Crossings: cross}},
		{"grid not dividing", 0, 3.3335, Settings{Every: 0.1, DropSteps: true}},
		{"backwards", 0.5, 0, Settings{Every: 0.03, DropSteps: true}},
		{"times", 0, 5, Settings{Times: []float64{0, 0, 1.5, 2, 4.75, 5}, DropSteps: true}},
		{"steps", 0, 5, Settings{RelTol: 1e-8, AbsTol: 1e-8, Crossings: cross}},
		{"steps stopping", 0, 5, Settings{Crossings: []Crossing{{Name: "x=0", Stop: true,
			G: func(_ float64, y []float64) float64 { return y[0] }}}}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			p := lorenz
			p.T0 = c.t0
			s1 := c.s
			want, err := Solve(context.Background(), p, c.t1, nil, &s1)
			require.NoError(t, err)
			var got streamed
			s2 := c.s
			sol, err := Stream(context.Background(), p, c.t1, nil, &s2, got.each)
			require.NoError(t, err)

			var wantT, wantY []float64
			if c.s.Every > 0 || c.s.Times != nil {
				for _, smp := range want.Samples {
					wantT = append(wantT, smp.T)
					wantY = append(wantY, smp.Y...)
				}
				assert.Equal(t, len(want.Samples), SampleCount(c.t0, c.t1, &c.s), "SampleCount against the grid Solve walked")
			} else {
				wantT, wantY = want.T, want.Y
				assert.Equal(t, -1, SampleCount(c.t0, c.t1, &c.s))
				if want.Status == Stopped {
					// Solve keeps the whole last step; Stream ends on the crossing.
					hit := want.Hits[len(want.Hits)-1]
					wantT = append(wantT[:len(wantT)-1], hit.T)
					wantY = append(wantY[:len(wantY)-len(hit.Y)], hit.Y...)
				}
			}
			require.NotEmpty(t, wantT)
			if c.name == "steps stopping" {
				require.Equal(t, Stopped, want.Status, "the case must exercise a stopping crossing")
			}
			assert.True(t, sameBits(wantT, got.t), "times differ: %d streamed, %d solved", len(got.t), len(wantT))
			assert.True(t, sameBits(wantY, got.y), "states differ")
			assert.Empty(t, sol.Samples)
			assert.Empty(t, sol.T, "Stream keeps no steps")
			assert.Equal(t, want.Status, sol.Status)
			assert.Equal(t, want.Stats, sol.Stats)
			assert.Equal(t, math.Float64bits(want.End), math.Float64bits(sol.End))
			assert.True(t, sameBits(want.Final, sol.Final))
			require.Equal(t, len(want.Hits), len(sol.Hits))
			for i := range want.Hits {
				assert.Equal(t, math.Float64bits(want.Hits[i].T), math.Float64bits(sol.Hits[i].T))
				assert.True(t, sameBits(want.Hits[i].Y, sol.Hits[i].Y))
			}
		})
	}
}

func TestStreamCallbackStops(t *testing.T) {
	lorenz := Problem{F: lorenzField(), Y0: []float64{1, 1, 1}}
	errFull := errors.New("disk full")

	// An error from the receiver stops the run with that error.
	n := 0
	sol, err := Stream(context.Background(), lorenz, 10, nil, &Settings{Every: 0.01}, func(t float64, y []float64) error {
		n++
		if n == 300 {
			return errFull
		}
		return nil
	})
	require.ErrorIs(t, err, errFull)
	assert.Equal(t, 300, n, "no call after the failing one")
	assert.Equal(t, Failed, sol.Status)
	assert.Less(t, sol.End, 2.99, "the run ends at the start of the step whose sample failed")
	assert.Len(t, sol.Final, 3)

	// At the start: nothing was stepped, the end is the start.
	sol, err = Stream(context.Background(), lorenz, 10, nil, &Settings{Every: 0.01}, func(float64, []float64) error { return errFull })
	require.ErrorIs(t, err, errFull)
	assert.Equal(t, 0.0, sol.End)
	assert.Equal(t, []float64{1, 1, 1}, sol.Final)

	// A panic is recovered and named.
	_, err = Stream(context.Background(), lorenz, 10, nil, &Settings{Every: 0.5}, func(t float64, y []float64) error {
		if t > 1 {
			panic("receiver broke")
		}
		return nil
	})
	var ce *CallbackError
	require.ErrorAs(t, err, &ce)
	assert.Equal(t, CallbackSample, ce.Callback)

	_, err = Stream(context.Background(), lorenz, 10, nil, nil, nil)
	assert.ErrorIs(t, err, ErrSettings)
}

func TestStreamFlatMemory(t *testing.T) {
	// Allocations do not grow with the span: ten times the samples and
	// steps, the same count (the set-up's), so the loop allocates nothing.
	lorenz := Problem{F: lorenzField(), Y0: []float64{1, 1, 1}}
	sink := 0.0
	each := func(t float64, y []float64) error { sink += y[0]; return nil }
	allocs := func(t1 float64) float64 {
		return testing.AllocsPerRun(5, func() {
			if _, err := Stream(context.Background(), lorenz, t1, nil, &Settings{Every: 0.01}, each); err != nil {
				t.Fatal(err)
			}
		})
	}
	short, long := allocs(2), allocs(20)
	t.Logf("allocations per Stream: %v over t1 = 2, %v over t1 = 20", short, long)
	assert.Equal(t, short, long, "allocations over t1 = 2 and t1 = 20")
}
