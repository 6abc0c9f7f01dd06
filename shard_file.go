package plumb

import (
	"bufio"
	"bytes"
	"encoding/json"
	"fmt"
	"io"
	"os"
	"slices"
	"strings"
)

// ShardFileFormat is the value of ShardHeader.Format: the version of the
// shard file's layout.
const ShardFileFormat = "plumb shard file 1"

// A shard file is what one piece of a split computation writes for the
// join to read: JSON Lines (one JSON object per line), first a
// ShardHeader, then one record per unit of work the piece did (its shape
// depends on the command: a scan row, a recorded run, a lockstep group of
// an ensemble), then a ShardTrailer. A file without its trailer is a
// piece that did not finish.

// ShardHeader is the first line of a shard file: what was computed, with
// which settings, and which piece of it the file holds.
type ShardHeader struct {
	// Format is ShardFileFormat.
	Format string `json:"format"`
	// Version is the version of plumb that computed the piece; every piece
	// of one join must come from the same version (another could give
	// other bits).
	Version string `json:"plumb_version"`
	// Command is what was split ("scan", "ensemble", "trust").
	Command string `json:"command"`
	// Args are the command's arguments without the shard's own flag: the
	// settings, which every piece must share.
	Args []string `json:"args"`
	// Inputs are the files the command read, with their SHA-256, so that a
	// join refuses pieces computed from different files.
	Inputs []ShardInput `json:"inputs,omitempty"`
	// Shard is the piece: Index of Count.
	Shard ShardJSON `json:"shard"`
	// Units names the units of work split (plural: "parameter points");
	// Total is their number in the whole computation, [First, End) the
	// piece's.
	Units string `json:"units"`
	Total int    `json:"total"`
	First int    `json:"first"`
	End   int    `json:"end"`
}

// ShardJSON is a Shard as a shard file writes it.
type ShardJSON struct {
	Index int `json:"index"`
	Count int `json:"count"`
}

// ShardInput is one file a sharded command read: its name as given and
// the SHA-256 of its bytes, in hex.
type ShardInput struct {
	Flag   string `json:"flag"`
	Name   string `json:"name"`
	SHA256 string `json:"sha256"`
}

// ShardTrailer is the last line of a shard file: how the piece ended.
type ShardTrailer struct {
	// Status is "completed", "canceled" or "failed"; only a completed
	// piece may be joined.
	Status string `json:"status"`
	// Error says why a piece did not complete ("" when it did).
	Error string `json:"error"`
	// Done is the number of records written.
	Done int `json:"done"`
}

// ShardWriter writes a shard file: NewShardWriter writes the header,
// Record each record, Close the trailer.
type ShardWriter struct {
	w    io.Writer
	enc  *json.Encoder
	done int
}

// NewShardWriter writes h (its Format set to ShardFileFormat) to w.
func NewShardWriter(w io.Writer, h ShardHeader) (*ShardWriter, error) {
	h.Format = ShardFileFormat
	enc := json.NewEncoder(w)
	enc.SetEscapeHTML(false)
	if err := enc.Encode(h); err != nil {
		return nil, fmt.Errorf("plumb: writing the shard header: %w", err)
	}
	return &ShardWriter{w: w, enc: enc}, nil
}

// Record writes one record (a JSON object on one line).
func (sw *ShardWriter) Record(v any) error {
	if err := sw.enc.Encode(v); err != nil {
		return fmt.Errorf("plumb: writing shard record %d: %w", sw.done+1, err)
	}
	sw.done++
	return nil
}

// Close writes the trailer with status and, when err is not nil, its
// message.
func (sw *ShardWriter) Close(status string, err error) error {
	t := ShardTrailer{Status: status, Done: sw.done}
	if err != nil {
		t.Error = err.Error()
	}
	return sw.enc.Encode(t)
}

// ShardPiece is one shard file as read: its header, its records (raw
// JSON, one per unit of work; nil when the piece was read by
// ReadShardFile, which reads them again from the file when asked) and its
// name.
type ShardPiece struct {
	Name    string
	Header  ShardHeader
	Records []json.RawMessage
	// count is the number of records; path, when not empty, the file they
	// are read again from.
	count int
	path  string
}

// EachRecord hands the piece's records to fn in order: the kept ones, or
// those read again from the file (which must still be the one checked:
// the same records, then the closing line).
func (p *ShardPiece) EachRecord(fn func(k int, raw json.RawMessage) error) error {
	if p.path == "" {
		for k, raw := range p.Records {
			if err := fn(k, raw); err != nil {
				return err
			}
		}
		return nil
	}
	f, err := os.Open(p.path)
	if err != nil {
		return fmt.Errorf("plumb: shard file %s: %v: %w", p.Name, err, ErrShard)
	}
	defer f.Close()
	k := 0
	_, err = readShard(p.Name, f, func(raw json.RawMessage) error {
		if k >= p.count {
			return fmt.Errorf("more records than when it was checked")
		}
		if err := fn(k, raw); err != nil {
			return err
		}
		k++
		return nil
	})
	if err == nil && k != p.count {
		err = fmt.Errorf("plumb: shard file %s: %d records, %d when it was checked: %w", p.Name, k, p.count, ErrShard)
	}
	return err
}

