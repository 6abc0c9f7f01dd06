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
	// kinds holds, when inline is set, each output's closure as an inline
	// kind with its registers (see inlineOut).
	kinds  []inlineOut
	inline bool
}

//go:generate go run gen_inline.go

// inlineOut is an output in the form the inline field closures of
// inline_gen.go evaluate without a call: a kind, naming the operations,
// and up to four registers a, b, c, d, in the order they are read.
type inlineOut struct {
	k, a, b, c, d uint8
}

// word packs o into one word: k, a, b, c, d in bytes 0 to 4, so an inline
// closure holds each output in one register.
func (o inlineOut) word() uint64 {
	return uint64(o.k) | uint64(o.a)<<8 | uint64(o.b)<<16 | uint64(o.c)<<24 | uint64(o.d)<<32
}

// Inline kinds. Operation indices: 0 add, 1 sub, 2 mul.
const (
	kReg     = iota     // r[a]
	kAdd                // a + b
	kSub                // a - b
	kMul                // a * b
	kDiv                // a / b
	kNeg                // -a
	kSq                 // a * a
	kL                  // kL + inner*3 + outer: (a inner b) outer c
	kR       = kL + 9   // kR + inner*3 + outer: a outer (b inner c)
	kLR      = kR + 9   // kLR + (l*3 + outer)*3 + r: (a l b) outer (c r d)
	kDeep    = kLR + 27 // kDeep + ((shape*3 + inner)*3 + absorbed)*3 + outer, shapes as in deepFns
	numKinds = kDeep + 108
)

// wordKind returns the inline kind of the fused instruction w, if it has one.
func wordKind(w uint64) (inlineOut, bool) {
	o := inlineOut{a: uint8(w >> 16), b: uint8(w >> 24), c: uint8(w >> 32), d: uint8(w >> 40)}
	op := Op(w)
	switch op {
	case OpAdd:
		o.k = kAdd
	case OpSub:
		o.k = kSub
	case OpMul:
		o.k = kMul
	case OpDiv:
		o.k = kDiv
	case OpNeg:
		o.k = kNeg
	case opSq:
		o.k = kSq
	default:
		s := shapeOf(w)
		switch {
		case s.l:
			o.k = uint8(kL + s.inner*3 + s.outer)
		case s.r:
			o.k = uint8(kR + s.inner*3 + s.outer)
		case op >= fAddAddAddLR && op <= fMulMulMulLR:
			o.k = uint8(kLR + int(op-fAddAddAddLR))
		default:
			return inlineOut{}, false
		}
	}
	return o, true
}

// inlinePre reports whether the inline field closures can run the tape
// instructions pre themselves: each is one + - * / of two registers, a
// square or a negation (the operations of their small switch, see
// gen_inline.go).
func inlinePre(pre []uint64) bool {
	for _, w := range pre {
		switch Op(w) {
		case OpAdd, OpSub, OpMul, OpDiv, opSq, OpNeg:
		default:
			return false
		}
	}
	return true
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
	pl := fieldPlan{inline: true}
	for _, o := range p.fastOuts {
		j := prod[o]
		if j < 0 || gone[j] || reads[o] != 0 || outUses[o] != 1 {
			pl.outs = append(pl.outs, func(r *[256]float64) float64 { return r[o] })
			pl.kinds = append(pl.kinds, inlineOut{k: kReg, a: o})
			continue
		}
		w := code[j]
		gone[j] = true
		s := shapeOf(w)
		a, b, c := uint8(w>>16), uint8(w>>24), uint8(w>>32)
		var f regFn
		var io inlineOut
		deep := func(shape int, v uint64, a, b, c, d uint8) {
			f = deepFns[shape][s.inner][opIndex(Op(v))][s.outer](a, b, c, d)
			io = inlineOut{k: uint8(kDeep + ((shape*3+s.inner)*3+opIndex(Op(v)))*3 + s.outer), a: a, b: b, c: c, d: d}
		}
		switch {
		case s.l:
			if k, ok := plainArith(a); ok {
				v := code[k]
				deep(0, v, uint8(v>>16), uint8(v>>24), b, c)
				gone[k] = true
			} else if k, ok := plainArith(b); ok && a != b {
				v := code[k]
				deep(1, v, a, uint8(v>>16), uint8(v>>24), c)
				gone[k] = true
			}
		case s.r:
			if k, ok := plainArith(b); ok {
				v := code[k]
				deep(2, v, a, uint8(v>>16), uint8(v>>24), c)
				gone[k] = true
			} else if k, ok := plainArith(c); ok && b != c {
				v := code[k]
				deep(3, v, a, b, uint8(v>>16), uint8(v>>24))
				gone[k] = true
			}
		}
		if f == nil {
			f = wordFn(w)
			var ok bool
			if io, ok = wordKind(w); !ok {
				pl.inline = false
			}
		}
		pl.kinds = append(pl.kinds, io)
		pl.outs = append(pl.outs, f)
	}
	for i, w := range code {
		if !gone[i] {
			pl.pre = append(pl.pre, w)
		}
	}
	return pl
}
