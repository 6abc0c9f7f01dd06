package main

import (
	"bytes"
	"context"
	"encoding/json"
	"errors"
	"io"
	"runtime"
	"strconv"
	"text/tabwriter"
)

// goarch is written into every JSON result as "arch". A variable so that
// golden files hold the same text on every architecture.
var goarch = runtime.GOARCH

// header opens every JSON result: which plumb, on which architecture, which
// command. Results are deterministic, so two results with the same header and
// settings are bit-identical; wall time is never part of them.
type header struct {
	// PlumbVersion is the version of the plumb that wrote the result.
	PlumbVersion string `json:"plumb_version"`
	// Arch is the GOARCH the result was computed on (amd64, arm64, ...).
	Arch string `json:"arch"`
	// Command is the plumb command that wrote the result.
	Command string `json:"command"`
}

func newHeader(cmd string) header {
	return header{PlumbVersion: version, Arch: goarch, Command: cmd}
}

// writeJSON writes v as indented JSON and a newline. Floats are written in
// the shortest form that reads back to the same bits.
func writeJSON(w io.Writer, v any) error {
	enc := json.NewEncoder(w)
	enc.SetIndent("", "  ")
	enc.SetEscapeHTML(false)
	return enc.Encode(v)
}

// newTable returns a tabwriter for aligned, space-separated columns.
func newTable(w io.Writer) *tabwriter.Writer {
	return tabwriter.NewWriter(w, 0, 0, 2, ' ', 0)
}

// formatFloat is the shortest decimal that reads back to the same float64,
// for CSV and for echoing settings.
func formatFloat(v float64) string { return strconv.FormatFloat(v, 'g', -1, 64) }

// tableFloat is v with 10 significant digits, for tables read by people.
func tableFloat(v float64) string { return strconv.FormatFloat(v, 'g', 10, 64) }

// errText is the error field of every JSON result: the text of the error
// that stopped the run, written as null when there is none, so that the
// field is always there.
type errText string

// MarshalJSON writes null for "" and the text as a JSON string otherwise
// (without HTML escapes, like the rest of the result).
func (e errText) MarshalJSON() ([]byte, error) {
	if e == "" {
		return []byte("null"), nil
	}
	var b bytes.Buffer
	enc := json.NewEncoder(&b)
	enc.SetEscapeHTML(false)
	if err := enc.Encode(string(e)); err != nil {
		return nil, err
	}
	return bytes.TrimRight(b.Bytes(), "\n"), nil
}

// runStatus is the status a result reports for the error of its run,
// "completed" (nil), "canceled" (a canceled or expired context) or
// "failed", and the error's text ("" for nil).
func runStatus(err error) (status string, msg errText) {
	switch {
	case err == nil:
		return "completed", ""
	case errors.Is(err, context.Canceled) || errors.Is(err, context.DeadlineExceeded):
		return "canceled", errText(err.Error())
	}
	return "failed", errText(err.Error())
}

// statusVerb is a status other than completed as an error message says
// it: "failed" or "was canceled".
func statusVerb(status string) string {
	if status == "canceled" {
		return "was canceled"
	}
	return "failed"
}

// count is "1 step", "2 steps".
func count(n int, noun string) string {
	if n == 1 {
		return "1 " + noun
	}
	return strconv.Itoa(n) + " " + noun + "s"
}
