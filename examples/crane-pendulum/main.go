// Command crane-pendulum audits a simulation of a crane hook with a second
// swinging load below it, modelled as a planar double pendulum (two point
// masses on rigid massless rods; the built-in model "double-pendulum").
//
// The crane's operators replay the swing after a sudden stop from a large
// angle. How many seconds of the replayed swing can be believed to a
// hundredth of a radian, and what limits that? Angles are compared modulo a
// full turn, so a load that goes over the top once is not counted as a
// divergence.
//
// The numbers here are invented for the scenario; the result is a statement
// about the numerical model, not a safety assessment of any crane.
package main

import (
	"context"
	"fmt"
	"io"
	"log"
	"os"

	"github.com/plumbdyn/plumb"
)

func main() {
	if _, err := run(os.Stdout); err != nil {
		log.Fatal(err)
	}
}

// run audits the replay, writes the report to w and returns it.
func run(w io.Writer) (*plumb.Report, error) {
	sys, err := plumb.Model("double-pendulum")
	if err != nil {
		return nil, err
	}
	// A hook of 4 m and a load rope of 3 m; the load weighs twice the hook.
	for _, p := range []struct {
		name  string
		value float64
	}{{"l1", 4}, {"l2", 3}, {"m1", 1}, {"m2", 2}} {
		if err := sys.Set(p.name, p.value); err != nil {
			return nil, err
		}
	}
	// Released from 100° and 140° at rest.
	if err := sys.SetStart([]float64{1.745, 2.443, 0, 0}); err != nil {
		return nil, err
	}
	rep, err := sys.Trust(context.Background(), 20, &plumb.TrustSettings{Tol: 0.01})
	if err != nil {
		return nil, err
	}
	if err := rep.Write(w); err != nil {
		return nil, err
	}
	_, err = fmt.Fprintf(w, "\nthe replay can be believed for %.3g s of the 20 s asked for\n", rep.TrustedUntil)
	return rep, err
}
