package main

// plumb scan --shard I/N (one block of the parameter points, written as a
// shard file), the rows of a merge, and --format npy.

import (
	"context"
	"fmt"
	"io"

	"github.com/plumbdyn/plumb"
	"github.com/plumbdyn/plumb/internal/runio"
	"github.com/plumbdyn/plumb/maps"
)

// scanUnits names the units a scan splits.
const scanShardUnits = "parameter points"

// runShard computes piece sh of the scan and writes its shard file.
func (f *scanFlags) runShard(ctx context.Context, cl *call, sh plumb.Shard, sys *plumb.System, fam maps.Family, axes [][]float64, set maps.ScanSettings) error {
	points := plumb.ScanPoints(axes)
	lo, hi := sh.Range(points)
	span := [2]float64{0, float64(hi - lo)}
	cl.sh.format, cl.sh.plot = "table", "" // the shard file; merge writes the format and draws the picture
	return cl.runJob(ctx, job{
		what:    "the scan of " + sys.Name,
		refusal: "the scan refused the settings",
		span:    &span,
		run: func(ctx context.Context, progress func(float64)) (*outcome, error) {
			sw, err := cl.shardWriter(sh, scanShardUnits, points, nil)
			if err != nil {
				return nil, err
			}
			done := 0
			runErr := plumb.ScanShard(ctx, fam, axes, sys.Start(), &set, sh, func(r maps.ScanRow) error {
				done++
				if progress != nil {
					progress(float64(done))
				}
				return sw.Record(plumb.NewScanRecord(r))
			})
			status, _ := runStatus(runErr)
			res := &outcome{done: fmt.Sprintf("shard %s: %s", sh, count(done, "parameter point")),
				table: func(io.Writer) error { return sw.Close(status, runErr) }}
			if runErr != nil {
				res.err = fmt.Errorf("shard %s of the scan of %s %s after %d points (the shard file says so; merge refuses it): %w", sh, sys.Name, statusVerb(status), done, runErr)
			}
			return res, nil
		},
	})
}

// scanRows hands the rows of the scan to emit: the joined shard files'
// rows in a merge, else the scan computed here.
func scanRows(ctx context.Context, cl *call, fam maps.Family, axes [][]float64, x0 []float64, set *maps.ScanSettings, emit func(maps.ScanRow) error) error {
	if cl.merge == nil {
		return maps.Scan(ctx, fam, axes, x0, set, emit)
	}
	h := cl.merge.set.Header()
	if h.Units != scanShardUnits || h.Total != plumb.ScanPoints(axes) {
		return fmt.Errorf("the shard files hold %d %s; the recorded scan has %d parameter points: %w", h.Total, h.Units, plumb.ScanPoints(axes), plumb.ErrShard)
	}
	return plumb.EachScanRow(cl.merge.set, len(axes), emit)
}

// scanNPY writes the points of the diagram as a .npy array with the CSV's
// columns: the parameters, the value, the period and the exponent (NaN
// where the orbit escaped or has no Jacobian, -Inf where superstable).
func scanNPY(w io.Writer, out scanJSON, rows []maps.ScanRow) error {
	n := 0
	for _, r := range rows {
		n += len(r.Values)
	}
	cols := len(out.Settings.Across) + 3
	nw, err := runio.NewNPYWriter(w, cols, n)
	if err != nil {
		return err
	}
	rec := make([]float64, cols)
	for _, r := range rows {
		for _, v := range r.Values {
			k := copy(rec, r.Params)
			rec[k], rec[k+1], rec[k+2] = v, float64(r.Period), r.Exponent
			if err := nw.Row(rec); err != nil {
				return err
			}
		}
	}
	return nw.Close()
}

// checkNPYOut refuses --format npy on a terminal: the array is binary.
func checkNPYOut(cl *call) error {
	if cl.sh.format == "npy" && isTerminal(cl.rawStdout) && !isDevNull(cl.rawStdout) {
		return usagef("--format npy writes binary data, not for a terminal: redirect stdout to a file (plumb %s --format npy > out.npy)", cl.cmd.name)
	}
	return nil
}
