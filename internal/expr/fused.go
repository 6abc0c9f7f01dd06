// The fused opcodes of the float64 fast path and its interpreter loop. The
// cases were written out mechanically, one per combination of + - * (keep
// them in step with fuseCode in compile.go).

package expr

// Fused opcodes of the float64 fast path: two or three arithmetic operations
// in one dispatch. Every product is rounded before it is used (float64(x*y)),
// so a fused instruction gives the same bits as the unfused ones.
const (
	fAddAddL     = opPowi + 1 + iota // (a + b) + c
	fAddAddR                         // a + (b + c)
	fAddSubL                         // (a + b) - c
	fSubAddR                         // a - (b + c)
	fAddMulL                         // (a + b) * c
	fMulAddR                         // a * (b + c)
	fSubAddL                         // (a - b) + c
	fAddSubR                         // a + (b - c)
	fSubSubL                         // (a - b) - c
	fSubSubR                         // a - (b - c)
	fSubMulL                         // (a - b) * c
	fMulSubR                         // a * (b - c)
	fMulAddL                         // (a * b) + c
	fAddMulR                         // a + (b * c)
	fMulSubL                         // (a * b) - c
	fSubMulR                         // a - (b * c)
	fMulMulL                         // (a * b) * c
	fMulMulR                         // a * (b * c)
	fAddAddAddLR                     // (a + b) + (c + d)
	fAddAddSubLR                     // (a + b) + (c - d)
	fAddAddMulLR                     // (a + b) + (c * d)
	fAddSubAddLR                     // (a + b) - (c + d)
	fAddSubSubLR                     // (a + b) - (c - d)
	fAddSubMulLR                     // (a + b) - (c * d)
	fAddMulAddLR                     // (a + b) * (c + d)
	fAddMulSubLR                     // (a + b) * (c - d)
	fAddMulMulLR                     // (a + b) * (c * d)
	fSubAddAddLR                     // (a - b) + (c + d)
	fSubAddSubLR                     // (a - b) + (c - d)
	fSubAddMulLR                     // (a - b) + (c * d)
	fSubSubAddLR                     // (a - b) - (c + d)
	fSubSubSubLR                     // (a - b) - (c - d)
	fSubSubMulLR                     // (a - b) - (c * d)
	fSubMulAddLR                     // (a - b) * (c + d)
	fSubMulSubLR                     // (a - b) * (c - d)
	fSubMulMulLR                     // (a - b) * (c * d)
	fMulAddAddLR                     // (a * b) + (c + d)
	fMulAddSubLR                     // (a * b) + (c - d)
	fMulAddMulLR                     // (a * b) + (c * d)
	fMulSubAddLR                     // (a * b) - (c + d)
	fMulSubSubLR                     // (a * b) - (c - d)
	fMulSubMulLR                     // (a * b) - (c * d)
	fMulMulAddLR                     // (a * b) * (c + d)
	fMulMulSubLR                     // (a * b) * (c - d)
	fMulMulMulLR                     // (a * b) * (c * d)
	fNumOps
)

// fusedL[inner][outer] is the opcode of (a inner b) outer c; fusedR that of
// a outer (b inner c); fusedLR[l][outer][r] that of (a l b) outer (c r d).
// Indices: 0 add, 1 sub, 2 mul.
var (
	fusedL  = [3][3]Op{{fAddAddL, fAddSubL, fAddMulL}, {fSubAddL, fSubSubL, fSubMulL}, {fMulAddL, fMulSubL, fMulMulL}}
	fusedR  = [3][3]Op{{fAddAddR, fSubAddR, fMulAddR}, {fAddSubR, fSubSubR, fMulSubR}, {fAddMulR, fSubMulR, fMulMulR}}
	fusedLR = [3][3][3]Op{{{fAddAddAddLR, fAddAddSubLR, fAddAddMulLR}, {fAddSubAddLR, fAddSubSubLR, fAddSubMulLR}, {fAddMulAddLR, fAddMulSubLR, fAddMulMulLR}}, {{fSubAddAddLR, fSubAddSubLR, fSubAddMulLR}, {fSubSubAddLR, fSubSubSubLR, fSubSubMulLR}, {fSubMulAddLR, fSubMulSubLR, fSubMulMulLR}}, {{fMulAddAddLR, fMulAddSubLR, fMulAddMulLR}, {fMulSubAddLR, fMulSubSubLR, fMulSubMulLR}, {fMulMulAddLR, fMulMulSubLR, fMulMulMulLR}}}
)

