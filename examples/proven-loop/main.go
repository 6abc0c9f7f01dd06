// Command proven-loop asks how long a lab's convection loop model can be
// proven to follow its sensors' start. The loop's three temperatures and
// speed are read by instruments that resolve 1e-6 (scaled units); the
// model (examples/systems/lab-loop.json: the Lorenz equations in the
// loop's own names) is started from the reading. Every true start lies
// within 5e-7 of it, so the enclosure starts from that box and carries
// every start in it: up to when is the model's state known to within
// 0.01, and how does that compare with the time the largest Lyapunov
// exponent predicts?
//
// The answer concerns the model's equations as written, not the loop in
// the lab; safety-critical use follows the field's codes and licensed
// review.
package main

import (
	"context"
	"fmt"
	"io"
	"log"
	"math"
	"os"
	"path/filepath"
	"runtime"

	"github.com/plumbdyn/plumb"
	"github.com/plumbdyn/plumb/enclose"
)

func main() {
	if _, err := run(os.Stdout); err != nil {
		log.Fatal(err)
	}
}

// The scenario's numbers (invented): the instruments' half-resolution,
// the width the operators can accept, and the largest Lyapunov exponent
// of the loop's model (Lorenz at these parameters, 0.9056 per time unit,
// Sprott 2003).
const (
	readHalfWidth = 5e-7
	acceptWidth   = 0.01
	lambda        = 0.9056
)

// outcome is what the proof found.
type outcome struct {
	Proven    float64 // the proven horizon (s)
	Predicted float64 // ln(accept/(2·half-width))/lambda (s)
	Stopped   string  // why the enclosure ended, "" if it reached the end
}

// run encloses the loop from its reading, writes the story to w and
// returns it.
func run(w io.Writer) (outcome, error) {
	_, here, _, _ := runtime.Caller(0)
	f, err := os.Open(filepath.Join(filepath.Dir(here), "..", "systems", "lab-loop.json"))
	if err != nil {
		return outcome{}, err
	}
	defer f.Close()
	sys, err := plumb.LoadSystem(f)
	if err != nil {
		return outcome{}, err
	}
	formulas := &enclose.Formulas{States: sys.States, Rates: sys.Formulas()}
	for _, p := range sys.Params() {
		formulas.Params = append(formulas.Params, p.Name)
		formulas.Values = append(formulas.Values, p.Value)
	}
	res, err := enclose.Flow(context.Background(), formulas, 0, sys.Start(), 40,
		&enclose.Settings{Tol: acceptWidth, Radius: readHalfWidth})
	if err != nil {
		return outcome{}, err
	}
	out := outcome{
		Proven:    res.Horizon,
		Predicted: math.Log(acceptWidth/(2*readHalfWidth)) / lambda,
	}
	fmt.Fprintf(w, "start read to ±%g: %v\n", readHalfWidth, sys.Start())
	for _, at := range []float64{0, 2, 4, 6, 8, 10} {
		st := nearest(res.Steps, at)
		fmt.Fprintf(w, "t = %5.2f s  every true state within a box of width %.2g\n", st.T, st.Width)
	}
	fmt.Fprintf(w, "proven to within %g up to t = %.2f s (the exponent predicts %.2f s)\n", acceptWidth, out.Proven, out.Predicted)
	if res.Failure != nil {
		out.Stopped = res.Failure.Reason
		fmt.Fprintf(w, "the enclosure stopped at t = %.2f s: %s\n", res.Failure.T, res.Failure.Reason)
	}
	fmt.Fprintln(w, "this is a proof about the model's equations as written, not about the loop in the lab")
	return out, nil
}

// nearest returns the first step at or after time at (the last one when
// none is).
func nearest(steps []enclose.Step, at float64) enclose.Step {
	for _, s := range steps {
		if s.T >= at {
			return s
		}
	}
	return steps[len(steps)-1]
}
