package main

import (
	"errors"
	"flag"
	"io"
	"regexp"
	"strings"

	"github.com/plumbdyn/plumb"
	"github.com/plumbdyn/plumb/internal/runio"
)

// errorJSON is the --format json document of a command that ended with an
// error before it wrote a result: bad usage or input (exit 2), or a run
// that failed or was canceled before it computed anything (exit 1). It
// goes to stdout, where the result would have gone (never into an --out
// file, which keeps its previous contents), so that with --format json
// stdout always holds exactly one JSON object: the result, whose error is
// null on success and the message when the run stopped early, or this
// document. The plain message still goes to stderr. Fields that do not
// apply are null.
type errorJSON struct {
	header
	// Status is refused (bad usage or input), failed or canceled.
	Status string `json:"status"`
	// Error is the message, as stderr gives it.
	Error string `json:"error"`
	// ExitStatus is the process's exit status: 2 refused, 1 otherwise.
	ExitStatus int `json:"exit_status"`
	// Flag is the flag the message names first, as typed ("--rtol").
	Flag *string `json:"flag"`
	// File is the input file the problem is in (a --file system, a --run
	// trajectory), Field the JSON path or column name inside it, Line and
	// Column the 1-based place.
	File   *string `json:"file"`
	Field  *string `json:"field"`
	Line   *int    `json:"line"`
	Column *int    `json:"column"`
	// Hint says what a failure usually means (null when there is none).
	Hint *string `json:"hint"`
}

// flagInMessage finds the flags a message names: "--name" at the start or
// after a space, parenthesis or quote.
var flagInMessage = regexp.MustCompile(`(?:^|[\s("'])--([a-z][a-z0-9-]*)`)

// newErrorJSON describes err, which ends command name (cmd nil for an
// unknown command) with exit status code; fs (may be nil) tells real flags
// from words that only look like one.
func newErrorJSON(name string, cmd *command, fs *flag.FlagSet, sh *shared, err error, code int) errorJSON {
	doc := errorJSON{header: newHeader(name), ExitStatus: code}
	var ue *usageError
	switch {
	case errors.As(err, &ue):
		doc.Status, doc.Error = "refused", ue.msg
	default:
		doc.Status, _ = runStatus(err)
		doc.Error = err.Error()
		if doc.Status == "completed" {
			doc.Status = "failed"
		}
		if cmd != nil {
			if h := failureHint(cmd, err); h != "" {
				doc.Hint = &h
			}
		}
	}
	for _, m := range flagInMessage.FindAllStringSubmatch(doc.Error, -1) {
		// A flag the parser did not know is still the one to blame.
		if fs == nil || fs.Lookup(m[1]) != nil || strings.HasPrefix(doc.Error, "flag provided but not defined") {
			f := "--" + m[1]
			doc.Flag = &f
			break
		}
	}
	var fe *plumb.FileError
	var re *runio.Error
	var me *plumb.MembersFileError
	switch {
	case errors.As(err, &fe):
		if sh != nil && sh.file != "" {
			doc.File = &sh.file
		}
		doc.Field, doc.Line, doc.Column = nonEmpty(fe.Field), positive(fe.Line), positive(fe.Col)
	case errors.As(err, &re):
		doc.File, doc.Field, doc.Line, doc.Column = nonEmpty(re.File), nonEmpty(re.Field), positive(re.Line), positive(re.Column)
	case errors.As(err, &me):
		doc.Line, doc.Column = positive(me.Line), positive(me.Column)
	}
	return doc
}

// nonEmpty is &s, or nil for "".
func nonEmpty(s string) *string {
	if s == "" {
		return nil
	}
	return &s
}

// positive is &n, or nil for n <= 0.
func positive(n int) *int {
	if n <= 0 {
		return nil
	}
	return &n
}

// writeErrorJSON writes the document of newErrorJSON to w.
func writeErrorJSON(w io.Writer, name string, cmd *command, fs *flag.FlagSet, sh *shared, err error, code int) {
	// A failed write to stdout has nowhere left to be reported; stderr
	// already has the message.
	_ = writeJSON(w, newErrorJSON(name, cmd, fs, sh, err, code))
}

// asksJSON reports whether args ask for --format json, for the errors of
// a command line that did not parse (so --format was perhaps never read).
// It reads args as the flag package does: flags up to the first argument
// that is not one (or "--"), a flag's value in the next argument unless it
// is a boolean flag or written --name=value, the last --format counting.
// fs tells boolean flags and value flags apart; a name fs does not know
// (an unknown flag, where the parser stopped) takes the next argument as
// its value unless that looks like a flag, and a nil fs (an unknown
// command) is read as if every flag took one.
func asksJSON(fs *flag.FlagSet, args []string) bool {
	format := ""
	for i := 0; i < len(args); i++ {
		a := args[i]
		if a == "--" || len(a) < 2 || a[0] != '-' {
			break
		}
		name, val, hasVal := strings.Cut(strings.TrimPrefix(a[1:], "-"), "=")
		if !hasVal {
			// An unknown flag (where the parser stopped) is taken to have
			// a value when the next argument does not look like a flag.
			takes := fs == nil || i+1 < len(args) && !strings.HasPrefix(args[i+1], "-")
			if f := lookupFlag(fs, name); f != nil {
				b, isBool := f.Value.(interface{ IsBoolFlag() bool })
				takes = !isBool || !b.IsBoolFlag()
			}
			if !takes {
				continue
			}
			if i+1 >= len(args) {
				break
			}
			i++
			val = args[i]
		}
		if name == "format" {
			format = val
		}
	}
	return format == "json"
}

// lookupFlag is fs.Lookup(name), nil for a nil fs.
func lookupFlag(fs *flag.FlagSet, name string) *flag.Flag {
	if fs == nil {
		return nil
	}
	return fs.Lookup(name)
}
