package integrate

import "testing"

// TestChunksRecords stores records through the first block's growth and
// across several full blocks, and reads every one back (exact identity:
// storage must return the bits it was given).
func TestChunksRecords(t *testing.T) {
	for _, per := range []int{1, 3, 9, 1 << 15} {
		c := newChunks(per)
		total := 3*c.block + 5
		rec := make([]float64, per)
		var firstFull *float64 // record 0 of block 1, once that block exists
		for k := range total {
			for i := range rec {
				rec[i] = float64(k*per + i)
			}
			if k%2 == 0 {
				c.add(rec)
			} else {
				copy(c.next(), rec)
			}
			if k == c.block {
				firstFull = &c.at(c.block)[0]
			}
		}
		if c.len() != total {
			t.Fatalf("per %d: %d records stored, want %d", per, c.len(), total)
		}
		if firstFull != nil && firstFull != &c.at(c.block)[0] {
			t.Errorf("per %d: a full block moved", per)
		}
		for k := range total {
			r := c.at(k)
			if len(r) != per {
				t.Fatalf("per %d: record %d has %d values", per, k, len(r))
			}
			for i, v := range r {
				if v != float64(k*per+i) {
					t.Fatalf("per %d: record %d value %d = %g, want %d", per, k, i, v, k*per+i)
				}
			}
		}
	}
}
