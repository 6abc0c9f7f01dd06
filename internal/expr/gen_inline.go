//go:build ignore

// gen_inline writes inline_gen.go: the field closures for one to four
// outputs that evaluate each output in place through a switch on its kind
// (see inlineOut in closure.go), with no call. Run with go generate.
//
// Each closure has two parts. The first serves a y of one value per output
// and a dydt long enough: the state is copied without a loop and each
// output has its own switch, unrolled, writing straight into dydt; the
// switch of the last output returns from its cases. The second serves any
// other lengths, with one switch in a loop over the outputs. Both first
// run the instructions no output absorbed (pre: one + - * / or square or
// negation each, see inlinePre in closure.go) by a small switch in a loop.
// Nothing calls anything, so the closure needs no stack frame; a call on
// the rare path (to the closure form, say) would give every call a frame,
// which measured dearer than the second copy of the switch.
package main

import (
	"bytes"
	"fmt"
	"go/format"
	"log"
	"os"
)

// bin writes x op y with op index 0 add, 1 sub, 2 mul; every product is
// rounded by a conversion, so Go cannot fuse it into a multiply-add.
func bin(x string, op int, y string) string {
	switch op {
	case 0:
		return "(" + x + " + " + y + ")"
	case 1:
		return "(" + x + " - " + y + ")"
	}
	return "float64(" + x + " * " + y + ")"
}

// kindCase is one case of the switch: its label and the value computed.
type kindCase struct{ label, expr, doc string }

// cases lists the kinds in the order of their constants in closure.go, with
// the operand registers written A, B, C, D.
func cases() []kindCase {
	sym := []string{"+", "-", "*"}
	cs := []kindCase{
		{"kAdd", "A + B", ""},
		{"kSub", "A - B", ""},
		{"kMul", "float64(A * B)", ""},
		{"kDiv", "A / B", ""},
		{"kNeg", "-A", ""},
		{"kSq", "float64(A * A)", ""},
	}
	for i := range 3 {
		for o := range 3 {
			cs = append(cs, kindCase{fmt.Sprintf("kL + %d", i*3+o), bin(bin("A", i, "B"), o, "C"),
				fmt.Sprintf("(a %s b) %s c", sym[i], sym[o])})
		}
	}
	for i := range 3 {
		for o := range 3 {
			cs = append(cs, kindCase{fmt.Sprintf("kR + %d", i*3+o), bin("A", o, bin("B", i, "C")),
				fmt.Sprintf("a %s (b %s c)", sym[o], sym[i])})
		}
	}
	for l := range 3 {
		for o := range 3 {
			for r := range 3 {
				cs = append(cs, kindCase{fmt.Sprintf("kLR + %d", (l*3+o)*3+r), bin(bin("A", l, "B"), o, bin("C", r, "D")),
					fmt.Sprintf("(a %s b) %s (c %s d)", sym[l], sym[o], sym[r])})
			}
		}
	}
	for s := range 4 {
		for i := range 3 {
			for x := range 3 {
				for o := range 3 {
					var e, doc string
					switch s {
					case 0:
						e = bin(bin(bin("A", x, "B"), i, "C"), o, "D")
						doc = fmt.Sprintf("((a %s b) %s c) %s d", sym[x], sym[i], sym[o])
					case 1:
						e = bin(bin("A", i, bin("B", x, "C")), o, "D")
						doc = fmt.Sprintf("(a %s (b %s c)) %s d", sym[i], sym[x], sym[o])
					case 2:
						e = bin("A", o, bin(bin("B", x, "C"), i, "D"))
						doc = fmt.Sprintf("a %s ((b %s c) %s d)", sym[o], sym[x], sym[i])
					case 3:
						e = bin("A", o, bin("B", i, bin("C", x, "D")))
						doc = fmt.Sprintf("a %s (b %s (c %s d))", sym[o], sym[i], sym[x])
					}
					cs = append(cs, kindCase{fmt.Sprintf("kDeep + %d", ((s*3+i)*3+x)*3+o), e, doc})
				}
			}
		}
	}
	return cs
}