// ReadShardFile reads and checks the shard file at path as ReadShardPiece
// does, without keeping its records: EachRecord reads them again, so that
// joining pieces never holds more than one record of a scan.
func ReadShardFile(path string) (*ShardPiece, error) {
	f, err := os.Open(path)
	if err != nil {
		return nil, fmt.Errorf("plumb: shard file %s: %v: %w", path, err, ErrShard)
	}
	defer f.Close()
	p, err := readShard(path, f, func(json.RawMessage) error { return nil })
	if err != nil {
		return nil, err
	}
	p.path = path
	return p, nil
}

// ShardSet is a complete set of shard files, checked: one piece per index
// 1..Count, in index order, all of one command, version, settings and
// inputs, covering the units 0..Total in contiguous blocks.
type ShardSet struct {
	Pieces []ShardPiece
}

// Header returns the first piece's header, with the shard fields of the
// whole computation.
func (s *ShardSet) Header() ShardHeader {
	h := s.Pieces[0].Header
	h.Shard, h.First, h.End = ShardJSON{}, 0, h.Total
	return h
}

// NamedReader is a shard file to read and the name errors call it by.
type NamedReader struct {
	Name string
	R    io.Reader
}

// maxShardLine bounds one line of a shard file (a record holds one unit
// of work: a scan row of up to 2^24 values, a run, a group's samples).
const maxShardLine = 1 << 30

// ReadShardPiece reads one shard file. Errors (ErrShard) name the file and
// line: not JSON Lines, not a shard file, a header whose piece is not the
// block its shard takes, no trailer (the piece did not finish), a trailer
// that is not completed, or a record count that differs from the header's.
func ReadShardPiece(name string, r io.Reader) (*ShardPiece, error) {
	var records []json.RawMessage
	p, err := readShard(name, r, func(raw json.RawMessage) error {
		records = append(records, raw)
		return nil
	})
	if err != nil {
		return nil, err
	}
	p.Records = records
	return p, nil
}

// readShard reads and checks a shard file, handing each record to keep as
// it is read (an error from keep stops the read and is returned).
func readShard(name string, r io.Reader, keep func(json.RawMessage) error) (*ShardPiece, error) {
	bad := func(line int, format string, a ...any) error {
		where := name
		if line > 0 {
			where = fmt.Sprintf("%s, line %d", name, line)
		}
		return fmt.Errorf("plumb: shard file %s: %s: %w", where, fmt.Sprintf(format, a...), ErrShard)
	}
	br := bufio.NewReaderSize(r, 1<<16)
	p := &ShardPiece{Name: name}
	var last []byte
	line := 0
	for {
		b, err := readLine(br)
		if len(b) > 0 {
			line++
			if line == 1 {
				dec := json.NewDecoder(bytes.NewReader(b))
				dec.DisallowUnknownFields()
				if derr := dec.Decode(&p.Header); derr != nil {
					return nil, bad(1, "not a shard file header (%v)", derr)
				}
				if p.Header.Format != ShardFileFormat {
					return nil, bad(1, "format %q, want %q", p.Header.Format, ShardFileFormat)
				}
				if herr := checkShardHeader(p.Header); herr != "" {
					return nil, bad(1, "%s", herr)
				}
			} else {
				if !json.Valid(b) || b[0] != '{' {
					return nil, bad(line, "not a JSON object")
				}
				if last != nil {
					if err := keep(last); err != nil {
						return nil, err
					}
					p.count++
				}
				last = append([]byte(nil), b...)
			}
		}
		if err == io.EOF {
			break
		}
		if err != nil {
			return nil, bad(line+1, "%v", err)
		}
	}
	if line == 0 {
		return nil, bad(0, "empty")
	}
	var t ShardTrailer
	dec := json.NewDecoder(bytes.NewReader(last))
	dec.DisallowUnknownFields()
	if last == nil || dec.Decode(&t) != nil || t.Status == "" {
		return nil, bad(0, "no closing status line: shard %s did not finish (still running, or stopped); run it again", p.Header.Shard.String())
	}
	if t.Status != "completed" {
		msg := t.Status
		if t.Error != "" {
			msg += ": " + t.Error
		}
		return nil, bad(line, "shard %s ended %s after %d of its %d %s; run it again", p.Header.Shard.String(), msg, t.Done, p.Header.End-p.Header.First, p.Header.Units)
	}
	if t.Done != p.count {
		return nil, bad(line, "the closing line counts %d records, the file holds %d", t.Done, p.count)
	}
	if p.count != p.Header.End-p.Header.First {
		return nil, bad(line, "%d records for the %d %s %d..%d", p.count, p.Header.End-p.Header.First, p.Header.Units, p.Header.First, p.Header.End)
	}
	return p, nil
}

