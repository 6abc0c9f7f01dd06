package main

import (
	"bytes"
	"context"
	"flag"
	"fmt"
	"io"
	"strings"
)

var helpCmd = &command{
	name:       "help",
	summary:    "show the commands, or one command's flags",
	doc:        `Show the list of commands, or with a COMMAND its flags. Help goes to stdout.`,
	formats:    []string{"table"},
	positional: "[COMMAND]",
	setup: func(fs *flag.FlagSet, sh *shared) func(context.Context, *call) error {
		return runHelp
	},
}

func runHelp(_ context.Context, cl *call) error {
	switch len(cl.args) {
	case 0:
		return writeMainHelp(cl.stdout)
	case 1:
		c := lookup(cl.args[0])
		if c == nil {
			return usagef("unknown command %q (commands: %s)", cl.args[0], strings.Join(commandNames(), ", "))
		}
		return writeCommandHelp(cl.stdout, c)
	}
	return usagef("want at most one COMMAND, got %q", cl.args)
}

func commandNames() []string {
	out := make([]string, len(commands))
	for i, c := range commands {
		out[i] = c.name
	}
	return out
}

// writeMainHelp writes 'plumb help'.
func writeMainHelp(w io.Writer) error {
	var b bytes.Buffer
	b.WriteString(`plumb integrates nonlinear systems with error control and tells how far
ahead a computed trajectory can be trusted.

usage: plumb COMMAND [flags]

commands:
`)
	tw := newTable(&b)
	for _, c := range commands {
		fmt.Fprintf(tw, "  %s\t%s\n", c.name, c.summary)
	}
	tw.Flush()
	b.WriteString(`
Every command takes --model, --file, --set, --format, --plot and --quiet.
Results go to stdout (--format table, json or csv); progress, warnings and
wall time go to stderr. Flags are written --name value or --name=value.

exit status: 0 done; 1 the computation failed (the message says which step
and why; what was done is still written); 2 bad usage or input (the message
names the flag).

Run 'plumb help COMMAND' for a command's flags.
`)
	_, err := w.Write(b.Bytes())
	return err
}

// writeCommandHelp writes 'plumb help NAME': usage, description, the
// command's own flags, then the shared ones.
func writeCommandHelp(w io.Writer, c *command) error {
	var b bytes.Buffer
	fmt.Fprintf(&b, "usage: plumb %s [flags]", c.name)
	if c.positional != "" {
		fmt.Fprintf(&b, " %s", c.positional)
	}
	fmt.Fprintf(&b, "\n\n%s\n", c.doc)
	fs, _, _ := newFlagSet(c)
	var own, common []*flag.Flag
	fs.VisitAll(func(f *flag.Flag) {
		if sharedNames[f.Name] {
			common = append(common, f)
		} else {
			own = append(own, f)
		}
	})
	if c.name != "help" {
		if len(own) > 0 {
			b.WriteString("\nflags:\n")
			writeFlags(&b, own)
		}
		b.WriteString("\nshared flags:\n")
		writeFlags(&b, common)
	}
	_, err := w.Write(b.Bytes())
	return err
}

// writeFlags writes one aligned line per flag: --name ARG  usage (default).
func writeFlags(w io.Writer, flags []*flag.Flag) {
	tw := newTable(w)
	for _, f := range flags {
		arg, usage := flag.UnquoteUsage(f)
		switch arg {
		case "value", "float", "int", "string":
			arg = strings.ToUpper(arg) // a type name: flags without a `NAME` in their usage
		}
		if arg != "" {
			arg = " " + arg
		}
		def := ""
		switch f.DefValue {
		case "", "0", "false", "[]":
		default:
			def = " (default " + f.DefValue + ")"
		}
		fmt.Fprintf(tw, "  --%s%s\t%s%s\n", f.Name, arg, usage, def)
	}
	tw.Flush()
}
