package plumb_test

import (
	"bytes"
	"context"
	"fmt"

	"github.com/plumbdyn/plumb"
	"github.com/plumbdyn/plumb/maps"
)

// A hatchery's stock model over 12 growth rates, split between three
// machines: each computes its block of rows and writes a shard file; the
// files joined give the rows of the whole scan.
func ExampleScanShard() {
	sys, err := plumb.Model("logistic")
	if err != nil {
		fmt.Println(err)
		return
	}
	fam, err := sys.Family("r")
	if err != nil {
		fmt.Println(err)
		return
	}
	axes := [][]float64{{2.9, 3.0, 3.1, 3.2, 3.3, 3.4, 3.5, 3.6, 3.7, 3.8, 3.9, 4.0}}
	set := &maps.ScanSettings{Discard: 2000, Keep: 64}
	var files []plumb.NamedReader
	for i := 1; i <= 3; i++ {
		sh := plumb.Shard{Index: i, Count: 3}
		lo, hi := sh.Range(plumb.ScanPoints(axes))
		var buf bytes.Buffer
		sw, err := plumb.NewShardWriter(&buf, plumb.ShardHeader{Version: "example", Command: "scan",
			Shard: plumb.ShardJSON{Index: i, Count: 3}, Units: "parameter points", Total: plumb.ScanPoints(axes), First: lo, End: hi})
		if err != nil {
			fmt.Println(err)
			return
		}
		err = plumb.ScanShard(context.Background(), fam, axes, sys.Start(), set, sh, func(r maps.ScanRow) error {
			return sw.Record(plumb.NewScanRecord(r))
		})
		if err := sw.Close("completed", err); err != nil {
			fmt.Println(err)
			return
		}
		fmt.Printf("shard %s: rows %d to %d\n", sh, lo, hi-1)
		files = append(files, plumb.NamedReader{Name: sh.String(), R: &buf})
	}
	joined, err := plumb.ReadShards(files)
	if err != nil {
		fmt.Println(err)
		return
	}
	rows, err := plumb.ScanRows(joined, 1)
	if err != nil {
		fmt.Println(err)
		return
	}
	for _, r := range rows[:6] {
		fmt.Printf("r = %.1f: period %d\n", r.Params[0], r.Period)
	}
	// Output:
	// shard 1/3: rows 0 to 3
	// shard 2/3: rows 4 to 7
	// shard 3/3: rows 8 to 11
	// r = 2.9: period 1
	// r = 3.0: period 0
	// r = 3.1: period 2
	// r = 3.2: period 2
	// r = 3.3: period 2
	// r = 3.4: period 2
}
