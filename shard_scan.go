package plumb

import (
	"bytes"
	"context"
	"encoding/json"
	"errors"
	"fmt"
	"math"
	"strconv"

	"github.com/plumbdyn/plumb/maps"
)

// ScanPoints returns the number of parameter points of a scan over axes
// (the product of their lengths), the units a sharded scan splits.
func ScanPoints(axes [][]float64) int {
	n := 1
	for _, a := range axes {
		n *= len(a)
	}
	return n
}

// ScanShard runs piece sh of the scan of fam over axes (maps.ScanRange of
// the rows sh.Range(ScanPoints(axes))): the rows are those of the whole
// scan, bit for bit. The zero Shard scans everything.
func ScanShard(ctx context.Context, fam maps.Family, axes [][]float64, x0 []float64, s *maps.ScanSettings, sh Shard, emit func(maps.ScanRow) error) error {
	if err := sh.Validate(); err != nil {
		return err
	}
	lo, hi := sh.Range(ScanPoints(axes))
	return maps.ScanRange(ctx, fam, axes, x0, s, lo, hi, emit)
}

// ExactFloat is a float64 that JSON carries bit for bit: a finite value as
// the shortest number that reads back to the same bits, NaN and the
// infinities as the strings "NaN", "+Inf" and "-Inf".
type ExactFloat float64

// MarshalJSON writes f.
func (f ExactFloat) MarshalJSON() ([]byte, error) {
	v := float64(f)
	switch {
	case math.IsNaN(v):
		return []byte(`"NaN"`), nil
	case math.IsInf(v, 1):
		return []byte(`"+Inf"`), nil
	case math.IsInf(v, -1):
		return []byte(`"-Inf"`), nil
	}
	return strconv.AppendFloat(nil, v, 'g', -1, 64), nil
}

// UnmarshalJSON reads what MarshalJSON writes.
func (f *ExactFloat) UnmarshalJSON(b []byte) error {
	switch string(bytes.TrimSpace(b)) {
	case `"NaN"`:
		*f = ExactFloat(math.NaN())
		return nil
	case `"+Inf"`:
		*f = ExactFloat(math.Inf(1))
		return nil
	case `"-Inf"`:
		*f = ExactFloat(math.Inf(-1))
		return nil
	}
	var v float64
	if err := json.Unmarshal(b, &v); err != nil {
		return fmt.Errorf("want a number or \"NaN\", \"+Inf\", \"-Inf\": %w", err)
	}
	*f = ExactFloat(v)
	return nil
}

// ScanRecord is a scan row as a shard file holds it.
type ScanRecord struct {
	Index    int        `json:"index"`
	Params   []float64  `json:"params"`
	Values   []float64  `json:"values"`
	Period   int        `json:"period"`
	Exponent ExactFloat `json:"exponent"`
	Escaped  bool       `json:"escaped,omitempty"`
	Err      string     `json:"err,omitempty"`
}

// NewScanRecord returns r as a record.
func NewScanRecord(r maps.ScanRow) ScanRecord {
	rec := ScanRecord{Index: r.Index, Params: r.Params, Values: r.Values, Period: r.Period, Exponent: ExactFloat(r.Exponent), Escaped: r.Escaped}
	if r.Err != nil {
		rec.Err = r.Err.Error()
	}
	return rec
}

// Row returns the record as a row (an error as its message only).
func (rec ScanRecord) Row() maps.ScanRow {
	r := maps.ScanRow{Index: rec.Index, Params: rec.Params, Values: rec.Values, Period: rec.Period, Exponent: float64(rec.Exponent), Escaped: rec.Escaped}
	if rec.Err != "" {
		r.Err = errors.New(rec.Err)
	}
	return r
}

// ScanRows returns the rows of a complete set of scan shards (ReadShards),
// in index order, each checked: its index the next one, its parameters
// as many as the axes. Errors (ErrShard) name the file and record.
func ScanRows(set *ShardSet, axes int) ([]maps.ScanRow, error) {
	var rows []maps.ScanRow
	err := EachScanRow(set, axes, func(r maps.ScanRow) error {
		rows = append(rows, r)
		return nil
	})
	return rows, err
}

// EachScanRow decodes the rows of set in index order and hands each to
// emit, as ScanRows does, without holding them.
func EachScanRow(set *ShardSet, axes int, emit func(maps.ScanRow) error) error {
	if set.Pieces[0].Header.Command != "scan" {
		return fmt.Errorf("plumb: shard files of %q, not of a scan: %w", set.Pieces[0].Header.Command, ErrShard)
	}
	for _, p := range set.Pieces {
		err := p.EachRecord(func(k int, raw json.RawMessage) error {
			var rec ScanRecord
			dec := json.NewDecoder(bytes.NewReader(raw))
			dec.DisallowUnknownFields()
			bad := func(why string) error {
				return fmt.Errorf("plumb: shard file %s, record %d: %s: %w", p.Name, k+1, why, ErrShard)
			}
			if err := dec.Decode(&rec); err != nil {
				return bad(err.Error())
			}
			switch want := p.Header.First + k; {
			case rec.Index != want:
				return bad(fmt.Sprintf("row %d where row %d belongs", rec.Index, want))
			case len(rec.Params) != axes:
				return bad(fmt.Sprintf("%d parameters, the scan has %d axes", len(rec.Params), axes))
			}
			return emit(rec.Row())
		})
		if err != nil {
			return err
		}
	}
	return nil
}
