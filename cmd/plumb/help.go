package main

import (
	"bytes"
	"context"
	"flag"
	"fmt"
	"io"
	"slices"
	"strings"
	"unicode/utf8"
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
Every command takes --model, --file, --set, --start, --format, --plot,
--plot-size, --quiet, --out and --progress.
Results go to stdout (--format table, json or csv), or whole into --out FILE;
progress, warnings and wall time go to stderr. With --format json an error
that leaves no result is a JSON object on stdout too (docs/json.md). Flags
are written --name value or --name=value.

exit status: 0 done; 1 the computation failed (the message says which step
and why; what was done is still written); 2 bad usage or input (the message
names the flag).

Run 'plumb help COMMAND' for a command's flags, 'plumb --version' for the
version.
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
		if slices.Contains(c.refuses, f.Name) {
			return
		}
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

// helpWidth is the width help text is wrapped to.
const helpWidth = 80

// writeFlags writes one entry per flag, "--name ARG  usage (default)", with
// the usage wrapped to helpWidth and aligned after the widest flag.
func writeFlags(w io.Writer, flags []*flag.Flag) {
	type entry struct{ left, text string }
	var entries []entry
	width := 0
	for _, f := range flags {
		arg, usage := flag.UnquoteUsage(f)
		switch arg {
		case "value", "float", "int", "string":
			arg = strings.ToUpper(arg) // a type name: the usage names no `ARG`
		}
		left := "--" + f.Name
		if arg != "" {
			left += " " + arg
		}
		switch f.DefValue {
		case "", "0", "false":
		default:
			usage += " (default " + f.DefValue + ")"
		}
		entries = append(entries, entry{left, usage})
		width = max(width, utf8.RuneCountInString(left))
	}
	for _, e := range entries {
		lines := wrap(e.text, max(helpWidth-4-width, 20))
		pad := strings.Repeat(" ", width-utf8.RuneCountInString(e.left))
		fmt.Fprintf(w, "  %s%s  %s\n", e.left, pad, lines[0])
		for _, l := range lines[1:] {
			fmt.Fprintf(w, "  %s  %s\n", strings.Repeat(" ", width), l)
		}
	}
}

// wrap splits text into lines of at most n runes at spaces (a longer word
// gets a line of its own).
func wrap(text string, n int) []string {
	var lines []string
	line := ""
	for _, word := range strings.Fields(text) {
		switch {
		case line == "":
			line = word
		case utf8.RuneCountInString(line)+1+utf8.RuneCountInString(word) <= n:
			line += " " + word
		default:
			lines = append(lines, line)
			line = word
		}
	}
	return append(lines, line)
}