// site writes the switch computing output k into dst[k] from the word of
// output k (wk; w and index k in the loop form, k < 0). The cases of the
// last output return at once. The switch covers every byte value (values
// past the last kind read a register, like kReg), so its jump table needs
// no range check.
func site(w *bytes.Buffer, k int, last bool, dst string) {
	end := ""
	if last {
		end = "\n\t\treturn"
	}
	wv, kv := fmt.Sprintf("w%d", k), fmt.Sprint(k)
	if k < 0 {
		wv, kv = "w", "k"
	}
	reg := func(c byte) string { return fmt.Sprintf("r[uint8(%s>>%d)]", wv, 8*(1+c-'a')) }
	expr := func(e string) string {
		var out bytes.Buffer
		for _, ch := range []byte(e) {
			if ch >= 'A' && ch <= 'D' {
				out.WriteString(reg(ch - 'A' + 'a'))
				continue
			}
			out.WriteByte(ch)
		}
		return out.String()
	}
	fmt.Fprintf(w, "\tswitch uint8(%s) {\n", wv)
	cs := cases()
	for _, c := range cs {
		if c.doc != "" {
			fmt.Fprintf(w, "\tcase %s: // %s\n", c.label, c.doc)
		} else {
			fmt.Fprintf(w, "\tcase %s:\n", c.label)
		}
		fmt.Fprintf(w, "\t\t%s[%s] = %s%s\n", dst, kv, expr(c.expr), end)
	}
	w.WriteString("\tcase kReg")
	for v := len(cs) + 1; v < 256; v++ {
		fmt.Fprintf(w, ", %d", v)
	}
	fmt.Fprintf(w, ":\n\t\t%s[%s] = %s%s\n\t}\n", dst, kv, reg('a'), end)
}

// preLoop runs the tape instructions in pre, each one of the operations
// inlinePre (closure.go) lets through, in tape order.
const preLoop = `	for _, w := range pre {
		x := r[uint8(w>>16)]
		var v float64
		switch Op(w) {
		case OpAdd:
			v = x + r[uint8(w>>24)]
		case OpSub:
			v = x - r[uint8(w>>24)]
		case OpMul:
			v = float64(x * r[uint8(w>>24)])
		case OpDiv:
			v = x / r[uint8(w>>24)]
		case opSq:
			v = float64(x * x)
		default: // OpNeg, the only other operation inlinePre lets through
			v = -x
		}
		r[uint8(w>>8)] = v
	}
`

// list returns f(0), f(1), ..., f(n-1) joined by commas.
func list(n int, f func(k int) string) string {
	var s string
	for k := range n {
		if k > 0 {
			s += ", "
		}
		s += f(k)
	}
	return s
}

func main() {
	var w bytes.Buffer
	w.WriteString(`// Code generated by gen_inline.go; DO NOT EDIT.

package expr

`)
	for n := 1; n <= 4; n++ {
		words := list(n, func(k int) string { return fmt.Sprintf("w%d", k) })
		packs := list(n, func(k int) string { return fmt.Sprintf("o[%d].word()", k) })
		fmt.Fprintf(&w, `// inlineField%[1]d returns Field for the %[1]d outputs o over the registers rs
// (nstate state slots), each output evaluated in place by a switch on its
// kind after the instructions pre. A y of %[1]d values with a dydt of at
// least %[1]d takes the unrolled switches; other lengths copy the state by a
// loop and evaluate the outputs that fit in dydt by the switch in a loop.
func inlineField%[1]d(rs *[256]float64, o *[%[1]d]inlineOut, pre []uint64, nstate int) func(t float64, y, dydt []float64) {
	%[2]s := %[3]s
	ws := [%[1]d]uint64{%[2]s}
	return func(t float64, y, dydt []float64) {
	r := rs
	r[0] = t
	if len(y) == %[1]d && len(dydt) >= %[1]d {
		s, out := (*[%[1]d]float64)(y), (*[%[1]d]float64)(dydt)
`, n, words, packs)
		for k := range n {
			fmt.Fprintf(&w, "\t\tr[%d] = s[%d]\n", k+1, k)
		}
		w.WriteString(preLoop)
		for k := range n {
			site(&w, k, k == n-1, "out")
		}
		fmt.Fprintf(&w, `	}
	for i := 0; i < len(y) && i < nstate; i++ {
		r[uint8(1+i)] = y[i] // 1+i <= nstate < 256
	}
`+preLoop+`	for k := range min(len(dydt), %d) {
		w := ws[k]
`, n)
		site(&w, -1, false, "dydt")
		w.WriteString("\t}\n\t}\n}\n\n")
	}
	src, err := format.Source(w.Bytes())
	if err != nil {
		log.Fatal(err)
	}
	if err := os.WriteFile("inline_gen.go", src, 0o644); err != nil {
		log.Fatal(err)
	}
}
