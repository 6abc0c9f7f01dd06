package integrate

import "math"

// batchBlock is one block of a batch: its members' vectors, component-major
// (component i of member k at [i*m+k]), and its field.
type batchBlock struct {
	m, n, first int // members, dimension, index of the first member
	f           BatchFunc

	y, f0, y1, f1, yPrev, fPrev []float64
	k2, k3, k4, k5, k6, ys      []float64
	ysti, pw, ew                []float64
	coef                        []float64 // the last step's dense output, 5 vectors
	sum                         []float64 // per member: err² of the last attempt

	e2     float64 // the largest finite err² of the last attempt
	nonFin int     // a member whose err² was NaN or Inf, or -1
}

func newBatchBlock(m, n, first int, f BatchFunc) *batchBlock {
	s := m * n
	buf := make([]float64, 20*s+m)
	b := &batchBlock{m: m, n: n, first: first, f: f}
	vs := []*[]float64{&b.y, &b.f0, &b.y1, &b.f1, &b.yPrev, &b.fPrev, &b.k2, &b.k3, &b.k4,
		&b.k5, &b.k6, &b.ys, &b.ysti, &b.pw, &b.ew}
	for j, v := range vs {
		*v = buf[j*s : (j+1)*s : (j+1)*s]
	}
	b.coef = buf[15*s : 20*s : 20*s]
	b.sum = buf[20*s:]
	return b
}

// attempt is one Dormand–Prince 5(4) trial step of every member of the
// block from (t, y) with k1 = f0, into y1 and f1. Each member's arithmetic
// is that of dp54Work.attemptSq, operation for operation (the same
// products, rounded the same way, summed in the same order), so a member
// gets the bits it would get alone. It leaves in b.e2 the largest err² of
// the members and in b.nonFin a member whose err² is not finite (or -1).
// sqrtInvN is 1/√n.
func (b *batchBlock) attempt(t, h, sqrtInvN float64, rtol, atol []float64) {
	m, s := b.m, b.m*b.n
	y, k1, y1, k7 := b.y[:s], b.f0[:s], b.y1[:s], b.f1[:s]
	k2, k3, k4, k5, k6, ys, ysti := b.k2[:s], b.k3[:s], b.k4[:s], b.k5[:s], b.k6[:s], b.ys[:s], b.ysti[:s]
	pw, ew := b.pw[:s], b.ew[:s]
	ha21 := float64(h * dpA21)
	for i := range ys {
		ys[i] = y[i] + float64(ha21*k1[i])
	}
	ha31, ha32 := float64(h*dpA31), float64(h*dpA32)
	b.f(t+float64(dpC2*h), m, ys, k2)
	for i := range ys {
		ys[i] = (y[i] + float64(ha31*k1[i])) + float64(ha32*k2[i])
	}
	ha41, ha42, ha43 := float64(h*dpA41), float64(h*dpA42), float64(h*dpA43)
	b.f(t+float64(dpC3*h), m, ys, k3)
	for i := range ys {
		ys[i] = (y[i] + (float64(ha41*k1[i]) + float64(ha42*k2[i]))) + float64(ha43*k3[i])
	}
	ha51, ha52, ha53, ha54 := float64(h*dpA51), float64(h*dpA52), float64(h*dpA53), float64(h*dpA54)
	b.f(t+float64(dpC4*h), m, ys, k4)
	for i := range ys {
		ys[i] = (y[i] + ((float64(ha51*k1[i]) + float64(ha52*k2[i])) + float64(ha53*k3[i]))) + float64(ha54*k4[i])
	}
	ha61, ha62, ha63, ha64, ha65 := float64(h*dpA61), float64(h*dpA62), float64(h*dpA63), float64(h*dpA64), float64(h*dpA65)
	b.f(t+float64(dpC5*h), m, ys, k5)
	for i := range ysti {
		ysti[i] = (y[i] + ((float64(ha61*k1[i]) + float64(ha62*k2[i])) + (float64(ha63*k3[i]) + float64(ha64*k4[i])))) + float64(ha65*k5[i])
	}
	ha71, ha73, ha74, ha75, ha76 := float64(h*dpA71), float64(h*dpA73), float64(h*dpA74), float64(h*dpA75), float64(h*dpA76)
	th := t + h
	b.f(th, m, ysti, k6)
	hs := float64(h * sqrtInvN)
	sum := b.sum[:m]
	for k := range sum {
		sum[k] = 0
	}
	for c := 0; c < b.n; c++ {
		at, rt := atol[c], rtol[c]
		o := c * m
		yc, k1c, k3c, k4c, k5c, k6c := y[o:o+m], k1[o:o+m], k3[o:o+m], k4[o:o+m], k5[o:o+m], k6[o:o+m]
		y1c, pwc, ewc := y1[o:o+m], pw[o:o+m], ew[o:o+m]
		for k := range sum {
			yn := (yc[k] + ((float64(ha71*k1c[k]) + float64(ha73*k3c[k])) + (float64(ha74*k4c[k]) + float64(ha75*k5c[k])))) + float64(ha76*k6c[k])
			y1c[k] = yn
			sum[k] += yn - yn // 0, or NaN for a NaN or Inf in y1
			ay, ay1 := math.Abs(yc[k]), math.Abs(yn)
			if ay1 > ay {
				ay = ay1
			}
			wt := hs / (at + float64(rt*ay)) // h/(sk·√n)
			pe := ((float64(dpE1*k1c[k]) + float64(dpE3*k3c[k])) + (float64(dpE4*k4c[k]) + float64(dpE5*k5c[k]))) + float64(dpE6*k6c[k])
			pwc[k] = float64(pe * wt)
			ewc[k] = float64(dpE7 * wt)
		}
	}
	b.f(th, m, y1, k7)
	for c := 0; c < b.n; c++ {
		o := c * m
		pwc, ewc, k7c := pw[o:o+m], ew[o:o+m], k7[o:o+m]
		for k := range sum {
			r := pwc[k] + float64(ewc[k]*k7c[k]) // e_i/(sk_i·√n)
			sum[k] += float64(r * r)
		}
	}
	e2, bad := 0.0, -1
	for k, v := range sum {
		if !(v <= math.MaxFloat64) { // NaN or +Inf
			if bad < 0 {
				bad = k
			}
			continue
		}
		if v > e2 {
			e2 = v
		}
	}
	b.e2, b.nonFin = e2, bad
}

