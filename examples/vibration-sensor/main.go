// Command vibration-sensor analyses the trace of an accelerometer on the
// housing of a pump whose casing rattles irregularly, as if nothing were
// known about the machine: is the rattle chaotic or just noise, how many
// variables drive it, how fast do small differences grow, and how far
// ahead can the trace be forecast from its own past?
//
// The trace is invented for the scenario: plumb makes it from one of its
// built-in systems (the Lorenz equations' x, read every 0.02 time units, a
// "50 Hz" sensor) and adds measurement noise of 1 % of the signal's spread.
// From then on only the numbers are used, as a field engineer would have
// them.
//
// A forecast horizon from data describes the recorded signal, not a safety
// assessment of any machine; safety-critical use follows the field's own
// codes and licensed review.
package main

import (
	"context"
	"fmt"
	"io"
	"log"
	"math"
	"math/rand/v2"
	"os"

	"github.com/plumbdyn/plumb"
	"github.com/plumbdyn/plumb/embed"
	"github.com/plumbdyn/plumb/integrate"
)

// Sampling of the invented sensor.
const (
	sampleEvery = 0.02  // time units between readings
	readings    = 12000 // about four minutes of the pump at "50 Hz"
	noiseLevel  = 0.01  // sensor noise, as a fraction of the signal's spread
)

func main() {
	if _, err := run(os.Stdout); err != nil {
		log.Fatal(err)
	}
}

// trace makes the sensor's readings: the source system is used here only.
func trace() ([]float64, error) {
	sys, err := plumb.Model("lorenz")
	if err != nil {
		return nil, err
	}
	const warmUp = 50.0 // the pump has been running for a while
	t1 := warmUp + float64(readings-1)*sampleEvery
	sol, err := integrate.Solve(context.Background(), sys.Problem(), t1, integrate.DormandPrince54,
		&integrate.Settings{RelTol: 1e-10, AbsTol: 1e-10, Every: sampleEvery, DropSteps: true})
	if err != nil {
		return nil, err
	}
	skip := int(math.Round(warmUp / sampleEvery))
	x := make([]float64, 0, readings)
	for _, s := range sol.Samples[skip:] {
		x = append(x, s.Y[0])
	}
	x = x[:readings]
	var sum, ss float64
	for _, v := range x {
		sum += v
	}
	mean := sum / float64(len(x))
	for _, v := range x {
		ss += (v - mean) * (v - mean)
	}
	sd := math.Sqrt(ss / float64(len(x)))
	noise := rand.New(rand.NewPCG(2026, 12))
	for i := range x {
		x[i] += noiseLevel * sd * noise.NormFloat64()
	}
	return x, nil
}

// run analyses the trace, writes a summary to w and returns the report.
func run(w io.Writer) (*embed.Report, error) {
	x, err := trace()
	if err != nil {
		return nil, err
	}
	s, err := embed.NewSeries(x, sampleEvery)
	if err != nil {
		return nil, err
	}
	r, err := embed.Analyze(context.Background(), s, &embed.Settings{Seed: 7})
	if err != nil {
		return nil, err
	}
	p := func(format string, a ...any) { fmt.Fprintf(w, format+"\n", a...) }
	p("%d readings every %g s", r.N, r.Dt)
	p("delay %d readings (%s); embedding dimension %d (%s)", r.Lag, r.Choices.Lag, r.Dim, r.Choices.Dim)
	if d := r.CorrDim; d != nil && d.Found {
		p("correlation dimension %.3g ± %.2g", d.D2, d.D2Err)
	}
	if d := r.Rosenstein; d != nil && d.Found {
		p("largest exponent %.3g ± %.2g per second (Rosenstein)", d.Lambda, d.LambdaErr)
	}
	if t := r.Surrogate; t != nil {
		p("linear-noise surrogates rejected: %v (p = %.2g)", t.Rejected, t.P)
	}
	if z := r.ZeroOne; z != nil {
		p("0-1 test K = %.3g", z.K)
	}
	if f := r.Forecast; f != nil {
		p("the trace can be forecast %.3g s ahead to half its spread (the exponent predicts %.3g s)", f.Horizon, r.ExponentHorizon)
	}
	for _, n := range r.Notes {
		p("note: %s", n)
	}
	p("this describes the recorded signal, not a safety assessment of the pump")
	return r, nil
}