// runFast is the interpreter loop of the fast path: registers in a fixed
// array indexed by bytes, so no bounds checks are needed, and each
// instruction packed in one word (see finstr.pack), so it stays in a
// register.
func runFast(r *[256]float64, code []uint64) {
	for _, w := range code {
		var v float64
		switch Op(w) {
		case fAddAddL:
			v = (r[uint8(w>>16)] + r[uint8(w>>24)]) + r[uint8(w>>32)]
		case fAddAddR:
			v = r[uint8(w>>16)] + (r[uint8(w>>24)] + r[uint8(w>>32)])
		case fAddSubL:
			v = (r[uint8(w>>16)] + r[uint8(w>>24)]) - r[uint8(w>>32)]
		case fSubAddR:
			v = r[uint8(w>>16)] - (r[uint8(w>>24)] + r[uint8(w>>32)])
		case fAddMulL:
			v = float64((r[uint8(w>>16)] + r[uint8(w>>24)]) * r[uint8(w>>32)])
		case fMulAddR:
			v = float64(r[uint8(w>>16)] * (r[uint8(w>>24)] + r[uint8(w>>32)]))
		case fSubAddL:
			v = (r[uint8(w>>16)] - r[uint8(w>>24)]) + r[uint8(w>>32)]
		case fAddSubR:
			v = r[uint8(w>>16)] + (r[uint8(w>>24)] - r[uint8(w>>32)])
		case fSubSubL:
			v = (r[uint8(w>>16)] - r[uint8(w>>24)]) - r[uint8(w>>32)]
		case fSubSubR:
			v = r[uint8(w>>16)] - (r[uint8(w>>24)] - r[uint8(w>>32)])
		case fSubMulL:
			v = float64((r[uint8(w>>16)] - r[uint8(w>>24)]) * r[uint8(w>>32)])
		case fMulSubR:
			v = float64(r[uint8(w>>16)] * (r[uint8(w>>24)] - r[uint8(w>>32)]))
		case fMulAddL:
			v = float64(r[uint8(w>>16)]*r[uint8(w>>24)]) + r[uint8(w>>32)]
		case fAddMulR:
			v = r[uint8(w>>16)] + float64(r[uint8(w>>24)]*r[uint8(w>>32)])
		case fMulSubL:
			v = float64(r[uint8(w>>16)]*r[uint8(w>>24)]) - r[uint8(w>>32)]
		case fSubMulR:
			v = r[uint8(w>>16)] - float64(r[uint8(w>>24)]*r[uint8(w>>32)])
		case fMulMulL:
			v = float64(float64(r[uint8(w>>16)]*r[uint8(w>>24)]) * r[uint8(w>>32)])
		case fMulMulR:
			v = float64(r[uint8(w>>16)] * float64(r[uint8(w>>24)]*r[uint8(w>>32)]))
		case fAddAddAddLR:
			v = (r[uint8(w>>16)] + r[uint8(w>>24)]) + (r[uint8(w>>32)] + r[uint8(w>>40)])
		case fAddAddSubLR:
			v = (r[uint8(w>>16)] + r[uint8(w>>24)]) + (r[uint8(w>>32)] - r[uint8(w>>40)])
		case fAddAddMulLR:
			v = (r[uint8(w>>16)] + r[uint8(w>>24)]) + float64(r[uint8(w>>32)]*r[uint8(w>>40)])
		case fAddSubAddLR:
			v = (r[uint8(w>>16)] + r[uint8(w>>24)]) - (r[uint8(w>>32)] + r[uint8(w>>40)])
		case fAddSubSubLR:
			v = (r[uint8(w>>16)] + r[uint8(w>>24)]) - (r[uint8(w>>32)] - r[uint8(w>>40)])
		case fAddSubMulLR:
			v = (r[uint8(w>>16)] + r[uint8(w>>24)]) - float64(r[uint8(w>>32)]*r[uint8(w>>40)])
		case fAddMulAddLR:
			v = float64((r[uint8(w>>16)] + r[uint8(w>>24)]) * (r[uint8(w>>32)] + r[uint8(w>>40)]))
		case fAddMulSubLR:
			v = float64((r[uint8(w>>16)] + r[uint8(w>>24)]) * (r[uint8(w>>32)] - r[uint8(w>>40)]))
		case fAddMulMulLR:
			v = float64((r[uint8(w>>16)] + r[uint8(w>>24)]) * float64(r[uint8(w>>32)]*r[uint8(w>>40)]))
		case fSubAddAddLR:
			v = (r[uint8(w>>16)] - r[uint8(w>>24)]) + (r[uint8(w>>32)] + r[uint8(w>>40)])
		case fSubAddSubLR:
			v = (r[uint8(w>>16)] - r[uint8(w>>24)]) + (r[uint8(w>>32)] - r[uint8(w>>40)])
		case fSubAddMulLR:
			v = (r[uint8(w>>16)] - r[uint8(w>>24)]) + float64(r[uint8(w>>32)]*r[uint8(w>>40)])
		case fSubSubAddLR:
			v = (r[uint8(w>>16)] - r[uint8(w>>24)]) - (r[uint8(w>>32)] + r[uint8(w>>40)])
		case fSubSubSubLR:
			v = (r[uint8(w>>16)] - r[uint8(w>>24)]) - (r[uint8(w>>32)] - r[uint8(w>>40)])
		case fSubSubMulLR:
			v = (r[uint8(w>>16)] - r[uint8(w>>24)]) - float64(r[uint8(w>>32)]*r[uint8(w>>40)])
		case fSubMulAddLR:
			v = float64((r[uint8(w>>16)] - r[uint8(w>>24)]) * (r[uint8(w>>32)] + r[uint8(w>>40)]))
		case fSubMulSubLR:
			v = float64((r[uint8(w>>16)] - r[uint8(w>>24)]) * (r[uint8(w>>32)] - r[uint8(w>>40)]))
		case fSubMulMulLR:
			v = float64((r[uint8(w>>16)] - r[uint8(w>>24)]) * float64(r[uint8(w>>32)]*r[uint8(w>>40)]))
		case fMulAddAddLR:
			v = float64(r[uint8(w>>16)]*r[uint8(w>>24)]) + (r[uint8(w>>32)] + r[uint8(w>>40)])
		case fMulAddSubLR:
			v = float64(r[uint8(w>>16)]*r[uint8(w>>24)]) + (r[uint8(w>>32)] - r[uint8(w>>40)])
		case fMulAddMulLR:
			v = float64(r[uint8(w>>16)]*r[uint8(w>>24)]) + float64(r[uint8(w>>32)]*r[uint8(w>>40)])
		case fMulSubAddLR:
			v = float64(r[uint8(w>>16)]*r[uint8(w>>24)]) - (r[uint8(w>>32)] + r[uint8(w>>40)])
		case fMulSubSubLR:
			v = float64(r[uint8(w>>16)]*r[uint8(w>>24)]) - (r[uint8(w>>32)] - r[uint8(w>>40)])
		case fMulSubMulLR:
			v = float64(r[uint8(w>>16)]*r[uint8(w>>24)]) - float64(r[uint8(w>>32)]*r[uint8(w>>40)])
		case fMulMulAddLR:
			v = float64(float64(r[uint8(w>>16)]*r[uint8(w>>24)]) * (r[uint8(w>>32)] + r[uint8(w>>40)]))
		case fMulMulSubLR:
			v = float64(float64(r[uint8(w>>16)]*r[uint8(w>>24)]) * (r[uint8(w>>32)] - r[uint8(w>>40)]))
		case fMulMulMulLR:
			v = float64(float64(r[uint8(w>>16)]*r[uint8(w>>24)]) * float64(r[uint8(w>>32)]*r[uint8(w>>40)]))
		case OpAdd:
			v = r[uint8(w>>16)] + r[uint8(w>>24)]
		case OpSub:
			v = r[uint8(w>>16)] - r[uint8(w>>24)]
		case OpMul:
			v = float64(r[uint8(w>>16)] * r[uint8(w>>24)])
		case OpDiv:
			v = r[uint8(w>>16)] / r[uint8(w>>24)]
		case OpNeg:
			v = -r[uint8(w>>16)]
		case opSq:
			x := r[uint8(w>>16)]
			v = float64(x * x)
		default:
			v = slowOp(r, w)
		}
		r[uint8(w>>8)] = v
	}
}

// slowOp computes an instruction that calls a function.
func slowOp(r *[256]float64, w uint64) float64 {
	x := r[uint8(w>>16)]
	switch op := Op(w); op {
	case opPowi:
		return powi(x, int(int8(w>>32)))
	case OpPow:
		return pow(x, r[uint8(w>>24)])
	case OpAtan2, OpMin, OpMax:
		return eval2(op, x, r[uint8(w>>24)])
	default:
		return eval1(op, x)
	}
}