// accept rotates the block's buffers after an accepted step, as
// Stepper.accept does.
func (b *batchBlock) accept() {
	b.yPrev, b.y, b.y1 = b.y, b.y1, b.yPrev
	b.fPrev, b.f0, b.f1 = b.f0, b.f1, b.fPrev
}

// dense writes Shampine's continuous extension of the last accepted step
// (size h) into b.coef, with the arithmetic of dp54Work.dense.
func (b *batchBlock) dense(h float64) {
	s := b.m * b.n
	y, k1, y1, k7 := b.yPrev[:s], b.fPrev[:s], b.y[:s], b.f0[:s]
	k3, k4, k5, k6 := b.k3[:s], b.k4[:s], b.k5[:s], b.k6[:s]
	r1, r2, r3, r4, r5 := b.coef[:s], b.coef[s:2*s], b.coef[2*s:3*s], b.coef[3*s:4*s], b.coef[4*s:5*s]
	for i := range y {
		yd := y1[i] - y[i]
		bspl := float64(h*k1[i]) - yd
		r1[i] = y[i]
		r2[i] = yd
		r3[i] = bspl
		r4[i] = yd - float64(h*k7[i]) - bspl
		r5[i] = float64(h * (float64(dpD1*k1[i]) + float64(dpD3*k3[i]) + float64(dpD4*k4[i]) + float64(dpD5*k5[i]) + float64(dpD6*k6[i]) + float64(dpD7*k7[i])))
	}
}

// interp writes the block's members at theta of the last step into dst,
// member-major (member k's component i at dst[(first+k)*n+i]), with the
// arithmetic of dp54Work.interp.
func (b *batchBlock) interp(theta float64, dst []float64) {
	s, m, n := b.m*b.n, b.m, b.n
	r1, r2, r3, r4, r5 := b.coef[:s], b.coef[s:2*s], b.coef[2*s:3*s], b.coef[3*s:4*s], b.coef[4*s:5*s]
	t1 := 1 - theta
	for c := 0; c < n; c++ {
		for k := 0; k < m; k++ {
			i := c*m + k
			dst[(b.first+k)*n+c] = r1[i] + float64(theta*(r2[i]+float64(t1*(r3[i]+float64(theta*(r4[i]+float64(t1*r5[i])))))))
		}
	}
}

// gather writes the block's current states into dst, member-major.
func (b *batchBlock) gather(dst []float64) {
	m, n := b.m, b.n
	for c := 0; c < n; c++ {
		for k := 0; k < m; k++ {
			dst[(b.first+k)*n+c] = b.y[c*m+k]
		}
	}
}
