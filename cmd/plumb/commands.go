package main

import (
	"context"
	"flag"
)

// command is one plumb command. Every command lives in its own file and is
// registered in the commands table below; nothing else needs to change to add
// one (the README's usage section is checked against 'plumb help', so refresh
// it with 'go test ./cmd/plumb -update').
type command struct {
	name    string // as typed: plumb NAME
	summary string // one line for 'plumb help'
	doc     string // what it does, for 'plumb help NAME'

	// model is the --model used when neither --model nor --file is given;
	// empty means the command needs no system or takes all of them.
	model string
	// formats lists the accepted --format values; the first is the default.
	formats []string
	// plots reports whether --plot draws anything for this command.
	plots bool
	// refuses lists shared flags the command does not take: help leaves
	// them out, and the command refuses a command line that gives one.
	refuses []string
	// refuseWhy says why, in the error (empty: that the command does not
	// take the flag).
	refuseWhy string
	// positional describes the positional arguments for help ("[COMMAND]");
	// empty means the command takes none and any is a usage error.
	positional string

	// setup registers the command's own flags on fs (the shared ones are
	// already there) and returns the function that does the work once the
	// flags are parsed. setup must not do work itself: help calls it too.
	setup func(fs *flag.FlagSet, sh *shared) func(ctx context.Context, cl *call) error
}

// commands is the table of plumb's commands, in the order 'plumb help' lists
// them. It is filled in init to break the reference cycle with help.
var commands []*command

func init() {
	commands = []*command{
		trustCmd,
		spectrumCmd,
		solveCmd,
		seriesCmd,
		ensembleCmd,
		scanCmd,
		cyclesCmd,
		mergeCmd,
		modelsCmd,
		versionCmd,
		helpCmd,
	}
}

// lookup returns the command with the given name, or nil.
func lookup(name string) *command {
	for _, c := range commands {
		if c.name == name {
			return c
		}
	}
	return nil
}