// String is "i/n".
func (s ShardJSON) String() string { return fmt.Sprintf("%d/%d", s.Index, s.Count) }

// readLine reads one line without its end, any length up to maxShardLine.
func readLine(br *bufio.Reader) ([]byte, error) {
	var buf []byte
	for {
		part, err := br.ReadSlice('\n')
		buf = append(buf, part...)
		if len(buf) > maxShardLine {
			return nil, fmt.Errorf("a line longer than %d bytes", maxShardLine)
		}
		if err == bufio.ErrBufferFull {
			continue
		}
		return bytes.TrimRight(buf, "\r\n"), err
	}
}

// checkShardHeader returns what is wrong with h, or "".
func checkShardHeader(h ShardHeader) string {
	s := Shard{Index: h.Shard.Index, Count: h.Shard.Count}
	if s.Whole() {
		return "shard 0/0: not a piece of a split run"
	}
	if err := s.Validate(); err != nil {
		return strings.TrimPrefix(err.Error(), "plumb: ")
	}
	if h.Total < 0 {
		return fmt.Sprintf("total %d: must be >= 0", h.Total)
	}
	lo, hi := s.Range(h.Total)
	if h.First != lo || h.End != hi {
		return fmt.Sprintf("shard %s holds %s %d..%d of %d, but that shard's block is %d..%d", s, h.Units, h.First, h.End, h.Total, lo, hi)
	}
	if h.Command == "" {
		return "no command"
	}
	return ""
}

// ReadShards reads shard files and checks that they make one complete
// computation: the same command, plumb version, settings (Args) and
// inputs, the same count n, and each index 1..n exactly once. Errors
// (ErrShard) name the files: a missing shard (by number), one given twice,
// one made with other settings.
func ReadShards(files []NamedReader) (*ShardSet, error) {
	if len(files) == 0 {
		return nil, fmt.Errorf("plumb: no shard files: %w", ErrShard)
	}
	pieces := make([]*ShardPiece, 0, len(files))
	for _, f := range files {
		p, err := ReadShardPiece(f.Name, f.R)
		if err != nil {
			return nil, err
		}
		pieces = append(pieces, p)
	}
	return JoinShards(pieces)
}

// JoinShards checks pieces already read (ReadShardPiece) as ReadShards
// does and puts them in index order.
func JoinShards(pieces []*ShardPiece) (*ShardSet, error) {
	if len(pieces) == 0 {
		return nil, fmt.Errorf("plumb: no shard files: %w", ErrShard)
	}
	first := pieces[0]
	h0 := first.Header
	byIndex := make(map[int]*ShardPiece, len(pieces))
	for _, p := range pieces {
		h := p.Header
		differ := func(what, a, b string) error {
			return fmt.Errorf("plumb: shard files %s and %s differ in %s (%s against %s): they are not pieces of one run: %w", first.Name, p.Name, what, a, b, ErrShard)
		}
		switch {
		case h.Version != h0.Version:
			return nil, differ("plumb version", h0.Version, h.Version)
		case h.Command != h0.Command:
			return nil, differ("command", h0.Command, h.Command)
		case !slices.Equal(h.Args, h0.Args):
			return nil, differ("settings", strings.Join(h0.Args, " "), strings.Join(h.Args, " "))
		case !slices.Equal(h.Inputs, h0.Inputs):
			return nil, differ("input files", inputList(h0.Inputs), inputList(h.Inputs))
		case h.Shard.Count != h0.Shard.Count:
			return nil, differ("shard count", h0.Shard.String(), h.Shard.String())
		case h.Total != h0.Total || h.Units != h0.Units:
			return nil, differ("size", fmt.Sprintf("%d %s", h0.Total, h0.Units), fmt.Sprintf("%d %s", h.Total, h.Units))
		}
		if q, dup := byIndex[h.Shard.Index]; dup {
			return nil, fmt.Errorf("plumb: shard %s given twice: %s and %s: %w", h.Shard.String(), q.Name, p.Name, ErrShard)
		}
		byIndex[h.Shard.Index] = p
	}
	n := h0.Shard.Count
	var missing []string
	for i := 1; i <= n; i++ {
		if byIndex[i] == nil {
			missing = append(missing, fmt.Sprintf("%d/%d", i, n))
		}
	}
	if len(missing) > 0 {
		return nil, fmt.Errorf("plumb: shard %s missing (%d of %d files given): %w", strings.Join(missing, ", "), len(pieces), n, ErrShard)
	}
	set := &ShardSet{Pieces: make([]ShardPiece, n)}
	for i := 1; i <= n; i++ {
		set.Pieces[i-1] = *byIndex[i]
	}
	return set, nil
}

// inputList is "--file a.json (sha256 12ab...)".
func inputList(in []ShardInput) string {
	if len(in) == 0 {
		return "none"
	}
	parts := make([]string, len(in))
	for i, f := range in {
		parts[i] = fmt.Sprintf("--%s %s (sha256 %.12s)", f.Flag, f.Name, f.SHA256)
	}
	return strings.Join(parts, ", ")
}
