// The closures of the float64 field path: one specialised Go closure per
// fused instruction, with its register indices captured, so an output costs
// one indirect call and no opcode dispatch. The cases were written out
// mechanically from runFast in fused.go (keep them in step), and the
// three-operation shapes of deepFns likewise, one per combination of + - *.

package expr

// regFn computes one value from the registers of the fast path.
type regFn func(r *[256]float64) float64

// wordFn returns a closure computing the fused instruction w (see
// finstr.pack) without storing it: the same operations in the same order as
// runFast, every product rounded, so the bits are the same.
func wordFn(w uint64) regFn {
	a, b, c, d := uint8(w>>16), uint8(w>>24), uint8(w>>32), uint8(w>>40)
	switch Op(w) {
	case fAddAddL:
		return func(r *[256]float64) float64 { return (r[a] + r[b]) + r[c] }
	case fAddAddR:
		return func(r *[256]float64) float64 { return r[a] + (r[b] + r[c]) }
	case fAddSubL:
		return func(r *[256]float64) float64 { return (r[a] + r[b]) - r[c] }
	case fSubAddR:
		return func(r *[256]float64) float64 { return r[a] - (r[b] + r[c]) }
	case fAddMulL:
		return func(r *[256]float64) float64 { return float64((r[a] + r[b]) * r[c]) }
	case fMulAddR:
		return func(r *[256]float64) float64 { return float64(r[a] * (r[b] + r[c])) }
	case fSubAddL:
		return func(r *[256]float64) float64 { return (r[a] - r[b]) + r[c] }
	case fAddSubR:
		return func(r *[256]float64) float64 { return r[a] + (r[b] - r[c]) }
	case fSubSubL:
		return func(r *[256]float64) float64 { return (r[a] - r[b]) - r[c] }
	case fSubSubR:
		return func(r *[256]float64) float64 { return r[a] - (r[b] - r[c]) }
	case fSubMulL:
		return func(r *[256]float64) float64 { return float64((r[a] - r[b]) * r[c]) }
	case fMulSubR:
		return func(r *[256]float64) float64 { return float64(r[a] * (r[b] - r[c])) }
	case fMulAddL:
		return func(r *[256]float64) float64 { return float64(r[a]*r[b]) + r[c] }
	case fAddMulR:
		return func(r *[256]float64) float64 { return r[a] + float64(r[b]*r[c]) }
	case fMulSubL:
		return func(r *[256]float64) float64 { return float64(r[a]*r[b]) - r[c] }
	case fSubMulR:
		return func(r *[256]float64) float64 { return r[a] - float64(r[b]*r[c]) }
	case fMulMulL:
		return func(r *[256]float64) float64 { return float64(float64(r[a]*r[b]) * r[c]) }
	case fMulMulR:
		return func(r *[256]float64) float64 { return float64(r[a] * float64(r[b]*r[c])) }
	case fAddAddAddLR:
		return func(r *[256]float64) float64 { return (r[a] + r[b]) + (r[c] + r[d]) }
	case fAddAddSubLR:
		return func(r *[256]float64) float64 { return (r[a] + r[b]) + (r[c] - r[d]) }
	case fAddAddMulLR:
		return func(r *[256]float64) float64 { return (r[a] + r[b]) + float64(r[c]*r[d]) }
	case fAddSubAddLR:
		return func(r *[256]float64) float64 { return (r[a] + r[b]) - (r[c] + r[d]) }
	case fAddSubSubLR:
		return func(r *[256]float64) float64 { return (r[a] + r[b]) - (r[c] - r[d]) }
	case fAddSubMulLR:
		return func(r *[256]float64) float64 { return (r[a] + r[b]) - float64(r[c]*r[d]) }
	case fAddMulAddLR:
		return func(r *[256]float64) float64 { return float64((r[a] + r[b]) * (r[c] + r[d])) }
	case fAddMulSubLR:
		return func(r *[256]float64) float64 { return float64((r[a] + r[b]) * (r[c] - r[d])) }
	case fAddMulMulLR:
		return func(r *[256]float64) float64 { return float64((r[a] + r[b]) * float64(r[c]*r[d])) }
	case fSubAddAddLR:
		return func(r *[256]float64) float64 { return (r[a] - r[b]) + (r[c] + r[d]) }
	case fSubAddSubLR:
		return func(r *[256]float64) float64 { return (r[a] - r[b]) + (r[c] - r[d]) }
	case fSubAddMulLR:
		return func(r *[256]float64) float64 { return (r[a] - r[b]) + float64(r[c]*r[d]) }
	case fSubSubAddLR:
		return func(r *[256]float64) float64 { return (r[a] - r[b]) - (r[c] + r[d]) }
	case fSubSubSubLR:
		return func(r *[256]float64) float64 { return (r[a] - r[b]) - (r[c] - r[d]) }
	case fSubSubMulLR:
		return func(r *[256]float64) float64 { return (r[a] - r[b]) - float64(r[c]*r[d]) }
	case fSubMulAddLR:
		return func(r *[256]float64) float64 { return float64((r[a] - r[b]) * (r[c] + r[d])) }
	case fSubMulSubLR:
		return func(r *[256]float64) float64 { return float64((r[a] - r[b]) * (r[c] - r[d])) }
	case fSubMulMulLR:
		return func(r *[256]float64) float64 { return float64((r[a] - r[b]) * float64(r[c]*r[d])) }
	case fMulAddAddLR:
		return func(r *[256]float64) float64 { return float64(r[a]*r[b]) + (r[c] + r[d]) }
	case fMulAddSubLR:
		return func(r *[256]float64) float64 { return float64(r[a]*r[b]) + (r[c] - r[d]) }
	case fMulAddMulLR:
		return func(r *[256]float64) float64 { return float64(r[a]*r[b]) + float64(r[c]*r[d]) }
	case fMulSubAddLR:
		return func(r *[256]float64) float64 { return float64(r[a]*r[b]) - (r[c] + r[d]) }
	case fMulSubSubLR:
		return func(r *[256]float64) float64 { return float64(r[a]*r[b]) - (r[c] - r[d]) }
	case fMulSubMulLR:
		return func(r *[256]float64) float64 { return float64(r[a]*r[b]) - float64(r[c]*r[d]) }
	case fMulMulAddLR:
		return func(r *[256]float64) float64 { return float64(float64(r[a]*r[b]) * (r[c] + r[d])) }
	case fMulMulSubLR:
		return func(r *[256]float64) float64 { return float64(float64(r[a]*r[b]) * (r[c] - r[d])) }
	case fMulMulMulLR:
		return func(r *[256]float64) float64 { return float64(float64(r[a]*r[b]) * float64(r[c]*r[d])) }
	case OpAdd:
		return func(r *[256]float64) float64 { return r[a] + r[b] }
	case OpSub:
		return func(r *[256]float64) float64 { return r[a] - r[b] }
	case OpMul:
		return func(r *[256]float64) float64 { return float64(r[a] * r[b]) }
	case OpDiv:
		return func(r *[256]float64) float64 { return r[a] / r[b] }
	case OpNeg:
		return func(r *[256]float64) float64 { return -r[a] }
	case opSq:
		return func(r *[256]float64) float64 {
			x := r[a]
			return float64(x * x)
		}
	}
	return func(r *[256]float64) float64 { return slowOp(r, w) }
}

