package expr

// wordShape describes a fused instruction for the closure path: which of
// its bytes a, b, c, d are registers read, and for the L-type and R-type
// shapes (a inner b) outer c and a outer (b inner c) their operation
// indices (0 add, 1 sub, 2 mul).
type wordShape struct {
	nread        int  // registers read: bytes a .. a+nread-1
	l, r         bool // L-type, R-type
	inner, outer int
}

// shapeOf returns the shape of the fused instruction w.
func shapeOf(w uint64) wordShape {
	op := Op(w)
	for i := range 3 {
		for o := range 3 {
			if fusedL[i][o] == op {
				return wordShape{nread: 3, l: true, inner: i, outer: o}
			}
			if fusedR[i][o] == op {
				return wordShape{nread: 3, r: true, inner: i, outer: o}
			}
		}
	}
	switch {
	case op >= fAddAddAddLR && op <= fMulMulMulLR:
		return wordShape{nread: 4}
	case op == OpAdd || op == OpSub || op == OpMul || op == OpDiv || op == OpPow ||
		op == OpAtan2 || op == OpMin || op == OpMax:
		return wordShape{nread: 2}
	}
	return wordShape{nread: 1}
}

// fieldPlan is the closure form of a fast-path program: the instructions
// that must still run on the tape (pre, in tape order), then one closure per
// output. An output computed by an instruction that nothing else reads is
// evaluated by its closure straight into the caller's slice, without a
// register store and reload; where such an instruction reads a single-use
// + - * result, that operation is absorbed into the closure too (deepFns).
// Every operation is kept, in the same order, so the bits are those of the
// tape.
type fieldPlan struct {
	pre  []uint64
	outs []regFn
}

// plan builds the closure form of p's fast tape.
func (p *Program) plan() fieldPlan {
	code := p.fast
	reads := make([]int, 256)
	prod := make([]int, 256)
	for i := range prod {
		prod[i] = -1
	}
	for i, w := range code {
		s := shapeOf(w)
		for k := range s.nread {
			reads[uint8(w>>(16+8*k))]++
		}
		prod[uint8(w>>8)] = i
	}
	outUses := make([]int, 256)
	for _, o := range p.fastOuts {
		outUses[o]++
	}
	gone := make([]bool, len(code))
	// plainArith returns the instruction computing register x when it is a
	// single + - * of two registers read only once, by one instruction, and
	// is no output.
	plainArith := func(x uint8) (int, bool) {
		j := prod[x]
		if j < 0 || gone[j] || reads[x] != 1 || outUses[x] != 0 || opIndex(Op(code[j])) < 0 {
			return 0, false
		}
		return j, true
	}
	var pl fieldPlan
	for _, o := range p.fastOuts {
		j := prod[o]
		if j < 0 || gone[j] || reads[o] != 0 || outUses[o] != 1 {
			pl.outs = append(pl.outs, func(r *[256]float64) float64 { return r[o] })
			continue
		}
		w := code[j]
		gone[j] = true
		s := shapeOf(w)
		a, b, c := uint8(w>>16), uint8(w>>24), uint8(w>>32)
		var f regFn
		switch {
		case s.l:
			if k, ok := plainArith(a); ok {
				v := code[k]
				f = deepFns[0][s.inner][opIndex(Op(v))][s.outer](uint8(v>>16), uint8(v>>24), b, c)
				gone[k] = true
			} else if k, ok := plainArith(b); ok && a != b {
				v := code[k]
				f = deepFns[1][s.inner][opIndex(Op(v))][s.outer](a, uint8(v>>16), uint8(v>>24), c)
				gone[k] = true
			}
		case s.r:
			if k, ok := plainArith(b); ok {
				v := code[k]
				f = deepFns[2][s.inner][opIndex(Op(v))][s.outer](a, uint8(v>>16), uint8(v>>24), c)
				gone[k] = true
			} else if k, ok := plainArith(c); ok && b != c {
				v := code[k]
				f = deepFns[3][s.inner][opIndex(Op(v))][s.outer](a, b, uint8(v>>16), uint8(v>>24))
				gone[k] = true
			}
		}
		if f == nil {
			f = wordFn(w)
		}
		pl.outs = append(pl.outs, f)
	}
	for i, w := range code {
		if !gone[i] {
			pl.pre = append(pl.pre, w)
		}
	}
	return pl
}
