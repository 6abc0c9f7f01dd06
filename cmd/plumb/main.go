// Command plumb audits how far ahead a simulated trajectory can be trusted.
package main

import (
	"context"
	"fmt"
	"io"
	"os"
	"os/signal"
	"strings"

	"github.com/plumbdyn/plumb"
	"github.com/plumbdyn/plumb/integrate"
)

func main() {
	ctx, stop := signal.NotifyContext(context.Background(), os.Interrupt)
	code := run(ctx, os.Args[1:], os.Stdin, os.Stdout, os.Stderr)
	stop()
	os.Exit(code)
}

func run(ctx context.Context, args []string, _ io.Reader, stdout, stderr io.Writer) int {
	if len(args) == 0 || args[0] != "solve" {
		fmt.Fprintln(stderr, "usage: plumb solve")
		return 2
	}
	sys, err := plumb.Model("lorenz")
	if err != nil {
		fmt.Fprintln(stderr, err)
		return 1
	}
	sol, err := integrate.Solve(ctx, sys.Problem(), 20, nil, &integrate.Settings{RelTol: 1e-10, AbsTol: 1e-10, Every: 0.1, DropSteps: true})
	if err != nil {
		fmt.Fprintln(stderr, "plumb solve:", err)
		return 1
	}
	fmt.Fprintln(stdout, "t,"+strings.Join(sys.States, ","))
	for _, s := range sol.Samples {
		fmt.Fprintf(stdout, "%.10g", s.T)
		for _, v := range s.Y {
			fmt.Fprintf(stdout, ",%.17g", v)
		}
		fmt.Fprintln(stdout)
	}
	return 0
}