// deepFns[shape][inner][absorbed][outer] builds the closure of a fused
// L-type or R-type instruction (see fusedL, fusedR) one of whose inner
// operands is itself a single-use + - * instruction, absorbed in turn.
// Shapes, with operation indices 0 add, 1 sub, 2 mul:
//
//	0: ((a absorbed b) inner c) outer d
//	1: (a inner (b absorbed c)) outer d
//	2: a outer ((b absorbed c) inner d)
//	3: a outer (b inner (c absorbed d))
var deepFns = [4][3][3][3]func(a, b, c, d uint8) regFn{
	{
		{
			{
				func(a, b, c, d uint8) regFn {
					return func(r *[256]float64) float64 { return ((r[a] + r[b]) + r[c]) + r[d] }
				},
				func(a, b, c, d uint8) regFn {
					return func(r *[256]float64) float64 { return ((r[a] + r[b]) + r[c]) - r[d] }
				},
				func(a, b, c, d uint8) regFn {
					return func(r *[256]float64) float64 { return float64(((r[a] + r[b]) + r[c]) * r[d]) }
				},
			},
			{
				func(a, b, c, d uint8) regFn {
					return func(r *[256]float64) float64 { return ((r[a] - r[b]) + r[c]) + r[d] }
				},
				func(a, b, c, d uint8) regFn {
					return func(r *[256]float64) float64 { return ((r[a] - r[b]) + r[c]) - r[d] }
				},
				func(a, b, c, d uint8) regFn {
					return func(r *[256]float64) float64 { return float64(((r[a] - r[b]) + r[c]) * r[d]) }
				},
			},
			{
				func(a, b, c, d uint8) regFn {
					return func(r *[256]float64) float64 { return (float64(r[a]*r[b]) + r[c]) + r[d] }
				},
				func(a, b, c, d uint8) regFn {
					return func(r *[256]float64) float64 { return (float64(r[a]*r[b]) + r[c]) - r[d] }
				},
				func(a, b, c, d uint8) regFn {
					return func(r *[256]float64) float64 { return float64((float64(r[a]*r[b]) + r[c]) * r[d]) }
				},
			},
		},
		{
			{
				func(a, b, c, d uint8) regFn {
					return func(r *[256]float64) float64 { return ((r[a] + r[b]) - r[c]) + r[d] }
				},
				func(a, b, c, d uint8) regFn {
					return func(r *[256]float64) float64 { return ((r[a] + r[b]) - r[c]) - r[d] }
				},
				func(a, b, c, d uint8) regFn {
					return func(r *[256]float64) float64 { return float64(((r[a] + r[b]) - r[c]) * r[d]) }
				},
			},
			{
				func(a, b, c, d uint8) regFn {
					return func(r *[256]float64) float64 { return ((r[a] - r[b]) - r[c]) + r[d] }
				},
				func(a, b, c, d uint8) regFn {
					return func(r *[256]float64) float64 { return ((r[a] - r[b]) - r[c]) - r[d] }
				},
				func(a, b, c, d uint8) regFn {
					return func(r *[256]float64) float64 { return float64(((r[a] - r[b]) - r[c]) * r[d]) }
				},
			},
			{
				func(a, b, c, d uint8) regFn {
					return func(r *[256]float64) float64 { return (float64(r[a]*r[b]) - r[c]) + r[d] }
				},
				func(a, b, c, d uint8) regFn {
					return func(r *[256]float64) float64 { return (float64(r[a]*r[b]) - r[c]) - r[d] }
				},
				func(a, b, c, d uint8) regFn {
					return func(r *[256]float64) float64 { return float64((float64(r[a]*r[b]) - r[c]) * r[d]) }
				},
			},
		},
		{
			{
				func(a, b, c, d uint8) regFn {
					return func(r *[256]float64) float64 { return float64((r[a]+r[b])*r[c]) + r[d] }
				},
				func(a, b, c, d uint8) regFn {
					return func(r *[256]float64) float64 { return float64((r[a]+r[b])*r[c]) - r[d] }
				},
				func(a, b, c, d uint8) regFn {
					return func(r *[256]float64) float64 { return float64(float64((r[a]+r[b])*r[c]) * r[d]) }
				},
			},
			{
				func(a, b, c, d uint8) regFn {
					return func(r *[256]float64) float64 { return float64((r[a]-r[b])*r[c]) + r[d] }
				},
				func(a, b, c, d uint8) regFn {
					return func(r *[256]float64) float64 { return float64((r[a]-r[b])*r[c]) - r[d] }
				},
				func(a, b, c, d uint8) regFn {
					return func(r *[256]float64) float64 { return float64(float64((r[a]-r[b])*r[c]) * r[d]) }
				},
			},
			{
				func(a, b, c, d uint8) regFn {
					return func(r *[256]float64) float64 { return float64(float64(r[a]*r[b])*r[c]) + r[d] }
				},
				func(a, b, c, d uint8) regFn {
					return func(r *[256]float64) float64 { return float64(float64(r[a]*r[b])*r[c]) - r[d] }
				},
				func(a, b, c, d uint8) regFn {
					return func(r *[256]float64) float64 { return float64(float64(float64(r[a]*r[b])*r[c]) * r[d]) }
				},
			},
		},
	},
	{
		{
			{
				func(a, b, c, d uint8) regFn {
					return func(r *[256]float64) float64 { return (r[a] + (r[b] + r[c])) + r[d] }
				},
				func(a, b, c, d uint8) regFn {
					return func(r *[256]float64) float64 { return (r[a] + (r[b] + r[c])) - r[d] }
				},
				func(a, b, c, d uint8) regFn {
					return func(r *[256]float64) float64 { return float64((r[a] + (r[b] + r[c])) * r[d]) }
				},
			},
			{
				func(a, b, c, d uint8) regFn {
					return func(r *[256]float64) float64 { return (r[a] + (r[b] - r[c])) + r[d] }
				},
				func(a, b, c, d uint8) regFn {
					return func(r *[256]float64) float64 { return (r[a] + (r[b] - r[c])) - r[d] }
				},
				func(a, b, c, d uint8) regFn {
					return func(r *[256]float64) float64 { return float64((r[a] + (r[b] - r[c])) * r[d]) }
				},
			},
			{
				func(a, b, c, d uint8) regFn {
					return func(r *[256]float64) float64 { return (r[a] + float64(r[b]*r[c])) + r[d] }
				},
				func(a, b, c, d uint8) regFn {
					return func(r *[256]float64) float64 { return (r[a] + float64(r[b]*r[c])) - r[d] }
				},
				func(a, b, c, d uint8) regFn {
					return func(r *[256]float64) float64 { return float64((r[a] + float64(r[b]*r[c])) * r[d]) }
				},
			},
		},
		{
			{
				func(a, b, c, d uint8) regFn {
					return func(r *[256]float64) float64 { return (r[a] - (r[b] + r[c])) + r[d] }
				},
				func(a, b, c, d uint8) regFn {
					return func(r *[256]float64) float64 { return (r[a] - (r[b] + r[c])) - r[d] }
				},
				func(a, b, c, d uint8) regFn {
					return func(r *[256]float64) float64 { return float64((r[a] - (r[b] + r[c])) * r[d]) }
				},
			},
			{
				func(a, b, c, d uint8) regFn {
					return func(r *[256]float64) float64 { return (r[a] - (r[b] - r[c])) + r[d] }
				},
				func(a, b, c, d uint8) regFn {
					return func(r *[256]float64) float64 { return (r[a] - (r[b] - r[c])) - r[d] }
				},
				func(a, b, c, d uint8) regFn {
					return func(r *[256]float64) float64 { return float64((r[a] - (r[b] - r[c])) * r[d]) }
				},
			},
			{
				func(a, b, c, d uint8) regFn {
					return func(r *[256]float64) float64 { return (r[a] - float64(r[b]*r[c])) + r[d] }
				},
				func(a, b, c, d uint8) regFn {
					return func(r *[256]float64) float64 { return (r[a] - float64(r[b]*r[c])) - r[d] }
				},
				func(a, b, c, d uint8) regFn {
					return func(r *[256]float64) float64 { return float64((r[a] - float64(r[b]*r[c])) * r[d]) }
				},
			},
		},
		{
			{
				func(a, b, c, d uint8) regFn {
					return func(r *[256]float64) float64 { return float64(r[a]*(r[b]+r[c])) + r[d] }
				},
				func(a, b, c, d uint8) regFn {
					return func(r *[256]float64) float64 { return float64(r[a]*(r[b]+r[c])) - r[d] }
				},
				func(a, b, c, d uint8) regFn {
					return func(r *[256]float64) float64 { return float64(float64(r[a]*(r[b]+r[c])) * r[d]) }
				},
			},
			{
				func(a, b, c, d uint8) regFn {
					return func(r *[256]float64) float64 { return float64(r[a]*(r[b]-r[c])) + r[d] }
				},
				func(a, b, c, d uint8) regFn {
					return func(r *[256]float64) float64 { return float64(r[a]*(r[b]-r[c])) - r[d] }
				},
				func(a, b, c, d uint8) regFn {
					return func(r *[256]float64) float64 { return float64(float64(r[a]*(r[b]-r[c])) * r[d]) }
				},
			},
			{
				func(a, b, c, d uint8) regFn {
					return func(r *[256]float64) float64 { return float64(r[a]*float64(r[b]*r[c])) + r[d] }
				},
				func(a, b, c, d uint8) regFn {
					return func(r *[256]float64) float64 { return float64(r[a]*float64(r[b]*r[c])) - r[d] }
				},
				func(a, b, c, d uint8) regFn {
					return func(r *[256]float64) float64 { return float64(float64(r[a]*float64(r[b]*r[c])) * r[d]) }
				},
			},
		},
	},
	{
		{
			{
				func(a, b, c, d uint8) regFn {
					return func(r *[256]float64) float64 { return r[a] + ((r[b] + r[c]) + r[d]) }
				},
				func(a, b, c, d uint8) regFn {
					return func(r *[256]float64) float64 { return r[a] - ((r[b] + r[c]) + r[d]) }
				},
				func(a, b, c, d uint8) regFn {
					return func(r *[256]float64) float64 { return float64(r[a] * ((r[b] + r[c]) + r[d])) }
				},
			},
			{
				func(a, b, c, d uint8) regFn {
					return func(r *[256]float64) float64 { return r[a] + ((r[b] - r[c]) + r[d]) }
				},
				func(a, b, c, d uint8) regFn {
					return func(r *[256]float64) float64 { return r[a] - ((r[b] - r[c]) + r[d]) }
				},
				func(a, b, c, d uint8) regFn {
					return func(r *[256]float64) float64 { return float64(r[a] * ((r[b] - r[c]) + r[d])) }
				},
			},
			{
				func(a, b, c, d uint8) regFn {
					return func(r *[256]float64) float64 { return r[a] + (float64(r[b]*r[c]) + r[d]) }
				},
				func(a, b, c, d uint8) regFn {
					return func(r *[256]float64) float64 { return r[a] - (float64(r[b]*r[c]) + r[d]) }
				},
				func(a, b, c, d uint8) regFn {
					return func(r *[256]float64) float64 { return float64(r[a] * (float64(r[b]*r[c]) + r[d])) }
				},
			},
		},
		{
			{
				func(a, b, c, d uint8) regFn {
					return func(r *[256]float64) float64 { return r[a] + ((r[b] + r[c]) - r[d]) }
				},
				func(a, b, c, d uint8) regFn {
					return func(r *[256]float64) float64 { return r[a] - ((r[b] + r[c]) - r[d]) }
				},
				func(a, b, c, d uint8) regFn {
					return func(r *[256]float64) float64 { return float64(r[a] * ((r[b] + r[c]) - r[d])) }
				},
			},
			{
				func(a, b, c, d uint8) regFn {
					return func(r *[256]float64) float64 { return r[a] + ((r[b] - r[c]) - r[d]) }
				},
				func(a, b, c, d uint8) regFn {
					return func(r *[256]float64) float64 { return r[a] - ((r[b] - r[c]) - r[d]) }
				},
				func(a, b, c, d uint8) regFn {
					return func(r *[256]float64) float64 { return float64(r[a] * ((r[b] - r[c]) - r[d])) }
				},
			},
			{
				func(a, b, c, d uint8) regFn {
					return func(r *[256]float64) float64 { return r[a] + (float64(r[b]*r[c]) - r[d]) }
				},
				func(a, b, c, d uint8) regFn {
					return func(r *[256]float64) float64 { return r[a] - (float64(r[b]*r[c]) - r[d]) }
				},
				func(a, b, c, d uint8) regFn {
					return func(r *[256]float64) float64 { return float64(r[a] * (float64(r[b]*r[c]) - r[d])) }
				},
			},
		},
		{
			{
				func(a, b, c, d uint8) regFn {
					return func(r *[256]float64) float64 { return r[a] + float64((r[b]+r[c])*r[d]) }
				},
				func(a, b, c, d uint8) regFn {
					return func(r *[256]float64) float64 { return r[a] - float64((r[b]+r[c])*r[d]) }
				},
				func(a, b, c, d uint8) regFn {
					return func(r *[256]float64) float64 { return float64(r[a] * float64((r[b]+r[c])*r[d])) }
				},
			},
			{
				func(a, b, c, d uint8) regFn {
					return func(r *[256]float64) float64 { return r[a] + float64((r[b]-r[c])*r[d]) }
				},
				func(a, b, c, d uint8) regFn {
					return func(r *[256]float64) float64 { return r[a] - float64((r[b]-r[c])*r[d]) }
				},
				func(a, b, c, d uint8) regFn {
					return func(r *[256]float64) float64 { return float64(r[a] * float64((r[b]-r[c])*r[d])) }
				},
			},
			{
				func(a, b, c, d uint8) regFn {
					return func(r *[256]float64) float64 { return r[a] + float64(float64(r[b]*r[c])*r[d]) }
				},
				func(a, b, c, d uint8) regFn {
					return func(r *[256]float64) float64 { return r[a] - float64(float64(r[b]*r[c])*r[d]) }
				},
				func(a, b, c, d uint8) regFn {
					return func(r *[256]float64) float64 { return float64(r[a] * float64(float64(r[b]*r[c])*r[d])) }
				},
			},
		},
	},
	{
		{
			{
				func(a, b, c, d uint8) regFn {
					return func(r *[256]float64) float64 { return r[a] + (r[b] + (r[c] + r[d])) }
				},
				func(a, b, c, d uint8) regFn {
					return func(r *[256]float64) float64 { return r[a] - (r[b] + (r[c] + r[d])) }
				},
				func(a, b, c, d uint8) regFn {
					return func(r *[256]float64) float64 { return float64(r[a] * (r[b] + (r[c] + r[d]))) }
				},
			},
			{
				func(a, b, c, d uint8) regFn {
					return func(r *[256]float64) float64 { return r[a] + (r[b] + (r[c] - r[d])) }
				},
				func(a, b, c, d uint8) regFn {
					return func(r *[256]float64) float64 { return r[a] - (r[b] + (r[c] - r[d])) }
				},
				func(a, b, c, d uint8) regFn {
					return func(r *[256]float64) float64 { return float64(r[a] * (r[b] + (r[c] - r[d]))) }
				},
			},
			{
				func(a, b, c, d uint8) regFn {
					return func(r *[256]float64) float64 { return r[a] + (r[b] + float64(r[c]*r[d])) }
				},
				func(a, b, c, d uint8) regFn {
					return func(r *[256]float64) float64 { return r[a] - (r[b] + float64(r[c]*r[d])) }
				},
				func(a, b, c, d uint8) regFn {
					return func(r *[256]float64) float64 { return float64(r[a] * (r[b] + float64(r[c]*r[d]))) }
				},
			},
		},
		{
			{
				func(a, b, c, d uint8) regFn {
					return func(r *[256]float64) float64 { return r[a] + (r[b] - (r[c] + r[d])) }
				},
				func(a, b, c, d uint8) regFn {
					return func(r *[256]float64) float64 { return r[a] - (r[b] - (r[c] + r[d])) }
				},
				func(a, b, c, d uint8) regFn {
					return func(r *[256]float64) float64 { return float64(r[a] * (r[b] - (r[c] + r[d]))) }
				},
			},
			{
				func(a, b, c, d uint8) regFn {
					return func(r *[256]float64) float64 { return r[a] + (r[b] - (r[c] - r[d])) }
				},
				func(a, b, c, d uint8) regFn {
					return func(r *[256]float64) float64 { return r[a] - (r[b] - (r[c] - r[d])) }
				},
				func(a, b, c, d uint8) regFn {
					return func(r *[256]float64) float64 { return float64(r[a] * (r[b] - (r[c] - r[d]))) }
				},
			},
			{
				func(a, b, c, d uint8) regFn {
					return func(r *[256]float64) float64 { return r[a] + (r[b] - float64(r[c]*r[d])) }
				},
				func(a, b, c, d uint8) regFn {
					return func(r *[256]float64) float64 { return r[a] - (r[b] - float64(r[c]*r[d])) }
				},
				func(a, b, c, d uint8) regFn {
					return func(r *[256]float64) float64 { return float64(r[a] * (r[b] - float64(r[c]*r[d]))) }
				},
			},
		},
		{
			{
				func(a, b, c, d uint8) regFn {
					return func(r *[256]float64) float64 { return r[a] + float64(r[b]*(r[c]+r[d])) }
				},
				func(a, b, c, d uint8) regFn {
					return func(r *[256]float64) float64 { return r[a] - float64(r[b]*(r[c]+r[d])) }
				},
				func(a, b, c, d uint8) regFn {
					return func(r *[256]float64) float64 { return float64(r[a] * float64(r[b]*(r[c]+r[d]))) }
				},
			},
			{
				func(a, b, c, d uint8) regFn {
					return func(r *[256]float64) float64 { return r[a] + float64(r[b]*(r[c]-r[d])) }
				},
				func(a, b, c, d uint8) regFn {
					return func(r *[256]float64) float64 { return r[a] - float64(r[b]*(r[c]-r[d])) }
				},
				func(a, b, c, d uint8) regFn {
					return func(r *[256]float64) float64 { return float64(r[a] * float64(r[b]*(r[c]-r[d]))) }
				},
			},
			{
				func(a, b, c, d uint8) regFn {
					return func(r *[256]float64) float64 { return r[a] + float64(r[b]*float64(r[c]*r[d])) }
				},
				func(a, b, c, d uint8) regFn {
					return func(r *[256]float64) float64 { return r[a] - float64(r[b]*float64(r[c]*r[d])) }
				},
				func(a, b, c, d uint8) regFn {
					return func(r *[256]float64) float64 { return float64(r[a] * float64(r[b]*float64(r[c]*r[d]))) }
				},
			},
		},
	},
}
