// Command plumb integrates nonlinear systems with error control and tells how
// far ahead a computed trajectory can be trusted.
//
// Run 'plumb help' for the commands and their flags.
package main

import (
	"context"
	"os"
	"os/signal"
	"syscall"
)

func main() {
	ctx, stop := signal.NotifyContext(context.Background(), os.Interrupt, syscall.SIGTERM)
	code := run(ctx, os.Args[1:], os.Stdin, os.Stdout, os.Stderr)
	stop()
	os.Exit(code)
}
