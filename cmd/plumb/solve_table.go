package main

import (
	"fmt"
	"io"
	"strconv"
	"strings"
	"unicode/utf8"
)

// tableBlockCells bounds the cells a table holds before it writes them:
// a run of up to this many cells (2001 samples of a model with four
// states fit many times over) is aligned as one block, exactly as
// text/tabwriter aligns it; a longer one is written block by block, the
// columns widening (never narrowing) where a later block needs it.
var tableBlockCells = 1 << 17 // a variable so that tests can make blocks small

// tableSink writes the samples of --format table as aligned columns,
// block by block, and then the crossings and the run's summary.
type tableSink struct {
	r       *solveRun
	w       io.Writer
	cols    int
	text    []byte // the held cells' text, back to back
	ends    []int  // where each held cell ends in text
	widths  []int  // column widths written so far (cell and padding)
	started bool
	buf     []byte
	err     error
}

// tablePadding is the space between columns, as newTable sets it.
const tablePadding = 2

func newTableSink(r *solveRun, w io.Writer) *tableSink {
	cols := 1 + len(r.sys.States)
	return &tableSink{r: r, w: w, cols: cols, widths: make([]int, cols)}
}

// cell holds one cell.
func (s *tableSink) cell(v string) {
	s.text = append(s.text, v...)
	s.ends = append(s.ends, len(s.text))
}

// number holds v as tableFloat writes it.
func (s *tableSink) number(v float64) {
	s.text = strconv.AppendFloat(s.text, v, 'g', 10, 64)
	s.ends = append(s.ends, len(s.text))
}

func (s *tableSink) start() {
	s.started = true
	d := describe(s.r.sys)
	s.cell(withUnit("t", d.TimeUnit))
	for _, st := range d.States {
		s.cell(withUnit(st.Name, st.Unit))
	}
}

func (s *tableSink) sample(t float64, y []float64) error {
	if s.err != nil {
		return s.err
	}
	if !s.started {
		s.start()
	}
	s.number(t)
	for _, v := range y {
		s.number(v)
	}
	if len(s.ends) >= tableBlockCells {
		s.err = s.flush()
	}
	return s.err
}

// flush writes the held rows: every column but the last padded to the
// widest cell so far plus the padding, as text/tabwriter does.
func (s *tableSink) flush() error {
	for i := range s.ends {
		j := i % s.cols
		if j == s.cols-1 {
			continue
		}
		if w := utf8.RuneCount(s.cellAt(i)) + tablePadding; w > s.widths[j] {
			s.widths[j] = w
		}
	}
	b := s.buf[:0]
	for i := range s.ends {
		c := s.cellAt(i)
		b = append(b, c...)
		if j := i % s.cols; j < s.cols-1 {
			for k := utf8.RuneCount(c); k < s.widths[j]; k++ {
				b = append(b, ' ')
			}
		} else {
			b = append(b, '\n')
			if len(b) >= 64<<10 {
				if _, err := s.w.Write(b); err != nil {
					return err
				}
				b = b[:0]
			}
		}
	}
	s.buf = b[:0]
	s.text, s.ends = s.text[:0], s.ends[:0]
	_, err := s.w.Write(b)
	return err
}

func (s *tableSink) cellAt(i int) []byte {
	from := 0
	if i > 0 {
		from = s.ends[i-1]
	}
	return s.text[from:s.ends[i]]
}

func (s *tableSink) failed() error { return s.err }

// finish writes the rows still held, the crossings and the summary.
func (s *tableSink) finish(r *solveRun) error {
	if s.err != nil {
		return s.err
	}
	if !s.started {
		s.start()
	}
	if err := s.flush(); err != nil {
		return err
	}
	w := s.w
	sol := r.sol
	if len(r.cross) > 0 {
		fmt.Fprintf(w, "\ncrossings (%s)\n", r.f.sense)
		tw := newTable(w)
		fmt.Fprintf(tw, "crossing\tsense\tt\t%s\n", strings.Join(r.sys.States, "\t"))
		for _, h := range sol.Hits {
			fmt.Fprintf(tw, "%s\t%s\t%s", r.cross[h.Which].label(), h.Sense, tableFloat(h.T))
			for _, v := range h.Y {
				fmt.Fprint(tw, "\t", tableFloat(v))
			}
			fmt.Fprintln(tw)
		}
		if len(sol.Hits) == 0 {
			fmt.Fprintln(tw, "(none)")
		}
		if err := tw.Flush(); err != nil {
			return err
		}
	}
	fmt.Fprintln(w)
	tw := newTable(w)
	fmt.Fprintf(tw, "system\t%s\n", describe(r.sys).heading())
	meth := sol.Method
	if r.m.fixed {
		meth += ", step " + formatFloat(r.f.h)
	} else {
		meth += ", rtol " + formatFloat(r.f.rtol) + ", atol " + formatFloat(r.f.atol)
	}
	fmt.Fprintf(tw, "method\t%s\n", meth)
	fmt.Fprintf(tw, "status\t%s at t=%s\n", sol.Status, tableFloat(sol.End))
	fmt.Fprintf(tw, "work\t%d accepted steps, %d rejected, %d evaluations\n", sol.Stats.Accepted, sol.Stats.Rejected, sol.Stats.Evaluations)
	return tw.Flush()
}
