package main

import (
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"strings"
)

// outFile is the --out file while a command writes into it: a temporary
// file beside the target, opened before the run (so that a result written
// row by row as it is computed goes straight into it) and renamed over the
// target by commit. Until then the target keeps its previous contents; a
// run that leaves nothing useful calls discard and the target is never
// touched. A failed write is remembered, and a file with a failed write is
// never committed.
type outFile struct {
	name string // the target, as --out gave it
	tmp  *os.File
	mode os.FileMode
	err  error // the first write error, if any
}

// partialSuffix is added to the --out name of a partial result in a format
// that has no place for a mark inside the file (a binary array): the file
// goes beside the target under this name, never in its place.
const partialSuffix = ".partial"

// createOut opens the temporary file for --out name in the target's folder
// (a rename within one folder is atomic). The file gets the mode of the
// file it will replace, or 0644 for a new one.
func createOut(name string) (*outFile, error) {
	mode := os.FileMode(0o644)
	switch st, err := os.Stat(name); {
	case err == nil && st.IsDir():
		return nil, errors.New("is a folder; want a file name")
	case err == nil && !st.Mode().IsRegular():
		return nil, errors.New("is not a regular file; plumb replaces the file by renaming, so give a file name (stdout is the default)")
	case err == nil:
		mode = st.Mode().Perm()
	}
	dir, base := filepath.Split(name)
	if dir == "" {
		dir = "."
	}
	if base == "" {
		return nil, errors.New("want a file name")
	}
	tmp, err := os.CreateTemp(dir, "."+base+".*.tmp")
	if err != nil {
		return nil, err
	}
	return &outFile{name: name, tmp: tmp, mode: mode}, nil
}

// Write writes into the temporary file.
func (o *outFile) Write(p []byte) (int, error) {
	if o.err != nil {
		return 0, o.err
	}
	n, err := o.tmp.Write(p)
	if err != nil {
		o.err = err
	}
	return n, err
}

// Seek moves in the temporary file, so that a writer that patches what it
// wrote first (the row count in a .npy header) can do so in an --out file:
// outFile is an io.WriteSeeker. Whatever a caller buffered in front of it
// must be flushed before.
func (o *outFile) Seek(offset int64, whence int) (int64, error) {
	if o.err != nil {
		return 0, o.err
	}
	n, err := o.tmp.Seek(offset, whence)
	if err != nil {
		o.err = err
	}
	return n, err
}

// commit syncs and closes the temporary file and renames it to target.
// On any failure the temporary file is removed and target is untouched.
func (o *outFile) commit(target string) error {
	err := o.err
	if err == nil {
		err = o.tmp.Sync()
	}
	if cerr := o.tmp.Close(); err == nil {
		err = cerr
	}
	if err == nil {
		// CreateTemp makes the file private (0600); the result is an
		// ordinary file, as os.Create would have made it.
		err = os.Chmod(o.tmp.Name(), o.mode)
	}
	if err == nil {
		err = os.Rename(o.tmp.Name(), target)
	}
	if err != nil {
		os.Remove(o.tmp.Name())
		return fmt.Errorf("writing --out %s: %w", o.name, err)
	}
	return nil
}

// discard removes the temporary file; the target keeps what it held.
func (o *outFile) discard() {
	o.tmp.Close()
	os.Remove(o.tmp.Name())
}

// outState is what the runner learnt about the result while writing it:
// whether a result was written whole (then no JSON error document follows
// it), and, for --out, whether it is partial and where its mark went. A
// command that runs another command's work on its own stdout (a call made
// inside a call) passes its *outState on, so that what the inner run wrote
// counts for the outer file.
type outState struct {
	// toFile: the results go to an --out file (execute opened one).
	toFile bool
	// written: the result was written whole (all of it, or the part done
	// before the run stopped, with its mark).
	written bool
	// partial: the run stopped early; the written result is its part.
	partial bool
	// aside: the format has no place for a mark, so a partial result goes
	// beside the target under the name + partialSuffix.
	aside bool
}

// resultWritten records that res was written whole in the chosen format
// and, when it is the partial result of a run that stopped early, marks it
// as such in the --out file. The mark, per format:
//
//   - json: none added; the document's own status and error say it.
//   - jsonl: a last record {"status": "canceled"|"failed", "error": "..."}.
//   - csv and table: a last line "# partial result: STATUS: MESSAGE".
//   - any other format (a binary array): no mark fits inside, so the file
//     is put beside the target as NAME.partial instead of in its place.
//
// A command whose output says how the run ended by itself (a stream that
// ends with its own status record) sets res.marked: nothing is added and
// the file goes in place, whatever the format.
//
// Without --out nothing is added: stdout stays as it always was, and the
// exit status (1) says the run stopped early.
func (cl *call) resultWritten(res *outcome) error {
	if cl.out == nil {
		return nil // a call made without execute (a test)
	}
	if cl.out.toFile && res.err != nil {
		if err := cl.markPartial(res); err != nil {
			return err
		}
		cl.out.partial = true
	}
	cl.out.written = true
	return nil
}

// markPartial writes the mark of a partial result (see resultWritten).
func (cl *call) markPartial(res *outcome) error {
	if res.marked {
		return nil
	}
	status, msg := runStatus(res.err)
	line := strings.Join(strings.Fields(string(msg)), " ")
	switch cl.sh.format {
	case "json":
		return nil
	case "jsonl":
		return writeJSONLine(cl.stdout, struct {
			Status string  `json:"status"`
			Error  errText `json:"error"`
		}{status, errText(line)})
	case "csv", "table":
		_, err := fmt.Fprintf(cl.stdout, "# partial result: %s: %s\n", status, line)
		return err
	}
	cl.out.aside = true
	return nil
}

// finishOut ends the --out file o after the command returned err (its
// buffered writes already flushed): the whole result is renamed into
// place; a partial result that was written and marked too (or beside the
// target when its format has no mark, see resultWritten); a run that
// wrote nothing useful leaves the target as it was. It returns the error
// the command ends with.
func (cl *call) finishOut(o *outFile, err error) error {
	switch {
	case err == nil:
		return o.commit(o.name)
	case !cl.out.written || o.err != nil:
		o.discard()
		return err
	}
	target := o.name
	if cl.out.aside {
		target += partialSuffix
	}
	if cerr := o.commit(target); cerr != nil {
		return errors.Join(err, cerr)
	}
	if cl.out.partial {
		cl.notef("the partial result is in %s", target)
	}
	return err
}

// notef writes an informational line on stderr unless --quiet.
func (cl *call) notef(format string, a ...any) {
	if cl.sh.quiet {
		return
	}
	fmt.Fprintf(cl.stderr, "plumb %s: %s\n", cl.cmd.name, fmt.Sprintf(format, a...))
}

// writeJSONLine writes v as one line of JSON (JSON Lines).
func writeJSONLine(w io.Writer, v any) error {
	enc := json.NewEncoder(w)
	enc.SetEscapeHTML(false)
	return enc.Encode(v)
}
