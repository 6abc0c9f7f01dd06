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
// array indexed by bytes, so no bounds checks are needed.
func runFast(r *[256]float64, code []finstr) {
	for _, in := range code {
		var v float64
		switch in.op {
		case fAddAddL:
			v = (r[in.a] + r[in.b]) + r[in.c]
		case fAddAddR:
			v = r[in.a] + (r[in.b] + r[in.c])
		case fAddSubL:
			v = (r[in.a] + r[in.b]) - r[in.c]
		case fSubAddR:
			v = r[in.a] - (r[in.b] + r[in.c])
		case fAddMulL:
			v = float64((r[in.a] + r[in.b]) * r[in.c])
		case fMulAddR:
			v = float64(r[in.a] * (r[in.b] + r[in.c]))
		case fSubAddL:
			v = (r[in.a] - r[in.b]) + r[in.c]
		case fAddSubR:
			v = r[in.a] + (r[in.b] - r[in.c])
		case fSubSubL:
			v = (r[in.a] - r[in.b]) - r[in.c]
		case fSubSubR:
			v = r[in.a] - (r[in.b] - r[in.c])
		case fSubMulL:
			v = float64((r[in.a] - r[in.b]) * r[in.c])
		case fMulSubR:
			v = float64(r[in.a] * (r[in.b] - r[in.c]))
		case fMulAddL:
			v = float64(r[in.a]*r[in.b]) + r[in.c]
		case fAddMulR:
			v = r[in.a] + float64(r[in.b]*r[in.c])
		case fMulSubL:
			v = float64(r[in.a]*r[in.b]) - r[in.c]
		case fSubMulR:
			v = r[in.a] - float64(r[in.b]*r[in.c])
		case fMulMulL:
			v = float64(float64(r[in.a]*r[in.b]) * r[in.c])
		case fMulMulR:
			v = float64(r[in.a] * float64(r[in.b]*r[in.c]))
		case fAddAddAddLR:
			v = (r[in.a] + r[in.b]) + (r[in.c] + r[in.d])
		case fAddAddSubLR:
			v = (r[in.a] + r[in.b]) + (r[in.c] - r[in.d])
		case fAddAddMulLR:
			v = (r[in.a] + r[in.b]) + float64(r[in.c]*r[in.d])
		case fAddSubAddLR:
			v = (r[in.a] + r[in.b]) - (r[in.c] + r[in.d])
		case fAddSubSubLR:
			v = (r[in.a] + r[in.b]) - (r[in.c] - r[in.d])
		case fAddSubMulLR:
			v = (r[in.a] + r[in.b]) - float64(r[in.c]*r[in.d])
		case fAddMulAddLR:
			v = float64((r[in.a] + r[in.b]) * (r[in.c] + r[in.d]))
		case fAddMulSubLR:
			v = float64((r[in.a] + r[in.b]) * (r[in.c] - r[in.d]))
		case fAddMulMulLR:
			v = float64((r[in.a] + r[in.b]) * float64(r[in.c]*r[in.d]))
		case fSubAddAddLR:
			v = (r[in.a] - r[in.b]) + (r[in.c] + r[in.d])
		case fSubAddSubLR:
			v = (r[in.a] - r[in.b]) + (r[in.c] - r[in.d])
		case fSubAddMulLR:
			v = (r[in.a] - r[in.b]) + float64(r[in.c]*r[in.d])
		case fSubSubAddLR:
			v = (r[in.a] - r[in.b]) - (r[in.c] + r[in.d])
		case fSubSubSubLR:
			v = (r[in.a] - r[in.b]) - (r[in.c] - r[in.d])
		case fSubSubMulLR:
			v = (r[in.a] - r[in.b]) - float64(r[in.c]*r[in.d])
		case fSubMulAddLR:
			v = float64((r[in.a] - r[in.b]) * (r[in.c] + r[in.d]))
		case fSubMulSubLR:
			v = float64((r[in.a] - r[in.b]) * (r[in.c] - r[in.d]))
		case fSubMulMulLR:
			v = float64((r[in.a] - r[in.b]) * float64(r[in.c]*r[in.d]))
		case fMulAddAddLR:
			v = float64(r[in.a]*r[in.b]) + (r[in.c] + r[in.d])
		case fMulAddSubLR:
			v = float64(r[in.a]*r[in.b]) + (r[in.c] - r[in.d])
		case fMulAddMulLR:
			v = float64(r[in.a]*r[in.b]) + float64(r[in.c]*r[in.d])
		case fMulSubAddLR:
			v = float64(r[in.a]*r[in.b]) - (r[in.c] + r[in.d])
		case fMulSubSubLR:
			v = float64(r[in.a]*r[in.b]) - (r[in.c] - r[in.d])
		case fMulSubMulLR:
			v = float64(r[in.a]*r[in.b]) - float64(r[in.c]*r[in.d])
		case fMulMulAddLR:
			v = float64(float64(r[in.a]*r[in.b]) * (r[in.c] + r[in.d]))
		case fMulMulSubLR:
			v = float64(float64(r[in.a]*r[in.b]) * (r[in.c] - r[in.d]))
		case fMulMulMulLR:
			v = float64(float64(r[in.a]*r[in.b]) * float64(r[in.c]*r[in.d]))
		case OpAdd:
			v = r[in.a] + r[in.b]
		case OpSub:
			v = r[in.a] - r[in.b]
		case OpMul:
			v = float64(r[in.a] * r[in.b])
		case OpDiv:
			v = r[in.a] / r[in.b]
		case OpNeg:
			v = -r[in.a]
		case opSq:
			x := r[in.a]
			v = float64(x * x)
		case opPowi:
			v = powi(r[in.a], int(int8(in.c)))
		case OpPow:
			v = pow(r[in.a], r[in.b])
		case OpAtan2, OpMin, OpMax:
			v = eval2(in.op, r[in.a], r[in.b])
		default:
			v = eval1(in.op, r[in.a])
		}
		r[in.dst] = v
	}
}
