package main

import (
	"fmt"
	"io"
	"math"
	"strings"
	"time"
)

// progressBar draws "label [=====     ]  45%" on stderr, redrawing only when
// the whole percentage changes, so that drawing costs nothing per step.
// It is used when stderr is a terminal or --progress bar asks for it
// (call.progress), and appears only once the run has taken barDelay.
type progressBar struct {
	w      io.Writer
	label  string
	t0, t1 float64
	shown  int // last percentage drawn, -1 before the first
	since  time.Time
	waited bool // barDelay has passed
}

const progressWidth = 30 // characters between the brackets

func newProgressBar(w io.Writer, label string, t0, t1 float64) *progressBar {
	return &progressBar{w: w, label: label, t0: t0, t1: t1, shown: -1, since: now()}
}

// at draws the bar for time t.
func (p *progressBar) at(t float64) {
	frac := (t - p.t0) / (p.t1 - p.t0)
	if math.IsNaN(frac) {
		return
	}
	if !p.waited {
		if now().Sub(p.since) < barDelay {
			return
		}
		p.waited = true
	}
	frac = math.Max(0, math.Min(1, frac))
	pct := int(frac * 100)
	if pct == p.shown {
		return
	}
	p.shown = pct
	fill := pct * progressWidth / 100
	fmt.Fprintf(p.w, "\r%s [%s%s] %3d%%", p.label, strings.Repeat("=", fill), strings.Repeat(" ", progressWidth-fill), pct)
}

// clear removes the bar from the line, if one was drawn.
func (p *progressBar) clear() {
	if p.shown < 0 {
		return
	}
	n := len(p.label) + progressWidth + 8
	fmt.Fprintf(p.w, "\r%s\r", strings.Repeat(" ", n))
	p.shown = -1
}
